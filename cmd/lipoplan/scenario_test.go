package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/optimise"
	"lipoplan/tui"
)

// saveScenario writes a scenario file for a test and returns its path.
func saveScenario(t *testing.T, dir, name string, sc *tui.Scenario) string {
	t.Helper()
	path := filepath.Join(dir, name)
	require.NoError(t, tui.SaveScenario(path, sc))
	return path
}

func demoScenario(t *testing.T, spec string) *tui.Scenario {
	t.Helper()
	s, ok := catalogue.DemoSpec(spec)
	require.True(t, ok)
	return tui.NewScenario(catalogue.DemoStocks(), s)
}

// solveScenario is the independent reference: optimise.Solve of what the
// optimiser sees of the scenario (tui.Scenario.Effective).
func solveScenario(t *testing.T, sc *tui.Scenario) *optimise.Result {
	t.Helper()
	cat, spec := sc.Effective()
	res, err := optimise.Solve(cat, spec, optimise.Options{Temps: blend.SpecTemps(spec)})
	require.NoError(t, err)
	return res
}

// --scenario gives the same answer as --stocks and --spec holding the same
// content: for solve and sweep, in JSON, and with stocks left out (which
// the spec file then caps at 0, as write-back writes them).
func TestScenarioFlagSameAsFiles(t *testing.T) {
	dir := t.TempDir()
	sc := demoScenario(t, "laminating")
	sc, err := sc.WithStock("palm", tui.FieldPrice, 1040)
	require.NoError(t, err)
	sc, err = sc.WithAllowed("palm-st-hard", false)
	require.NoError(t, err)
	path := saveScenario(t, dir, "s.toml", sc)
	cat, spec := sc.Effective()
	stocks, specPath := filepath.Join(dir, "stocks.toml"), filepath.Join(dir, "spec.toml")
	var b bytes.Buffer
	require.NoError(t, catalogue.WriteStocks(&b, cat))
	require.NoError(t, os.WriteFile(stocks, b.Bytes(), 0o644))
	b.Reset()
	require.NoError(t, catalogue.WriteSpec(&b, spec))
	require.NoError(t, os.WriteFile(specPath, b.Bytes(), 0o644))

	for _, cmd := range [][]string{
		{"solve", "--format", "json"},
		{"solve", "--format", "csv"},
		{"sweep", "--price", "palm=900:1300:5", "--format", "json"},
	} {
		c1, fromScenario, e1 := run(t, append(cmd, "--scenario", path)...)
		c2, fromFiles, e2 := run(t, append(cmd, "--stocks", stocks, "--spec", specPath)...)
		require.Equal(t, 0, c1, e1)
		require.Equal(t, 0, c2, e2)
		assertSameReport(t, fromFiles, fromScenario, "%v", cmd)
	}
	// and it is the independent solve of the scenario
	_, out, _ := run(t, "solve", "--format", "json", "--scenario", path)
	var got struct {
		Cost float64 `json:"cost_per_tonne"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.InDelta(t, solveScenario(t, sc).CostPerTonne, got.Cost, 1e-4)
	_, text, _ := run(t, "solve", "--scenario", path)
	assert.Contains(t, text, "Left out by the spec: palm-st-hard")
	// a sheet of a scenario run names the scenario file as its input, with
	// its SHA-256 (FIPS 180-4, by crypto/sha256)
	sheet := filepath.Join(dir, "sheet.html")
	code, _, errs := run(t, "solve", "--scenario", path, "--sheet", sheet)
	require.Equal(t, 0, code, errs)
	sum := sha256.Sum256(readBytes(t, path))
	page := string(readBytes(t, sheet))
	assert.Contains(t, page, "scenario (stocks and spec)")
	assert.Contains(t, page, hex.EncodeToString(sum[:]))
	assert.NotContains(t, page, "embedded demo data", "the scenario, not the demo files, is the input")

	// one set of inputs a run; the scenario is an input no output may overwrite
	code, _, errs = run(t, "solve", "--scenario", path, "--stocks", stocks)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "either --scenario or --stocks/--spec")
	code, _, errs = run(t, "sweep", "--price", "palm=900:1300:5", "--scenario", path, "--spec", specPath)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "either --scenario or --stocks/--spec")
	before := readBytes(t, path)
	code, _, errs = run(t, "solve", "--scenario", path, "--svg", path)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "an input of this run")
	assert.Equal(t, before, readBytes(t, path))
	code, _, errs = run(t, "solve", "--scenario", filepath.Join(dir, "nope.toml"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "nope.toml")
}

// number is a number as the reports print it.
var number = regexp.MustCompile(`-?[0-9]+(\.[0-9]+)?([eE][-+]?[0-9]+)?`)

// assertSameReport checks two reports are the same text with the same
// numbers, to 1e-9 relative: the last digits of a ranging end may differ
// from one solve to the next.
func assertSameReport(t *testing.T, want, got string, msg ...any) {
	t.Helper()
	require.Equal(t, number.ReplaceAllString(want, "#"), number.ReplaceAllString(got, "#"), msg...)
	w, g := number.FindAllString(want, -1), number.FindAllString(got, -1)
	for i := range w {
		a, _ := strconv.ParseFloat(w[i], 64)
		b, _ := strconv.ParseFloat(g[i], 64)
		assert.InDelta(t, a, b, 1e-9*math.Max(1, math.Abs(a)), msg...)
	}
}

func readBytes(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return b
}
