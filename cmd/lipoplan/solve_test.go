package main

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/optimise"
)

func keysOf(m map[string]any) []string {
	var ks []string
	for k := range m {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return ks
}

func TestSolveDemoJSON(t *testing.T) {
	code, out, errs := run(t, "solve", "--format", "json")
	require.Equal(t, 0, code, errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	// The keys of the JSON contract (README, JSON output), exactly.
	assert.Equal(t, []string{"batch_cost", "blend", "caution", "cost_per_tonne", "engine", "limits", "properties", "ranging", "status"}, keysOf(got))
	assert.Equal(t, "optimal", got["status"])
	assertEngineNamed(t, got["engine"])
	var pct float64
	for _, l := range got["blend"].([]any) {
		line := l.(map[string]any)
		assert.Equal(t, []string{"pct", "stock", "tonnes"}, keysOf(line))
		pct += line["pct"].(float64)
	}
	assert.InDelta(t, 100, pct, 1e-4)
	for _, l := range got["limits"].([]any) {
		assert.Equal(t, []string{"binding", "bound", "excluded", "holds_from", "holds_to", "label", "name", "room", "shadow_price", "value"}, keysOf(l.(map[string]any)))
	}
	for _, g := range got["ranging"].([]any) {
		assert.Equal(t, []string{"price_high", "price_low", "stock"}, keysOf(g.(map[string]any)))
	}
	props := got["properties"].(map[string]any)
	for _, k := range []string{"fatty_acids", "iv", "sv", "safa", "mufa", "pufa", "trans", "cox", "sfc"} {
		assert.Contains(t, props, k)
	}
	assert.Contains(t, props["sfc"], "20")
}

func TestSolveDemoText(t *testing.T) {
	code, out, errs := run(t, "solve")
	require.Equal(t, 0, code, errs)
	for _, want := range []string{"Cheapest blend found", "Properties of the blend", "What holds the blend",
		"Limits with room left", "Stocks and their prices", "would come in at", "saves", "past that the blend changes", cautionLine} {
		assert.Contains(t, out, want)
	}
}

func TestSolveCSV(t *testing.T) {
	code, out, errs := run(t, "solve", "--format", "csv")
	require.Equal(t, 0, code, errs)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	require.NoError(t, err)
	require.Greater(t, len(rows), 3)
	assert.Equal(t, "section", rows[0][0])
	assert.Equal(t, []string{"status", "optimal"}, rows[1][:2])
	var pct float64
	for _, r := range rows {
		if r[0] == "blend" {
			v, err := strconv.ParseFloat(r[2], 64)
			require.NoError(t, err)
			pct += v
		}
	}
	assert.InDelta(t, 100, pct, 1e-6)
}

// impossibleSpec asks for 30 % solid fat at 20 °C with at most 5 % SAFA:
// solid fat at room temperature is saturated fat (common practice: fully
// saturated TAGs are the high-melting ones), so no blend of the demo stocks
// can do both.
const impossibleSpec = `name = "Impossible test fat"
batch = 10.0
[limits]
safa = { max = 5.0 }
[limits.sfc]
"20" = { min = 30.0 }
`

func TestSolveInfeasible(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "impossible.toml")
	require.NoError(t, os.WriteFile(path, []byte(impossibleSpec), 0o644))

	code, out, _ := run(t, "solve", "--spec", path)
	assert.Equal(t, 3, code)
	assert.Contains(t, out, "cannot be met")
	assert.Contains(t, out, cautionLine)

	code, out, _ = run(t, "solve", "--spec", path, "--format", "json")
	assert.Equal(t, 3, code)
	var got struct {
		Status     string           `json:"status"`
		Relaxation []optimise.Relax `json:"relaxation"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.Equal(t, "infeasible", got.Status)
	require.NotEmpty(t, got.Relaxation)
	var raw map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &raw))
	for _, r := range raw["relaxation"].([]any) {
		assert.Equal(t, []string{"by", "name"}, keysOf(r.(map[string]any)))
	}
	// The relaxation applied makes the spec feasible.
	cat := catalogue.DemoStocks()
	spec, ps := catalogue.LoadSpec(path, cat)
	require.Empty(t, ps.Errors())
	c2, s2, err := optimise.Relaxed(cat, spec, got.Relaxation)
	require.NoError(t, err)
	res, err := optimise.Solve(c2, s2, optimise.Options{})
	require.NoError(t, err)
	assert.Equal(t, optimise.Optimal, res.Status)
}

// glpsolObjective solves an MPS file with GLPK (an outside reference) and
// reads the objective from its plain-text solution ("s bas ... obj").
func glpsolObjective(t *testing.T, mps string) float64 {
	t.Helper()
	sol := mps + ".sol"
	out, err := exec.Command("glpsol", "--freemps", mps, "-w", sol).CombinedOutput()
	require.NoError(t, err, string(out))
	f, err := os.Open(sol)
	require.NoError(t, err)
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) >= 7 && fs[0] == "s" && fs[1] == "bas" {
			require.Equal(t, "f", fs[4], "GLPK finds no feasible optimum")
			v, err := strconv.ParseFloat(fs[6], 64)
			require.NoError(t, err)
			return v
		}
	}
	t.Fatal("no solution line in glpsol output")
	return math.NaN()
}

func TestSolveMPSAgainstGLPK(t *testing.T) {
	if _, err := exec.LookPath("glpsol"); err != nil {
		t.Skip("glpsol (Debian package glpk-utils) is not on PATH; .ci/run installs it")
	}
	dir := t.TempDir()
	mps := filepath.Join(dir, "model.mps")
	code, out, errs := run(t, "solve", "--format", "json", "--mps", mps)
	require.Equal(t, 0, code, errs)
	var got struct {
		Cost float64 `json:"cost_per_tonne"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	obj := glpsolObjective(t, mps)
	assert.InDelta(t, obj, got.Cost, 1e-6*obj+1e-4) // JSON rounds the cost to 4 decimals
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	for _, e := range entries {
		assert.False(t, strings.HasSuffix(e.Name(), ".tmp"), "temporary file %s left behind", e.Name())
	}
}

func TestSolveBadInput(t *testing.T) {
	code, _, errs := run(t, "solve", "--format", "xml")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--format")

	code, _, errs = run(t, "solve", "--spec", filepath.Join(t.TempDir(), "nope.toml"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "nope.toml")

	code, _, errs = run(t, "solve", "--mps", filepath.Join(t.TempDir(), "no-such-dir", "m.mps"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "m.mps")

	code, _, errs = run(t, "solve", "--temps", "hot")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--temps")
}

// A spec with a [process] step reports the reactor: the feed is taken from
// the blend's own stocks (never more than the blend holds of each), the
// processing cost is the spec's cost per tonne times the tonnes fed, and
// the hazard caution is printed.
func TestSolveReportsTheReactor(t *testing.T) {
	spec := "../../testdata/process-margarine.toml"
	code, out, errs := run(t, "solve", "--spec", spec, "--format", "json")
	require.Equal(t, 0, code, errs)
	var got struct {
		Blend []struct {
			Stock       string
			Pct, Tonnes float64
		} `json:"blend"`
		Process struct {
			Method string
			Feed   []struct {
				Stock       string
				Pct, Tonnes float64
			}
			Tonnes float64
			Cost   float64
		} `json:"process"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	require.NotEmpty(t, got.Process.Feed, "the demo margarine uses the reactor")
	inBlend := map[string]float64{}
	for _, l := range got.Blend {
		inBlend[l.Stock] = l.Pct
	}
	var fed float64
	for _, f := range got.Process.Feed {
		assert.LessOrEqual(t, f.Pct, inBlend[f.Stock]+1e-6, f.Stock)
		fed += f.Tonnes
	}
	assert.InDelta(t, fed, got.Process.Tonnes, 1e-4)
	s, ps := catalogue.LoadSpec(spec, catalogue.DemoStocks())
	require.Empty(t, ps.Errors())
	assert.InDelta(t, s.Process.Cost*got.Process.Tonnes, got.Process.Cost, 1e-3)

	code, text, _ := run(t, "solve", "--spec", spec)
	require.Equal(t, 0, code)
	assert.Contains(t, text, "Reactor (chemical interesterification")
	assert.Contains(t, text, "SFC of the reacted fat alone")
	assert.Contains(t, text, "sodium methoxide")
}

// --svg draws one point per reported temperature and one band per SFC limit.
func TestSolveSVG(t *testing.T) {
	path := filepath.Join(t.TempDir(), "sfc.svg")
	code, _, errs := run(t, "solve", "--svg", path)
	require.Equal(t, 0, code, errs)
	raw, err := os.ReadFile(path)
	require.NoError(t, err)
	svg := string(raw)
	spec := catalogue.DemoSpecs()[0]
	assert.Equal(t, len(blend.SpecTemps(spec)), strings.Count(svg, "<circle"), "one point per report temperature")
	assert.Equal(t, len(spec.SFC), strings.Count(svg, "fill-opacity"), "one band per SFC limit")
	assert.True(t, strings.HasSuffix(svg, "</svg>\n"))
}

// TestSolveNotProvenWithinLimits: with integer rules and a branch-and-bound
// limit of one LP, solve says the search was stopped (status not_proven in
// JSON with the note; a plain message in text) and exits 3, as no blend was
// found; without the limit the same spec is proven optimal.
func TestSolveNotProvenWithinLimits(t *testing.T) {
	if _, v, _ := run(t, "--version"); !strings.Contains(v, "lipoplan-bb") {
		t.Skip("the coin build's CBC counts branch-and-bound nodes its own way; this checks lipoplan-bb's limit")
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "rules.toml")
	spec := string(catalogue.DemoFiles()["laminating.toml"]) + "\n[rules]\nmax_stocks = 3\nsmallest_share = 8.0\n"
	require.NoError(t, os.WriteFile(path, []byte(spec), 0o644))

	code, out, errs := run(t, "solve", "--spec", path, "--format", "json")
	require.Equal(t, 0, code, errs)
	var full map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &full))
	assert.Equal(t, "optimal", full["status"])

	code, out, _ = run(t, "solve", "--spec", path, "--max-nodes", "1", "--format", "json")
	assert.Equal(t, 3, code)
	var got struct {
		Status string   `json:"status"`
		Notes  []string `json:"notes"`
		Blend  []any    `json:"blend"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.Equal(t, "not_proven", got.Status)
	require.NotEmpty(t, got.Notes)
	assert.Contains(t, got.Notes[0], "stopped at its limit of 1 LPs")
	assert.Empty(t, got.Blend)

	code, out, _ = run(t, "solve", "--spec", path, "--max-nodes", "1")
	assert.Equal(t, 3, code)
	assert.Contains(t, out, "No blend found within the limits of branch and bound")
	assert.Contains(t, out, "not proven impossible")

	code, _, errs = run(t, "solve", "--spec", path, "--max-nodes", "0")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--max-nodes")
}

// A predicted-SFC process spec states in JSON the TAG model used and how
// far it has been measured off, and carries the solver's notes.
func TestSolveProcessJSONStatesModelError(t *testing.T) {
	code, out, errs := run(t, "solve", "--spec", "../../testdata/process-margarine.toml", "--format", "json")
	require.Equal(t, 0, code, errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	m, ok := got["sfc_model"].(map[string]any)
	require.True(t, ok, "sfc_model present")
	assert.Contains(t, m["measured_error"], "RMS 7.9 % solid")
	assert.Contains(t, m["method"], "solid-liquid equilibrium")
	notes, ok := got["notes"].([]any)
	require.True(t, ok)
	assert.NotEmpty(t, notes)
}

// The report in our own shape: no status column of BINDING/slack words
// (text and CSV), a stock the spec leaves out named once as such and not
// among the limits' costs or the stocks' prices, and no price range below
// zero (a range that reaches below nothing reads "no lower limit").
func TestSolveReportShape(t *testing.T) {
	code, out, _ := run(t, "solve")
	require.Equal(t, 0, code)
	for _, word := range []string{"BINDING", "slack", "Stocks left out", "from -"} {
		assert.NotContains(t, out, word)
	}
	assert.Equal(t, 1, strings.Count(out, "ph-soy"), "ph-soy (use max 0) is named once: %s", out)
	assert.Contains(t, out, "Left out by the spec: ph-soy")
	code, csvOut, _ := run(t, "solve", "--format", "csv")
	require.Equal(t, 0, code)
	rows, err := csv.NewReader(strings.NewReader(csvOut)).ReadAll()
	require.NoError(t, err)
	assert.NotContains(t, rows[0], "binding")
	for _, r := range rows[1:] {
		if r[0] == "stock" && r[10] != "" {
			v, err := strconv.ParseFloat(r[10], 64)
			require.NoError(t, err)
			assert.GreaterOrEqual(t, v, 0.0, "price_low of %s", r[1])
		}
	}
}
