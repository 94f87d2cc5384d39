package optimise

import (
	"fmt"
	"math"
)

// ranger does cost ranging for the columns of one optimal basis, working on
// the part of the basis that is not a slack. With the rows split into T
// (rows whose logical is nonbasic: the tight rows) and L (rows whose logical
// is basic) and the basic structural columns S, the basis of [A  -I] is
//
//	B = | A_TS   0 |
//	    | A_LS  -I |
//
// with A_TS square (|T| = |S|). A tableau row of a basic structural column
// at position p of S is e_pᵀB⁻¹[A -I]; its multiplier vector ρ = B⁻ᵀe_p is
// zero on L and equals row p of A_TS⁻¹ on T. So ranging every stock costs
// one LU of the |S|x|S| matrix A_TS, which in a blend LP with few binding
// limits is much smaller than B, one solve with A_TSᵀ per basic stock and a
// pass over the nonbasic variables' columns restricted to T (the usual
// product-form reasoning on a block-triangular basis; Chvátal, Linear
// Programming (1983), on the revised simplex method and sensitivity
// analysis, chapters from memory).
type ranger struct {
	basis []varState
	d     []float64
	pos   []int // position in S of each basic structural column, -1 otherwise
	lu    denseLU
	// The nonbasic variables that restrict the ranges (not fixed), with
	// their states, reduced costs (y_i for a row logical) and columns on T.
	st        []varState
	dk        []float64
	off       []int     // offset of a structural's column in colT; -1 for a logical
	tix       []int     // a logical's row position in T
	colT      []float64 // nonbasic structural columns restricted to T, one after another
	rho, e, w []float64 // scratch, len |S|
}

// newRanger prepares cost ranging for the optimal basis of m with reduced
// costs d and row duals y. It fails when the basis does not have one basic
// variable per row or A_TS is singular.
func newRanger(m *model, basis []varState, d, y []float64, sc *scratch) (*ranger, error) {
	n, r := m.nCols, m.nRows
	var nbs, ns, nl, nbl int
	for k, s := range basis {
		switch {
		case s == stBasic && k < n:
			ns++
		case s == stBasic:
			nl++
		case s != stFixed && k < n:
			nbs++
		case s != stFixed:
			nbl++
		}
	}
	if ns+nl != r {
		return nil, fmt.Errorf("%w: %d basic variables for %d rows", errBasis, ns+nl, r)
	}
	fl, ints, st := sc.rangerArrays(ns*ns+nbs*ns+3*ns+nbs+nbl, n+r+2*(nbs+nbl), nbs+nbl)
	rg := &ranger{basis: basis, d: d, pos: ints[:n:n], st: st}
	ints = ints[n:]
	tpos := ints[:r:r] // position of each row in T, -1 on L
	rg.off, rg.tix = ints[r:r:r+nbs+nbl], ints[r+nbs+nbl:r+nbs+nbl]
	t := 0
	for i := 0; i < r; i++ {
		tpos[i] = -1
		if basis[n+i] != stBasic {
			tpos[i] = t
			t++
		}
	}
	a, fl := fl[:ns*ns], fl[ns*ns:]
	rg.colT, fl = fl[:0:nbs*ns], fl[nbs*ns:]
	rg.rho, rg.e, rg.w, fl = fl[:ns], fl[ns:2*ns], fl[2*ns:3*ns], fl[3*ns:]
	rg.dk = fl[:0]
	p := 0
	for j := 0; j < n; j++ {
		rg.pos[j] = -1
		if basis[j] == stBasic {
			rg.pos[j] = p
			p++
		}
	}
	// a = A_TS, row-major over T x S.
	for i, ti := range tpos {
		if ti < 0 {
			continue
		}
		row := m.row(i)
		for j, pj := range rg.pos {
			if pj >= 0 {
				a[ti*ns+pj] = row[j]
			}
		}
	}
	for k, s := range basis {
		if s == stBasic || s == stFixed {
			continue
		}
		rg.st = append(rg.st, s)
		if k < n {
			rg.off = append(rg.off, len(rg.colT))
			rg.tix = append(rg.tix, -1)
			for i, ti := range tpos {
				if ti >= 0 { // T in row order: this entry lands at off+ti
					rg.colT = append(rg.colT, m.a[i*n+k])
				}
			}
			rg.dk = append(rg.dk, d[k])
		} else {
			rg.off = append(rg.off, -1)
			rg.tix = append(rg.tix, tpos[k-n])
			rg.dk = append(rg.dk, y[k-n])
		}
	}
	if ns > 0 {
		if err := rg.lu.factor(a, ns); err != nil {
			return nil, fmt.Errorf("%w: %w", errBasis, err)
		}
	}
	return rg, nil
}

// costRange is the interval [lo, hi] of changes δ to the objective
// coefficient of column j over which the basis stays optimal.
//
// A nonbasic column at its lower bound stays out while d_j + δ >= 0, at its
// upper bound while d_j + δ <= 0. For a basic column in position p, every
// nonbasic k keeps the right sign of d_k - δ·α_pk (α_p = e_pᵀB⁻¹[A -I]),
// the textbook ratio test of cost ranging (Chvátal 1983, sensitivity
// analysis).
func (r *ranger) costRange(j int) (lo, hi float64) {
	const eps = 1e-9
	lo, hi = math.Inf(-1), math.Inf(1)
	switch r.basis[j] {
	case stLower:
		return -r.d[j], hi
	case stUpper:
		return lo, -r.d[j]
	case stFixed:
		return lo, hi
	case stFree:
		return 0, 0
	}
	clear(r.e)
	r.e[r.pos[j]] = 1
	r.lu.solveTTo(r.rho, r.w, r.e)
	rho := r.rho
	for t, st := range r.st {
		var a float64
		if off := r.off[t]; off >= 0 {
			for i, v := range r.colT[off : off+len(rho)] {
				a += rho[i] * v
			}
		} else {
			a = -rho[r.tix[t]]
		}
		if math.Abs(a) <= eps {
			continue
		}
		ratio := r.dk[t] / a
		switch st {
		case stLower: // need dk - δa >= 0
			if a > 0 {
				hi = math.Min(hi, ratio)
			} else {
				lo = math.Max(lo, ratio)
			}
		case stUpper: // need dk - δa <= 0
			if a > 0 {
				lo = math.Max(lo, ratio)
			} else {
				hi = math.Min(hi, ratio)
			}
		case stFree: // need dk - δa = 0
			lo, hi = math.Max(lo, 0), math.Min(hi, 0)
		}
	}
	// A degenerate basis can hand a tiny wrong-signed ratio; never exclude
	// the current price itself.
	lo, hi = math.Min(lo, 0), math.Max(hi, 0)
	return lo, hi
}
