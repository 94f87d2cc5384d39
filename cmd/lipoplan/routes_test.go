package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Two test stocks of palmitic and oleic acid only (invented test data), so
// that every route's TAG classes follow by hand from textbook formulas.
const routeStocks = `currency = "EUR"
[[stock]]
id = "hs"
name = "palmitic-rich test fat"
price = 1000.0
[stock.fatty_acids]
"C16:0" = 70.0
"C18:1" = 30.0
[stock.sn2]
"C16:0" = 20.0
"C18:1" = 80.0

[[stock]]
id = "lo"
name = "oleic-rich test oil"
price = 1100.0
[stock.fatty_acids]
"C16:0" = 10.0
"C18:1" = 90.0
[stock.sn2]
"C16:0" = 2.0
"C18:1" = 98.0
`

// The blend is fixed at 40 % hs + 60 % lo and the spec sends all of it
// through the reactor, so each route's TAG classes are one distribution.
const routeSpec = `name = "Route test fat"
batch = 10.0
[use]
"hs" = { min = 40, max = 40 }
"lo" = { min = 60, max = 60 }
[process]
interesterify = ["hs", "lo"]
method = "chemical"
cost = 40.0
through = { min = 100 }
`

// Molar masses, g/mol: palmitic acid C16H32O2 256.42 and oleic acid
// C18H34O2 282.46 (PubChem); a TAG is three acids on glycerol (92.09) less
// three waters (18.015): M_TAG = 3·M_acid + 38.05.
const (
	mPalmitic = 256.42
	mOleic    = 282.46
)

// routeClass are TAG saturation classes, mol %.
type routeClass struct{ S3, S2U, SUS, SU2, U3 float64 }

// sat13 are a stock's saturated share of acyl groups in all (s), at sn-2
// (s2) and at sn-1,3 (s13 = (3s - s2)/2), and its TAG moles per 100 g.
func sat13(palm, sn2Palm float64) (s, s2, s13, mol float64) {
	np, no := palm/mPalmitic, (100-palm)/mOleic
	s = np / (np + no)
	s2 = sn2Palm / 100
	s13 = (3*s - s2) / 2
	mAcid := 100 / (np + no)
	return s, s2, s13, 100 / (3*mAcid + 38.05)
}

// classes13 is the 1,3-random-2-random distribution (Vander Wal 1960;
// Coleman 1961) in classes: sn-1 and sn-3 independent with saturated share
// a, sn-2 with b.
func classes13(a, b float64) routeClass {
	return routeClass{
		S3:  100 * a * a * b,
		SUS: 100 * a * a * (1 - b),
		S2U: 100 * (a*a*(1-b) + 2*a*(1-a)*b),
		SU2: 100 * ((1-a)*(1-a)*b + 2*a*(1-a)*(1-b)),
		U3:  100 * (1 - a) * (1 - a) * (1 - b),
	}
}

