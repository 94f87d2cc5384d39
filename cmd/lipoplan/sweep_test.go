package main

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// The sweep's breakpoints around the demo optimum are the cost-ranging ends
// that solve reports for the same stock (two methods, one answer).
func TestSweepMatchesRanging(t *testing.T) {
	cat := catalogue.DemoStocks()
	spec := catalogue.DemoSpecs()[0]
	res, err := optimise.Solve(cat, spec, optimise.Options{})
	require.NoError(t, err)
	var lo, hi float64
	for _, g := range res.Ranging {
		if g.Stock == "palm" {
			lo, hi = g.PriceLow, g.PriceHigh
		}
	}
	require.NotZero(t, hi, "palm is in the demo laminating blend")
	svg := filepath.Join(t.TempDir(), "sweep.svg")
	code, out, errs := run(t, "sweep", "--price", "palm="+f(lo-50)+":"+f(hi+50)+":5", "--format", "json", "--svg", svg)
	require.Equal(t, 0, code, errs)
	var got struct {
		Engine      string           `json:"engine"`
		Points      []map[string]any `json:"points"`
		Breakpoints []float64        `json:"breakpoints"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assertEngineNamed(t, got.Engine)
	assert.Len(t, got.Points, 5)
	require.Len(t, got.Breakpoints, 2)
	assert.InDelta(t, lo, got.Breakpoints[0], 0.01)
	assert.InDelta(t, hi, got.Breakpoints[1], 0.01)
	raw, err := os.ReadFile(svg)
	require.NoError(t, err)
	var doc struct{ XMLName xml.Name }
	require.NoError(t, xml.Unmarshal(raw, &doc), "the SVG is well-formed XML")
	assert.Equal(t, "svg", doc.XMLName.Local)
}

func f(v float64) string { return jsonNumber(v) }

func jsonNumber(v float64) string {
	b, _ := json.Marshal(round(v, 2))
	return string(b)
}

func TestSweepBadInput(t *testing.T) {
	for _, p := range []string{"", "palm", "palm=1:2", "palm=a:2:3", "palm=1:2:x", "nosuch=1:2:3", "palm=5:5:3", "palm=1:2:1", "palm=1e25:1e26:3", "palm=-5:10:3", "palm=1:1e308:3"} {
		code, _, errs := run(t, "sweep", "--price", p)
		assert.Equal(t, 2, code, p)
		assert.Contains(t, errs, "--price", p)
	}
}

// sweepOut is the JSON of a sweep, as far as the tests read it.
type sweepOut struct {
	Stocks      []string           `json:"stocks"`
	ValueUnit   string             `json:"value_unit"`
	BasePrices  map[string]float64 `json:"base_prices"`
	BaseCost    *float64           `json:"base_cost_per_tonne"`
	Breakpoints []float64          `json:"breakpoints"`
	Points      []struct {
		Value  float64            `json:"value"`
		Prices map[string]float64 `json:"prices"`
		Cost   *float64           `json:"cost_per_tonne"`
		Change *float64           `json:"change_per_tonne"`
	} `json:"points"`
	Changes []struct {
		Value  float64 `json:"value"`
		Shifts []struct {
			Stock  string  `json:"stock"`
			Before float64 `json:"pct_before"`
			After  float64 `json:"pct_after"`
		} `json:"shifts"`
		Before []map[string]any `json:"before"`
		After  []map[string]any `json:"after"`
	} `json:"breakpoint_changes"`
}

func sweepRun(t *testing.T, args ...string) sweepOut {
	t.Helper()
	code, out, errs := run(t, append([]string{"sweep", "--format", "json"}, args...)...)
	require.Equal(t, 0, code, errs)
	var got sweepOut
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	return got
}

// solveCostAt is the cost per tonne `lipoplan solve` reports for spec with
// the named stocks' prices set by hand in a catalogue file of their own: an
// independent re-solve of one sweep point.
func solveCostAt(t *testing.T, spec string, prices map[string]float64) float64 {
	t.Helper()
	cat := catalogue.DemoStocks().Clone()
	for id, p := range prices {
		st, ok := cat.Find(id)
		require.True(t, ok)
		st.Price = p
	}
	var b bytes.Buffer
	require.NoError(t, catalogue.WriteStocks(&b, cat))
	path := filepath.Join(t.TempDir(), "stocks.toml")
	require.NoError(t, os.WriteFile(path, b.Bytes(), 0o644))
	code, out, errs := run(t, "solve", "--stocks", path, "--spec", spec, "--format", "json")
	require.Equal(t, 0, code, errs)
	var got struct {
		Cost float64 `json:"cost_per_tonne"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	return got.Cost
}

// A relative sweep from the command line is the absolute sweep at the
// prices computed by hand (today's price × (1 + v/100)); the base case is
// what solve reports at today's prices, each point's change is its cost
// less that; a sweep of three palm stocks moved together equals, at each
// step checked, solve on a catalogue with the three prices set by hand;
// and at each breakpoint the JSON names the stocks whose shares move.
func TestSweepRelativeCLI(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "shortening.toml")
	require.NoError(t, os.WriteFile(spec, catalogue.DemoFiles()["shortening.toml"], 0o644))
	st, _ := catalogue.DemoStocks().Find("palm-st-hard")
	p0 := st.Price

	rel := sweepRun(t, "--spec", spec, "--price", "palm-st-hard=-10%:+20%:13")
	abs := sweepRun(t, "--spec", spec, "--price", "palm-st-hard="+f(p0*0.9)+":"+f(p0*1.2)+":13")
	assert.Equal(t, "percent", rel.ValueUnit)
	assert.Equal(t, "price", abs.ValueUnit)
	require.Len(t, rel.Points, 13)
	require.NotNil(t, rel.BaseCost)
	base := solveCostAt(t, spec, nil)
	assert.InDelta(t, base, *rel.BaseCost, 1e-3, "the base case is today's solve")
	for i, p := range rel.Points {
		price := p0 * (1 + p.Value/100)
		assert.InDelta(t, -10+2.5*float64(i), p.Value, 1e-9)
		assert.InDelta(t, price, p.Prices["palm-st-hard"], 1e-3)
		assert.InDelta(t, abs.Points[i].Value, price, 1e-6)
		require.NotNil(t, p.Cost)
		assert.InDelta(t, *abs.Points[i].Cost, *p.Cost, 1e-3, "step %d", i)
		assert.InDelta(t, *p.Cost-*rel.BaseCost, *p.Change, 2e-4, "step %d", i)
	}
	require.Equal(t, len(abs.Breakpoints), len(rel.Breakpoints))
	require.NotEmpty(t, rel.Breakpoints, "palm-st-hard changes the demo shortening's blend within -10 % to +20 %")
	for i, bp := range rel.Breakpoints {
		assert.InDelta(t, abs.Breakpoints[i], p0*(1+bp/100), 0.01)
	}

	ids := []string{"palm", "palm-olein", "palm-st-soft"}
	multi := sweepRun(t, "--spec", spec, "--price", "palm,palm-olein,palm-st-soft=-10%:+20%:7")
	assert.Equal(t, ids, multi.Stocks)
	for _, i := range []int{0, 3, 5} {
		p := multi.Points[i]
		prices := map[string]float64{}
		for _, id := range ids {
			s, _ := catalogue.DemoStocks().Find(id)
			prices[id] = s.Price * (1 + p.Value/100)
			assert.InDelta(t, prices[id], p.Prices[id], 1e-3)
		}
		assert.InDelta(t, solveCostAt(t, spec, prices), *p.Cost, 1e-3, "at %+g %%", p.Value)
	}
	require.NotEmpty(t, multi.Changes)
	require.Len(t, multi.Changes, len(multi.Breakpoints))
	for _, c := range multi.Changes {
		require.NotEmpty(t, c.Shifts, "at %+g %%", c.Value)
		before, after := map[string]float64{}, map[string]float64{}
		for _, l := range c.Before {
			before[l["stock"].(string)] = l["pct"].(float64)
		}
		for _, l := range c.After {
			after[l["stock"].(string)] = l["pct"].(float64)
		}
		for _, x := range c.Shifts {
			assert.InDelta(t, before[x.Stock], x.Before, 1e-6)
			assert.InDelta(t, after[x.Stock], x.After, 1e-6)
		}
	}

	code, out, errs := run(t, "sweep", "--spec", spec, "--price", "palm-st-hard=-10%:+20%:13")
	require.Equal(t, 0, code, errs)
	for _, want := range []string{"of today's price", "Base case, today's prices (palm-st-hard 950.00 EUR/t)", "vs base", "goes out"} {
		assert.Contains(t, out, want)
	}
}

