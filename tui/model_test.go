package tui

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "charm.land/bubbletea/v2"
	"github.com/charmbracelet/x/ansi"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/optimise"
	"lipoplan/randomise"
)

func stockIndex(t *testing.T, m *Model, id string) int {
	t.Helper()
	for i, s := range m.Scenario().Catalogue.Stocks {
		if s.ID == id {
			return i
		}
	}
	t.Fatalf("no stock %s", id)
	return 0
}

func rowIndex(t *testing.T, m *Model, key string) int {
	t.Helper()
	for i, r := range m.Scenario().Rows() {
		if r.Key == key {
			return i
		}
	}
	t.Fatalf("no row %s", key)
	return 0
}

func downs(n int) string { return strings.Repeat("<down>", n) }

func price(m *Model, id string) float64 {
	s, _ := m.Scenario().Catalogue.Find(id)
	return s.Price
}

func TestWorkspaceShowsTheDemoBlend(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	require.False(t, d.m.Pending())
	snap := d.m.Snapshot()
	require.True(t, snap.Feasible(), "demo spec solves: %v", snap.Err)
	scr := d.screen()
	assert.Contains(t, scr, "Cheapest blend")
	assert.Contains(t, scr, fmt.Sprintf("%.2f EUR/t", snap.Result.CostPerTonne))
	for _, l := range snap.Result.Blend {
		assert.Contains(t, scr, l.Stock)
	}
	assert.Contains(t, scr, "GC FAME", "the caution line (README, \"Cautions\") is on screen")
	assert.Contains(t, scr, "local food law")
	assert.Contains(t, scr, "u undo", "one-line key help")
	d.requireFrame(80, 24)
}

func TestNavigationNeverSolves(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	rev := d.m.rev
	for _, k := range []string{"2", "<down>", "<down>", "<right>", "<left>", "3", "<up>", "4", "5", "<tab>", "<s-tab>", "1", "?", "x"} {
		var msg tea.KeyPressMsg
		if strings.HasPrefix(k, "<") {
			msg = special(t, strings.Trim(k, "<>"))
		} else {
			msg = tea.KeyPressMsg{Code: rune(k[0]), Text: k}
		}
		_, cmd := d.m.Update(msg)
		assert.Nil(t, cmd, "key %s must not start a solve", k)
		_ = d.m.View()
	}
	assert.Equal(t, rev, d.m.rev)
}

func TestEditPriceUndoRedo(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	before := d.m.Snapshot().Result.CostPerTonne
	i := stockIndex(t, d.m, "palm")
	d.keys("2" + downs(i) + "<enter><ctrl+u>1100<enter>")
	assert.Equal(t, 1100.0, price(d.m, "palm"))
	require.False(t, d.m.Pending())
	after := d.m.Snapshot().Result.CostPerTonne
	// the snapshot matches a direct solve of the edited scenario
	cat, spec := d.m.Scenario().Effective()
	direct, err := optimise.Solve(cat, spec, optimise.Options{})
	require.NoError(t, err)
	assert.InDelta(t, direct.CostPerTonne, after, 1e-9)
	assert.GreaterOrEqual(t, after, before-1e-9, "a dearer stock cannot make the optimum cheaper")
	assert.Contains(t, d.m.Message(), "→", "the status line reports the change in cost")
	assert.Contains(t, d.screen(), "1100.00")

	d.keys("u")
	assert.Equal(t, 1000.0, price(d.m, "palm"))
	assert.InDelta(t, before, d.m.Snapshot().Result.CostPerTonne, 1e-9)
	d.keys("U")
	assert.Equal(t, 1100.0, price(d.m, "palm"))
	d.keys("uu")
	assert.Contains(t, d.m.Message(), "Nothing to undo")
}

