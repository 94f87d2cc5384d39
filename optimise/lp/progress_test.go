package lp_test

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp"
	"lipoplan/optimise/lp/lptest"
)

// Branch and bound reports the share of its tree closed: starting at 0,
// never falling, never past ProgressTotal, ending at ProgressTotal when
// the search is complete, and short of it when a node limit stops the
// search; the answer is the same with or without a Progress callback.
func TestBranchAndBoundProgress(t *testing.T) {
	complete, stopped := 0, 0
	for c := 0; c < 60 && (complete < 8 || stopped < 3); c++ {
		r := rand.New(rand.NewPCG(2019, uint64(c)))
		base := lptest.Random(r, lptest.Blend)
		if base.Cols < 8 {
			continue
		}
		p, ints := cardinality(base, 2, 10)
		var done []int
		record := func(d, total int) {
			assert.Equal(t, lp.ProgressTotal, total)
			done = append(done, d)
		}
		plain, err := lp.NewBranchAndBound().SolveMIP(p, ints, lp.Limits{})
		require.NoError(t, err)
		told, err := lp.NewBranchAndBound().SolveMIP(p, ints, lp.Limits{Progress: record})
		require.NoError(t, err)
		assert.Equal(t, plain.Status, told.Status)
		assert.Equal(t, plain.Nodes, told.Nodes)
		assert.Equal(t, plain.X, told.X, "the callback changes nothing of the search")
		require.NotEmpty(t, done)
		assert.Equal(t, 0, done[0])
		for i := 1; i < len(done); i++ {
			assert.Greater(t, done[i], done[i-1], "case %d: reported only when it grows", c)
		}
		if plain.Status == lp.Optimal || plain.Status == lp.Infeasible {
			assert.Equal(t, lp.ProgressTotal, done[len(done)-1], "case %d: complete", c)
			complete++
		}
		if plain.Nodes > 4 {
			done = nil
			cut, err := lp.NewBranchAndBound().SolveMIP(p, ints, lp.Limits{MaxNodes: 2, Progress: record})
			require.NoError(t, err)
			require.Contains(t, []lp.Status{lp.NotProven, lp.NoSolution}, cut.Status)
			assert.Less(t, done[len(done)-1], lp.ProgressTotal, "case %d: a search stopped by its limit is not complete", c)
			stopped++
		}
	}
	assert.GreaterOrEqual(t, complete, 8)
	assert.GreaterOrEqual(t, stopped, 3)
}
