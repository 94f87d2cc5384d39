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
