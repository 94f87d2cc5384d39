package lp

import (
	"errors"
	"fmt"
	"math"
)

// ErrBasis is wrapped when a basis does not have one basic variable per
// row or its matrix is singular.
var ErrBasis = errors.New("basis is not square and nonsingular")

// basisLU factorises the basis matrix of a basis of p as given (unscaled):
// the basic columns of [A -I].
type basisLU struct {
	p    *Problem
	head []int // basic variable at each position
	pos  []int // position of each variable, -1 when nonbasic
	f    factor
}

func newBasisLU(p *Problem, basis []VarStatus) (*basisLU, error) {
	n, m := p.Cols, p.Rows
	if len(basis) != n+m {
		return nil, fmt.Errorf("%w: %d statuses for %d columns and %d rows", ErrBasis, len(basis), n, m)
	}
	b := &basisLU{p: p, pos: make([]int, n+m)}
	for k, st := range basis {
		b.pos[k] = -1
		if st == Basic {
			b.pos[k] = len(b.head)
			b.head = append(b.head, k)
		}
	}
	if len(b.head) != m {
		return nil, fmt.Errorf("%w: %d basic variables for %d rows", ErrBasis, len(b.head), m)
	}
	start, idx, val := basisMatrix(b.head, n, p.Start, p.Index, p.Value, nil, nil, nil, nil, nil)
	if bad, _ := b.f.factorize(m, start, idx, val); len(bad) > 0 {
		return nil, fmt.Errorf("%w: %d dependent basic columns", ErrBasis, len(bad))
	}
	return b, nil
}

// solve returns z with B z = rhs (rhs by row, not modified; z by position).
func (b *basisLU) solve(rhs []float64) []float64 {
	a := append([]float64(nil), rhs...)
	z := make([]float64, len(rhs))
	b.f.ftran(a, z)
	return z
}

// solveT returns y with Bᵀ y = rhs (rhs by position, not modified; y by row).
func (b *basisLU) solveT(rhs []float64) []float64 {
	e := append([]float64(nil), rhs...)
	y := make([]float64, len(rhs))
	b.f.btran(e, y)
	return y
}

// column writes variable k's column of [A -I] into w (by row, cleared first).
func (b *basisLU) column(k int, w []float64) {
	clear(w)
	p := b.p
	if k >= p.Cols {
		w[k-p.Cols] = -1
		return
	}
	for q := p.Start[k]; q < p.Start[k+1]; q++ {
		w[p.Index[q]] = p.Value[q]
	}
}

// Ranging is sensitivity analysis on an optimal basis: over which changes
// of one cost, or of one row or column bound, the basis stays optimal.
// These are the textbook ratio tests on the final tableau (Chvátal 1983,
// Linear Programming, ch. 10 on sensitivity analysis; Bazaraa, Jarvis &
// Sherali, Linear Programming and Network Flows, on cost and right-hand
// side ranging), on the computational form with bounded variables.
//
// The ratio tests run on the problem scaled as Scaled scales it for an
// engine (their thresholds are absolute), and the ranges are unscaled.
type Ranging struct {
	p      *Problem // scaled
	sol    *Solution
	sc     scaling
	b      *basisLU
	w, rho []float64
	row    []float64
}

// NewRanging prepares ranging for an optimal solution of p that has a
// basis.
func NewRanging(p *Problem, sol *Solution) (*Ranging, error) {
	if sol == nil || sol.Status != Optimal || sol.Basis == nil {
		return nil, fmt.Errorf("%w: no optimal basis to range", ErrBasis)
	}
	if err := p.Check(); err != nil {
		return nil, err
	}
	if len(sol.X) != p.Cols || len(sol.D) != p.Cols || len(sol.Y) != p.Rows || len(sol.RowAct) != p.Rows {
		return nil, fmt.Errorf("%w: the answer does not match %d columns and %d rows", ErrBadProblem, p.Cols, p.Rows)
	}
	g := &Ranging{p: &Problem{}}
	g.sc.set(p, nil)
	g.sc.apply(p, g.p)
	g.sol = g.sc.scaleAnswer(sol)
	b, err := newBasisLU(g.p, sol.Basis)
	if err != nil {
		return nil, err
	}
	m := p.Rows
	g.b, g.w, g.rho, g.row = b, make([]float64, m), make([]float64, m), make([]float64, p.Cols+m)
	return g, nil
}

