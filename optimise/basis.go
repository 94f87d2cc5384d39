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

// alpha is entry k of tableau row rho (rho = B⁻ᵀ e_p): rhoᵀ times column k of
// [A -I].
func (f *basisFactor) alpha(rho []float64, k int) float64 {
	m := f.m
	if k >= m.nCols {
		return -rho[k-m.nCols]
	}
	var s float64
	for i, r := range rho {
		if r != 0 {
			s += r * m.a[i*m.nCols+k]
		}
	}
	return s
}

// costRange is the interval [lo, hi] of changes δ to the objective
// coefficient of column j over which the basis stays optimal.
//
// A nonbasic column at its lower bound stays out while d_j + δ >= 0, at its
// upper bound while d_j + δ <= 0. For a basic column in position p, every
// nonbasic k keeps the right sign of d_k - δ·α_pk (α_p = e_pᵀB⁻¹[A -I]),
// the textbook ratio test of cost ranging (Chvátal 1983, sensitivity
// analysis).
func (f *basisFactor) costRange(j int, basis []varState, d, y []float64) (lo, hi float64, err error) {
	const eps = 1e-9
	lo, hi = math.Inf(-1), math.Inf(1)
	m := f.m
	switch basis[j] {
	case stLower:
		return -d[j], hi, nil
	case stUpper:
		return lo, -d[j], nil
	case stFixed:
		return lo, hi, nil
	case stFree:
		return 0, 0, nil
	}
	e := make([]float64, m.nRows)
	e[f.pos[j]] = 1
	rho, err := f.solveT(e)
	if err != nil {
		return 0, 0, err
	}
	for k, s := range basis {
		if s == stBasic || s == stFixed {
			continue
		}
		a := f.alpha(rho, k)
		if math.Abs(a) <= eps {
			continue
		}
		var dk float64
		if k < m.nCols {
			dk = d[k]
		} else {
			dk = y[k-m.nCols]
		}
		ratio := dk / a
		switch s {
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