func TestNudgeAndBadInput(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	i := stockIndex(t, d.m, "palm")
	d.keys("2" + downs(i) + "]]")
	assert.Equal(t, 1020.0, price(d.m, "palm"))
	d.keys("[")
	assert.Equal(t, 1010.0, price(d.m, "palm"))
	rev := d.m.rev
	d.keys("<enter><ctrl+u>cheap<enter>")
	assert.Equal(t, 1010.0, price(d.m, "palm"), "a bad number changes nothing")
	assert.Equal(t, rev, d.m.rev)
	assert.Contains(t, d.screen(), "not a number")
	d.keys("<enter><ctrl+u>2000<esc>")
	assert.Equal(t, 1010.0, price(d.m, "palm"), "esc cancels")
	// availability column: empty input means unlimited purchase
	j := stockIndex(t, d.m, "hosun")
	d.keys("g" + downs(j) + "<right><enter><ctrl+u><enter>")
	h, _ := d.m.Scenario().Catalogue.Find("hosun")
	assert.False(t, h.Limited())
}

// A price, amount or limit typed beyond the accepted magnitudes (README
// "Accepted magnitudes") is refused on the status line and changes nothing.
func TestTypedMagnitudesRefused(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	i := stockIndex(t, d.m, "palm")
	rev := d.m.rev
	for _, v := range []string{"1e25", "1e-320", "NaN", "-5", "1e400"} {
		d.keys("2" + "g" + downs(i) + "<enter><ctrl+u>" + v + "<enter>")
		assert.Equal(t, 1000.0, price(d.m, "palm"), v)
		assert.True(t, d.m.msgError, v)
	}
	d.keys("<right><enter><ctrl+u>1e308<enter>")
	assert.Contains(t, d.m.Message(), "outside the accepted range 0, or 0.001 to 1e6 t")
	d.keys("3g<enter><ctrl+u>1e-320<enter>")
	assert.Contains(t, d.m.Message(), "batch = 1e-320 is outside the accepted range 0.001 to 1e6 t")
	assert.Equal(t, rev, d.m.rev, "no refused value became an edit")
	d.requireFrame(80, 24)
}

func TestLeaveOutAStock(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	top := d.m.Snapshot().Result.Blend[0].Stock
	for _, l := range d.m.Snapshot().Result.Blend {
		if l.Pct > d.m.Snapshot().Result.Blend[0].Pct {
			top = l.Stock
		}
	}
	d.keys("2" + downs(stockIndex(t, d.m, top)) + "<space>")
	assert.True(t, d.m.Scenario().Excluded[top])
	snap := d.m.Snapshot()
	require.NoError(t, snap.Err)
	if snap.Feasible() {
		l, ok := snap.Line(top)
		assert.True(t, !ok || l.Pct < 1e-9, "a left-out stock is not in the blend")
	}
	assert.Contains(t, d.screen(), "left out")
	d.keys("<space>")
	assert.False(t, d.m.Scenario().Excluded[top])
}

func TestImpossibleSpecShowsRelaxation(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	// SFC at 40 °C of at most 0.5 % with 35 °C at least 10 %: no demo stock
	// mix melts that sharply, so the spec cannot be met.
	d.keys("3" + downs(rowIndex(t, d.m, "sfc.40")) + "<right><enter><ctrl+u>0.5<enter>")
	snap := d.m.Snapshot()
	require.NoError(t, snap.Err)
	require.Equal(t, optimise.Infeasible, snap.Result.Status)
	require.NotEmpty(t, snap.Result.Relaxation)
	scr := d.screen()
	assert.Contains(t, scr, "spec cannot be met")
	assert.Contains(t, scr, "relax", "the limits panel marks what to relax")
	d.requireFrame(80, 24)
	d.keys("1")
	scr = d.screen()
	assert.Contains(t, scr, "Smallest change")
	assert.Contains(t, scr, snap.Result.Relaxation[0].Name)
	for p := 0; p < int(numPanels); p++ {
		d.keys(fmt.Sprint(p + 1))
		d.requireFrame(80, 24)
		assert.NotEmpty(t, strings.TrimSpace(strings.Join(strings.Split(d.screen(), "\n")[2:20], "")), "panel %d is not blank", p+1)
	}
	d.keys("R")
	require.NotNil(t, d.m.relax)
	require.NotNil(t, d.m.relax.snap, "the preview is costed")
	preview := d.m.relax.snap.Result
	d.keys("<enter>")
	require.True(t, d.m.Snapshot().Feasible(), "applying the relaxation makes the spec feasible: %s", d.m.Message())
	require.Same(t, preview, d.m.Snapshot().Result, "the preview's solve is shown, not solved again")
	require.Equal(t, d.m.rev, d.m.Snapshot().Rev)
	require.False(t, d.m.Pending())
	d.keys("u")
	require.Equal(t, optimise.Infeasible, d.m.Snapshot().Result.Status, "u takes the relaxation back")
}

