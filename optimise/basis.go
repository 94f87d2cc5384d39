package optimise

import (
	"errors"
	"fmt"
	"math"
)

// classify names the state of a variable with value v and bounds lo..up:
// basic when the solver says so, otherwise the bound it sits at.
func classify(basic bool, v, lo, up float64) varState {
	switch {
	case basic:
		return stBasic
	case lo == up:
		return stFixed
	case math.IsInf(lo, -1) && math.IsInf(up, 1):
		return stFree
	case math.IsInf(up, 1):
		return stLower
	case math.IsInf(lo, -1):
		return stUpper
	case math.Abs(v-lo) <= math.Abs(v-up):
		return stLower
	default:
		return stUpper
	}
}

// basisFactor is an LU factorisation of the basis matrix B of a bounded LP
// written as [A  -I]·(x, r) = 0, where r are the row logicals (activities).
// B's columns are the basic structurals' columns of A and -e_i for each basic
// logical i. It yields duals (Bᵀy = c_B) and tableau rows (e_pᵀB⁻¹[A -I])
// for cost ranging; see e.g. Chvátal, Linear Programming (1983), the
// chapter on sensitivity analysis (chapter number from memory: 10)
// (sensitivity analysis) for both formulas.
type basisFactor struct {
	m     *model
	basic []int // basic variable of each basis position (0..nCols+nRows-1)
	pos   []int // basis position of each variable, -1 when nonbasic
	lu    denseLU
}

var errBasis = errors.New("basis is not square and nonsingular")

func newBasisFactor(m *model, basis []varState) (*basisFactor, error) {
	n, r := m.nCols, m.nRows
	f := &basisFactor{m: m, pos: make([]int, n+r)}
	for k, s := range basis {
		f.pos[k] = -1
		if s == stBasic {
			f.pos[k] = len(f.basic)
			f.basic = append(f.basic, k)
		}
	}
	if len(f.basic) != r {
		return nil, fmt.Errorf("%w: %d basic variables for %d rows", errBasis, len(f.basic), r)
	}
	b := make([]float64, r*r)
	for p, k := range f.basic {
		if k < n {
			for i := 0; i < r; i++ {
				b[i*r+p] = m.at(i, k)
			}
		} else {
			b[(k-n)*r+p] = -1
		}
	}
	if err := f.lu.factor(b, r); err != nil {
		return nil, fmt.Errorf("%w: %w", errBasis, err)
	}
	return f, nil
}

// solveT solves Bᵀ z = rhs.
func (f *basisFactor) solveT(rhs []float64) ([]float64, error) { return f.lu.solveT(rhs), nil }

// solve solves B z = rhs.
func (f *basisFactor) solve(rhs []float64) ([]float64, error) { return f.lu.solve(rhs), nil }

// duals computes y from Bᵀ y = c_B (logicals cost nothing) and the reduced
// costs d = c - Aᵀ y of every column.
func (f *basisFactor) duals() (y, d []float64, err error) {
	m := f.m
	cb := make([]float64, m.nRows)
	for p, k := range f.basic {
		if k < m.nCols {
			cb[p] = m.obj[k]
		}
	}
	y, err = f.solveT(cb)
	if err != nil {
		return nil, nil, err
	}
	d = make([]float64, m.nCols)
	for j := range d {
		d[j] = m.obj[j]
	}
	for i := 0; i < m.nRows; i++ {
		if y[i] == 0 {
			continue
		}
		for j, v := range m.row(i) {
			d[j] -= y[i] * v
		}
	}
	return y, d, nil
}

// ranger does cost ranging for the columns of one optimal basis. It lists
// the nonbasic variables that restrict the ranges once, with their reduced
// costs and their columns of [A -I] laid out contiguously, so that ranging
// every stock costs one Bᵀ solve and one pass over that list per basic
// stock.
type ranger struct {
	f     *basisFactor
	basis []varState
	d     []float64
	k     []int      // nonbasic variables that are not fixed
	st    []varState // their states
	dk    []float64  // their reduced costs (y_i for a row logical)
	col   []int      // offset of their column of A in data; -1 for a row logical
	data  []float64  // the nonbasic structural columns, one after another
	e     []float64  // scratch unit vector
}

func (f *basisFactor) newRanger(basis []varState, d, y []float64) *ranger {
	m := f.m
	nb, ns := 0, 0
	for k, s := range basis {
		if s != stBasic && s != stFixed {
			nb++
			if k < m.nCols {
				ns++
			}
		}
	}
	r := &ranger{f: f, basis: basis, d: d, e: make([]float64, m.nRows),
		k: make([]int, 0, nb), st: make([]varState, 0, nb), dk: make([]float64, 0, nb), col: make([]int, 0, nb),
		data: make([]float64, 0, ns*m.nRows)}
	for k, s := range basis {
		if s == stBasic || s == stFixed {
			continue
		}
		r.k = append(r.k, k)
		r.st = append(r.st, s)
		if k < m.nCols {
			r.col = append(r.col, len(r.data))
			for i := 0; i < m.nRows; i++ {
				r.data = append(r.data, m.a[i*m.nCols+k])
			}
			r.dk = append(r.dk, d[k])
		} else {
			r.col = append(r.col, -1)
			r.dk = append(r.dk, y[k-m.nCols])
		}
	}
	return r
}

// costRange is the interval [lo, hi] of changes δ to the objective
// coefficient of column j over which the basis stays optimal.
//
// A nonbasic column at its lower bound stays out while d_j + δ >= 0, at its
// upper bound while d_j + δ <= 0. For a basic column in position p, every
// nonbasic k keeps the right sign of d_k - δ·α_pk (α_p = e_pᵀB⁻¹[A -I]),
// the textbook ratio test of cost ranging (Chvátal 1983, sensitivity
// analysis).
func (r *ranger) costRange(j int) (lo, hi float64, err error) {
	const eps = 1e-9
	lo, hi = math.Inf(-1), math.Inf(1)
	switch r.basis[j] {
	case stLower:
		return -r.d[j], hi, nil
	case stUpper:
		return lo, -r.d[j], nil
	case stFixed:
		return lo, hi, nil
	case stFree:
		return 0, 0, nil
	}
	clear(r.e)
	r.e[r.f.pos[j]] = 1
	rho := r.f.lu.solveT(r.e)
	nc := r.f.m.nCols
	for t, k := range r.k {
		var a float64
		if off := r.col[t]; off >= 0 {
			for i, v := range r.data[off : off+len(rho)] {
				a += rho[i] * v
			}
		} else {
			a = -rho[k-nc]
		}
		if math.Abs(a) <= eps {
			continue
		}
		ratio := r.dk[t] / a
		switch r.st[t] {
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
	return lo, hi, nil
}