// routes sets the physical blend and chemical and enzymatic
// interesterification side by side; its TAG classes are checked against
// the textbook distributions (Gunstone, The Chemistry of Oils and Fats,
// 2004, ch. 1 and 7, from memory for the formulas' presentation):
//   - physical: each stock 1,3-random-2-random from its own sn-2 profile,
//     mixed by TAG moles;
//   - chemical (random over all three positions): S3 = s³, S2U = 3s²u,
//     SU2 = 3su², U3 = u³, s the pooled saturated acyl share;
//   - enzymatic (sn-1,3 lipase): sn-2 kept, sn-1,3 randomised over the
//     pool: 1,3-random-2-random with the pooled s13 and s2.
func TestRoutesTAGClassesByHand(t *testing.T) {
	dir := t.TempDir()
	stocks, spec := filepath.Join(dir, "stocks.toml"), filepath.Join(dir, "spec.toml")
	require.NoError(t, os.WriteFile(stocks, []byte(routeStocks), 0o644))
	require.NoError(t, os.WriteFile(spec, []byte(routeSpec), 0o644))
	code, out, errs := run(t, "routes", "--stocks", stocks, "--spec", spec, "--format", "json")
	require.Equal(t, 0, code, errs)
	var js struct {
		Routes []struct {
			Route      string             `json:"route"`
			Status     string             `json:"status"`
			Cost       float64            `json:"cost_per_tonne"`
			Change     *float64           `json:"cost_change"`
			Through    *float64           `json:"through_pct"`
			TAGClasses map[string]float64 `json:"tag_classes"`
		} `json:"routes"`
		Caution string `json:"caution"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &js))
	require.Len(t, js.Routes, 3)

	sA, s2A, s13A, nA := sat13(70, 20)
	sB, s2B, s13B, nB := sat13(10, 2)
	wA, wB := 40*nA, 60*nB // TAG moles of each stock in 100 g of blend
	// physical: mixture of the two stocks' own distributions
	cA, cB := classes13(s13A, s2A), classes13(s13B, s2B)
	mixc := func(f func(c routeClass) float64) float64 { return (wA*f(cA) + wB*f(cB)) / (wA + wB) }
	phys := routeClass{
		S3: mixc(func(c routeClass) float64 { return c.S3 }), S2U: mixc(func(c routeClass) float64 { return c.S2U }),
		SUS: mixc(func(c routeClass) float64 { return c.SUS }), SU2: mixc(func(c routeClass) float64 { return c.SU2 }),
		U3: mixc(func(c routeClass) float64 { return c.U3 }),
	}
	// chemical: acyl groups pooled by moles (3 per TAG)
	s := (wA*sA + wB*sB) / (wA + wB)
	u := 1 - s
	chem := routeClass{S3: 100 * s * s * s, S2U: 300 * s * s * u, SUS: 100 * s * s * u, SU2: 300 * s * u * u, U3: 100 * u * u * u}
	enz := classes13((wA*s13A+wB*s13B)/(wA+wB), (wA*s2A+wB*s2B)/(wA+wB))

	for i, want := range []routeClass{phys, chem, enz} {
		r := js.Routes[i]
		assert.Equal(t, []string{"physical", "chemical", "enzymatic"}[i], r.Route)
		require.Equal(t, "optimal", r.Status, r.Route)
		got := r.TAGClasses
		// 0.2 mol %: the molar masses (acid, methyl ester or acyl) a
		// TAG-mole weighting may use differ by a few g/mol
		for k, v := range map[string]float64{"S3": want.S3, "S2U": want.S2U, "SUS": want.SUS, "SU2": want.SU2, "U3": want.U3} {
			assert.InDelta(t, v, got[k], 0.2, "%s %s", r.Route, k)
		}
	}
	// the same blend three ways: the reactor routes cost the processing
	// more, 40 EUR per tonne processed for the whole batch
	assert.InDelta(t, 0.4*1000+0.6*1100, js.Routes[0].Cost, 1e-6)
	for _, r := range js.Routes[1:] {
		assert.InDelta(t, 0.4*1000+0.6*1100+40, r.Cost, 1e-6, r.Route)
		require.NotNil(t, r.Change)
		assert.InDelta(t, 40, *r.Change, 1e-6)
		require.NotNil(t, r.Through)
		assert.InDelta(t, 100, *r.Through, 1e-6)
	}
	assert.Nil(t, js.Routes[0].Through)
	assert.Contains(t, js.Caution, "sodium methoxide")
}

// The text report has a column per route, the demand named once, and the
// cautions; the demo margarine shows the reactor routes cheaper than the
// physical blend. A spec without [process] takes --feed; bad input is
// exit 2 naming what to do.
func TestRoutesTextAndInput(t *testing.T) {
	code, out, errs := run(t, "routes", "--spec", filepath.Join("..", "..", "testdata", "process-margarine.toml"))
	require.Equal(t, 0, code, errs)
	for _, want := range []string{"physical blend", "chemical IE", "enzymatic IE", "change against physical", "through the reactor, %",
		"TAG classes, mol %", "SFC, % solid (spec band)", "35 C (<= 2)", "sodium methoxide"} {
		assert.Contains(t, out, want)
	}

	shortening := filepath.Join("..", "..", "catalogue", "demo", "shortening.toml")
	code, out, errs = run(t, "routes", "--spec", shortening, "--feed", "palm-st-hard,pko", "--process-cost", "50")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "Reactor feed: palm-st-hard, pko; processing 50.00 EUR per tonne processed")

	// every route impossible: no table of dashes, each route's diagnosis, exit 3
	impossible := filepath.Join(t.TempDir(), "hard.toml")
	body, err := os.ReadFile(filepath.Join("..", "..", "testdata", "process-margarine.toml"))
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(impossible, []byte(strings.Replace(string(body), `"10" = { min = 12.0, max = 22.0 }`, `"10" = { min = 60.0 }`, 1)), 0o644))
	code, out, _ = run(t, "routes", "--spec", impossible)
	assert.Equal(t, 3, code)
	assert.NotContains(t, out, "TAG classes, mol %")
	assert.Contains(t, out, "The physical blend cannot meet the spec.")
	assert.Contains(t, out, "The enzymatic IE cannot meet the spec.")

	code, _, errs = run(t, "routes")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "has no [process] table: give the stocks that may be interesterified with --feed")
	code, _, errs = run(t, "routes", "--spec", filepath.Join("..", "..", "testdata", "process-margarine.toml"), "--feed", "pko")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "leave out --feed and --process-cost")
	code, _, errs = run(t, "routes", "--feed", "lard")
	assert.Equal(t, 2, code)
	assert.True(t, strings.Contains(errs, `"lard"`), errs)
}

// solve reports a spec's demands on the reactor: the demand in the reactor
// section, the minimum as a limit with its saving (JSON process.through,
// feed_ratio, limits process.through.min), and an impossible demand with
// the through minimum to lower.
func TestSolveReactorDemand(t *testing.T) {
	body, err := os.ReadFile(filepath.Join("..", "..", "testdata", "process-margarine.toml"))
	require.NoError(t, err)
	dir := t.TempDir()
	spec := filepath.Join(dir, "forced.toml")
	require.NoError(t, os.WriteFile(spec, append(body, "through = { min = 40 }\nfeed_ratio = { \"palm-st-hard\" = 1, pko = 1 }\n"...), 0o644))
	code, out, errs := run(t, "solve", "--spec", spec)
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "the spec asks for at least 40.00 % of the batch through it, the feed as palm-st-hard 50 % : pko 50 %")
	assert.Contains(t, out, "reactor throughput, at least")
	assert.NotContains(t, out, "successive LP")

	code, out, errs = run(t, "solve", "--spec", spec, "--format", "json")
	require.Equal(t, 0, code, errs)
	var js struct {
		Process struct {
			Through   map[string]float64 `json:"through"`
			FeedRatio map[string]float64 `json:"feed_ratio"`
			Feed      []struct {
				Stock string  `json:"stock"`
				Pct   float64 `json:"pct"`
			} `json:"feed"`
		} `json:"process"`
		Limits []struct {
			Name    string `json:"name"`
			Binding bool   `json:"binding"`
		} `json:"limits"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &js))
	assert.Equal(t, map[string]float64{"min": 40}, js.Process.Through)
	assert.Equal(t, map[string]float64{"palm-st-hard": 50, "pko": 50}, js.Process.FeedRatio)
	require.Len(t, js.Process.Feed, 2)
	assert.InDelta(t, js.Process.Feed[0].Pct, js.Process.Feed[1].Pct, 1e-6, "1 : 1")
	assert.GreaterOrEqual(t, js.Process.Feed[0].Pct+js.Process.Feed[1].Pct, 40-1e-6)
	found := false
	for _, l := range js.Limits {
		found = found || l.Name == "process.through.min"
	}
	assert.True(t, found)

	require.NoError(t, os.WriteFile(spec, append(body, "through = { min = 95 }\n"...), 0o644))
	code, out, _ = run(t, "solve", "--spec", spec)
	assert.Equal(t, 3, code)
	assert.Contains(t, out, "Change to the reactor demand that would make it feasible")
	assert.Contains(t, out, "process.through.min    lower the minimum by")
}
