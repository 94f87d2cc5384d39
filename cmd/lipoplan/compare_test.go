package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise"
	"lipoplan/tui"
)

type compareOut struct {
	Scenarios []struct {
		File         string   `json:"file"`
		Note         string   `json:"note"`
		Status       string   `json:"status"`
		CostPerTonne *float64 `json:"cost_per_tonne"`
		CostChange   *float64 `json:"cost_change"`
		Blend        []struct {
			Stock string  `json:"stock"`
			Pct   float64 `json:"pct"`
		} `json:"blend"`
		Properties *struct {
			IV    float64            `json:"iv"`
			SAFA  float64            `json:"safa"`
			Trans float64            `json:"trans"`
			SFC   map[string]float64 `json:"sfc"`
		} `json:"properties"`
		Relaxation []map[string]any `json:"relaxation"`
		Saved      *struct {
			Solved       string   `json:"solved"`
			CostPerTonne *float64 `json:"cost_per_tonne"`
			Same         bool     `json:"same"`
			Differences  []string `json:"differences"`
		} `json:"saved"`
	} `json:"scenarios"`
	SFCTemps []float64 `json:"sfc_temps"`
	Caution  string    `json:"caution"`
}

// savedPair is a demo scenario with a note and its result saved on
// 2025-11-03, and the same with palm at another price that still carries
// that result: compare must flag it.
func savedPair(t *testing.T, spec, note string, palm float64) (base, dear *tui.Scenario) {
	t.Helper()
	base = demoScenario(t, spec).WithNote(note)
	base.Saved = tui.SolvedOf(solveScenario(t, base), time.Date(2025, 11, 3, 8, 30, 0, 0, time.UTC))
	dear, err := base.WithStock("palm", tui.FieldPrice, palm)
	require.NoError(t, err)
	dear.Saved = base.Saved
	return base, dear
}

// compare's JSON gives, for each file, what an independent solve of that
// scenario gives; the cost is also the blend's shares times the stocks'
// prices (the definition of a blend's cost per tonne); the saved result is
// flagged where it no longer holds.
func TestCompareJSONMatchesIndependentSolves(t *testing.T) {
	dir := t.TempDir()
	base, dear := savedPair(t, "laminating", "winter prices", 1100)
	out, err := dear.WithAllowed("palm-st-hard", false)
	require.NoError(t, err)
	files := []string{
		saveScenario(t, dir, "base.toml", base),
		saveScenario(t, dir, "dear.toml", dear),
		saveScenario(t, dir, "no-hard.toml", out),
		"../../testdata/scenario-format1.toml",
	}
	code, stdout, errs := run(t, "compare", files[0], files[1], "--format", "json", files[2], files[3])
	require.Equal(t, 0, code, errs)
	var got compareOut
	require.NoError(t, json.Unmarshal([]byte(stdout), &got))
	require.Len(t, got.Scenarios, 4)
	assert.NotEmpty(t, got.Caution)
	assert.Equal(t, []float64{20, 30, 35, 40}, got.SFCTemps, "the demo spec's SFC limit temperatures")
	var first float64
	for i, f := range files {
		sc, err := tui.LoadScenario(f)
		require.NoError(t, err)
		want := solveScenario(t, sc)
		require.Equal(t, optimise.Optimal, want.Status, f)
		g := got.Scenarios[i]
		assert.Equal(t, f, g.File)
		assert.Equal(t, sc.Note, g.Note)
		assert.Equal(t, "optimal", g.Status)
		require.NotNil(t, g.CostPerTonne, f)
		assert.InDelta(t, want.CostPerTonne, *g.CostPerTonne, 1e-4, f)
		var byPrice float64
		for _, l := range g.Blend {
			st, ok := sc.Catalogue.Find(l.Stock)
			require.True(t, ok)
			byPrice += l.Pct / 100 * st.Price
		}
		assert.InDelta(t, *g.CostPerTonne, byPrice, 1e-3, "%s: cost is Σ share × price", f)
		require.Len(t, g.Blend, len(want.Blend), f)
		for j, l := range want.Blend {
			assert.Equal(t, l.Stock, g.Blend[j].Stock)
			assert.InDelta(t, l.Pct, g.Blend[j].Pct, 1e-5)
		}
		require.NotNil(t, g.Properties)
		assert.InDelta(t, want.Properties.IV, g.Properties.IV, 1e-3)
		assert.InDelta(t, want.Properties.SAFA, g.Properties.SAFA, 1e-4)
		assert.InDelta(t, want.Properties.Trans, g.Properties.Trans, 1e-4)
		for _, l := range sc.Spec.SFC {
			assert.InDelta(t, want.Properties.SFC[l.Temp], g.Properties.SFC[catalogue.TempKey(l.Temp)], 1e-3, "%s SFC %v", f, l.Temp)
		}
		if i == 0 {
			first = want.CostPerTonne
			assert.Nil(t, g.CostChange)
		} else {
			require.NotNil(t, g.CostChange)
			assert.InDelta(t, want.CostPerTonne-first, *g.CostChange, 1e-3)
		}
	}
	assert.Greater(t, *got.Scenarios[1].CostPerTonne, *got.Scenarios[0].CostPerTonne, "dearer palm, dearer blend")
	require.NotNil(t, got.Scenarios[0].Saved)
	assert.True(t, got.Scenarios[0].Saved.Same, "the base's saved result is today's solve")
	assert.Empty(t, got.Scenarios[0].Saved.Differences)
	assert.Equal(t, "2025-11-03T08:30:00Z", got.Scenarios[0].Saved.Solved)
	require.NotNil(t, got.Scenarios[1].Saved)
	assert.False(t, got.Scenarios[1].Saved.Same)
	require.NotEmpty(t, got.Scenarios[1].Saved.Differences)
	assert.Contains(t, got.Scenarios[1].Saved.Differences[0], "when saved")
	assert.Nil(t, got.Scenarios[2].Saved, "an edit drops the saved result")
	assert.Nil(t, got.Scenarios[3].Saved, "an old file has none")
}

