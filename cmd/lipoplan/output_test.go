package main

import (
	"bytes"
	"encoding/json"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// demoDir writes the demo files into a temporary folder.
func demoDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	code, _, errs := run(t, "demo", "--write", dir)
	require.Equal(t, 0, code, errs)
	return dir
}

// An output that is an input of the same run is refused with exit 2 and the
// input is left byte for byte as it was: the catalogue, the spec, an orders
// file and a spec an order names, directly or through a symlink.
func TestOutputOverAnInputRefused(t *testing.T) {
	dir := demoDir(t)
	stocks, spec := filepath.Join(dir, "stocks.toml"), filepath.Join(dir, "laminating.toml")
	orders := filepath.Join(dir, "orders.toml")
	require.NoError(t, os.WriteFile(orders, []byte("[[order]]\nspec = \"laminating.toml\"\ntonnes = 50\n"), 0o644))
	link := filepath.Join(dir, "link.toml")
	require.NoError(t, os.Symlink(stocks, link))
	before := map[string][]byte{}
	for _, p := range []string{stocks, spec, orders} {
		b, err := os.ReadFile(p)
		require.NoError(t, err)
		before[p] = b
	}
	for _, args := range [][]string{
		{"solve", "--stocks", stocks, "--spec", spec, "--mps", stocks},
		{"solve", "--stocks", stocks, "--spec", spec, "--mps", link},
		{"solve", "--stocks", link, "--spec", spec, "--svg", stocks},
		{"solve", "--stocks", stocks, "--spec", spec, "--svg", spec},
		{"sweep", "--stocks", stocks, "--spec", spec, "--price", "palm=900:1100:3", "--svg", spec},
		{"plan", "--stocks", stocks, "--orders", orders, "--mps", orders},
		{"plan", "--stocks", stocks, "--orders", orders, "--mps", spec},
	} {
		code, _, errs := run(t, args...)
		assert.Equal(t, 2, code, "%v: %s", args, errs)
		assert.Contains(t, errs, "an input of this run", args)
	}
	for p, b := range before {
		got, err := os.ReadFile(p)
		require.NoError(t, err)
		assert.Equal(t, b, got, "%s is untouched", p)
	}
}

// "-" sends the file to standard output and the report to standard error;
// two outputs on one path are refused.
func TestOutputToStandardOutput(t *testing.T) {
	code, out, errs := run(t, "solve", "--mps", "-")
	require.Equal(t, 0, code, errs)
	assert.True(t, strings.HasPrefix(out, "NAME"), "standard output holds the MPS model alone:\n%s", out)
	assert.Contains(t, out, "ENDATA")
	assert.Contains(t, errs, "Cheapest blend found", "the report moves to standard error")

	code, out, errs = run(t, "sweep", "--price", "palm=900:1100:3", "--svg", "-")
	require.Equal(t, 0, code, errs)
	assert.True(t, strings.HasPrefix(out, "<?xml"), out)
	assert.Contains(t, errs, "Price sweep of palm")

	code, _, errs = run(t, "solve", "--mps", "-", "--svg", "-")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "both ask for - (standard output)")
	p := filepath.Join(t.TempDir(), "x")
	code, _, errs = run(t, "solve", "--mps", p, "--svg", p)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "both name")
}

