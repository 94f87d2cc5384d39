package optimise

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
)

// TestProfileCacheFollowsEdits: the cache hands out blend.Profile of the
// stock as it is now, and its fatty acids by reference-table rank, after
// the stock's fatty acids are changed in place (a value, a new key, a key
// removed) and after the catalogue is replaced by another.
func TestProfileCacheFollowsEdits(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 8))
	cat := genStocks(r, 6)
	var pc profileCache
	check := func(what string) {
		t.Helper()
		for j := range cat.Stocks {
			want := blend.Profile(cat.Stocks[j].FattyAcids)
			e := pc.profile(j, &cat.Stocks[j])
			got := e.props
			require.NotNil(t, e.share, "%s: stock %d uses table keys only", what, j)
			for i, key := range catalogue.Keys() {
				assert.Equal(t, cat.Stocks[j].FattyAcids[key], e.share[i], "%s: stock %d %s", what, j, key)
			}
			assert.InDelta(t, want.IV, got.IV, 1e-9*want.IV, "%s: stock %d IV", what, j)
			assert.InDelta(t, want.SV, got.SV, 1e-9*want.SV, "%s: stock %d SV", what, j)
			assert.InDelta(t, want.SAFA, got.SAFA, 1e-9, "%s: stock %d SAFA", what, j)
			assert.InDelta(t, want.Cox, got.Cox, 1e-9, "%s: stock %d Cox", what, j)
			assert.Equal(t, len(want.FattyAcids), len(got.FattyAcids), "%s: stock %d", what, j)
		}
	}
	check("first use")
	check("second use")
	fa := cat.Stocks[2].FattyAcids
	for k := range fa {
		fa[k] += 10
		break
	}
	check("value changed")
	fa["C18:3"] += 5
	check("key added")
	for k := range fa {
		delete(fa, k)
		break
	}
	check("key removed")
	cat = genStocks(r, 9)
	check("another catalogue")
	cat.Stocks[1].FattyAcids["C99:9"] = 1 // not in the reference table
	e := pc.profile(1, &cat.Stocks[1])
	assert.Nil(t, e.share, "a key outside the table: read the map instead")
}

// TestSolverSeesFattyAcidEdits: a Solver that has solved a catalogue gives
// the fresh answer after a stock's fatty acids are edited in place, here
// one that moves the optimum. Worked by hand as TestTwoStocksOnPaper, with
// the limit on MUFA (a property, so it goes through the profiles): soft is
// all C18:1, so MUFA >= 30 % takes 30 % soft at 1150 EUR/t; with soft at
// 60 % C18:1 and 40 % C18:0 it takes 50 % soft, 10·50 + 15·50 = 1250 EUR/t.
func TestSolverSeesFattyAcidEdits(t *testing.T) {
	cat := twoStocks()
	spec := &catalogue.Spec{Name: "paper", Batch: 20, Limits: []catalogue.Limit{{Name: "mufa", Bound: bound(30, inf())}}}
	s := NewSolver()
	defer s.Close()
	r, err := s.Solve(cat, spec, Options{})
	require.NoError(t, err)
	assert.InDelta(t, 1150, r.CostPerTonne, 1e-6)
	cat.Stocks[1].FattyAcids["C18:1"] = 60
	cat.Stocks[1].FattyAcids["C18:0"] = 40
	r, err = s.Solve(cat, spec, Options{})
	require.NoError(t, err)
	fresh, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	assert.InDelta(t, fresh.CostPerTonne, r.CostPerTonne, 1e-9)
	assert.InDelta(t, 1250, r.CostPerTonne, 1e-6)
	assert.False(t, math.IsNaN(r.CostPerTonne))
}