func TestCompareText(t *testing.T) {
	dir := t.TempDir()
	base, dear := savedPair(t, "shortening", "line 2, night shift", 1200)
	a, b := saveScenario(t, dir, "a.toml", base), saveScenario(t, dir, "b.toml", dear)
	code, out, errs := run(t, "compare", a, b)
	require.Equal(t, 0, code, errs)
	ra, rb := solveScenario(t, base), solveScenario(t, dear)
	for _, s := range []string{
		"cost per tonne, EUR", money(ra.CostPerTonne, ""), money(rb.CostPerTonne, ""),
		"SFC 10 C, % solid", "SFC 35 C, % solid", "IV", "SAFA, %", "trans, %",
		"note: line 2, night shift", "saved 2025-11-03 08:30 UTC", "today's solve is the same", "DIFFERS from today's solve",
		"Caution:",
	} {
		assert.Contains(t, out, s)
	}
}

// A note carrying a terminal escape sequence (ECMA-48 CSI, ESC [ 31 m)
// and a line break is printed as one line of plain text, as the
// workspace shows it: nothing in a saved file may act on the terminal.
func TestCompareTextNoteControl(t *testing.T) {
	dir := t.TempDir()
	base, dear := savedPair(t, "shortening", "red \x1b[31malert\nsecond line", 1200)
	a, b := saveScenario(t, dir, "a.toml", base), saveScenario(t, dir, "b.toml", dear)
	code, out, errs := run(t, "compare", a, b)
	require.Equal(t, 0, code, errs)
	assert.NotContains(t, out, "\x1b")
	assert.Contains(t, out, "note: red [31malert second line")
}

// A scenario that cannot be met is shown as such, with its relaxation in
// JSON, and compare exits 3 as solve does.
func TestCompareImpossible(t *testing.T) {
	dir := t.TempDir()
	base := demoScenario(t, "laminating")
	var row tui.Row
	for _, r := range base.Rows() {
		if r.Key == "safa" {
			row = r
		}
	}
	// no edible fat has under 5 % saturated acids (from memory: rapeseed, the
	// least saturated common oil, has about 7 %)
	bad, err := base.WithBound(row, tui.Max, 5)
	require.NoError(t, err)
	a, b := saveScenario(t, dir, "a.toml", base), saveScenario(t, dir, "b.toml", bad)
	code, out, _ := run(t, "compare", "--format", "json", a, b)
	assert.Equal(t, 3, code)
	var got compareOut
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.Equal(t, "infeasible", got.Scenarios[1].Status)
	assert.Nil(t, got.Scenarios[1].CostPerTonne)
	assert.Nil(t, got.Scenarios[1].CostChange)
	assert.NotEmpty(t, got.Scenarios[1].Relaxation)
	code, out, _ = run(t, "compare", a, b)
	assert.Equal(t, 3, code)
	assert.Contains(t, out, "cannot be met")
}

func TestCompareBadInput(t *testing.T) {
	dir := t.TempDir()
	a := saveScenario(t, dir, "a.toml", demoScenario(t, "laminating"))
	notScenario := filepath.Join(dir, "stocks.toml")
	require.NoError(t, os.WriteFile(notScenario, catalogue.DemoFiles()["stocks.toml"], 0o644))
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"compare", a}, "2 to 4 scenario files"},
		{[]string{"compare", a, a, a, a, a}, "2 to 4 scenario files (got 5)"},
		{[]string{"compare", a, filepath.Join(dir, "missing.toml")}, "missing.toml"},
		{[]string{"compare", a, notScenario}, "stocks.toml"},
		{[]string{"compare", a, a, "--format", "csv"}, "--format"},
		{[]string{"compare", a, a, "--colour"}, "colour"},
	} {
		code, out, errs := run(t, tc.args...)
		assert.Equal(t, 2, code, "%v\n%s", tc.args, out)
		assert.Contains(t, errs, tc.want, tc.args)
		assert.NotContains(t, out+errs, "goroutine")
	}
}

// Two practically equal costs show no change, never "-0.00" (text) or -0
// (JSON), in compare as in routes.
func TestCostChangeNoNegativeZero(t *testing.T) {
	assert.Equal(t, "+0.00", costChange(-0.004))
	assert.Equal(t, "+0.00", costChange(1e-12))
	assert.Equal(t, "-0.01", costChange(-0.006))
	assert.Equal(t, "+12.35", costChange(12.345001))
	b, err := json.Marshal(round(-0.00001, 4))
	require.NoError(t, err)
	assert.Equal(t, "0", string(b))
}
