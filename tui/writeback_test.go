package tui

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	tea "charm.land/bubbletea/v2"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// Write-back (W) asks first and edits the changed values in place
// (catalogue.PatchStocks, PatchSpec). The files written are read back by
// the loaders (catalogue.LoadStocks, LoadSpec, on BurntSushi/toml, the
// reference TOML parser) and compared line by line with what the user
// wrote: only the lines of the changed values may differ.

// writeBackFiles puts the demo stocks and the laminating spec, comments
// and all, in a folder and opens a workspace on them.
func writeBackFiles(t *testing.T, files func(dir string) Files) (*driver, string, string, map[string][]byte) {
	t.Helper()
	dir := t.TempDir()
	stocks, spec := filepath.Join(dir, "stocks.toml"), filepath.Join(dir, "spec.toml")
	demo := catalogue.DemoFiles()
	require.NoError(t, os.WriteFile(stocks, demo["stocks.toml"], 0o644))
	require.NoError(t, os.WriteFile(spec, demo["laminating.toml"], 0o644))
	f := Files{StocksPath: stocks, SpecPath: spec}
	if files != nil {
		f = files(dir)
	}
	return newDriver(t, demoModel(t, "laminating", f), 80, 24), stocks, spec, demo
}

// changedLines lists the lines of after that differ from before, position
// by position (the edits here keep the number of lines).
func changedLines(t *testing.T, before, after []byte) []string {
	t.Helper()
	a, b := strings.Split(string(before), "\n"), strings.Split(string(after), "\n")
	require.Len(t, b, len(a), "the edit keeps every line")
	var out []string
	for i := range a {
		if a[i] != b[i] {
			out = append(out, a[i]+" => "+b[i])
		}
	}
	return out
}

func backups(t *testing.T, path string) []string {
	t.Helper()
	baks, err := filepath.Glob(path + ".*.bak")
	require.NoError(t, err)
	return baks
}

func TestWriteBackAsksFirst(t *testing.T) {
	d, stocks, spec, demo := writeBackFiles(t, nil)
	d.keys("2" + downs(stockIndex(t, d.m, "palm")) + "<enter><ctrl+u>1100<enter>")
	d.keys("W")
	abs, err := filepath.Abs(stocks)
	require.NoError(t, err)
	scr := d.screen()
	assert.Contains(t, scr, "Write back to the files the session started from?")
	assert.Contains(t, scr, abs, "the file is named in full")
	assert.Contains(t, scr, `stock "palm" price 1000 → 1100`)
	assert.Contains(t, scr, "comments and layout kept")
	assert.Contains(t, scr, "old file kept as")
	assert.Contains(t, scr, abs+".<UTC-time>.bak", "where the backup goes")
	assert.Contains(t, scr, "spec.toml already holds these values: not written")
	assert.Contains(t, d.m.Message(), "Write stocks.toml: 1 price? Comments kept")
	assert.Contains(t, scr, "y/enter write · n/esc cancel")
	d.requireFrame(80, 24)

	// other keys are ignored while it asks
	rev := d.m.rev
	d.keys("2]q[d<space>R")
	assert.Equal(t, promptWrite, d.m.prompt.kind, "still asking")
	assert.Equal(t, rev, d.m.rev, "no edit was made")
	assert.False(t, d.quit)

	// n and esc cancel and leave both files byte for byte
	for _, no := range []string{"n", "<esc>"} {
		d.keys(no)
		assert.Equal(t, promptNone, d.m.prompt.kind)
		assert.Contains(t, d.m.Message(), "Nothing written")
		assert.Equal(t, demo["stocks.toml"], []byte(readFile(t, stocks)))
		assert.Equal(t, demo["laminating.toml"], []byte(readFile(t, spec)))
		assert.Empty(t, backups(t, stocks))
		d.keys("W")
	}

	// y writes: the palm price line alone changes, every comment stays
	d.keys("y")
	require.False(t, d.m.msgError, d.m.Message())
	after := []byte(readFile(t, stocks))
	assert.Equal(t, []string{"price = 1000.0 => price = 1100.0"}, changedLines(t, demo["stocks.toml"], after))
	assert.Equal(t, demo["laminating.toml"], []byte(readFile(t, spec)), "the spec held these values: not written")
	cat, ps := catalogue.LoadStocks(stocks)
	require.Empty(t, ps.Errors())
	p, _ := cat.Find("palm")
	assert.Equal(t, 1100.0, p.Price)

	// the backup is where the status line and the sheet say, in full
	baks := backups(t, stocks)
	require.Len(t, baks, 1)
	bak, err := filepath.Abs(baks[0])
	require.NoError(t, err)
	assert.Equal(t, demo["stocks.toml"], []byte(readFile(t, bak)))
	assert.Contains(t, d.m.Message(), "Old files kept as "+bak+".")
	assert.Contains(t, d.m.Message(), "Wrote stocks.toml (1 price, comments and layout kept).")
	scr = d.screen()
	assert.Contains(t, scr, "Written back")
	assert.Contains(t, strings.ReplaceAll(scr, "\n     ", ""), bak, "the sheet names the backup in full")
	d.requireFrame(80, 24)
	assert.False(t, d.m.dirty, "written back: nothing unsaved")
	d.keys("x")
	assert.NotContains(t, d.screen(), "Written back", "any key closes the sheet")
	assert.Equal(t, rev, d.m.rev, "the key that closes it does nothing else")
}

