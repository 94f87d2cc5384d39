package tui

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// solveDirect solves a scenario as the optimiser sees it, outside the
// workspace: the reference the comparison is checked against.
func solveDirect(t *testing.T, sc *Scenario) *optimise.Result {
	t.Helper()
	cat, spec := sc.Effective()
	res, err := optimise.Solve(cat, spec, optimise.Options{})
	require.NoError(t, err)
	return res
}

// A scenario file round trip keeps the note and the result exactly.
func TestScenarioFileRoundTripWithResult(t *testing.T) {
	sc := demoScenario(t, "shortening").WithNote("tallow-free, line 2\tnight shift")
	res := solveDirect(t, sc)
	sc.Saved = SolvedOf(res, time.Date(2025, 6, 2, 9, 14, 30, 0, time.FixedZone("CEST", 7200)))
	path := filepath.Join(t.TempDir(), "s.toml")
	require.NoError(t, SaveScenario(path, sc))
	raw := readFile(t, path)
	assert.Contains(t, raw, "format = 2")
	assert.Contains(t, raw, "solved = 2025-06-02T07:14:30Z", "the date is written in UTC")
	back, err := LoadScenario(path)
	require.NoError(t, err)
	assert.Equal(t, sc.Note, back.Note)
	require.NotNil(t, back.Saved)
	assert.Equal(t, *sc.Saved, *back.Saved)
	assert.Empty(t, back.Saved.Differences(res))
	a, _ := EncodeScenario(sc)
	b, _ := EncodeScenario(back)
	assert.Equal(t, string(a), string(b))
	// an edit drops the saved result (it no longer describes the scenario),
	// a note keeps it
	edited, err := back.WithStock("palm", FieldPrice, 999)
	require.NoError(t, err)
	assert.Nil(t, edited.Saved)
	assert.NotNil(t, back.WithNote("x").Saved)

	// an impossible spec is saved as such, with no cost and no blend
	// (no edible fat has under 1 % saturated acids)
	bad, err := sc.WithBound(rowByKey(t, sc, "safa"), Max, 1)
	require.NoError(t, err)
	ires := solveDirect(t, bad)
	require.Equal(t, optimise.Infeasible, ires.Status)
	bad.Saved = SolvedOf(ires, time.Now())
	data, err := EncodeScenario(bad)
	require.NoError(t, err)
	assert.NotContains(t, string(data), "cost_per_tonne")
	ib, err := DecodeScenario("i.toml", data)
	require.NoError(t, err)
	assert.False(t, ib.Saved.HasBlend())
	assert.Equal(t, optimise.Infeasible, ib.Saved.Status)
	assert.Empty(t, ib.Saved.Differences(ires))
	assert.NotEmpty(t, ib.Saved.Differences(res))
}

// A scenario file written before notes and results (format 1, kept in
// testdata as lipoplan wrote it) still loads, and is saved again as format 2.
func TestOldScenarioFileLoads(t *testing.T) {
	sc, err := LoadScenario("../testdata/scenario-format1.toml")
	require.NoError(t, err)
	assert.Empty(t, sc.Note)
	assert.Nil(t, sc.Saved)
	assert.True(t, sc.Excluded["coconut"])
	p, _ := sc.Catalogue.Find("palm")
	assert.Equal(t, 1012.5, p.Price)
	data, err := EncodeScenario(sc)
	require.NoError(t, err)
	assert.Contains(t, string(data), "format = 2")
	assert.NotContains(t, string(data), "[result]")
	back, err := DecodeScenario("again.toml", data)
	require.NoError(t, err)
	assert.Equal(t, sc.Catalogue.Stocks, back.Catalogue.Stocks)
	assert.Equal(t, sc.Spec.SFC, back.Spec.SFC)
	d := newDriver(t, NewWithScenario(sc, "old", Files{}), 80, 24)
	require.True(t, d.m.Snapshot().Feasible())
}