func TestAddEditDropLimit(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	d.keys("3niv<enter>")
	i := rowIndex(t, d.m, "iv")
	assert.Equal(t, i, d.m.cursor[panelLimits], "the new row is selected")
	d.keys("<enter><ctrl+u>44<enter>")
	assert.Equal(t, 44.0, d.m.Scenario().Rows()[i].Bound.Max)
	snap := d.m.Snapshot()
	require.True(t, snap.Feasible())
	// AOCS Cd 1c-85 calculated IV of the blend, recomputed here from its
	// fatty-acid profile, respects the new limit
	var parts []blend.Part
	for _, l := range snap.Result.Blend {
		s, _ := d.m.Scenario().Catalogue.Find(l.Stock)
		parts = append(parts, blend.Part{Stock: s, Pct: l.Pct})
	}
	p, err := blend.Mix(parts, nil)
	require.NoError(t, err)
	assert.LessOrEqual(t, p.IV, 44+1e-6)
	d.keys("<left><enter><ctrl+u>40<enter>")
	assert.Equal(t, 40.0, d.m.Scenario().Rows()[i].Bound.Min)
	d.keys("d")
	for _, r := range d.m.Scenario().Rows() {
		assert.NotEqual(t, "iv", r.Key)
	}
	d.keys("<enter><ctrl+u>200<enter>")
	d.keys("nnonsense<enter>")
	assert.Contains(t, d.screen(), "is not a limit")
}

func TestBatchEdit(t *testing.T) {
	d := newDriver(t, demoModel(t, "shortening", Files{}), 80, 24)
	d.keys("3g<enter><ctrl+u>40<enter>")
	assert.Equal(t, 40.0, d.m.Scenario().Spec.Batch)
	assert.InDelta(t, 40.0, d.m.Snapshot().Result.Batch, 1e-9)
	d.keys("<enter><ctrl+u>0<enter>")
	assert.Equal(t, 40.0, d.m.Scenario().Spec.Batch)
	assert.Contains(t, d.screen(), "outside the accepted range")
}

func TestResizeKeepsTheFrame(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	for _, sz := range [][2]int{{80, 24}, {120, 40}, {100, 30}, {200, 60}, {80, 24}} {
		d.send(tea.WindowSizeMsg{Width: sz[0], Height: sz[1]})
		for p := 1; p <= int(numPanels); p++ {
			d.keys(fmt.Sprint(p))
			d.requireFrame(sz[0], sz[1])
		}
	}
	d.send(tea.WindowSizeMsg{Width: 140, Height: 30})
	d.keys("1")
	assert.Contains(t, d.screen(), cautionLong, "wide terminals get the full caution")
	d.send(tea.WindowSizeMsg{Width: 0, Height: 0})
	d.requireFrame(140, 30)
}

func TestSaveAndOpenThroughKeys(t *testing.T) {
	dir := t.TempDir()
	d := newDriver(t, demoModel(t, "laminating", Files{Dir: dir}), 80, 24)
	d.keys("2" + downs(stockIndex(t, d.m, "pko")) + "<space>")
	d.keys("s<ctrl+u>mine.toml<enter>")
	path := filepath.Join(dir, "mine.toml")
	require.FileExists(t, path)
	assert.Contains(t, d.screen(), "Saved")
	d.keys("g<enter><ctrl+u>5<enter><space>")
	require.Equal(t, 5.0, d.m.Scenario().Catalogue.Stocks[0].Price)
	d.keys("o<ctrl+u>mine.toml<enter>")
	assert.Equal(t, catalogue.DemoStocks().Stocks[0].Price, d.m.Scenario().Catalogue.Stocks[0].Price)
	assert.True(t, d.m.Scenario().Excluded["pko"], "left-out stocks come back from the file")
	d.keys("u")
	assert.Equal(t, 5.0, d.m.Scenario().Catalogue.Stocks[0].Price, "opening is undoable")
	d.keys("o<ctrl+u>missing.toml<enter>")
	assert.Contains(t, d.screen(), "cannot read scenario")
}

