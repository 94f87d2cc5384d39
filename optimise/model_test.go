package optimise

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestCSCMatchesDense: the column form lists, column by column and in row
// order, exactly the nonzeros of the dense matrix (the definition of
// compressed sparse column storage), on seeded random matrices with many
// exact zeros, also when the arrays are reused from a larger matrix.
func TestCSCMatchesDense(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 4))
	var c csc
	for k := 0; k < 60; k++ {
		m := newModel(1 + r.IntN(40))
		for i, rows := 0, r.IntN(25); i < rows; i++ {
			coef := make([]float64, m.nCols)
			for j := range coef {
				if r.IntN(3) == 0 {
					coef[j] = r.NormFloat64()
				}
			}
			m.addRow("r", coef, 0, 1)
		}
		m.cscInto(&c)
		require.Len(t, c.start, m.nCols+1)
		assert.Equal(t, int32(0), c.start[0])
		idx, val := []int32{}, []float64{}
		for j := 0; j < m.nCols; j++ {
			for i := 0; i < m.nRows; i++ {
				if v := m.at(i, j); v != 0 {
					idx, val = append(idx, int32(i)), append(val, v)
				}
			}
			require.Equal(t, int32(len(idx)), c.start[j+1], "case %d column %d end", k, j)
		}
		assert.Equal(t, idx, append([]int32{}, c.index...), "case %d", k)
		assert.Equal(t, val, append([]float64{}, c.value...), "case %d", k)
	}
}
