//go:build coin

package coin

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// paperLP is worked by hand: minimise 2x + 3y subject to x + y >= 4 and
// x + 3y >= 6, x, y >= 0. The feasible region's vertices are (0,4) cost 12,
// (3,1) cost 9 and (6,0) cost 12, so the optimum is (3,1) at 9. Both rows are
// tight; the duals solve u + v = 2, u + 3v = 3, so u = 1.5, v = 0.5.
func paperLP() *Problem {
	inf := math.Inf(1)
	return &Problem{
		Cols: 2, Rows: 2,
		Start:    []int32{0, 2, 4},
		Index:    []int32{0, 1, 0, 1},
		Value:    []float64{1, 1, 1, 3},
		ColLower: []float64{0, 0}, ColUpper: []float64{inf, inf},
		Obj:      []float64{2, 3},
		RowLower: []float64{4, 6}, RowUpper: []float64{inf, inf},
	}
}

func TestLPPaperExample(t *testing.T) {
	lp := NewLP()
	defer lp.Close()
	require.NoError(t, lp.Load(paperLP()))
	require.Equal(t, Optimal, lp.Solve())
	assert.InDelta(t, 9, lp.Objective(), 1e-9)
	x := lp.ColSolution(nil)
	assert.InDeltaSlice(t, []float64{3, 1}, x, 1e-9)
	assert.InDeltaSlice(t, []float64{4, 6}, lp.RowActivity(nil), 1e-9)
	assert.InDeltaSlice(t, []float64{1.5, 0.5}, lp.RowPrice(nil), 1e-9)
	assert.InDeltaSlice(t, []float64{0, 0}, lp.ReducedCost(nil), 1e-9)
	assert.Equal(t, Basic, lp.ColStatus(0))
	assert.Equal(t, Basic, lp.ColStatus(1))
	assert.NotEqual(t, Basic, lp.RowStatus(0))
	st := lp.Statuses(nil)
	require.Len(t, st, 4)
	assert.Equal(t, []Basis{lp.ColStatus(0), lp.ColStatus(1), lp.RowStatus(0), lp.RowStatus(1)}, st)
	lp.Close()
	lp.Close() // idempotent
}

// Worked by hand: x + y >= 4 and x + y <= 3 cannot both hold.
func TestLPInfeasible(t *testing.T) {
	inf := math.Inf(1)
	lp := NewLP()
	defer lp.Close()
	require.NoError(t, lp.Load(&Problem{
		Cols: 2, Rows: 2, Start: []int32{0, 2, 4}, Index: []int32{0, 1, 0, 1},
		Value: []float64{1, 1, 1, 1}, ColLower: []float64{0, 0}, ColUpper: []float64{inf, inf},
		Obj: []float64{1, 1}, RowLower: []float64{4, math.Inf(-1)}, RowUpper: []float64{inf, 3},
	}))
	assert.Equal(t, Infeasible, lp.Solve())
}

// Worked by hand: maximise x + y with 2x + 2y <= 3 and x, y integer in
// [0, 5]: the LP relaxation reaches 1.5, the best integer point sums to 1.
func TestMIPPaperExample(t *testing.T) {
	mp := NewMIP()
	defer mp.Close()
	require.NoError(t, mp.Load(&Problem{
		Cols: 2, Rows: 1, Start: []int32{0, 1, 2}, Index: []int32{0, 0}, Value: []float64{2, 2},
		ColLower: []float64{0, 0}, ColUpper: []float64{5, 5}, Obj: []float64{-1, -1},
		RowLower: []float64{math.Inf(-1)}, RowUpper: []float64{3}, Integer: []int{0, 1},
	}))
	require.Equal(t, Optimal, mp.Solve())
	assert.InDelta(t, -1, mp.Objective(), 1e-9)
	x := mp.ColSolution(nil)
	assert.InDelta(t, 1, x[0]+x[1], 1e-9)
	for _, v := range x {
		assert.InDelta(t, math.Round(v), v, 1e-9)
	}
}