func TestReadOnlyWorkspaceRefusesWrites(t *testing.T) {
	dir := t.TempDir()
	files := Files{Dir: dir, Confined: true, ReadOnly: true}
	d := newDriver(t, demoModel(t, "laminating", files), 80, 24)
	d.keys("s")
	assert.Contains(t, d.screen(), "read-only")
	assert.Equal(t, promptNone, d.m.prompt.kind, "no file name is even asked for")
	d.keys("W")
	assert.Contains(t, d.screen(), "read-only")
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Empty(t, entries)
	// opening is confined to plain names in the scenario folder
	d.keys("o<ctrl+u>../../etc/passwd<enter>")
	assert.Contains(t, d.m.Message(), "no folders")
}

func TestWriteBack(t *testing.T) {
	dir := t.TempDir()
	stocks, spec := filepath.Join(dir, "stocks.toml"), filepath.Join(dir, "spec.toml")
	files := catalogue.DemoFiles()
	require.NoError(t, os.WriteFile(stocks, files["stocks.toml"], 0o644))
	require.NoError(t, os.WriteFile(spec, files["laminating.toml"], 0o644))
	d := newDriver(t, demoModel(t, "laminating", Files{StocksPath: stocks, SpecPath: spec}), 80, 24)
	d.keys("2" + downs(stockIndex(t, d.m, "palm")) + "<enter><ctrl+u>999<enter>Wy")
	assert.Contains(t, d.m.Message(), "Old files kept as")
	cat, ps := catalogue.LoadStocks(stocks)
	require.Empty(t, ps.Errors())
	p, _ := cat.Find("palm")
	assert.Equal(t, 999.0, p.Price)
	_, ps = catalogue.LoadSpec(spec, cat)
	require.Empty(t, ps.Errors())
	// The file the user wrote (comments and all) is kept byte for byte
	// beside the edited one; the spec, which holds these values already,
	// is not written at all.
	baks, err := filepath.Glob(stocks + ".*.bak")
	require.NoError(t, err)
	require.Len(t, baks, 1)
	raw, err := os.ReadFile(baks[0])
	require.NoError(t, err)
	assert.Equal(t, files["stocks.toml"], raw)
	baks, _ = filepath.Glob(spec + ".*.bak")
	assert.Empty(t, baks)
	assert.Equal(t, files["laminating.toml"], []byte(readFile(t, spec)))
}

// The workspace's save and write-back follow the rules of every output
// (catalogue.Output): the stocks and spec it started from are never saved
// over, "-" and folders are refused, a symlinked stocks file is written
// through to its target, and writing back what is on disk makes no backup.
func TestWorkspaceWritesByTheOutputRules(t *testing.T) {
	dir := t.TempDir()
	files := catalogue.DemoFiles()
	real := filepath.Join(dir, "real-stocks.toml")
	require.NoError(t, os.WriteFile(real, files["stocks.toml"], 0o600))
	stocks := filepath.Join(dir, "stocks.toml")
	require.NoError(t, os.Symlink(real, stocks))
	spec := filepath.Join(dir, "spec.toml")
	require.NoError(t, os.WriteFile(spec, files["laminating.toml"], 0o644))
	d := newDriver(t, demoModel(t, "laminating", Files{Dir: dir, StocksPath: stocks, SpecPath: spec}), 80, 24)
	for _, name := range []string{"stocks.toml", "real-stocks.toml", spec} {
		d.keys("s<ctrl+u>" + name + "<enter>")
		assert.Contains(t, d.m.Message(), "an input of this run", name)
	}
	d.keys("s<ctrl+u>-<enter>")
	assert.Contains(t, d.m.Message(), "standard output")
	require.NoError(t, os.Mkdir(filepath.Join(dir, "folder"), 0o755))
	d.keys("s<ctrl+u>folder<enter>")
	assert.Contains(t, d.m.Message(), "is a folder")
	assert.Equal(t, files["stocks.toml"], []byte(readFile(t, real)), "nothing was written over the stocks")

	// write back: the stocks through the link, the spec (unchanged) not at
	// all; a second W finds nothing to write
	d.keys("2]Wy")
	require.False(t, d.m.msgError, d.m.Message())
	d.keys("<esc>W")
	assert.Contains(t, d.m.Message(), "Nothing to write back", "the second write-back changes nothing on disk")
	lst, err := os.Lstat(stocks)
	require.NoError(t, err)
	assert.NotZero(t, lst.Mode()&os.ModeSymlink, "the stocks file is still a link")
	baks, _ := filepath.Glob(real + ".*.bak")
	assert.Len(t, baks, 1, "the backup of the real stocks file sits beside it")
	st, _ := os.Stat(real)
	assert.Equal(t, os.FileMode(0o600), st.Mode().Perm(), "the rewritten file keeps its mode")
}

