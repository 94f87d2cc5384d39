package optimise

import (
	"errors"
	"math"
)

// denseLU is an LU factorisation with partial (row) pivoting, PA = LU, of a
// small dense square matrix, by Gaussian elimination (Golub & Van Loan,
// Matrix Computations, the LU with partial pivoting algorithm; reference
// from memory; checked against gonum's mat.LU in lu_test.go). Blend bases are at most a
// few dozen rows, where this beats a general library call.
type denseLU struct {
	n   int
	a   []float64 // row-major; L below the diagonal (unit), U on and above
	piv []int     // row i of PA is row piv[i] of A
}

var errSingular = errors.New("matrix is singular")

// factor factorises the n x n row-major matrix a, which it takes over.
func (f *denseLU) factor(a []float64, n int) error {
	f.n, f.a = n, a
	f.piv = make([]int, n)
	var big float64
	for _, v := range a {
		big = math.Max(big, math.Abs(v))
	}
	for i := range f.piv {
		f.piv[i] = i
	}
	for k := 0; k < n; k++ {
		p, pv := k, math.Abs(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := math.Abs(a[i*n+k]); v > pv {
				p, pv = i, v
			}
		}
		if pv <= 1e-13*big || pv == 0 {
			return errSingular
		}
		if p != k {
			rk, rp := a[k*n:(k+1)*n], a[p*n:(p+1)*n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
			f.piv[k], f.piv[p] = f.piv[p], f.piv[k]
		}
		d := a[k*n+k]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k] / d
			if l == 0 {
				continue
			}
			a[i*n+k] = l
			ri, rk := a[i*n:(i+1)*n], a[k*n:(k+1)*n]
			for j := k + 1; j < n; j++ {
				ri[j] -= l * rk[j]
			}
		}
	}
	return nil
}

// solve returns x with A x = b.
func (f *denseLU) solve(b []float64) []float64 {
	n, a := f.n, f.a
	x := make([]float64, n)
	for i, p := range f.piv {
		x[i] = b[p]
	}
	for i := 0; i < n; i++ { // L y = P b
		s := x[i]
		for j := 0; j < i; j++ {
			s -= a[i*n+j] * x[j]
		}
		x[i] = s
	}
	for i := n - 1; i >= 0; i-- { // U x = y
		s := x[i]
		for j := i + 1; j < n; j++ {
			s -= a[i*n+j] * x[j]
		}
		x[i] = s / a[i*n+i]
	}
	return x
}

// solveT returns x with Aᵀ x = b: Uᵀ z = b, Lᵀ w = z, x = Pᵀ w.
func (f *denseLU) solveT(b []float64) []float64 {
	x := make([]float64, f.n)
	f.solveTTo(x, make([]float64, f.n), b)
	return x
}

// solveTTo is solveT writing x into x, with w as scratch (both len n, not
// aliasing b).
func (f *denseLU) solveTTo(x, w, b []float64) {
	n, a := f.n, f.a
	copy(w, b)
	for i := 0; i < n; i++ {
		s := w[i]
		for j := 0; j < i; j++ {
			s -= a[j*n+i] * w[j]
		}
		w[i] = s / a[i*n+i]
	}
	for i := n - 1; i >= 0; i-- {
		s := w[i]
		for j := i + 1; j < n; j++ {
			s -= a[j*n+i] * w[j]
		}
		w[i] = s
	}
	for i, p := range f.piv {
		x[p] = w[i]
	}
}
