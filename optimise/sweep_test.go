package optimise

import (
	"math"
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