func readFile(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return string(b)
}

func TestQuitAsksWhileUnsaved(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	d.keys("2]q")
	assert.False(t, d.quit)
	assert.Contains(t, d.screen(), "press q again")
	d.keys("q")
	assert.True(t, d.quit)
	clean := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	clean.keys("q")
	assert.True(t, clean.quit)
}

// TestTAGPanelRandomClasses checks the chemical-interesterification column
// against the 1,2,3-random distribution written out by hand: with s the mole
// fraction of saturated acids and u = 1 - s, S3 = s³, S2U = 3s²u,
// SU2 = 3su², U3 = u³ (random distribution theory; e.g. Gunstone, The
// Chemistry of Oils and Fats, 2004 — from memory). Mole fractions come from
// the FAME wt% through the methyl esters' molar masses (GC area % taken as
// wt % FAME, ISO 12966-4:2015; catalogue.MolFractions).
func TestTAGPanelRandomClasses(t *testing.T) {
	d := newDriver(t, demoModel(t, "shortening", Files{}), 80, 24)
	snap := d.m.Snapshot()
	require.True(t, snap.Feasible())
	var parts []blend.Part
	for _, l := range snap.Result.Blend {
		s, _ := d.m.Scenario().Catalogue.Find(l.Stock)
		parts = append(parts, blend.Part{Stock: s, Pct: l.Pct})
	}
	p, err := blend.Mix(parts, nil)
	require.NoError(t, err)
	var sat, all float64
	for k, w := range p.FattyAcids {
		fa, ok := catalogue.Lookup(k)
		require.True(t, ok)
		n := w / fa.EsterMolarMass()
		all += n
		if fa.Saturated() {
			sat += n
		}
	}
	s := sat / all
	u := 1 - s
	var chem *TAGColumn
	for i := range snap.TAG.Columns {
		if snap.TAG.Columns[i].Method == "chemical" {
			chem = &snap.TAG.Columns[i]
		}
	}
	require.NotNil(t, chem)
	require.NoError(t, chem.Err)
	// The reaction starts from the stocks' native TAGs; where a stock has a
	// measured TAG profile its acid fractions differ from its GC FAME profile
	// by a few hundredths of a mol %, hence the tolerance.
	const tol = 0.01
	assert.InDelta(t, 100*s*s*s, chem.Classes.S3, tol)
	assert.InDelta(t, 300*s*s*u, chem.Classes.S2U, tol)
	assert.InDelta(t, 300*s*u*u, chem.Classes.SU2, tol)
	assert.InDelta(t, 100*u*u*u, chem.Classes.U3, tol)
	assert.InDelta(t, 100*s*s*u, chem.Classes.SUS, tol, "SUS is one of the three S2U arrangements")
	d.keys("5")
	scr := d.screen()
	assert.Contains(t, scr, "chemical IE")
	assert.Contains(t, scr, fmt.Sprintf("%.1f", chem.Classes.S3))
}

