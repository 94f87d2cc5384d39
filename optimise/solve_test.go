package optimise

import (
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// engines under test: the build's default (lipoplan's simplex, or CLP/CBC
// in the coin build, where lipoplan's simplex is tested too) and gonum's
// simplex, a reference that is always compiled in. Engines keep their LP
// engines warm from one model to the next, as a Solver does.
func engines() []*engine {
	es := []*engine{defaultEngine()}
	if es[0].name() != simplexEngine().name() {
		es = append(es, simplexEngine())
	}
	return append(es, gonumEngine())
}

func twoStocks() *catalogue.Catalogue {
	return &catalogue.Catalogue{File: "paper.toml", Currency: "EUR", Stocks: []catalogue.Stock{
		{ID: "hard", Name: "palmitic stock", Price: 1000, Available: math.Inf(1), FattyAcids: map[string]float64{"C16:0": 100}},
		{ID: "soft", Name: "oleic stock", Price: 1500, Available: math.Inf(1), FattyAcids: map[string]float64{"C18:1": 100}},
	}}
}

func limitByName(t *testing.T, r *Result, name string) LimitReport {
	t.Helper()
	for _, l := range r.Limits {
		if l.Name == name {
			return l
		}
	}
	t.Fatalf("no limit %q in %+v", name, r.Limits)
	return LimitReport{}
}

func rangeOf(t *testing.T, r *Result, id string) Range {
	t.Helper()
	for _, g := range r.Ranging {
		if g.Stock == id {
			return g
		}
	}
	t.Fatalf("no ranging for %q", id)
	return Range{}
}

// TestTwoStocksOnPaper is solved by hand. Stocks: "hard" is 100 % C16:0 at
// 1000 EUR/t, "soft" 100 % C18:1 at 1500 EUR/t; spec C18:1 >= 30 %, batch
// 20 t. With x the share of soft, cost = 10(100-x) + 15x = 1000 + 5x EUR/t,
// rising in x, so x sits at its minimum 30: 70 % hard (14 t), 30 % soft (6 t),
// 1150 EUR/t, 23 000 EUR per batch. Raising the minimum by 1 raises the cost
// by 5 EUR/t: shadow price -5, for every minimum b from 0 to 100 (x = b
// stays a blend of the two). The blend stays optimal while hard is the
// cheaper stock: hard's price may rise to 1500 (and fall without limit),
// soft's may fall to 1000. The IV of the blend is 30 x 0.8601 = 25.80 with
// the AOCS Cd 1c-85 factor for C18:1 (0.8601, triolein).
func TestTwoStocksOnPaper(t *testing.T) {
	spec := &catalogue.Spec{Name: "paper", Batch: 20, Limits: []catalogue.Limit{{Name: "C18:1", Bound: bound(30, inf())}}}
	for _, eng := range engines() {
		t.Run(eng.name(), func(t *testing.T) {
			r, err := solveWith(eng, twoStocks(), spec, Options{})
			require.NoError(t, err)
			require.Equal(t, Optimal, r.Status)
			assert.InDelta(t, 1150, r.CostPerTonne, 1e-9)
			assert.InDelta(t, 23000, r.BatchCost, 1e-7)
			require.Len(t, r.Blend, 2)
			assert.Equal(t, "hard", r.Blend[0].Stock)
			assert.InDelta(t, 70, r.Blend[0].Pct, 1e-9)
			assert.InDelta(t, 14, r.Blend[0].Tonnes, 1e-9)
			assert.InDelta(t, 30, r.Blend[1].Pct, 1e-9)
			assert.InDelta(t, 6, r.Blend[1].Tonnes, 1e-9)
			l := limitByName(t, r, "C18:1.min")
			assert.True(t, l.Binding)
			assert.InDelta(t, 30, l.Value, 1e-9)
			assert.InDelta(t, -5, l.ShadowPrice, 1e-9)
			assert.InDelta(t, 0, l.HoldsFrom, 1e-9)
			assert.InDelta(t, 100, l.HoldsTo, 1e-9)
			assert.Equal(t, "lowering the C18:1 minimum saves 5.00 EUR/t per 1 %, down to 0.00", l.Explain)
			h := rangeOf(t, r, "hard")
			assert.True(t, h.InBlend)
			assert.True(t, math.IsInf(h.PriceLow, -1))
			assert.InDelta(t, 1500, h.PriceHigh, 1e-7)
			s := rangeOf(t, r, "soft")
			assert.InDelta(t, 1000, s.PriceLow, 1e-7)
			assert.True(t, math.IsInf(s.PriceHigh, 1))
			assert.InDelta(t, 25.80, r.Properties.IV, 0.01) // AOCS Cd 1c-85 factor 0.8601 for C18:1
		})
	}
}

// TestAvailabilityOnPaper: the same two stocks, C18:1 >= 30 %, but only 10 t
// of hard on hand for a 20 t batch, so hard <= 50 %. Solved by hand: hard
// 50 %, soft 50 %, cost 10·50 + 15·50 = 1250 EUR/t. With A tonnes of hard,
// hard = 5A % and cost = 1500 - 25A EUR/t: each extra tonne saves 25 EUR/t
// (500 EUR per batch), for A from 0 up to 14 t, where hard reaches the 70 %
// that C18:1 >= 30 allows. C18:1 (50 %) is not binding. Hard sits at its upper
// bound with reduced cost 10 - 15 = -5 per %, so its price may rise to 1500.
func TestAvailabilityOnPaper(t *testing.T) {
	cat := twoStocks()
	cat.Stocks[0].Available = 10
	spec := &catalogue.Spec{Name: "paper", Batch: 20, Limits: []catalogue.Limit{{Name: "C18:1", Bound: bound(30, inf())}}}
	for _, eng := range engines() {
		t.Run(eng.name(), func(t *testing.T) {
			r, err := solveWith(eng, cat, spec, Options{})
			require.NoError(t, err)
			assert.InDelta(t, 1250, r.CostPerTonne, 1e-9)
			a := limitByName(t, r, "avail.hard")
			assert.True(t, a.Binding)
			assert.InDelta(t, 10, a.Value, 1e-9)
			assert.InDelta(t, 10, a.Bound, 0)
			assert.InDelta(t, 25, a.ShadowPrice, 1e-9)
			assert.InDelta(t, 0, a.HoldsFrom, 1e-9)
			assert.InDelta(t, 14, a.HoldsTo, 1e-9)
			assert.Equal(t, "each extra tonne of hard on hand saves 25.00 EUR/t (500.00 EUR per batch), up to 14.00 t on hand; past that the blend changes", a.Explain)
			l := limitByName(t, r, "C18:1.min")
			assert.False(t, l.Binding)
			assert.Zero(t, l.ShadowPrice)
			h := rangeOf(t, r, "hard")
			assert.True(t, math.IsInf(h.PriceLow, -1))
			assert.InDelta(t, 1500, h.PriceHigh, 1e-7)
		})
	}
}

// paperInfeasible is solved by hand. hard: C16:0 100 %, SFC 60 % at 20 °C;
// soft: C18:1 100 %, SFC 0; wax: C18:0 100 %, SFC 90 %, excluded by
// use max = 0. Spec: SFC(20) >= 40 and C18:1 >= 50. With soft >= 50 % hard is
// at most 50 %, so SFC <= 30: impossible by 10 SFC units. The elastic
// programme weighs each deficit by the spread of its quantity over the
// stocks: SFC 90 - 0 = 90, C18:1 100 - 0 = 100, [use] 100. Per SFC unit won:
// lowering the SFC minimum costs 1/90 = 0.0111; lowering the C18:1 minimum
// frees a share for hard (+0.6 SFC each) at 1/(0.6·100) = 0.0167; letting wax
// replace hard (+0.3 SFC per share) costs 1/(0.3·100) = 0.0333. The smallest
// relaxation is therefore sfc.20.min by 10.
func paperInfeasible() (*catalogue.Catalogue, *catalogue.Spec) {
	curve := func(s float64) catalogue.Curve { return catalogue.Curve{{Temp: 10, Solid: s}, {Temp: 40, Solid: s}} }
	cat := &catalogue.Catalogue{File: "paper.toml", Currency: "EUR", Stocks: []catalogue.Stock{
		{ID: "hard", Price: 1000, Available: inf(), FattyAcids: map[string]float64{"C16:0": 100}, SFC: curve(60)},
		{ID: "soft", Price: 1500, Available: inf(), FattyAcids: map[string]float64{"C18:1": 100}, SFC: curve(0)},
		{ID: "wax", Price: 3000, Available: inf(), FattyAcids: map[string]float64{"C18:0": 100}, SFC: curve(90)},
	}}
	spec := &catalogue.Spec{Name: "paper", Batch: 10,
		Limits: []catalogue.Limit{{Name: "C18:1", Bound: bound(50, inf())}},
		SFC:    []catalogue.SFCLimit{{Temp: 20, Bound: bound(40, inf())}},
		Use:    []catalogue.Use{{Stock: "wax", Bound: bound(math.Inf(-1), 0)}},
	}
	return cat, spec
}

func TestInfeasibleOnPaper(t *testing.T) {
	cat, spec := paperInfeasible()
	for _, eng := range engines() {
		t.Run(eng.name(), func(t *testing.T) {
			r, err := solveWith(eng, cat, spec, Options{})
			require.NoError(t, err)
			require.Equal(t, Infeasible, r.Status)
			require.Len(t, r.Relaxation, 1)
			assert.Equal(t, "sfc.20.min", r.Relaxation[0].Name)
			assert.InDelta(t, 10, r.Relaxation[0].By, 1e-7)
			c2, s2, err := Relaxed(cat, spec, r.Relaxation)
			require.NoError(t, err)
			r2, err := solveWith(eng, c2, s2, Options{})
			require.NoError(t, err)
			assert.Equal(t, Optimal, r2.Status)
			assert.InDelta(t, 30, s2.SFC[0].Min, 1e-7)
			assert.InDelta(t, 40, spec.SFC[0].Min, 0, "the original spec is untouched")
		})
	}
}

func TestMissingSFCIsBadInput(t *testing.T) {
	cat, spec := paperInfeasible()
	cat.Stocks[1].SFC = catalogue.Curve{{Temp: 25, Solid: 0}, {Temp: 40, Solid: 0}}
	_, err := Solve(cat, spec, Options{})
	require.Error(t, err)
	assert.True(t, catalogue.IsBadInput(err))
	assert.Contains(t, err.Error(), `"soft"`)
	assert.Contains(t, err.Error(), `20 °C`)

	// A stock excluded by use max = 0 need not have the data.
	cat, spec = paperInfeasible()
	cat.Stocks[2].SFC = nil
	spec.SFC[0].Min = 20
	r, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	assert.Equal(t, Optimal, r.Status)
}

func TestBadInputs(t *testing.T) {
	cat := twoStocks()
	cases := map[string]struct {
		spec *catalogue.Spec
		want string
	}{
		"batch":     {&catalogue.Spec{Batch: 0}, "batch"},
		"unknown":   {&catalogue.Spec{Batch: 1, Limits: []catalogue.Limit{{Name: "ivv", Bound: bound(1, 2)}}}, `"ivv"`},
		"min>max":   {&catalogue.Spec{Batch: 1, Limits: []catalogue.Limit{{Name: "iv", Bound: bound(3, 2)}}}, "is above max"},
		"use stock": {&catalogue.Spec{Batch: 1, Use: []catalogue.Use{{Stock: "nope", Bound: bound(0, 2)}}}, `"nope"`},
	}
	for name, c := range cases {
		t.Run(name, func(t *testing.T) {
			_, err := Solve(cat, c.spec, Options{})
			require.Error(t, err)
			assert.True(t, catalogue.IsBadInput(err), err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
	_, err := Solve(&catalogue.Catalogue{}, &catalogue.Spec{Batch: 1}, Options{})
	assert.True(t, catalogue.IsBadInput(err))
}

// Duplicate, redundant and empty limits must not disturb the answer: the
// optimum equals that of the clean spec (the paper case above, 1150 EUR/t).
func TestDuplicateRedundantEmptyLimits(t *testing.T) {
	spec := &catalogue.Spec{Name: "messy", Batch: 20, Limits: []catalogue.Limit{
		{Name: "C18:1", Bound: bound(30, inf())},
		{Name: "C18:1", Bound: bound(30, inf())},           // duplicate
		{Name: "safa", Bound: bound(math.Inf(-1), 100)},    // redundant: SAFA never exceeds 100
		{Name: "C4:0", Bound: bound(math.Inf(-1), 5)},      // no stock has C4:0: an all-zero row
		{Name: "C12:0", Bound: bound(0, 0)},                // all-zero equality row, met
		{Name: "iv", Bound: catalogue.Free()},              // empty: no side set
		{Name: "C16:0", Bound: bound(math.Inf(-1), 100.0)}, // touches the upper corner only
	}}
	for _, eng := range engines() {
		t.Run(eng.name(), func(t *testing.T) {
			r, err := solveWith(eng, twoStocks(), spec, Options{})
			require.NoError(t, err)
			require.Equal(t, Optimal, r.Status)
			assert.InDelta(t, 1150, r.CostPerTonne, 1e-9)
			// The two copies of C18:1 share the price of the bound.
			var total float64
			for _, l := range r.Limits {
				if l.Name == "C18:1.min" {
					total += l.ShadowPrice
				}
			}
			assert.InDelta(t, -5, total, 1e-9)
		})
	}
	_, err := MPS(twoStocks(), spec)
	require.NoError(t, err)
}

func TestEmptyRowInfeasible(t *testing.T) {
	// No stock holds C4:0, so C4:0 >= 1 cannot be met; the relaxation must
	// say so (worked by hand: lower the minimum by 1).
	spec := &catalogue.Spec{Batch: 20, Limits: []catalogue.Limit{{Name: "C4:0", Bound: bound(1, inf())}}}
	for _, eng := range engines() {
		r, err := solveWith(eng, twoStocks(), spec, Options{})
		require.NoError(t, err, eng.name())
		require.Equal(t, Infeasible, r.Status)
		require.Len(t, r.Relaxation, 1)
		assert.Equal(t, "C4:0.min", r.Relaxation[0].Name)
		assert.InDelta(t, 1, r.Relaxation[0].By, 1e-9)
	}
}

// Odd programmatic inputs (as a what-if editor might produce) give a
// bad-input error or an answer, never a panic.
func TestOddInputsNeverPanic(t *testing.T) {
	nan := math.NaN()
	mk := func(edit func(*catalogue.Catalogue, *catalogue.Spec)) (*catalogue.Catalogue, *catalogue.Spec) {
		cat := twoStocks()
		spec := &catalogue.Spec{Batch: 20, Limits: []catalogue.Limit{{Name: "iv", Bound: bound(10, 60)}}, SFC: nil}
		edit(cat, spec)
		return cat, spec
	}
	edits := map[string]func(*catalogue.Catalogue, *catalogue.Spec){
		"nan fa":    func(c *catalogue.Catalogue, _ *catalogue.Spec) { c.Stocks[0].FattyAcids["C18:1"] = nan },
		"nan price": func(c *catalogue.Catalogue, _ *catalogue.Spec) { c.Stocks[0].Price = nan },
		"neg avail": func(c *catalogue.Catalogue, _ *catalogue.Spec) { c.Stocks[0].Available = -1 },
		"nan bound": func(_ *catalogue.Catalogue, s *catalogue.Spec) { s.Limits[0].Min = nan },
		"inf batch": func(_ *catalogue.Catalogue, s *catalogue.Spec) { s.Batch = math.Inf(1) },
		"dup stock": func(c *catalogue.Catalogue, _ *catalogue.Spec) { c.Stocks[1].ID = "hard" },
		"no fa":     func(c *catalogue.Catalogue, _ *catalogue.Spec) { c.Stocks[0].FattyAcids = nil },
		"huge use": func(_ *catalogue.Catalogue, s *catalogue.Spec) {
			s.Use = []catalogue.Use{{Stock: "hard", Bound: bound(150, 200)}}
		},
		"zero avail":  func(c *catalogue.Catalogue, _ *catalogue.Spec) { c.Stocks[0].Available, c.Stocks[1].Available = 0, 0 },
		"rules range": func(_ *catalogue.Catalogue, s *catalogue.Spec) { s.Rules.SmallestShare = 150 },
		"sfc no data": func(_ *catalogue.Catalogue, s *catalogue.Spec) {
			s.SFC = []catalogue.SFCLimit{{Temp: 20, Bound: bound(5, inf())}}
		},
	}
	for name, edit := range edits {
		t.Run(name, func(t *testing.T) {
			cat, spec := mk(edit)
			for _, eng := range engines() {
				require.NotPanics(t, func() {
					r, err := solveWith(eng, cat, spec, Options{})
					if err == nil {
						require.Contains(t, []Status{Optimal, Infeasible}, r.Status)
					} else {
						assert.True(t, catalogue.IsBadInput(err), "%s: %v", eng.name(), err)
					}
				})
			}
		})
	}
}

func TestProcessStepNoted(t *testing.T) {
	spec := &catalogue.Spec{Batch: 20, Limits: []catalogue.Limit{{Name: "C18:1", Bound: bound(30, inf())}},
		Process: &catalogue.Process{Interesterify: []string{"hard", "soft"}, Method: "chemical"}}
	r, err := Solve(twoStocks(), spec, Options{})
	require.NoError(t, err)
	require.NotEmpty(t, r.Notes)
	assert.Contains(t, r.Notes[0], "[process]")
	joined := strings.Join(r.Notes, "\n")
	assert.Contains(t, joined, "TAG model:", "the model used is named")
	assert.Contains(t, joined, "RMS 7.9 % solid", "the measured error is stated")
	assert.InDelta(t, 1150, r.CostPerTonne, 1e-9) // the paper case, unchanged
}
