package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
)

// run executes one command line in-process and returns the exit code and
// what it printed.
func run(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := (&app{stdout: &out, stderr: &errb}).main(args)
	return code, out.String(), errb.String()
}

func TestHelpForEveryCommand(t *testing.T) {
	for _, c := range commands() {
		code, out, _ := run(t, c.name, "--help")
		assert.Equal(t, 0, code, c.name)
		assert.Contains(t, out, "Usage: lipoplan "+c.name, c.name)
	}
	code, out, _ := run(t, "--help")
	assert.Equal(t, 0, code)
	assert.Contains(t, out, "mix")
}

func TestUnknownCommandAndFlag(t *testing.T) {
	code, _, errs := run(t, "blendify")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, `unknown command "blendify"`)
	code, _, errs = run(t, "mix", "--colour")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "colour")
	assert.NotContains(t, errs, "goroutine", "never a Go trace")
}

func TestCheckDemoIsClean(t *testing.T) {
	code, out, _ := run(t, "check")
	assert.Equal(t, 0, code, out)
	assert.Contains(t, out, "ok:")
}

// Every file of the bad corpus is answered with exit 2 and a message naming
// the problem, never a trace.
func TestCheckBadCorpus(t *testing.T) {
	files, err := filepath.Glob("../../testdata/bad/*.toml")
	require.NoError(t, err)
	require.NotEmpty(t, files)
	for _, f := range files {
		raw, err := os.ReadFile(f)
		require.NoError(t, err)
		head := string(raw)
		flag := "--stocks"
		switch {
		case strings.Contains(head, "# kind: spec"):
			flag = "--spec"
		case strings.Contains(head, "# kind: orders"):
			flag = "--orders"
		case strings.Contains(head, "# kind: calibration"):
			flag = "--calibration"
		}
		code, out, errs := run(t, "check", flag, f)
		assert.Equal(t, 2, code, "%s\n%s%s", f, out, errs)
		assert.Contains(t, out, filepath.Base(f), "%s: the message names the file", f)
		assert.NotContains(t, out+errs, "goroutine", f)
		assert.NotContains(t, out+errs, "panic", f)
	}
}

func TestMixJSONMatchesBlend(t *testing.T) {
	cat := catalogue.DemoStocks()
	require.GreaterOrEqual(t, len(cat.Stocks), 2)
	a, b := cat.Stocks[0], cat.Stocks[1]
	code, out, errs := run(t, "mix", "--use", a.ID+"=30,"+b.ID+"=70", "--format", "json")
	require.Equal(t, 0, code, errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	for _, k := range []string{"fatty_acids", "iv", "sv", "safa", "mufa", "pufa", "trans", "cox", "sfc"} {
		assert.Contains(t, got, k)
	}
	want, err := blend.Mix([]blend.Part{{Stock: &a, Pct: 30}, {Stock: &b, Pct: 70}}, blend.Temps())
	require.NoError(t, err)
	assert.InDelta(t, want.IV, got["iv"].(float64), 1e-3)
	sfc := got["sfc"].(map[string]any)
	if v, ok := want.SFC[20]; ok {
		assert.InDelta(t, v, sfc["20"].(float64), 1e-3, `whole degrees are written as "20"`)
	}
}

func TestMixText(t *testing.T) {
	cat := catalogue.DemoStocks()
	code, out, _ := run(t, "mix", "--use", cat.Stocks[0].ID+"=100")
	require.Equal(t, 0, code)
	assert.Contains(t, out, "AOCS Cd 1c-85")
	assert.Contains(t, out, "Caution")
}

func TestMixBadInput(t *testing.T) {
	for _, tc := range []struct{ use, want string }{
		{"", "--use is required"},
		{"nosuch=10", `no stock "nosuch"`},
		{"x", "has no share"},
		{catalogue.DemoStocks().Stocks[0].ID + "=abc", "give a number"},
		{catalogue.DemoStocks().Stocks[0].ID + "=0", "add up to 0"},
		{catalogue.DemoStocks().Stocks[0].ID + "=1e308," + catalogue.DemoStocks().Stocks[1].ID + "=1e308", "too large to add up"},
	} {
		code, _, errs := run(t, "mix", "--use", tc.use)
		assert.Equal(t, 2, code, tc.use)
		assert.Contains(t, errs, tc.want, tc.use)
	}
	code, _, errs := run(t, "mix", "--use", catalogue.DemoStocks().Stocks[0].ID+"=1", "--temps", "hot")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--temps")
	code, _, errs = run(t, "mix", "--stocks", "/nonexistent/stocks.toml", "--use", "a=1")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "/nonexistent/stocks.toml")
}

