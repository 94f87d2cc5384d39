package optimise

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// solvedAt is an independent re-solve: spec on a copy of cat with the
// named stocks' prices set by hand, on gonum's simplex (an outside
// reference) or, with integer rules, by Solve.
func solvedAt(t *testing.T, cat *catalogue.Catalogue, spec *catalogue.Spec, prices map[string]float64) *Result {
	t.Helper()
	work := cat.Clone()
	for id, p := range prices {
		st, ok := work.Find(id)
		require.True(t, ok, id)
		st.Price = p
	}
	if spec.Rules.Active() {
		r, err := Solve(work, spec, Options{})
		require.NoError(t, err)
		return r
	}
	r, err := solveWith(gonumEngine(), work, spec, Options{})
	require.NoError(t, err)
	return r
}

// relativePrices are the prices of stocks ids of cat moved by v % of each
// one's price, set by hand for a re-solve.
func relativePrices(cat *catalogue.Catalogue, ids []string, v float64) map[string]float64 {
	out := map[string]float64{}
	for _, id := range ids {
		s, _ := cat.Find(id)
		out[id] = s.Price * (1 + v/100)
	}
	return out
}

// On the paper case (sweepCase: cost min((pA + 900) / 2, 1100), one
// breakpoint at pA = 1300) a relative sweep of a from -5 % to +60 % of its
// price 1000 in 14 steps is the absolute sweep 950:1600:14 computed by hand
// (1000 × (1 + v/100)): the same costs, the same blends, the breakpoint at
// +30 % (1300), and the change against the base case (1000: 950/t). (At
// -10 % a costs what c does and every blend of at least 50 % a is optimal,
// a tie the range keeps clear of.)
func TestSweepRelativeOnPaper(t *testing.T) {
	cat, spec := sweepCase()
	rel, err := SweepPrices(cat, spec, PriceSweep{Stocks: []string{"a"}, Relative: true, From: -5, To: 60, Steps: 14}, Options{})
	require.NoError(t, err)
	abs, err := Sweep(cat, spec, "a", 950, 1600, 14, Options{})
	require.NoError(t, err)
	require.Len(t, rel.Points, 14)
	assert.Equal(t, Optimal, rel.BaseStatus)
	assert.InDelta(t, 950, rel.BaseCostPerTonne, 1e-9, "(1000 + 900) / 2, on paper")
	for i, p := range rel.Points {
		price := 1000 * (1 + p.Value/100)
		assert.InDelta(t, -5+5*float64(i), p.Value, 1e-12)
		assert.InDelta(t, price, p.Prices[0], 1e-9)
		assert.InDelta(t, abs.Points[i].Value, price, 1e-9)
		assert.InDelta(t, abs.Points[i].CostPerTonne, p.CostPerTonne, 1e-9, "step %d", i)
		assert.True(t, sameLines(abs.Points[i].Blend, p.Blend), "step %d", i)
		assert.InDelta(t, math.Min((price+900)/2, 1100)-950, p.ChangePerTonne, 1e-9, "step %d: change against the base case, on paper", i)
	}
	require.Len(t, rel.Breakpoints, 1)
	assert.InDelta(t, 30, rel.Breakpoints[0], 1e-6, "(1300 / 1000 - 1) × 100 %")
	assert.InDelta(t, 1100, rel.BreakpointCosts[0], 1e-6)
	require.Len(t, rel.Changes, 1)
	// At +30 %: 50 % a + 50 % c give way to 100 % b.
	sh := rel.Changes[0].Shifts()
	want := map[string][2]float64{"b": {0, 100}, "a": {50, 0}, "c": {50, 0}}
	require.Len(t, sh, 3)
	for _, x := range sh {
		w, ok := want[x.Stock]
		require.True(t, ok, x.Stock)
		assert.InDelta(t, w[0], x.Before, 1e-6, x.Stock)
		assert.InDelta(t, w[1], x.After, 1e-6, x.Stock)
	}
	assert.Equal(t, "b", sh[0].Stock, "the stock that comes in first")
}

