package optimise

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// TestDenseLUAgainstGonum checks the small LU against gonum's mat.LU (a
// general-purpose reference library) on seeded random systems, both
// A x = b and Aᵀ x = b.
func TestDenseLUAgainstGonum(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	for k := 0; k < 50; k++ {
		n := 1 + r.IntN(30)
		a := make([]float64, n*n)
		for i := range a {
			if r.IntN(3) > 0 {
				a[i] = r.NormFloat64()
			}
		}
		for i := 0; i < n; i++ {
			a[i*n+i] += 3
		}
		b := make([]float64, n)
		for i := range b {
			b[i] = r.NormFloat64()
		}
		var ref mat.LU
		ref.Factorize(mat.NewDense(n, n, append([]float64(nil), a...)))
		var f denseLU
		require.NoError(t, f.factor(append([]float64(nil), a...), n))
		for _, trans := range []bool{false, true} {
			want := mat.NewVecDense(n, nil)
			require.NoError(t, ref.SolveVecTo(want, trans, mat.NewVecDense(n, b)))
			got := f.solve(b)
			if trans {
				got = f.solveT(b)
			}
			assert.InDeltaSlice(t, want.RawVector().Data, got, 1e-9, "n=%d trans=%v", n, trans)
		}
	}
	var f denseLU
	assert.ErrorIs(t, f.factor([]float64{1, 2, 2, 4}, 2), errSingular)
}