// A folder is exit 2 with a message; a replaced file is kept as a backup,
// named on standard error; a FIFO is written into, not renamed over.
func TestOutputTargets(t *testing.T) {
	dir := t.TempDir()
	code, _, errs := run(t, "solve", "--svg", dir)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--svg: "+dir+" is a folder")

	svg := filepath.Join(dir, "chart.svg")
	require.NoError(t, os.WriteFile(svg, []byte("mine"), 0o644))
	code, _, errs = run(t, "solve", "--svg", svg)
	require.Equal(t, 0, code, errs)
	assert.Contains(t, errs, "--svg: kept the old "+svg+" as "+svg+".")
	baks, _ := filepath.Glob(svg + ".*.bak")
	require.Len(t, baks, 1)
	b, _ := os.ReadFile(baks[0])
	assert.Equal(t, "mine", string(b))

	fifo := filepath.Join(dir, "model.pipe")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	code, _, errs = run(t, "solve", "--mps", fifo)
	assert.Equal(t, 2, code, "nobody reads the pipe: refused, not waited on")
	assert.Contains(t, errs, "nobody is reading the named pipe")
	r, err := os.OpenFile(fifo, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	require.NoError(t, err)
	defer r.Close()
	// the demo model (a few kB) fits the pipe's buffer, so it is read after
	code, _, errs = run(t, "solve", "--mps", fifo)
	require.Equal(t, 0, code, errs)
	got, err := io.ReadAll(r)
	require.NoError(t, err)
	assert.Contains(t, string(got), "ENDATA")
	st, err := os.Lstat(fifo)
	require.NoError(t, err)
	assert.NotZero(t, st.Mode()&os.ModeNamedPipe, "still a FIFO")
}

// demo --write follows the same rules and still never mixes the demo files
// into a folder that holds one of them.
func TestDemoWriteThroughOutput(t *testing.T) {
	dir := t.TempDir()
	real := filepath.Join(dir, "elsewhere")
	require.NoError(t, os.Mkdir(real, 0o755))
	link := filepath.Join(dir, "demo")
	require.NoError(t, os.Symlink(real, link))
	code, _, errs := run(t, "demo", "--write", link)
	require.Equal(t, 0, code, errs)
	for name := range catalogue.DemoFiles() {
		assert.FileExists(t, filepath.Join(real, name))
	}
	code, _, errs = run(t, "demo", "--write", link)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "already exists")
}

// TestWriteJSONAsEncoder holds writeJSON to the standard library's
// json.Encoder with SetIndent("", "  "), byte for byte: nested objects and
// arrays, empty ones, HTML characters (escaped by both), numbers, null, and
// a whole 300-stock solve report.
func TestWriteJSONAsEncoder(t *testing.T) {
	stocks, spec := stocks300(t, t.TempDir())
	var report bytes.Buffer
	require.NoError(t, (&app{stdout: &report, stderr: io.Discard}).solve([]string{"--stocks", stocks, "--spec", spec, "--format", "json"}))
	var decoded any
	require.NoError(t, json.Unmarshal(report.Bytes(), &decoded))
	for _, v := range []any{
		map[string]any{"a": []any{}, "b": map[string]any{}, "c": nil, "d": 1.5e-9, "e": "<b>&</b>", "f": []any{1, []any{2, map[string]any{"g": true}}}},
		[]int{}, "plain", 3, nil, decoded,
	} {
		var want, got bytes.Buffer
		enc := json.NewEncoder(&want)
		enc.SetIndent("", "  ")
		require.NoError(t, enc.Encode(v))
		require.NoError(t, writeJSON(&got, v))
		require.Equal(t, want.String(), got.String())
	}
	require.Error(t, writeJSON(io.Discard, func() {}), "a value JSON cannot hold is an error")
}

// FuzzIndentJSON holds indentJSON to the standard library's json.Indent
// on any valid JSON, compacted first by json.Compact, byte for byte.
func FuzzIndentJSON(f *testing.F) {
	for _, s := range []string{`{"a":[],"b":{},"c":null,"d":[1,[2,{"g":true}]]}`, `"a\"b\\"`, `[{"":""},{},[[]]]`, `  [ 1 , { "k" : "v}]" } ]  `, `3`} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if !json.Valid(data) {
			return
		}
		var compact, want bytes.Buffer
		require.NoError(t, json.Compact(&compact, data))
		require.NoError(t, json.Indent(&want, compact.Bytes(), "", "  "))
		require.Equal(t, want.String(), string(indentJSON(nil, compact.Bytes())), "%s", compact.Bytes())
	})
}