// On the demo specs, a relative sweep of one stock equals the absolute
// sweep of its price computed by hand, point by point and breakpoint by
// breakpoint; and a sweep of several stocks moved together equals, at every
// step, a gonum solve with each stock's price set by hand to today's price
// × (1 + v/100), with its breakpoints where gonum's blend changes between
// 1e-4 below and 1e-4 above.
func TestSweepRelativeDemo(t *testing.T) {
	cat := catalogue.DemoStocks()
	for _, spec := range catalogue.DemoSpecs() {
		p0 := 0.0
		st, _ := cat.Find("palm-st-hard")
		p0 = st.Price
		rel, err := SweepPrices(cat, spec, PriceSweep{Stocks: []string{"palm-st-hard"}, Relative: true, From: -10, To: 20, Steps: 13}, Options{})
		require.NoError(t, err)
		abs, err := Sweep(cat, spec, "palm-st-hard", p0*0.9, p0*1.2, 13, Options{})
		require.NoError(t, err)
		for i, p := range rel.Points {
			assert.InDelta(t, abs.Points[i].Value, p0*(1+p.Value/100), 1e-9)
			assert.InDelta(t, abs.Points[i].CostPerTonne, p.CostPerTonne, 1e-7, "%s step %d", spec.ID, i)
		}
		require.Equal(t, len(abs.Breakpoints), len(rel.Breakpoints), spec.ID)
		for i, bp := range rel.Breakpoints {
			assert.InDelta(t, abs.Breakpoints[i], p0*(1+bp/100), 1e-6*p0, spec.ID)
		}

		ids := []string{"palm", "palm-olein", "palm-st-soft"}
		multi, err := SweepPrices(cat, spec, PriceSweep{Stocks: ids, Relative: true, From: -10, To: 20, Steps: 13}, Options{})
		require.NoError(t, err)
		base := solvedAt(t, cat, spec, nil)
		assert.InDelta(t, base.CostPerTonne, multi.BaseCostPerTonne, 1e-7, spec.ID)
		for _, p := range multi.Points {
			prices := relativePrices(cat, ids, p.Value)
			for k, id := range ids {
				assert.InDelta(t, prices[id], p.Prices[k], 1e-9)
			}
			want := solvedAt(t, cat, spec, prices)
			require.Equal(t, want.Status, p.Status)
			assert.True(t, relClose(want.CostPerTonne, p.CostPerTonne, 1e-7), "%s at %+g %%: sweep %v, gonum %v", spec.ID, p.Value, p.CostPerTonne, want.CostPerTonne)
			assert.InDelta(t, want.CostPerTonne-base.CostPerTonne, p.ChangePerTonne, 1e-6)
		}
		for i, bp := range multi.Breakpoints {
			below, above := solvedAt(t, cat, spec, relativePrices(cat, ids, bp-1e-4)), solvedAt(t, cat, spec, relativePrices(cat, ids, bp+1e-4))
			assert.False(t, sameBlend(below, above), "%s: no change of blend at %+g %%", spec.ID, bp)
			assert.True(t, sameLines(below.Blend, multi.Changes[i].Before), "%s at %+g %%: blend before", spec.ID, bp)
			assert.True(t, sameLines(above.Blend, multi.Changes[i].After), "%s at %+g %%: blend after", spec.ID, bp)
			assert.NotEmpty(t, multi.Changes[i].Shifts())
		}
		t.Logf("%s: %d breakpoints of palm-st-hard, %d of the three palm stocks", spec.ID, len(rel.Breakpoints), len(multi.Breakpoints))
	}
}

// A multi-stock sweep on seeded random specs (genSpec) equals gonum's
// optimum with the prices set by hand at every step, and with integer rules
// (solved step by step) equals Solve with the prices set by hand; every
// breakpoint is a change of blend.
func TestSweepSeveralStocksAgainstSolves(t *testing.T) {
	r := rand.New(rand.NewPCG(1955, 2))
	checked, bps, ruled := 0, 0, 0
	for k := 0; k < 24; k++ {
		cat := genStocks(r, 4+r.IntN(16))
		spec := genSpec(r, cat, 3+r.IntN(10))
		if k%3 == 2 {
			spec.Rules = catalogue.Rules{MaxStocks: 3, SmallestShare: 5}
		}
		perm := r.Perm(len(cat.Stocks))[:2+r.IntN(2)]
		var ids []string
		for _, j := range perm {
			ids = append(ids, cat.Stocks[j].ID)
		}
		ps := PriceSweep{Stocks: ids, Relative: true, From: -10 - 60*r.Float64(), To: 10 + 90*r.Float64(), Steps: 7}
		got, err := SweepPrices(cat, spec, ps, Options{})
		require.NoError(t, err, "case %d", k)
		name := fmt.Sprintf("case %d (rules %v)", k, spec.Rules.Active())
		pricesAt := func(v float64) map[string]float64 { return relativePrices(cat, ids, v) }
		for _, p := range got.Points {
			want := solvedAt(t, cat, spec, pricesAt(p.Value))
			require.Equal(t, want.Status, p.Status, "%s at %+g %%", name, p.Value)
			if p.Status == Optimal {
				assert.True(t, relClose(want.CostPerTonne, p.CostPerTonne, 1e-6), "%s at %+g %%: sweep %v, re-solve %v", name, p.Value, p.CostPerTonne, want.CostPerTonne)
				checked++
			}
		}
		for _, bp := range got.Breakpoints {
			d := 1e-4 * math.Max(1, math.Abs(bp))
			if spec.Rules.Active() {
				d = 4 * got.Tolerance
			}
			below, above := solvedAt(t, cat, spec, pricesAt(bp-d)), solvedAt(t, cat, spec, pricesAt(bp+d))
			assert.False(t, sameBlend(below, above), "%s: no change of blend at %+g %%", name, bp)
			bps++
			if spec.Rules.Active() {
				ruled++
			}
		}
	}
	t.Logf("%d steps, %d breakpoints (%d with integer rules) checked", checked, bps, ruled)
	assert.Greater(t, checked, 60)
	assert.Greater(t, bps, 5)
	assert.Greater(t, ruled, 0)
}