// reduced is the reduced cost of variable k (a row logical's is its dual).
func (g *Ranging) reduced(k int) float64 {
	if k >= g.p.Cols {
		return g.sol.Y[k-g.p.Cols]
	}
	return g.sol.D[k]
}

// CostRange is the interval [lo, hi] of changes δ to column j's cost over
// which the basis stays optimal (±Inf when unlimited). A nonbasic column
// at its lower bound stays out while d_j + δ >= 0, at its upper bound
// while d_j + δ <= 0. For a basic column at position p every nonbasic k
// must keep the sign of d_k - δ·α_pk, α_p = e_pᵀB⁻¹[A -I].
func (g *Ranging) CostRange(j int) (lo, hi float64) {
	lo, hi = g.costRange(j)
	f := g.sc.obj * g.sc.cs[j]
	return lo / f, hi / f
}

// costRange is CostRange on the scaled problem.
func (g *Ranging) costRange(j int) (lo, hi float64) {
	const eps = 1e-9
	lo, hi = math.Inf(-1), math.Inf(1)
	switch g.sol.Basis[j] {
	case AtLower:
		return -g.sol.D[j], hi
	case AtUpper:
		return lo, -g.sol.D[j]
	case Fixed:
		return lo, hi
	case Free:
		return 0, 0
	}
	clear(g.w)
	g.w[g.b.pos[j]] = 1
	g.b.f.btran(g.w, g.rho)
	p := g.p
	for k, st := range g.sol.Basis {
		if st == Basic || st == Fixed {
			continue
		}
		var a float64
		if k >= p.Cols {
			a = -g.rho[k-p.Cols]
		} else {
			for q := p.Start[k]; q < p.Start[k+1]; q++ {
				a += g.rho[p.Index[q]] * p.Value[q]
			}
		}
		if math.Abs(a) <= eps {
			continue
		}
		ratio := g.reduced(k) / a
		switch st {
		case AtLower: // need d_k - δa >= 0
			if a > 0 {
				hi = min(hi, ratio)
			} else {
				lo = max(lo, ratio)
			}
		case AtUpper: // need d_k - δa <= 0
			if a > 0 {
				lo = max(lo, ratio)
			} else {
				hi = min(hi, ratio)
			}
		case Free: // need d_k - δa = 0
			lo, hi = max(lo, 0), min(hi, 0)
		}
	}
	// A degenerate basis can hand a tiny wrong-signed ratio; never exclude
	// the current cost itself.
	return min(lo, 0), max(hi, 0)
}

// CostDirectionRange is the interval [lo, hi] of steps t along a direction
// of cost change, Obj + t·dir (len(dir) = Cols), over which the basis stays
// optimal (±Inf when unlimited): the parametric objective function of Gass
// & Saaty (Naval Res. Logist. Q. 2, 1955, 39), on the final tableau. With
// y = B⁻ᵀ dir_B, every nonbasic variable k's reduced cost moves by t·δ_k,
// δ_k = dir_k - yᵀa_k (a_k its column of [A -I]; a row logical has no cost),
// and must keep its sign. CostRange(j) is the case dir = e_j.
//
// The direction is scaled as the costs are (the ratio tests run on the
// scaled problem): Obj_s + t·dir_s is the scaled Obj + t·dir, so t needs
// no unscaling.
func (g *Ranging) CostDirectionRange(dir []float64) (lo, hi float64) {
	const eps = 1e-9
	lo, hi = math.Inf(-1), math.Inf(1)
	p := g.p
	scaled := make([]float64, len(dir))
	for k, v := range dir {
		scaled[k] = v * g.sc.obj * g.sc.cs[k]
	}
	dir = scaled
	clear(g.w)
	for k, st := range g.sol.Basis {
		if st == Basic && k < p.Cols {
			g.w[g.b.pos[k]] = dir[k]
		}
	}
	g.b.f.btran(g.w, g.rho)
	for k, st := range g.sol.Basis {
		if st == Basic || st == Fixed {
			continue
		}
		var delta float64
		if k >= p.Cols {
			delta = g.rho[k-p.Cols]
		} else {
			delta = dir[k]
			for q := p.Start[k]; q < p.Start[k+1]; q++ {
				delta -= g.rho[p.Index[q]] * p.Value[q]
			}
		}
		if math.Abs(delta) <= eps {
			continue
		}
		ratio := -g.reduced(k) / delta
		switch st {
		case AtLower: // need d_k + tδ >= 0
			if delta < 0 {
				hi = min(hi, ratio)
			} else {
				lo = max(lo, ratio)
			}
		case AtUpper: // need d_k + tδ <= 0
			if delta > 0 {
				hi = min(hi, ratio)
			} else {
				lo = max(lo, ratio)
			}
		case Free: // need d_k + tδ = 0
			lo, hi = max(lo, 0), min(hi, 0)
		}
	}
	// As in CostRange: never exclude the current costs themselves.
	return min(lo, 0), max(hi, 0)
}

