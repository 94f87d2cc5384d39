package optimise

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp"
)

// Solve with integer rules reports branch and bound's progress through
// Options.Progress: with max_stocks in two equal parts (the MILP, then the
// MILP that prices the rule), each in parts per lp.ProgressTotal, sane
// (see progressLog.sane) and complete at the end; the answer is the one
// found without the callback.
func TestSolveProgress(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 7))
	checked := 0
	for k := 0; k < 20 && checked < 5; k++ {
		cat := genStocks(r, 30)
		spec := genSpec(r, cat, 6)
		spec.Rules = catalogue.Rules{MaxStocks: 3, SmallestShare: 5}
		plain, err := Solve(cat, spec, Options{})
		require.NoError(t, err)
		if plain.Status != Optimal {
			continue
		}
		var log progressLog
		told, err := Solve(cat, spec, Options{Progress: log.record})
		require.NoError(t, err)
		assert.InDelta(t, plain.CostPerTonne, told.CostPerTonne, 1e-9)
		log.sane(t, "solve with max_stocks")
		assert.Equal(t, 2*lp.ProgressTotal, log.total[0])
		assert.Equal(t, 0, log.done[0])
		assert.Greater(t, len(log.done), 2, "reports between start and end")
		checked++
	}
	assert.GreaterOrEqual(t, checked, 3)
}