func TestSweepPricesBadInput(t *testing.T) {
	cat, spec := sweepCase()
	for _, ps := range []PriceSweep{
		{Stocks: []string{"a", "b"}, From: 900, To: 1200, Steps: 3},               // absolute prices for several stocks
		{Stocks: []string{"a", "a"}, Relative: true, From: -10, To: 10, Steps: 3}, // named twice
		{Stocks: []string{"a"}, Relative: true, From: -110, To: 10, Steps: 3},     // more than 100 % cheaper
		{Stocks: []string{"a"}, Relative: true, From: 0, To: 1e10, Steps: 3},      // past the accepted prices
		{Stocks: []string{"a"}, Relative: true, From: 5, To: 5, Steps: 3},
		{Stocks: nil, Relative: true, From: -5, To: 5, Steps: 3},
	} {
		_, err := SweepPrices(cat, spec, ps, Options{})
		assert.True(t, catalogue.IsBadInput(err), "%+v: %v", ps, err)
	}
}

// progressLog records the calls of an Options.Progress.
type progressLog struct{ done, total []int }

func (p *progressLog) record(done, total int) {
	p.done, p.total = append(p.done, done), append(p.total, total)
}

// sane checks the calls: done never falls, never passes total, and the
// last call is done == total.
func (p *progressLog) sane(t *testing.T, what string) {
	t.Helper()
	require.NotEmpty(t, p.done, what)
	for i := range p.done {
		assert.LessOrEqual(t, p.done[i], p.total[i], "%s call %d", what, i)
		assert.GreaterOrEqual(t, p.done[i], 0, what)
		if i > 0 {
			assert.GreaterOrEqual(t, p.done[i], p.done[i-1], "%s call %d: done fell", what, i)
			assert.GreaterOrEqual(t, p.total[i], p.total[i-1], "%s call %d: total fell", what, i)
		}
	}
	last := len(p.done) - 1
	assert.Equal(t, p.total[last], p.done[last], "%s ends complete", what)
}

// A sweep reports its steps: the parametric sweep as many as it has, the
// sweep by solves (integer rules) the steps and then every bisection solve.
func TestSweepProgress(t *testing.T) {
	cat, spec := sweepCase()
	var plain progressLog
	_, err := SweepPrices(cat, spec, PriceSweep{Stocks: []string{"a"}, Relative: true, From: -5, To: 60, Steps: 14}, Options{Progress: plain.record})
	require.NoError(t, err)
	plain.sane(t, "parametric sweep")
	assert.Equal(t, 14, plain.total[len(plain.total)-1])
	assert.Equal(t, 0, plain.done[0], "the first call says nothing is done yet")

	ruled := *spec
	ruled.Rules = catalogue.Rules{MaxStocks: 2}
	var steps progressLog
	r, err := SweepPrices(cat, &ruled, PriceSweep{Stocks: []string{"a"}, Relative: true, From: -5, To: 60, Steps: 14}, Options{Progress: steps.record})
	require.NoError(t, err)
	require.Len(t, r.Breakpoints, 1)
	steps.sane(t, "sweep by solves")
	// 14 steps, then one bisection from a 5 % wide interval down to the
	// tolerance, 1e-6 × 60 (17 halvings: 5/2^17 = 3.8e-5 <= 6e-5 < 5/2^16
	// = 7.6e-5), and the solve at the breakpoint.
	assert.Equal(t, 14+17+1, steps.total[len(steps.total)-1])
}