// A stock left out and a limit nudged are counted in the question and land
// on their own lines of the spec: the left-out stock as [use] max 0.
func TestWriteBackSpecEdits(t *testing.T) {
	d, stocks, spec, demo := writeBackFiles(t, nil)
	d.keys("2" + downs(stockIndex(t, d.m, "pko")) + "<space>")
	d.keys("3" + downs(rowIndex(t, d.m, "safa")) + "<right>]")
	d.keys("W")
	assert.Contains(t, d.m.Message(), "Write spec.toml: 1 limit, 1 stock left out? Comments kept")
	assert.Contains(t, d.screen(), "Stocks left out are written as [use] max 0.")
	d.keys("<enter>")
	require.False(t, d.m.msgError, d.m.Message())
	assert.ElementsMatch(t, []string{
		"safa  = { max = 62.0 } => safa  = { max = 62.5 }",
		`"pko"     = { max = 10.0 }         # lauric oils with palm soften on storage (common practice) => ` +
			`"pko"     = { max = 0.0 }          # lauric oils with palm soften on storage (common practice)`,
	}, changedLines(t, demo["laminating.toml"], []byte(readFile(t, spec))))
	assert.Equal(t, demo["stocks.toml"], []byte(readFile(t, stocks)))
	s, ps := catalogue.LoadSpec(spec, catalogue.DemoStocks())
	require.Empty(t, ps.Errors())
	_, want := d.m.Scenario().Effective()
	want.File, want.ID = s.File, s.ID
	assert.Equal(t, want, s, "the file reads back as the spec the workspace solves")
	assert.Len(t, backups(t, spec), 1)
}

// Relative paths are shown in full (absolute) in a local workspace.
func TestWriteBackShowsAbsolutePaths(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	demo := catalogue.DemoFiles()
	require.NoError(t, os.WriteFile("stocks.toml", demo["stocks.toml"], 0o644))
	require.NoError(t, os.WriteFile("spec.toml", demo["laminating.toml"], 0o644))
	d := newDriver(t, demoModel(t, "laminating", Files{StocksPath: "stocks.toml", SpecPath: "spec.toml"}), 80, 24)
	d.keys("2]W")
	abs, err := filepath.Abs("stocks.toml")
	require.NoError(t, err)
	assert.Contains(t, d.screen(), abs)
	d.keys("y")
	require.Regexp(t, regexp.QuoteMeta("Old files kept as "+abs+".")+`\d{8}T\d{6}\.\d{3}Z\.bak\.`, d.m.Message())
}

// A served (confined) workspace names files inside the served folder and
// never the server's own folders.
func TestWriteBackConfinedHidesTheServerFolder(t *testing.T) {
	d, stocks, _, _ := writeBackFiles(t, func(dir string) Files {
		return Files{Dir: dir, Confined: true, StocksPath: filepath.Join(dir, "stocks.toml"), SpecPath: filepath.Join(dir, "spec.toml")}
	})
	dir := filepath.Dir(stocks)
	d.keys("2]W")
	assert.NotContains(t, d.screen(), dir)
	assert.Contains(t, d.screen(), " stocks.toml\n")
	assert.Contains(t, d.screen(), "stocks.toml.<UTC-time>.bak")
	d.keys("y")
	assert.NotContains(t, d.m.Message(), dir)
	assert.Regexp(t, `^Old files kept as stocks\.toml\.\d{8}T\d{6}\.\d{3}Z\.bak\. Wrote stocks\.toml`, d.m.Message())
	assert.NotContains(t, d.screen(), dir)
	assert.Len(t, backups(t, stocks), 1)
}