func TestSweepRelativeBadInput(t *testing.T) {
	for _, p := range []string{"palm=-10%:20:3", "palm,soybean=800:900:3", "palm=-150%:+10%:3", "palm,=-10%:+10%:3", "palm,palm=-10%:+10%:3", "palm=+5%:+5%:3", "palm=x%:+5%:3", "palm=-10%:+1e12%:3"} {
		code, _, errs := run(t, "sweep", "--price", p)
		assert.Equal(t, 2, code, p)
		assert.Contains(t, errs, "--price", p)
	}
}

// A sweep whose spec is met at no price of the range exits 3, as solve
// does on that spec (README, exit codes); one met at some price exits 0.
// testdata/impossible-laminating.toml is a spec the demo stocks cannot
// meet (its header says why).
func TestSweepImpossibleExit3(t *testing.T) {
	spec := filepath.Join("..", "..", "testdata", "impossible-laminating.toml")
	code, out, _ := run(t, "sweep", "--spec", spec, "--price", "palm=800:1400:3")
	require.Equal(t, 3, code)
	assert.Contains(t, out, "spec cannot be met")
	code, _, _ = run(t, "solve", "--spec", spec)
	require.Equal(t, 3, code, "solve and sweep must agree")
	code, _, errs := run(t, "sweep", "--price", "palm=800:1400:3")
	require.Equal(t, 0, code, errs)
}
