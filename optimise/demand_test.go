package optimise

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

func feedPct(r *Result) map[string]float64 {
	out := map[string]float64{}
	for _, l := range r.Process.Feed {
		out[l.Stock] = l.Pct
	}
	return out
}

func sharePct(r *Result) map[string]float64 {
	out := map[string]float64{}
	for _, l := range r.Blend {
		out[l.Stock] = l.Pct
	}
	return out
}

func throughOf(r *Result) float64 {
	var z float64
	for _, l := range r.Process.Feed {
		z += l.Pct
	}
	return z
}

// A spec may demand the reactor: a minimum share of the batch through it
// and a fixed feed ratio. Worked by hand on the paper stocks with measured
// SFC, where the reactor adds only its cost (30 EUR/t processed): the
// blend stays hard 20.8333 % + liquid 79.1667 % (SFC 10 °C >= 20 from hard
// at 96 % solid), and each % of the batch forced through costs 0.30 EUR/t.
//
//   - through >= 50: 1183.33 + 0.30 x 50 = 1198.33 EUR/t; the minimum
//     holds the blend at 0.30 EUR/t per % of batch, from 0 up to 100 %.
//   - through >= 40, feed hard : liquid = 1 : 3: 10 % hard and 30 %
//     liquid through, 10.8333 % hard blended as it is; 1195.33 EUR/t.
//   - through >= 100, feed 1 : 3: everything reacts, hard 25 %, liquid
//     75 %, SFC 24: 0.25 x 1500 + 0.75 x 1100 + 30 = 1230 EUR/t.
func TestProcessDemandsByHand(t *testing.T) {
	cat := paperStocks()
	inf := math.Inf(1)
	spec := paperSpec(30)
	spec.Process.Through = &catalogue.Bound{Min: 50, Max: inf}
	r, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, r.Status)
	assert.InDelta(t, 1100+400*20/96.0+0.30*50, r.CostPerTonne, 1e-6)
	assert.InDelta(t, 50, throughOf(r), 1e-6)
	assert.InDelta(t, 100*20/96.0, sharePct(r)["hard"], 1e-6)
	lr := procLimit(t, r, "process.through.min")
	assert.True(t, lr.Binding)
	assert.Equal(t, "reactor throughput, at least", lr.Label)
	assert.InDelta(t, 0.30, math.Abs(lr.ShadowPrice), 1e-9)
	// over the range it is said to hold, re-solving at its ends costs
	// 0.30 per % of batch (the basis may change sooner than the price: the
	// range is where the LP's own basis proves it)
	assert.GreaterOrEqual(t, lr.HoldsFrom, -1e-9)
	assert.LessOrEqual(t, lr.HoldsTo, 100+1e-9)
	assert.Less(t, lr.HoldsFrom, 50.0)
	assert.Greater(t, lr.HoldsTo, 50.0)
	for _, end := range []float64{lr.HoldsFrom, lr.HoldsTo} {
		s := spec.Clone()
		s.Process.Through.Min = end
		re, err := Solve(cat, s, Options{})
		require.NoError(t, err)
		assert.InDelta(t, r.CostPerTonne+0.30*(end-50), re.CostPerTonne, 1e-6, "through min %v", end)
	}
	assert.Contains(t, lr.Explain, "lowering the reactor throughput minimum saves 0.30 EUR/t per 1 % of the batch")
	// the shadow price is the cost of one more % through, by re-solving
	spec51 := spec.Clone()
	spec51.Process.Through.Min = 51
	r51, err := Solve(cat, spec51, Options{})
	require.NoError(t, err)
	assert.InDelta(t, math.Abs(lr.ShadowPrice), r51.CostPerTonne-r.CostPerTonne, 1e-6)

	ratio := paperSpec(30)
	ratio.Process.Through = &catalogue.Bound{Min: 40, Max: inf}
	ratio.Process.FeedRatio = []catalogue.FeedPart{{Stock: "hard", Parts: 1}, {Stock: "liquid", Parts: 3}}
	r, err = Solve(cat, ratio, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, r.Status)
	assert.InDelta(t, 10, feedPct(r)["hard"], 1e-6)
	assert.InDelta(t, 30, feedPct(r)["liquid"], 1e-6)
	assert.InDelta(t, 100*20/96.0, sharePct(r)["hard"], 1e-6)
	assert.InDelta(t, 1100+400*20/96.0+0.30*40, r.CostPerTonne, 1e-6)
	assert.Equal(t, map[string]float64{"hard": 0.25, "liquid": 0.75}, r.Process.FeedRatio)

	ratio.Process.Through.Min = 100
	r, err = Solve(cat, ratio, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, r.Status)
	assert.InDelta(t, 25, feedPct(r)["hard"], 1e-6)
	assert.InDelta(t, 75, feedPct(r)["liquid"], 1e-6)
	assert.InDelta(t, 1230, r.CostPerTonne, 1e-6)
	assert.InDelta(t, 24, r.Properties.SFC[10], 1e-6)
}

