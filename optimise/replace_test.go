package optimise

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

func partsOf(cat *catalogue.Catalogue, r *Result) []blend.Part {
	var parts []blend.Part
	for _, l := range r.Blend {
		s, _ := cat.Find(l.Stock)
		parts = append(parts, blend.Part{Stock: s, Pct: l.Pct})
	}
	return parts
}

// The demo's partially hardened base replaced with measured curves: the
// answer, recomputed independently (blend.SFC of the stocks' measured
// curves, blend.Mix for trans), stays within ±3 % solid of the incumbent's
// curve at every point, is trans-free (<= 1 %), leaves the incumbent out,
// and costs what a spec written by hand with the same bands costs.
func TestReplaceMeasuredMatchesIncumbent(t *testing.T) {
	cat := catalogue.DemoStocks()
	res, err := Replace(cat, Replacement{Incumbent: "ph-soy", Tolerance: 3, TransMax: 1, Batch: 20}, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, res.Status)
	inc, _ := cat.Find("ph-soy")
	var temps []float64
	for _, p := range inc.SFC {
		temps = append(temps, p.Temp)
	}
	sfc, missing := blend.SFC(partsOf(cat, res.Result), temps)
	require.Empty(t, missing)
	for _, p := range inc.SFC {
		assert.InDelta(t, p.Solid, sfc[p.Temp], 3+1e-6, "%v C", p.Temp)
	}
	props, err := blend.Mix(partsOf(cat, res.Result), nil)
	require.NoError(t, err)
	assert.LessOrEqual(t, props.Trans, 1+1e-9)
	for _, l := range res.Result.Blend {
		assert.NotEqual(t, "ph-soy", l.Stock)
	}
	assert.InDelta(t, inc.Price-res.Result.CostPerTonne, res.Saving, 1e-9)
	assert.LessOrEqual(t, math.Abs(res.MaxDeviation.By), 3+1e-6)

	// the same spec by hand
	spec := &catalogue.Spec{Name: "by hand", Batch: 20,
		Limits: []catalogue.Limit{{Name: "trans", Bound: catalogue.Bound{Min: math.Inf(-1), Max: 1}}},
		Use:    []catalogue.Use{{Stock: "ph-soy", Bound: catalogue.Bound{Min: math.Inf(-1), Max: 0}}}}
	for _, p := range inc.SFC {
		spec.SFC = append(spec.SFC, catalogue.SFCLimit{Temp: p.Temp, Bound: catalogue.Bound{Min: math.Max(0, p.Solid-3), Max: p.Solid + 3}})
	}
	hand, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	assert.InDelta(t, hand.CostPerTonne, res.Result.CostPerTonne, 1e-6)
}

// When no blend meets the tolerance the answer is the smallest one that
// can: checked by solving just below it (no blend) and at it (the blend
// returned), with per-temperature tolerances kept in proportion.
func TestReplaceSmallestTolerance(t *testing.T) {
	cat := catalogue.DemoStocks()
	res, err := Replace(cat, Replacement{Incumbent: "ph-soy", Tolerance: 0.2, TransMax: 1, Batch: 20}, Options{})
	require.NoError(t, err)
	require.Equal(t, Infeasible, res.Status)
	require.NotNil(t, res.Result)
	require.Equal(t, Optimal, res.Result.Status, "the blend at the smallest tolerance")
	assert.Greater(t, res.Tolerance, 0.2)
	assert.InDelta(t, 0.2, res.Requested, 1e-12)
	t.Logf("smallest tolerance %.3f %% solid", res.Tolerance)
	below, err := Replace(cat, Replacement{Incumbent: "ph-soy", Tolerance: res.Tolerance - 0.06, TransMax: 1, Batch: 20}, Options{})
	require.NoError(t, err)
	assert.Equal(t, Infeasible, below.Status, "just below the smallest tolerance nothing matches")
	at, err := Replace(cat, Replacement{Incumbent: "ph-soy", Tolerance: res.Tolerance, TransMax: 1, Batch: 20}, Options{})
	require.NoError(t, err)
	assert.Equal(t, Optimal, at.Status)
	assert.InDelta(t, at.Result.CostPerTonne, res.Result.CostPerTonne, 1e-6)
}

