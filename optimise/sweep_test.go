package optimise

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// sweepCase is solved on paper: A (SFC20 40 %), B (20 %, 1100/t), C (0 %,
// 900/t); the spec asks SFC20 >= 20. Either 100 % B (1100/t) or 50 % A +
// 50 % C ((pA + 900) / 2 per t) is optimal; they cost the same at pA = 1300,
// the one breakpoint of a sweep of A's price.
func sweepCase() (*catalogue.Catalogue, *catalogue.Spec) {
	flat := func(v float64) catalogue.Curve {
		return catalogue.Curve{{Temp: 10, Solid: v}, {Temp: 20, Solid: v}, {Temp: 30, Solid: v}}
	}
	fa := map[string]float64{"C16:0": 50, "C18:1": 50}
	cat := &catalogue.Catalogue{Currency: "EUR", Stocks: []catalogue.Stock{
		{ID: "a", Price: 1000, Available: math.Inf(1), FattyAcids: fa, SFC: flat(40)},
		{ID: "b", Price: 1100, Available: math.Inf(1), FattyAcids: fa, SFC: flat(20)},
		{ID: "c", Price: 900, Available: math.Inf(1), FattyAcids: fa, SFC: flat(0)},
	}}
	spec := &catalogue.Spec{Name: "sweep", Batch: 10, SFC: []catalogue.SFCLimit{{Temp: 20, Bound: catalogue.Bound{Min: 20, Max: math.Inf(1)}}}}
	return cat, spec
}

func TestSweepBreakpointOnPaper(t *testing.T) {
	cat, spec := sweepCase()
	r, err := Sweep(cat, spec, "a", 1000, 1600, 7, Options{})
	require.NoError(t, err)
	require.Len(t, r.Points, 7)
	require.Len(t, r.Breakpoints, 1)
	assert.InDelta(t, 1300, r.Breakpoints[0], 1e-3)
	for _, p := range r.Points {
		want := math.Min((p.Value+900)/2, 1100)
		assert.InDelta(t, want, p.CostPerTonne, 1e-6, "price %g", p.Value)
	}
	assert.Equal(t, 1000.0, cat.Stocks[0].Price, "the caller's catalogue is not touched")

	// The breakpoint is where cost ranging at the start price says the
	// blend stops being optimal (same model, two methods).
	res, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	for _, g := range res.Ranging {
		if g.Stock == "a" {
			assert.InDelta(t, g.PriceHigh, r.Breakpoints[0], 1e-3)
		}
	}
}

func TestSweepBadInput(t *testing.T) {
	cat, spec := sweepCase()
	_, err := Sweep(cat, spec, "zz", 1, 2, 3, Options{})
	assert.True(t, catalogue.IsBadInput(err))
	_, err = Sweep(cat, spec, "a", 5, 5, 3, Options{})
	assert.True(t, catalogue.IsBadInput(err))
	_, err = Sweep(cat, spec, "a", 1, 5, 1, Options{})
	assert.True(t, catalogue.IsBadInput(err))
}

// TestSweepParametricAgainstSolves sweeps one stock's price on 30 seeded
// random specs by parametric LP and checks it against gonum's simplex (an
// outside reference): the cost at every step is gonum's optimum with the
// stock at that price, to 1e-7 relative; at every breakpoint gonum's blend
// 1e-4 below and 1e-4 above the price differ (a change of the optimal blend
// is there) while its costs meet the breakpoint's (the optimal cost is
// continuous in a cost coefficient). Every breakpoint the step-by-step
// sweep (a solve per step, bisection) finds is among them, to its
// tolerance; it finds one at most between two steps, the parametric sweep
// every one.
func TestSweepParametricAgainstSolves(t *testing.T) {
	r := rand.New(rand.NewPCG(1955, 39))
	swept, extra := 0, 0
	g := gonumEngine()
	at := func(cat *catalogue.Catalogue, spec *catalogue.Spec, id string, p float64) *Result {
		work := cat.Clone()
		st, _ := work.Find(id)
		st.Price = p
		res, err := solveWith(g, work, spec, Options{})
		require.NoError(t, err)
		return res
	}
	for k := 0; k < 30; k++ {
		cat := genStocks(r, 3+r.IntN(20))
		spec := genSpec(r, cat, 3+r.IntN(12))
		id := cat.Stocks[r.IntN(len(cat.Stocks))].ID
		from, to := 300+1000*r.Float64(), 1500+1500*r.Float64()
		if r.IntN(2) == 0 {
			from, to = to, from
		}
		got, err := Sweep(cat, spec, id, from, to, 11, Options{})
		require.NoError(t, err, "case %d", k)
		require.Len(t, got.Points, 11)
		for _, p := range got.Points {
			want := at(cat, spec, id, p.Value)
			require.Equal(t, want.Status, p.Status, "case %d price %g", k, p.Value)
			if p.Status == Optimal {
				assert.True(t, relClose(want.CostPerTonne, p.CostPerTonne, 1e-7), "case %d price %g: sweep %v, gonum %v", k, p.Value, p.CostPerTonne, want.CostPerTonne)
			}
		}
		for i, bp := range got.Breakpoints {
			below, above := at(cat, spec, id, bp*(1-1e-4)), at(cat, spec, id, bp*(1+1e-4))
			assert.False(t, sameBlend(below, above), "case %d: no change of blend at breakpoint %g", k, bp)
			assert.True(t, relClose(got.BreakpointCosts[i], below.CostPerTonne, 1e-3), "case %d breakpoint %g: cost %v, gonum below %v", k, bp, got.BreakpointCosts[i], below.CostPerTonne)
			assert.True(t, relClose(got.BreakpointCosts[i], above.CostPerTonne, 1e-3), "case %d breakpoint %g: cost %v, gonum above %v", k, bp, got.BreakpointCosts[i], above.CostPerTonne)
		}
		prices := make([]float64, 11)
		for i, p := range got.Points {
			prices[i] = p.Value
		}
		ps := PriceSweep{Stocks: []string{id}, From: from, To: to, Steps: 11}
		ref, err := newSweep(cat, ps)
		require.NoError(t, err)
		require.NoError(t, sweepBySolves(ref, cat, spec, ps, prices, Options{}, nil))
		for _, want := range ref.Breakpoints {
			found := false
			for _, bp := range got.Breakpoints {
				found = found || math.Abs(bp-want) <= 2*got.Tolerance
			}
			assert.True(t, found, "case %d: breakpoint %g of the step-by-step sweep is not among %v", k, want, got.Breakpoints)
		}
		swept += len(got.Breakpoints)
		extra += len(got.Breakpoints) - len(ref.Breakpoints)
	}
	t.Logf("%d breakpoints checked, %d of them between steps the bisection could not split", swept, extra)
	assert.Greater(t, swept, 15)
}