// TestSFCPanelLinearBlend checks the chart's summary against the linear
// weighting of the stocks' measured SFC curves by mass share, the usual first
// estimate of a blend's SFC (common practice; pulsed NMR per AOCS Cd 16b-93
// measures the stock curves).
func TestSFCPanelLinearBlend(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	snap := d.m.Snapshot()
	require.True(t, snap.Feasible())
	d.keys("4")
	scr := d.screen()
	assert.Contains(t, scr, "spec band")
	for _, l := range d.m.Scenario().Spec.SFC {
		var v, tot float64
		for _, line := range snap.Result.Blend {
			s, _ := d.m.Scenario().Catalogue.Find(line.Stock)
			x, ok := s.SFC.At(l.Temp)
			require.True(t, ok, "demo stock %s has SFC at %v", s.ID, l.Temp)
			v += line.Pct * x
			tot += line.Pct
		}
		v /= tot
		assert.Contains(t, scr, fmt.Sprintf("%s° %.1f", catalogue.TempKey(l.Temp), v))
		if l.HasMax() {
			assert.LessOrEqual(t, v, l.Max+1e-6)
		}
		if l.HasMin() {
			assert.GreaterOrEqual(t, v, l.Min-1e-6)
		}
	}
	lines := strings.Split(scr, "\n")
	summary := lines[len(lines)-4]
	assert.Contains(t, summary, "✓")
	assert.NotContains(t, summary, "✗", "the optimal blend meets every SFC limit")
	d.requireFrame(80, 24)
}

func TestEvaluateNeverPanics(t *testing.T) {
	sc := demoScenario(t, "laminating")
	sc.Spec.Batch = math.NaN()
	snap := Evaluate(sc, 1)
	if snap.Err == nil {
		assert.NotNil(t, snap.Result)
	}
	m := NewWithScenario(sc, "test", Files{})
	d := newDriver(t, m, 80, 24)
	d.requireFrame(80, 24)
	assert.NotEmpty(t, strings.TrimSpace(d.screen()))
}

func TestEditsDuringASolveAreFolded(t *testing.T) {
	m := demoModel(t, "laminating", Files{})
	first := m.Init()
	require.NotNil(t, first)
	m.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	m.Update(tea.KeyPressMsg{Code: '2', Text: "2"})
	// three nudges while the first evaluation is still running start no
	// further solve of their own
	for i := 0; i < 3; i++ {
		_, cmd := m.Update(tea.KeyPressMsg{Code: ']', Text: "]"})
		assert.Nil(t, cmd)
	}
	assert.True(t, m.Pending())
	assert.Contains(t, ansi.Strip(m.View().Content), "solving", "the screen says it is working, never blank")
	// the first result arrives: one evaluation of the newest scenario follows
	_, next := m.Update(first())
	require.NotNil(t, next)
	_, none := m.Update(next())
	assert.Nil(t, none)
	assert.False(t, m.Pending())
	assert.Equal(t, m.rev, m.Snapshot().Rev)
	assert.Equal(t, 1180.0, price(m, "rapeseed"))
}

// p overlays the TAG model's predicted SFC on the chart, cycling as blended,
// chemical IE, enzymatic IE and off. The numbers shown must be the blend/sle
// prediction for the optimal blend's TAGs (same model, computed directly).
func TestPredictedOverlay(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	snap := d.m.Snapshot()
	require.True(t, snap.Feasible())
	d.keys("4p")
	scr := d.screen()
	assert.Contains(t, scr, "∘ predicted")
	assert.Contains(t, scr, "as blended")
	parts := blendParts(d.m.Scenario().Catalogue, snap.Result)
	temps := []float64{}
	for _, l := range d.m.Scenario().Spec.SFC {
		temps = append(temps, l.Temp)
	}
	want, _, err := sle.PredictParts(parts, randomise.Native, 1, temps, sle.DefaultOptions())
	require.NoError(t, err)
	for _, tt := range temps {
		assert.Contains(t, scr, fmt.Sprintf("%s° %.1f", catalogue.TempKey(tt), want[tt]))
	}
	d.requireFrame(80, 24)
	d.keys("p")
	assert.Contains(t, d.screen(), "after chemical interesterification")
	d.keys("pp")
	assert.NotContains(t, d.screen(), "∘ predicted", "fourth p turns the overlay off")
	assert.Equal(t, snap, d.m.Snapshot(), "the overlay never re-solves")
}