func TestScenarioFileBadResult(t *testing.T) {
	sc := demoScenario(t, "laminating").WithNote("n")
	sc.Saved = SolvedOf(solveDirect(t, sc), time.Date(2025, 6, 2, 9, 0, 0, 0, time.UTC))
	good, err := EncodeScenario(sc)
	require.NoError(t, err)
	old := readFile(t, "../testdata/scenario-format1.toml")
	g := string(good)
	cases := map[string]struct{ body, want string }{
		"unknown result key": {replaceOnce(g, "[result]\n", "[result]\ncolour = \"gold\"\n"), "unknown key result.colour"},
		"unknown line key":   {replaceOnce(g, "[[result.blend]]\n", "[[result.blend]]\nlot = 7\n"), "unknown key result.blend.lot"},
		"bad status":         {replaceOnce(g, `status = "optimal"`, `status = "great"`), `status = "great"`},
		"no date":            {replaceOnce(g, "solved = 2025-06-02T09:00:00Z\n", ""), "no solved"},
		"date as text":       {replaceOnce(g, "solved = 2025-06-02T09:00:00Z", `solved = "yesterday"`), "solved"},
		"unknown stock":      {replaceOnce(g, "[[result.blend]]\nstock = \"", "[[result.blend]]\nstock = \"x"), "not in [stocks]"},
		"no cost":            {deleteLine(g, "cost_per_tonne = "), "no cost_per_tonne"},
		"huge cost":          {replaceLine(g, "cost_per_tonne = ", "cost_per_tonne = 1e25"), "outside the accepted range"},
		"share above 100":    {replaceLine(g, "pct = ", "pct = 140.0"), "outside the accepted range"},
		"note as number":     {replaceOnce(g, `note = "n"`, "note = 5"), "note"},
		"note in format 1":   {replaceOnce(old, "format = 1\n", "format = 1\nnote = \"x\"\n"), "format 1 scenario holds no note"},
		"result in format 1": {replaceOnce(old, "\n[stocks]\n", "\n[result]\nsolved = 2025-06-02T09:00:00Z\nstatus = \"infeasible\"\n\n[stocks]\n"), "format 1 scenario holds no note or [result]"},
	}
	for name, c := range cases {
		_, err := DecodeScenario("bad.toml", []byte(c.body))
		require.Error(t, err, name)
		assert.True(t, catalogue.IsBadInput(err), "%s: %v", name, err)
		assert.Contains(t, err.Error(), "bad.toml", name)
		assert.Contains(t, err.Error(), c.want, name)
	}
}

// Differences names what moved, to the printed precision: a cost within
// half a cent and shares within 0.005 % are the same answer.
func TestSavedDifferences(t *testing.T) {
	sc := demoScenario(t, "laminating")
	res := solveDirect(t, sc)
	saved := SolvedOf(res, time.Now())
	assert.Empty(t, saved.Differences(res))
	near := *saved
	near.CostPerTonne += 0.004
	assert.Empty(t, near.Differences(res))
	dear, err := sc.WithStock(res.Blend[0].Stock, FieldPrice, 5000)
	require.NoError(t, err)
	now := solveDirect(t, dear)
	diff := saved.Differences(now)
	require.NotEmpty(t, diff)
	assert.Contains(t, diff[0], fmt.Sprintf("cost %.2f when saved, %.2f now", res.CostPerTonne, now.CostPerTonne))
	assert.True(t, math.Abs(now.CostPerTonne-res.CostPerTonne) > costTolerance)
	id := res.Blend[0].Stock
	after := 0.0
	for _, l := range now.Blend {
		if l.Stock == id {
			after = l.Pct
		}
	}
	require.Greater(t, math.Abs(after-res.Blend[0].Pct), shareTolerance, "a stock at five times its price loses share")
	assert.Contains(t, strings.Join(diff, "; "), fmt.Sprintf("%s %.2f → %.2f %%", id, res.Blend[0].Pct, after))
}

func deleteLine(s, prefix string) string { return replaceLine(s, prefix, "") }

// replaceLine replaces the first line starting with prefix by with.
func replaceLine(s, prefix, with string) string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		if strings.HasPrefix(l, prefix) {
			lines[i] = with
			return strings.Join(lines, "\n")
		}
	}
	return s + "\n# marker missing: " + prefix
}