// RowBoundRange is the interval of values of row i's lower bound (upper
// false) or upper bound (upper true) over which the basis stays optimal,
// so that the row's dual Y[i] prices every change within it. When the
// row sits at that bound (its logical nonbasic there, or fixed), moving
// it moves the basic variables along B⁻¹e_i and the interval ends where
// the first of them reaches a bound (the right-hand-side ranging ratio
// test). When the bound is not the one the row sits at, it is free to
// move away from the activity: [-Inf, activity] for a lower bound,
// [activity, +Inf] for an upper bound.
func (g *Ranging) RowBoundRange(i int, upper bool) (lo, hi float64) {
	lo, hi = g.boundRange(g.p.Cols+i, upper, g.sol.RowAct[i], g.p.RowLo[i], g.p.RowUp[i])
	r := g.sc.rs[i]
	return lo / r, hi / r
}

// ColBoundRange is RowBoundRange for column j's bounds.
func (g *Ranging) ColBoundRange(j int, upper bool) (lo, hi float64) {
	lo, hi = g.boundRange(j, upper, g.sol.X[j], g.p.ColLo[j], g.p.ColUp[j])
	c := g.sc.cs[j]
	return lo * c, hi * c
}

func (g *Ranging) boundRange(k int, upper bool, v, blo, bup float64) (lo, hi float64) {
	st := g.sol.Basis[k]
	active := st == Fixed || upper && st == AtUpper || !upper && st == AtLower
	if !active {
		if upper {
			return v, math.Inf(1)
		}
		return math.Inf(-1), v
	}
	cur := blo
	if upper {
		cur = bup
	}
	// Raising the nonbasic variable k by t changes x_B by -t·B⁻¹a_k.
	g.b.column(k, g.w)
	z := g.b.solve(g.w)
	tlo, thi := math.Inf(-1), math.Inf(1)
	p := g.p
	for r, kb := range g.b.head {
		a := z[r]
		if math.Abs(a) <= 1e-12 {
			continue
		}
		var x, l, u float64
		if kb >= p.Cols {
			x, l, u = g.sol.RowAct[kb-p.Cols], p.RowLo[kb-p.Cols], p.RowUp[kb-p.Cols]
		} else {
			x, l, u = g.sol.X[kb], p.ColLo[kb], p.ColUp[kb]
		}
		// x - t·a within [l, u]
		if a > 0 {
			thi = min(thi, (x-l)/a)
			tlo = max(tlo, (x-u)/a)
		} else {
			thi = min(thi, (x-u)/a)
			tlo = max(tlo, (x-l)/a)
		}
	}
	tlo, thi = min(tlo, 0), max(thi, 0)
	lo, hi = cur+tlo, cur+thi
	// The other bound caps the move unless the variable is fixed (both
	// bounds move together then).
	if st != Fixed {
		if upper {
			lo = max(lo, blo)
		} else {
			hi = min(hi, bup)
		}
	}
	return lo, hi
}