// A value that cannot be edited in place (here a limit written over
// several lines, as TOML 1.1 allows an inline table) makes the file be
// written in full, and the question says so before anything is written.
func TestWriteBackSaysWhyCommentsCannotBeKept(t *testing.T) {
	dir := t.TempDir()
	stocks, spec := filepath.Join(dir, "stocks.toml"), filepath.Join(dir, "spec.toml")
	require.NoError(t, os.WriteFile(stocks, catalogue.DemoFiles()["stocks.toml"], 0o644))
	text := "# hand-written\nname = \"Wide\"\nbatch = 20.0\n\n[limits]\ntrans = {\n  max = 1.0, # the cap\n}\nsafa = { max = 62.0 } # kept\n"
	require.NoError(t, os.WriteFile(spec, []byte(text), 0o644))
	cat := catalogue.DemoStocks()
	s, ps := catalogue.LoadSpec(spec, cat)
	require.Empty(t, ps.Errors())
	d := newDriver(t, New(cat, s, "files", Files{StocksPath: stocks, SpecPath: spec}), 80, 24)
	d.keys("3" + downs(rowIndex(t, d.m, "trans")) + "d")
	d.keys("W")
	assert.Contains(t, d.m.Message(), "Comments in spec.toml cannot be kept")
	scr := strings.Join(strings.Fields(d.screen()), " ")
	assert.Contains(t, scr, "comments could not be kept: the value of limits.trans on line 6 spans several lines; the file is written in full")
	assert.Equal(t, text, readFile(t, spec), "nothing written yet")
	d.keys("y")
	assert.Contains(t, d.m.Message(), "spec.toml (1 limit, written in full)")
	back, ps := catalogue.LoadSpec(spec, cat)
	require.Empty(t, ps.Errors())
	assert.Len(t, back.Limits, 1)
	baks := backups(t, spec)
	require.Len(t, baks, 1)
	assert.Equal(t, text, readFile(t, baks[0]), "the file with its comments is kept as the backup")
}

// A file changed on disk between W and y is not written over.
func TestWriteBackRefusesAFileChangedSinceAsked(t *testing.T) {
	d, stocks, _, demo := writeBackFiles(t, nil)
	d.keys("2]W")
	theirs := append(append([]byte(nil), demo["stocks.toml"]...), "# added by someone else\n"...)
	require.NoError(t, os.WriteFile(stocks, theirs, 0o644))
	d.keys("y")
	assert.True(t, d.m.msgError)
	assert.Contains(t, d.m.Message(), "changed on disk since W was pressed; press W again")
	assert.Equal(t, theirs, []byte(readFile(t, stocks)))
	assert.Empty(t, backups(t, stocks))
	d.keys("Wy")
	require.False(t, d.m.msgError, d.m.Message())
	assert.Contains(t, readFile(t, stocks), "# added by someone else\n", "their line is kept too")
}

func TestWriteBackNothingToWrite(t *testing.T) {
	d, _, _, _ := writeBackFiles(t, nil)
	d.keys("W")
	assert.Equal(t, promptNone, d.m.prompt.kind)
	assert.Equal(t, "Nothing to write back: stocks.toml and spec.toml already hold these values.", d.m.Message())
}

// The question and the sheet after writing fit any window, as every
// screen of the workspace does.
func TestWriteBackFitsTheWindow(t *testing.T) {
	for _, size := range [][2]int{{20, 6}, {44, 12}, {80, 24}, {200, 50}} {
		d, _, _, _ := writeBackFiles(t, nil)
		d.send(tea.WindowSizeMsg{Width: size[0], Height: size[1]})
		d.keys("2]W")
		require.Equal(t, promptWrite, d.m.prompt.kind)
		d.requireFrame(size[0], size[1])
		d.keys("y")
		require.NotNil(t, d.m.sheet, d.m.Message())
		d.requireFrame(size[0], size[1])
	}
}
