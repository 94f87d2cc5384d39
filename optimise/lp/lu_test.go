package lp

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// basisLike is a random n x n matrix shaped like a simplex basis: some
// columns are -e_i (row logicals), the others sparse or dense structurals,
// with a strong diagonal so that it is nonsingular. It returns the matrix
// column-wise and dense row-major.
func basisLike(r *rand.Rand, n int) (start, idx []int, val, dense []float64) {
	dense = make([]float64, n*n)
	for j := 0; j < n; j++ {
		if r.IntN(3) == 0 {
			dense[j*n+j] = -1
			continue
		}
		for i := 0; i < n; i++ {
			if r.IntN(3) == 0 {
				dense[i*n+j] = r.NormFloat64()
			}
		}
		dense[j*n+j] += 4
	}
	start, idx, val = columns(n, dense)
	return start, idx, val, dense
}

func columns(n int, dense []float64) (start, idx []int, val []float64) {
	start = make([]int, n+1)
	for j := 0; j < n; j++ {
		start[j] = len(idx)
		for i := 0; i < n; i++ {
			if v := dense[i*n+j]; v != 0 {
				idx, val = append(idx, i), append(val, v)
			}
		}
	}
	start[n] = len(idx)
	return start, idx, val
}

func gonumSolve(t *testing.T, n int, dense, b []float64, trans bool) []float64 {
	t.Helper()
	var ref mat.LU
	ref.Factorize(mat.NewDense(n, n, append([]float64(nil), dense...)))
	x := mat.NewVecDense(n, nil)
	require.NoError(t, ref.SolveVecTo(x, trans, mat.NewVecDense(n, append([]float64(nil), b...))))
	return x.RawVector().Data
}

// TestFactorAgainstGonum checks FTRAN (B z = a) and BTRAN (Bᵀ y = e) of
// the sparse LU against gonum's mat.LU (a general-purpose reference
// library) on 80 seeded random basis-shaped matrices, then after each of
// 40 column replacements recorded as product-form updates, with a fresh
// factorisation whenever the eta file is due, as the simplex does.
func TestFactorAgainstGonum(t *testing.T) {
	r := rand.New(rand.NewPCG(1954, 64))
	for c := 0; c < 80; c++ {
		n := 1 + r.IntN(40)
		start, idx, val, dense := basisLike(r, n)
		var f factor
		bad, _ := f.factorize(n, start, idx, val)
		require.Empty(t, bad, "case %d", c)
		check := func(stage string) {
			b := make([]float64, n)
			for i := range b {
				b[i] = r.NormFloat64()
			}
			z := make([]float64, n)
			f.ftran(append([]float64(nil), b...), z)
			assert.InDeltaSlice(t, gonumSolve(t, n, dense, b, false), z, 1e-8, "case %d %s: ftran", c, stage)
			y := make([]float64, n)
			f.btran(append([]float64(nil), b...), y)
			assert.InDeltaSlice(t, gonumSolve(t, n, dense, b, true), y, 1e-8, "case %d %s: btran", c, stage)
		}
		check("fresh")
		for u := 0; u < 40; u++ {
			// Replace column p by a new column a: alpha = B⁻¹a, pivot alpha[p].
			p := r.IntN(n)
			a := make([]float64, n)
			for i := range a {
				if r.IntN(2) == 0 {
					a[i] = r.NormFloat64()
				}
			}
			a[p] += 3
			alpha := make([]float64, n)
			f.ftran(append([]float64(nil), a...), alpha)
			if alpha[p] > -0.5 && alpha[p] < 0.5 {
				continue // a poor pivot; the simplex would not take it
			}
			for i := 0; i < n; i++ {
				dense[i*n+p] = a[i]
			}
			if f.due() {
				start, idx, val = columns(n, dense)
				bad, _ := f.factorize(n, start, idx, val)
				require.Empty(t, bad)
			} else {
				f.update(p, alpha)
			}
			check("after updates")
		}
	}
}

// TestFactorFindsDependentColumns: a basis with a column that is a
// combination of two others (or zero) is reported with the dependent
// position and a row left without a pivot, never factorised silently.
func TestFactorFindsDependentColumns(t *testing.T) {
	r := rand.New(rand.NewPCG(6, 6))
	for c := 0; c < 40; c++ {
		n := 3 + r.IntN(20)
		_, _, _, dense := basisLike(r, n)
		p, q, s := r.IntN(n), r.IntN(n), r.IntN(n)
		for q == p {
			q = r.IntN(n)
		}
		for s == p || s == q {
			s = r.IntN(n)
		}
		for i := 0; i < n; i++ {
			dense[i*n+p] = 2*dense[i*n+q] - 0.5*dense[i*n+s]
			if c%5 == 0 {
				dense[i*n+p] = 0
			}
		}
		start, idx, val := columns(n, dense)
		var f factor
		bad, free := f.factorize(n, start, idx, val)
		require.Len(t, bad, 1, "case %d", c)
		require.Len(t, free, 1, "case %d", c)
		assert.Contains(t, []int{p, q, s}, bad[0], "case %d: the dependent column is one of the three", c)
	}
}

// TestDenseToColumns: Problem.Dense lists, column by column and in row
// order, exactly the nonzeros of the dense matrix (the definition of
// compressed sparse column storage), on seeded random matrices with many
// exact zeros, also when the arrays are reused from a larger matrix.
func TestDenseToColumns(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 4))
	var p Problem
	for c := 0; c < 60; c++ {
		rows, cols := r.IntN(25), 1+r.IntN(40)
		a := make([]float64, rows*cols)
		for i := range a {
			if r.IntN(3) == 0 {
				a[i] = r.NormFloat64()
			}
		}
		p.Dense(rows, cols, a)
		require.Len(t, p.Start, cols+1)
		assert.Equal(t, 0, p.Start[0])
		var idx []int
		var val []float64
		for j := 0; j < cols; j++ {
			for i := 0; i < rows; i++ {
				if v := a[i*cols+j]; v != 0 {
					idx, val = append(idx, i), append(val, v)
				}
			}
			require.Equal(t, len(idx), p.Start[j+1], "case %d column %d end", c, j)
		}
		assert.Equal(t, idx, append([]int(nil), p.Index...), "case %d", c)
		assert.Equal(t, val, append([]float64(nil), p.Value...), "case %d", c)
	}
}