// Per-temperature tolerances: a tight band at 35 °C is met there while the
// other temperatures keep the default.
func TestReplacePerTemperatureTolerance(t *testing.T) {
	cat := catalogue.DemoStocks()
	res, err := Replace(cat, Replacement{Incumbent: "ph-soy", Tolerance: 5, PerTemp: map[float64]float64{35: 0.5}, TransMax: 1, Batch: 20}, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, res.Status)
	for _, p := range res.Points {
		lim := 5.0
		if p.Temp == 35 {
			lim = 0.5
		}
		assert.LessOrEqual(t, math.Abs(p.By), lim+1e-6, "%v C", p.Temp)
	}
}

// With a reactor the match is judged on the TAG model's SFC of the whole
// blend, recomputed independently (trueSFCOf), within the tolerance.
func TestReplaceWithReactor(t *testing.T) {
	cat := catalogue.DemoStocks()
	proc := &catalogue.Process{Interesterify: []string{"palm-st-hard", "soybean"}, Method: "chemical", Cost: 45}
	res, err := Replace(cat, Replacement{Incumbent: "ph-soy", Tolerance: 3, TransMax: 1, Batch: 20, Process: proc}, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, res.Status)
	for _, p := range res.Points {
		v := trueSFCOf(t, cat, res.Result, randomise.Chemical, p.Temp)
		assert.InDelta(t, p.Incumbent, v, 3+slpSFCTol+1e-9, "%v C", p.Temp)
		assert.InDelta(t, v, p.Predicted, 1e-6)
	}
	assert.Equal(t, "predicted", res.Result.Process.SFCModel)
}

func TestReplaceBadInput(t *testing.T) {
	cat := catalogue.DemoStocks()
	for name, c := range map[string]struct {
		r    Replacement
		want string
	}{
		"unknown":   {Replacement{Incumbent: "lard", Tolerance: 3}, `"lard"`},
		"no curve":  {Replacement{Incumbent: "x", Tolerance: 3}, "no measured SFC curve"},
		"range":     {Replacement{Incumbent: "ph-soy", Tolerance: 3, Temps: []float64{60}}, "60 °C"},
		"tolerance": {Replacement{Incumbent: "ph-soy", Tolerance: -1}, "tolerance"},
	} {
		c2 := cat.Clone()
		c2.Stocks = append(c2.Stocks, catalogue.Stock{ID: "x", FattyAcids: map[string]float64{"C16:0": 100}, Available: math.Inf(1)})
		c.r.TransMax = math.NaN()
		_, err := Replace(c2, c.r, Options{})
		require.Error(t, err, name)
		assert.True(t, catalogue.IsBadInput(err), "%s: %v", name, err)
		assert.Contains(t, err.Error(), c.want, name)
	}
}

// Of several bad per-temperature tolerances the coldest is named, on every
// call: the same command gives the same message each run (reproducible
// reports, common practice), not whichever Go's random map order met first.
func TestReplaceBadPerTempSameMessage(t *testing.T) {
	cat := catalogue.DemoStocks()
	r := Replacement{Incumbent: "ph-soy", Tolerance: 3, PerTemp: map[float64]float64{10: -1, 20: 101, 30: -2, 35: 200, 40: math.NaN()}, TransMax: 1, Batch: 20}
	for i := 0; i < 20; i++ {
		_, err := Replace(cat, r, Options{})
		require.Error(t, err)
		require.True(t, catalogue.IsBadInput(err))
		require.Contains(t, err.Error(), "tolerance at 10 °C = -1 % solid", "call %d", i)
	}
}

// BenchmarkReplaceWithReactor is a replacement with the reactor and the
// TAG model's SFC (target: under 300 ms) on the demo data.
func BenchmarkReplaceWithReactor(b *testing.B) {
	cat := catalogue.DemoStocks()
	proc := &catalogue.Process{Interesterify: []string{"palm-st-hard", "soybean"}, Method: "chemical", Cost: 45}
	for b.Loop() {
		res, err := Replace(cat, Replacement{Incumbent: "ph-soy", Tolerance: 3, TransMax: 1, Batch: 20, Process: proc}, Options{})
		if err != nil || res.Status != Optimal {
			b.Fatal(err, res.Status)
		}
	}
}
