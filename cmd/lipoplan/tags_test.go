package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

func runTags(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := (&app{stdout: &out, stderr: &errb}).main(append([]string{"tags"}, args...))
	return code, out.String(), errb.String()
}

type tagsJSON struct {
	Process string `json:"process"`
	Degree  float64
	Species []struct {
		Tag       string   `json:"tag"`
		Positions []string `json:"positions"`
		MolPct    *float64 `json:"mol_pct"`
		WtPct     *float64 `json:"wt_pct"`
		MolarMass float64  `json:"molar_mass"`
	} `json:"species"`
	SpeciesCount int                `json:"species_count"`
	Classes      map[string]float64 `json:"classes"`
	SUS          *float64           `json:"sus"`
	SSU          *float64           `json:"ssu"`
	ByCN         map[string]float64 `json:"by_cn"`
	ByECN        map[string]float64 `json:"by_ecn"`
	Notes        []string           `json:"notes"`
}

func decodeTags(t *testing.T, out string) tagsJSON {
	t.Helper()
	var raw map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &raw), out)
	for _, k := range []string{"species", "classes", "sus", "ssu", "by_cn", "by_ecn"} {
		assert.Contains(t, raw, k, "README JSON key")
	}
	var r tagsJSON
	require.NoError(t, json.Unmarshal([]byte(out), &r))
	return r
}

func sum(m map[string]float64) float64 {
	var s float64
	for _, v := range m {
		s += v
	}
	return s
}

// Tripalmitin and triolein at 1:1 by moles, chemically interesterified:
// S3 12.5, S2U 37.5, SU2 37.5, U3 12.5 mol% and SUS:SSU = 1:2 (binomial
// counting, first principles), end to end from a catalogue file.
func TestTagsRandomisedTripalmitinTriolein(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "stocks.toml")
	require.NoError(t, os.WriteFile(path, []byte(`currency = "EUR"

[[stock]]
id = "ppp"
name = "Tripalmitin, invented test stock"
price = 0.0
[stock.fatty_acids]
"C16:0" = 100.0
[stock.tags]
"PPP" = 100.0

[[stock]]
id = "ooo"
name = "Triolein, invented test stock"
price = 0.0
[stock.fatty_acids]
"C18:1" = 100.0
[stock.tags]
"OOO" = 100.0
`), 0o600))
	p, _ := catalogue.Lookup("C16:0")
	o, _ := catalogue.Lookup("C18:1")
	use := fmt.Sprintf("ppp=%.9f,ooo=%.9f", catalogue.TAGMolarMass(p, p, p), catalogue.TAGMolarMass(o, o, o))

	code, out, errs := runTags(t, "--stocks", path, "--use", use, "--process", "chemical", "--format", "json", "--top", "0")
	require.Equal(t, 0, code, errs)
	r := decodeTags(t, out)
	assert.Equal(t, "chemical", r.Process)
	assert.InDelta(t, 12.5, r.Classes["S3"], 1e-8)
	assert.InDelta(t, 37.5, r.Classes["S2U"], 1e-8)
	assert.InDelta(t, 37.5, r.Classes["SU2"], 1e-8)
	assert.InDelta(t, 12.5, r.Classes["U3"], 1e-8)
	require.NotNil(t, r.SUS)
	require.NotNil(t, r.SSU)
	assert.InDelta(t, 2, *r.SSU / *r.SUS, 1e-8)
	assert.InDelta(t, 37.5, r.ByCN["50"], 1e-8)
	assert.InDelta(t, 100, r.ByECN["48"], 1e-8, "P and O are a critical pair: ECN 48 throughout (common practice)")
	require.Len(t, r.Species, 8)
	seen := map[string][]string{}
	for _, s := range r.Species {
		seen[s.Tag] = s.Positions
		assert.InDelta(t, 12.5, *s.MolPct, 1e-8, s.Tag)
	}
	assert.Equal(t, []string{"C16:0", "C18:1", "C16:0"}, seen["POP"])
	assert.Equal(t, []string{"C18:1", "C16:0", "C16:0"}, seen["OPP"])

	// native: the two pure TAGs, half each
	code, out, errs = runTags(t, "--stocks", path, "--use", use, "--format", "json")
	require.Equal(t, 0, code, errs)
	r = decodeTags(t, out)
	assert.InDelta(t, 50, r.Classes["S3"], 1e-8)
	assert.InDelta(t, 50, r.Classes["U3"], 1e-8)
}