func TestDemoWrite(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := run(t, "demo", "--write", dir)
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "wrote")
	// what it wrote passes check
	code, out, _ = run(t, "check", "--stocks", filepath.Join(dir, "stocks.toml"))
	assert.Equal(t, 0, code, out)
	// never overwrites
	code, _, errs = run(t, "demo", "--write", dir)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "already exists")
}

func TestHelpPrintedOnce(t *testing.T) {
	_, out, _ := run(t, "mix", "--help")
	assert.Equal(t, 1, strings.Count(out, "Usage: lipoplan mix"))
}

// The demo solves every demo spec; its optimum must equal a direct solve.
func TestDemoReport(t *testing.T) {
	code, out, errs := run(t, "demo")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "Demo stocks")
	assert.Equal(t, len(catalogue.DemoSpecs()), strings.Count(out, "=== Demo spec"))
	assert.Contains(t, out, "What holds the blend")
	assert.Contains(t, out, "Caution")
}

// Colour only where allowed: the test app writes to buffers (not a
// terminal), so no escape codes; with colour on, errors are marked.
func TestColourOnlyWhenAllowed(t *testing.T) {
	_, out, _ := run(t, "check", "--stocks", "../../testdata/bad/"+firstBad(t))
	assert.NotContains(t, out, "\x1b[")
	var buf bytes.Buffer
	a := &app{stdout: &buf, stderr: &buf, color: true}
	a.main([]string{"check", "--stocks", "../../testdata/bad/" + firstBad(t)})
	assert.Contains(t, buf.String(), "\x1b[31merror: ")
	t.Setenv("NO_COLOR", "1")
	assert.False(t, colorAllowed(os.Stdout))
}

func firstBad(t *testing.T) string {
	files, err := filepath.Glob("../../testdata/bad/stock*.toml")
	require.NoError(t, err)
	require.NotEmpty(t, files)
	return filepath.Base(files[0])
}

// assertEngineNamed checks a report's engine against lipoplan --version,
// which names the engine of this build first on its "engine:" line.
func assertEngineNamed(t *testing.T, engine any) {
	t.Helper()
	code, out, _ := run(t, "--version")
	require.Equal(t, 0, code)
	name, ok := engine.(string)
	require.True(t, ok, "engine is %v", engine)
	require.NotEmpty(t, name)
	assert.Contains(t, out, "engine: "+name, "the report's engine is the one --version names")
}

// TestVersion: lipoplan --version names the build and the engines.
func TestVersion(t *testing.T) {
	for _, arg := range []string{"--version", "version"} {
		code, out, errs := run(t, arg)
		require.Equal(t, 0, code, errs)
		assert.Regexp(t, `^lipoplan \S+.* \(go[0-9.]+\S*, [a-z0-9]+/[a-z0-9]+\)\nengine: \S+`, out)
	}
}

// One-shot commands run with a higher GOGC; the workspace and the server,
// which live for hours, keep the runtime's default, and so does anyone who
// set GOGC or GOMEMLIMIT (project decision: DEVELOPERS.md, "Project
// decisions"; the setting itself: go.dev/doc/gc-guide).
func TestBatchGCPercent(t *testing.T) {
	none := func(string) string { return "" }
	for _, c := range []struct {
		args []string
		env  map[string]string
		pct  int
		ok   bool
	}{
		{[]string{"solve", "--format", "json"}, nil, batchGC, true},
		{[]string{"plan"}, nil, batchGC, true},
		{[]string{"--version"}, nil, batchGC, true},
		{[]string{"explore"}, nil, 0, false},
		{[]string{"serve", "--listen", "127.0.0.1:0"}, nil, 0, false},
		{[]string{"solve"}, map[string]string{"GOGC": "50"}, 0, false},
		{[]string{"solve"}, map[string]string{"GOMEMLIMIT": "1GiB"}, 0, false},
		{nil, nil, 0, false},
	} {
		getenv := none
		if c.env != nil {
			getenv = func(k string) string { return c.env[k] }
		}
		pct, ok := batchGCPercent(c.args, getenv)
		assert.Equal(t, c.ok, ok, "%v %v", c.args, c.env)
		assert.Equal(t, c.pct, pct, "%v %v", c.args, c.env)
	}
}