// A spec with a reactor step shows the reactor on 1 Blend, and the chart's
// curve is the solve's own SFC (reacted part predicted), not a re-weighting
// of measured curves.
func TestReactorShownAndCharted(t *testing.T) {
	spec, ps := catalogue.LoadSpec("../testdata/process-margarine.toml", catalogue.DemoStocks())
	require.Empty(t, ps.Errors())
	d := newDriver(t, New(catalogue.DemoStocks(), spec, "test", Files{}), 80, 24)
	snap := d.m.Snapshot()
	require.True(t, snap.Feasible(), "%v", snap.Err)
	require.NotNil(t, snap.Result.Process)
	assert.Contains(t, d.screen(), "Reactor")
	for _, p := range snap.Curve {
		if v, ok := snap.Result.Properties.SFC[p.Temp]; ok {
			assert.InDelta(t, v, p.Solid, 1e-9)
		}
	}
	d.requireFrame(80, 24)
}

// A calibration given to the session (Scenario.Model) is the model the TAG
// panel and the overlay use: the predictions equal sle's with those options
// and differ from the uncalibrated ones.
func TestSessionCalibrationReachesPredictions(t *testing.T) {
	sc := NewScenario(catalogue.DemoStocks(), catalogue.DemoSpecs()[0])
	sc.Model = sle.Options{Shift: sle.Shifts{3, 2, 2, 1, 0}}
	snap := Evaluate(sc, 1)
	require.True(t, snap.Feasible(), "%v", snap.Err)
	base := Evaluate(NewScenario(catalogue.DemoStocks(), catalogue.DemoSpecs()[0]), 1)
	parts := blendParts(sc.Catalogue, snap.Result)
	col, ok := snap.TAG.Column(randomise.Native)
	require.True(t, ok)
	col0, _ := base.TAG.Column(randomise.Native)
	var temps []float64
	for _, p := range col.Predicted {
		temps = append(temps, p.Temp)
	}
	want, _, err := sle.PredictParts(parts, randomise.Native, 1, temps, sc.Model)
	require.NoError(t, err)
	differs := false
	for i, p := range col.Predicted {
		assert.InDelta(t, want[p.Temp], p.Solid, 1e-9)
		differs = differs || math.Abs(p.Solid-col0.Predicted[i].Solid) > 0.1
	}
	assert.True(t, differs, "the calibration changes the prediction")
	assert.Equal(t, sc.Model, sc.Clone().Model, "clones keep the session's model")
}

// m matches a fat: the offered default is the demo's trans-containing stock,
// the scenario's SFC limits become its measured curve ± the tolerance, it is
// left out, trans is held at most 1 %, and the blend costs what
// optimise.Replace finds with the same spec as base; u undoes it.
func TestMatchMode(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 100, 30)
	before := d.m.Scenario()
	d.keys("m")
	assert.Contains(t, d.screen(), "ph-soy 3", "the partially hardened stock is offered")
	d.keys("<enter>")
	sc := d.m.Scenario()
	inc, _ := sc.Catalogue.Find("ph-soy")
	require.Len(t, sc.Spec.SFC, len(inc.SFC))
	for i, p := range inc.SFC {
		assert.InDelta(t, math.Max(0, p.Solid-3), sc.Spec.SFC[i].Min, 1e-12)
		assert.InDelta(t, p.Solid+3, sc.Spec.SFC[i].Max, 1e-12)
	}
	snap := d.m.Snapshot()
	require.True(t, snap.Feasible(), "%v", snap.Err)
	cat, spec := before.Effective()
	want, err := optimise.Replace(cat, optimise.Replacement{Incumbent: "ph-soy", Tolerance: 3, TransMax: 1, Base: spec}, optimise.Options{})
	require.NoError(t, err)
	require.Equal(t, optimise.Optimal, want.Status)
	assert.InDelta(t, want.Result.CostPerTonne, snap.Result.CostPerTonne, 1e-6)
	for _, l := range snap.Result.Blend {
		assert.NotEqual(t, "ph-soy", l.Stock)
	}
	assert.Contains(t, d.screen(), "Matching ph-soy")
	d.requireFrame(100, 30)
	d.keys("u")
	assert.Equal(t, before.Spec.SFC, d.m.Scenario().Spec.SFC, "undo restores the spec's own bands")
	// a bad answer is refused with a message, the scenario unchanged
	d.keys("m<ctrl+u>lard 3<enter>")
	assert.Contains(t, d.screen(), "lard")
	assert.Equal(t, before.Spec.SFC, d.m.Scenario().Spec.SFC)
}
