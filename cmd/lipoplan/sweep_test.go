package main

import (
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
