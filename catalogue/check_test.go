package catalogue

import (
	"bytes"
	"math"
	"sort"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// errorTexts lists the errors of ps as "where: message", without the file,
// in a fixed order.
func errorTexts(ps Problems) []string {
	var out []string
	for _, p := range ps.Errors() {
		out = append(out, p.Where+": "+p.Msg)
	}
	sort.Strings(out)
	return out
}

// The demo data, which load without a problem, pass the checks for values
// built in code too.
func TestChecksPassDemo(t *testing.T) {
	cat := DemoStocks()
	assert.Empty(t, cat.Check())
	for _, s := range cat.Stocks {
		assert.Empty(t, s.Check(), s.ID)
		assert.Empty(t, s.CheckProfiles(), s.ID)
	}
	for _, s := range DemoSpecs() {
		assert.Empty(t, s.Check(cat), s.ID)
	}
	assert.NoError(t, cat.Check().Err())
}

// A value edited in code is refused by Check with exactly the words the
// loader uses for the same value written in the file (one wording; the
// rules are the project's, README "File formats" and "Accepted
// magnitudes"): each edit of a demo stock is written with WriteStocks and
// parsed back, and both must name the same problems.
func TestStockCheckSpeaksAsTheLoader(t *testing.T) {
	for name, edit := range map[string]func(s *Stock){
		"price huge":      func(s *Stock) { s.Price = 1e25 },
		"price tiny":      func(s *Stock) { s.Price = 1e-320 },
		"on hand":         func(s *Stock) { s.Available = -3 },
		"id":              func(s *Stock) { s.ID = "PKO R" },
		"fa key":          func(s *Stock) { s.FattyAcids["C18:4"] = 0.5 },
		"fa negative":     func(s *Stock) { s.FattyAcids["C16:0"] = -2 },
		"fa sum":          func(s *Stock) { s.FattyAcids["C16:0"] += 5 },
		"sn2 absent acid": func(s *Stock) { s.SN2 = map[string]float64{"C16:0": 10, "C22:1": 90} },
		"sn2 sum":         func(s *Stock) { s.SN2 = map[string]float64{"C18:1": 90} },
		"sfc over 100":    func(s *Stock) { s.SFC[0].Solid = 120 },
		"sfc temperature": func(s *Stock) { s.SFC = append(s.SFC, Point{Temp: 150, Solid: 0}) },
		"tags code":       func(s *Stock) { s.TAGs = map[string]float64{"PXP": 100} },
		"tags negative":   func(s *Stock) { s.TAGs = map[string]float64{"POP": 105, "PPP": -5} },
		"tags sum":        func(s *Stock) { s.TAGs = map[string]float64{"POP": 80} },
	} {
		cat := DemoStocks().Clone()
		s, ok := cat.Find("palm")
		require.True(t, ok)
		edit(s)
		var b bytes.Buffer
		require.NoError(t, WriteStocks(&b, cat), name)
		_, loaded := ParseStocks("stocks.toml", b.Bytes())
		want := errorTexts(loaded)
		require.NotEmpty(t, want, "%s: the loader refuses it", name)
		assert.Equal(t, want, errorTexts(cat.Check()), name)
		assert.Equal(t, want, errorTexts(s.Check()), name)
		assert.True(t, IsBadInput(cat.Check().Err()), name)
	}
	// two stocks with one id
	cat := DemoStocks().Clone()
	cat.Stocks[1].ID = cat.Stocks[0].ID
	var b bytes.Buffer
	require.NoError(t, WriteStocks(&b, cat))
	_, loaded := ParseStocks("stocks.toml", b.Bytes())
	assert.Equal(t, errorTexts(loaded), errorTexts(cat.Check()))
	assert.Contains(t, cat.Check().Error(), "is already used by stock #1")
	// no stocks
	assert.Contains(t, (&Catalogue{}).Check().Error(), "no stocks")
	var none *Catalogue
	assert.Contains(t, none.Check().Error(), "no stocks")
}

// The same for specs: each edit of a demo spec is written with WriteSpec,
// parsed back against the demo catalogue, and both name the same problems.
func TestSpecCheckSpeaksAsTheLoader(t *testing.T) {
	cat := DemoStocks()
	for name, edit := range map[string]func(s *Spec){
		"batch zero": func(s *Spec) { s.Batch = 0 },
		"batch huge": func(s *Spec) { s.Batch = 1e308 },
		"unknown limit": func(s *Spec) {
			s.Limits = append(s.Limits, Limit{Name: "saffa", Bound: Bound{Min: math.Inf(-1), Max: 50}})
		},
		"iv huge": func(s *Spec) {
			s.Limits = append(s.Limits, Limit{Name: "iv", Bound: Bound{Min: math.Inf(-1), Max: 1e25}})
		},
		"min above max": func(s *Spec) { s.Limits = append(s.Limits, Limit{Name: "mufa", Bound: Bound{Min: 48, Max: 38}}) },
		"fa limit": func(s *Spec) {
			s.Limits = append(s.Limits, Limit{Name: "C18:2", Bound: Bound{Min: -1, Max: math.Inf(1)}})
		},
		"sfc over 100":    func(s *Spec) { s.SFC[0].Min = 130 },
		"sfc temperature": func(s *Spec) { s.SFC = append(s.SFC, SFCLimit{Temp: 200, Bound: Bound{Min: math.Inf(-1), Max: 5}}) },
		"use stock":       func(s *Spec) { s.Use = append(s.Use, Use{Stock: "palmm", Bound: Bound{Min: math.Inf(-1), Max: 5}}) },
		"use over 100":    func(s *Spec) { s.Use = append(s.Use, Use{Stock: "palm", Bound: Bound{Min: math.Inf(-1), Max: 150}}) },
		"use minimums": func(s *Spec) {
			s.Use = append(s.Use, Use{Stock: "palm", Bound: Bound{Min: 60, Max: math.Inf(1)}}, Use{Stock: "rapeseed", Bound: Bound{Min: 50, Max: math.Inf(1)}})
		},
		"smallest_share": func(s *Spec) { s.Rules.SmallestShare = 150 },
		"max_stocks":     func(s *Spec) { s.Rules.MaxStocks = 2_000_000 },
		"feed twice": func(s *Spec) {
			s.Process = &Process{Interesterify: []string{"palm", "palm"}, Method: "chemical", Cost: 40, SFC: "predicted"}
		},
		"feed unknown": func(s *Spec) {
			s.Process = &Process{Interesterify: []string{"ps-hard"}, Method: "chemical", Cost: 40, SFC: "predicted"}
		},
		"feed empty": func(s *Spec) { s.Process = &Process{Method: "chemical", Cost: 40, SFC: "predicted"} },
		"method": func(s *Spec) {
			s.Process = &Process{Interesterify: []string{"palm"}, Method: "random", SFC: "predicted"}
		},
		"no method": func(s *Spec) { s.Process = &Process{Interesterify: []string{"palm"}, SFC: "predicted"} },
		"cost":      func(s *Spec) { s.Process = &Process{Interesterify: []string{"palm"}, Method: "enzymatic", Cost: -45} },
		"sfc model": func(s *Spec) {
			s.Process = &Process{Interesterify: []string{"palm"}, Method: "enzymatic", SFC: "model"}
		},
	} {
		s, ok := DemoSpec("laminating")
		require.True(t, ok)
		s = s.Clone()
		edit(s)
		s.SortLimits()
		var b bytes.Buffer
		require.NoError(t, WriteSpec(&b, s), name)
		_, loaded := ParseSpec("spec.toml", b.Bytes(), cat)
		want := errorTexts(loaded)
		require.NotEmpty(t, want, "%s: the loader refuses it", name)
		assert.Equal(t, want, errorTexts(s.Check(cat)), name)
		assert.True(t, IsBadInput(s.Check(cat).Err()), name)
	}
}

// What only a file can get wrong is the loader's: in code, a stock known by
// its TAGs alone, a limit with neither side set (the workspace's new row), a
// rule of 0 (no rule) and a [process] step whose SFC model is left to the
// default are all sound. The stock ids of [use] are checked only against a
// catalogue.
func TestChecksLeaveFileRulesToTheLoader(t *testing.T) {
	tagsOnly := Stock{ID: "m", TAGs: map[string]float64{"POP": 100}, Available: math.Inf(1)}
	assert.Empty(t, tagsOnly.Check())
	spec := &Spec{Batch: 10, Limits: []Limit{{Name: "iv", Bound: Free()}},
		Use:     []Use{{Stock: "anything", Bound: Bound{Min: math.Inf(-1), Max: 0}}},
		Process: &Process{Interesterify: []string{"anything"}, Method: "chemical"}}
	assert.Empty(t, spec.Check(nil))
	assert.Contains(t, spec.Check(DemoStocks()).Error(), `no stock "anything"`)
}

// CheckProfiles finds what a model cannot use (unknown keys and codes,
// amounts that are not finite and >= 0) in the loader's words, and leaves
// the sums to the model, which normalises them.
func TestCheckProfiles(t *testing.T) {
	s := Stock{ID: "x", FattyAcids: map[string]float64{"C16:0": 20, "C18:7": 10}, SN2: map[string]float64{"C16:0": math.NaN()},
		TAGs: map[string]float64{"PQP": 1}}
	ps := s.CheckProfiles()
	require.Len(t, ps, 3)
	assert.Contains(t, ps.Error(), `stock "x": fatty_acids: unknown fatty-acid key "C18:7"`)
	assert.Contains(t, ps.Error(), `stock "x": sn2 "C16:0" = NaN is not a finite number`)
	assert.Contains(t, ps.Error(), `stock "x": tags: TAG "PQP"`)
	low := Stock{ID: "y", FattyAcids: map[string]float64{"C16:0": 20}, TAGs: map[string]float64{"PPP": 50}}
	assert.Empty(t, low.CheckProfiles(), "sums are the model's to normalise")
	assert.NotEmpty(t, low.Check().Errors(), "and the loader's rule for a stock")
}

// CheckModel keeps the rules without which there is no model (finite
// numbers, min not above max, a share not below zero, known stocks and
// limits, the [process] step) and leaves out those for what a person types:
// a relaxed minimum a hair below zero, a [use] cap above 100 % and a fatty
// acid outside the reference table (left out of every property) are a
// model, if not a file; the words are Check's.
func TestCheckModel(t *testing.T) {
	cat := DemoStocks().Clone()
	spec, ok := DemoSpec("laminating")
	require.True(t, ok)
	spec = spec.Clone()
	spec.SFC[0].Min = -1e-14
	spec.Use = append(spec.Use, Use{Stock: "palm", Bound: Bound{Min: math.Inf(-1), Max: 150}})
	spec.SortLimits()
	assert.Empty(t, spec.CheckModel(cat))
	assert.Len(t, spec.Check(cat).Errors(), 2)
	cat.Stocks[0].FattyAcids["C99:1"] = 1
	assert.Empty(t, cat.CheckModel())
	assert.Len(t, cat.Check().Errors(), 1, "the unknown key (its sum is not checked then)")

	spec.SFC[0].Min = math.NaN()
	spec.Use[0].Min = -5
	cat.Stocks[0].Price = -1
	cat.Stocks[1].FattyAcids["C16:0"] = math.Inf(1)
	for _, ps := range []Problems{spec.CheckModel(cat), cat.CheckModel()} {
		for _, p := range ps {
			assert.Contains(t, errorTexts(append(spec.Check(cat), cat.Check()...)), p.Where+": "+p.Msg, "one wording")
		}
	}
	assert.Len(t, spec.CheckModel(cat), 2)
	assert.Len(t, cat.CheckModel(), 2)
}