func TestTagsDemoJSON(t *testing.T) {
	code, out, errs := runTags(t, "--use", "palm-st-hard=40,pko=60", "--process", "enzymatic", "--degree", "0.8", "--format", "json", "--top", "5")
	require.Equal(t, 0, code, errs)
	r := decodeTags(t, out)
	assert.Len(t, r.Species, 5, "--top is a display cut-off")
	assert.Greater(t, r.SpeciesCount, 5)
	// classes and groups come from the full distribution
	assert.InDelta(t, 100, sum(r.Classes), 1e-9)
	assert.InDelta(t, 100, sum(r.ByCN), 1e-9)
	assert.InDelta(t, 100, sum(r.ByECN), 1e-9)
	assert.InDelta(t, r.Classes["S2U"], *r.SUS+*r.SSU, 1e-9)
	for i, s := range r.Species {
		assert.Len(t, s.Positions, 3)
		require.NotNil(t, s.WtPct)
		assert.Greater(t, s.MolarMass, 400.0)
		if i > 0 {
			assert.GreaterOrEqual(t, *r.Species[i-1].MolPct, *s.MolPct)
		}
	}
	for k := range r.ByCN {
		_, err := strconv.Atoi(k)
		assert.NoError(t, err, "by_cn keys are whole carbon numbers")
	}
}

func TestTagsText(t *testing.T) {
	code, out, errs := runTags(t, "--use", "palm=70,pko=30", "--process", "chemical")
	require.Equal(t, 0, code, errs)
	for _, want := range []string{"chemical", "S3", "S2U", "SUS", "SSU", "CN", "ECN", "sn-2", "more"} {
		assert.Contains(t, out, want)
	}
	assert.True(t, strings.HasSuffix(strings.TrimSpace(out), strings.TrimSpace(processCaution)), "ends with the process caution")

	code, out, errs = runTags(t, "--use", "palm=100")
	require.Equal(t, 0, code, errs)
	assert.NotContains(t, out, "sodium methoxide", "no process, no process caution")
	assert.Contains(t, out, "confirm by lab analysis")

	code, out, errs = runTags(t, "--use", "soybean=100", "--harden", "soybean", "--isomers", "combined")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "fully hardened")
	assert.Contains(t, out, "hydrogenation", "hardening is a process: caution shown")
}

func TestTagsBadInput(t *testing.T) {
	for _, args := range [][]string{
		{"--use", "nosuch=10"},
		{"--use", "palm=10", "--process", "steam"},
		{"--use", "palm=10", "--process", "chemical", "--degree", "1.5"},
		{"--use", "palm=10", "--process", "chemical", "--degree", "NaN"},
		{"--use", "palm=10", "--degree", "0.5"},
		{"--use", "palm=10", "--top", "-1"},
		{"--use", "palm=10", "--harden", "pko"},
		{"--use", "palm=10", "--isomers", "mirror"},
		{"--use", "palm=10", "--format", "xml"},
		{"--use", "palm=10", "--stocks", filepath.Join(t.TempDir(), "missing.toml")},
		{},
	} {
		code, _, errs := runTags(t, args...)
		assert.Equal(t, 2, code, "%v: %s", args, errs)
		assert.NotEmpty(t, errs, "%v", args)
		assert.NotContains(t, errs, "goroutine", "never a Go trace")
	}
	_, _, errs := runTags(t, "--use", "palm=10", "--process", "chemical", "--degree", "1.5")
	assert.Contains(t, errs, "--degree")
	_, _, errs = runTags(t, "--use", "palm=10", "--process", "steam")
	assert.Contains(t, errs, "--process")
}