func TestLoadRejectsMalformed(t *testing.T) {
	p := paperLP()
	p.Index[1] = 7
	lp := NewLP()
	defer lp.Close()
	assert.ErrorContains(t, lp.Load(p), "row 7")
	p = paperLP()
	p.Start = p.Start[:2]
	assert.Error(t, lp.Load(p))
	lp.Close()
	assert.ErrorContains(t, lp.Load(paperLP()), "after Close")
}

func TestVersion(t *testing.T) {
	assert.Contains(t, Version(), "CLP 1.")
	assert.Contains(t, Version(), "CBC 2.")
}

// Clp_initialSolve reaches the same hand-worked optimum (3, 1) at 9.
func TestLPSolveInitial(t *testing.T) {
	lp := NewLP()
	defer lp.Close()
	require.NoError(t, lp.Load(paperLP()))
	require.Equal(t, Optimal, lp.SolveInitial())
	assert.InDelta(t, 9, lp.Objective(), 1e-9)
	assert.InDeltaSlice(t, []float64{1.5, 0.5}, lp.RowPrice(nil), 1e-9)
}

// Solution reads the hand-worked answer of paperLP in one call: x = (3, 1),
// both rows tight at (4, 6), duals (1.5, 0.5), reduced costs zero, both
// columns basic and both row logicals not.
func TestLPSolutionInOneCall(t *testing.T) {
	lp := NewLP()
	defer lp.Close()
	require.NoError(t, lp.Load(paperLP()))
	require.Equal(t, Optimal, lp.Solve())
	x, act, y, d := make([]float64, 2), make([]float64, 2), make([]float64, 2), make([]float64, 2)
	st := make([]Basis, 4)
	require.NoError(t, lp.Solution(x, act, y, d, st))
	assert.InDeltaSlice(t, []float64{3, 1}, x, 1e-9)
	assert.InDeltaSlice(t, []float64{4, 6}, act, 1e-9)
	assert.InDeltaSlice(t, []float64{1.5, 0.5}, y, 1e-9)
	assert.InDeltaSlice(t, []float64{0, 0}, d, 1e-9)
	assert.Equal(t, lp.Statuses(nil), st)
	assert.Equal(t, Basic, st[0])
	assert.NotEqual(t, Basic, st[2])
	require.NoError(t, lp.Solution(nil, act, nil, nil, nil), "nil parts are skipped")
	assert.ErrorContains(t, lp.Solution(make([]float64, 3), nil, nil, nil, nil), "length 3")
}

// One model loaded again and again: each Load replaces the problem and the
// next solve starts afresh, so a reused model gives what a new one gives
// (the hand-worked optimum 9 of paperLP, the hand-checked infeasibility of
// x + y >= 4 with x + y <= 3, and paperLP again with the same iteration count).
func TestLPReuse(t *testing.T) {
	fresh := NewLP()
	require.NoError(t, fresh.Load(paperLP()))
	require.Equal(t, Optimal, fresh.Solve())
	iters := fresh.Iterations()
	fresh.Close()

	lp := NewLP()
	defer lp.Close()
	for k := 0; k < 3; k++ {
		require.NoError(t, lp.Load(paperLP()))
		require.Equal(t, Optimal, lp.Solve())
		assert.InDelta(t, 9, lp.Objective(), 1e-9)
		assert.Equal(t, iters, lp.Iterations(), "solve %d starts from the slack basis", k)
		inf := math.Inf(1)
		require.NoError(t, lp.Load(&Problem{
			Cols: 2, Rows: 2, Start: []int32{0, 2, 4}, Index: []int32{0, 1, 0, 1},
			Value: []float64{1, 1, 1, 1}, ColLower: []float64{0, 0}, ColUpper: []float64{inf, inf},
			Obj: []float64{1, 1}, RowLower: []float64{4, math.Inf(-1)}, RowUpper: []float64{inf, 3},
		}))
		assert.Equal(t, Infeasible, lp.Solve())
	}
}