// A demand the limits cannot grant is diagnosed, not blamed on the other
// limits. By hand: 1 t of hard on hand in a 10 t batch (10 %) and a feed
// ratio hard : liquid = 1 : 1 let at most 20 % of the batch through; the
// SFC is met with lauric oil beside the hard, so without the demand the
// spec is feasible. through >= 50 asks 30 % too much. The reported most,
// 20 %, is feasible and a little more is not.
func TestProcessDemandInfeasible(t *testing.T) {
	cat := paperStocks()
	cat.Stocks[0].Available = 1
	spec := paperSpec(30)
	spec.Process.Through = &catalogue.Bound{Min: 50, Max: math.Inf(1)}
	spec.Process.FeedRatio = []catalogue.FeedPart{{Stock: "hard", Parts: 1}, {Stock: "liquid", Parts: 1}}
	r, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	require.Equal(t, Infeasible, r.Status)
	require.Len(t, r.Relaxation, 1)
	assert.Equal(t, "process.through.min", r.Relaxation[0].Name)
	assert.InDelta(t, 30, r.Relaxation[0].By, 1e-6)
	require.NotEmpty(t, r.Notes)
	assert.Contains(t, r.Notes[0], "at most 20.00 % can go through")
	for _, c := range []struct {
		min  float64
		want Status
	}{{20, Optimal}, {20.01, Infeasible}} {
		s := spec.Clone()
		s.Process.Through.Min = c.min
		r, err := Solve(cat, s, Options{})
		require.NoError(t, err)
		assert.Equal(t, c.want, r.Status, "through min %v", c.min)
	}

	// a feed ratio the stock on hand cannot follow at all: hard capped at
	// 0 t leaves the 1 : 1 feed no blend but z = 0, below the minimum
	cat.Stocks[0].Available = 0
	r, err = Solve(cat, spec, Options{})
	require.NoError(t, err)
	require.Equal(t, Infeasible, r.Status)
	require.Len(t, r.Relaxation, 1)
	assert.InDelta(t, 50, r.Relaxation[0].By, 1e-6, "nothing can go through")
}

// With predicted SFC the demand holds, costs money (the unforced optimum
// sends about 30 % through), and the reported blend meets the SFC limits
// by an independent recomputation (trueSFCOf: randomise.Distribute and
// sle.Predict on the whole blend). A minimum the SFC limits cannot allow
// is reported with the most that can go through, found by trial: solving
// at that minimum finds a blend.
func TestProcessDemandPredicted(t *testing.T) {
	cat := catalogue.DemoStocks()
	free, err := Solve(cat, margarineSpec(t, cat), Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, free.Status)

	spec := margarineSpec(t, cat)
	spec.Process.Through = &catalogue.Bound{Min: 40, Max: math.Inf(1)}
	r, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, r.Status)
	assert.GreaterOrEqual(t, throughOf(r), 40-1e-6)
	assert.GreaterOrEqual(t, r.CostPerTonne, free.CostPerTonne-1e-6, "a demand cannot make the blend cheaper")
	meetsSFC(t, cat, r, randomise.Chemical, spec.SFC, 0.05, "")
	lr := procLimit(t, r, "process.through.min")
	assert.True(t, lr.Binding)

	spec.Process.Through.Min = 35
	spec.Process.FeedRatio = []catalogue.FeedPart{{Stock: "palm-st-hard", Parts: 3}, {Stock: "pko", Parts: 1}}
	r, err = Solve(cat, spec, Options{})
	require.NoError(t, err)
	require.Equal(t, Infeasible, r.Status)
	require.Len(t, r.Relaxation, 1)
	assert.Equal(t, "process.through.min", r.Relaxation[0].Name)
	most := 35 - r.Relaxation[0].By
	assert.Greater(t, most, 0.0)
	s := spec.Clone()
	s.Process.Through.Min = most
	ok, err := Solve(cat, s, Options{})
	require.NoError(t, err)
	assert.Equal(t, Optimal, ok.Status, "the most reported, %.2f %%, admits a blend", most)
	assert.InDelta(t, 0.75, feedPct(ok)["palm-st-hard"]/throughOf(ok), 1e-6, "the feed ratio holds")
}

// CompareRoutes solves the physical blend, chemical and enzymatic
// interesterification alike: the reactor routes are Solve of the spec with
// that method (the same answer), the physical route sends nothing through
// the reactor and its predicted SFC, recomputed independently (trueSFCOf),
// meets the limits. On the demo margarine the reactor routes are cheaper:
// the hardstock's trisaturates are diluted into mixed TAGs that melt
// lower (common practice).
func TestCompareRoutes(t *testing.T) {
	cat := catalogue.DemoStocks()
	spec := margarineSpec(t, cat)
	routes, err := CompareRoutes(cat, spec, Options{})
	require.NoError(t, err)
	require.Len(t, routes, 3)
	for i, name := range routeNames() {
		assert.Equal(t, name, routes[i].Name)
		require.Equal(t, Optimal, routes[i].Result.Status, name)
	}
	phys := routes[0].Result
	assert.Empty(t, phys.Process.Feed)
	meetsSFC(t, cat, phys, randomise.Native, spec.SFC, 0.05, "physical")
	for _, rt := range routes[1:] {
		s := spec.Clone()
		s.Process.Method = rt.Name
		want, err := Solve(cat, s, Options{})
		require.NoError(t, err)
		assert.InDelta(t, want.CostPerTonne, rt.Result.CostPerTonne, 1e-6, rt.Name)
		assert.Less(t, rt.Result.CostPerTonne, phys.CostPerTonne, rt.Name)
		assert.NotEmpty(t, rt.Result.Process.Feed, rt.Name)
	}

	_, err = CompareRoutes(cat, &catalogue.Spec{Name: "x", Batch: 10}, Options{})
	require.True(t, catalogue.IsBadInput(err), "%v", err)
	assert.Contains(t, err.Error(), "[process]")
}
