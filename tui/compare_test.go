package tui

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "charm.land/bubbletea/v2"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise"
)

// benchOf drives the demo to a base and two variants: A with palm at 1100,
// B with palm at 1100 and pko left out, and leaves the workspace on B.
func benchOf(t *testing.T, w, h int) *driver {
	d := newDriver(t, demoModel(t, "laminating", Files{}), w, h)
	d.keys("v<enter>")
	assert.Contains(t, d.m.Message(), "kept already as base", "the starting scenario is the base")
	d.keys("2" + downs(stockIndex(t, d.m, "palm")) + "<enter><ctrl+u>1100<enter>")
	d.keys("v<enter>")
	require.Contains(t, d.m.Message(), "Kept as variant A")
	d.keys("g" + downs(stockIndex(t, d.m, "pko")) + "<space>")
	d.keys("v<enter>")
	require.Contains(t, d.m.Message(), "Kept as variant B")
	require.Len(t, d.m.bench, 3)
	return d
}

// Each column of 6 Compare shows what an independent solve of that kept
// scenario gives (optimise.Solve of its Effective catalogue and spec): cost,
// change against the base, shares and properties.
func TestCompareColumnsMatchIndependentSolves(t *testing.T) {
	d := benchOf(t, 100, 30)
	d.keys("6")
	scr := d.screen()
	base := solveDirect(t, d.m.bench[0].sc)
	require.Equal(t, optimise.Optimal, base.Status)
	for i, k := range d.m.bench {
		res := solveDirect(t, k.sc)
		require.Equal(t, optimise.Optimal, res.Status, k.name)
		require.NotNil(t, k.snap, "%s was evaluated", k.name)
		assert.InDelta(t, res.CostPerTonne, k.snap.Result.CostPerTonne, 1e-9, k.name)
		assert.Contains(t, scr, f2(res.CostPerTonne), k.name)
		if i > 0 {
			assert.Contains(t, scr, fmt.Sprintf("%+.2f", res.CostPerTonne-base.CostPerTonne), "%s against the base", k.name)
		}
		for _, l := range res.Blend {
			if l.Pct > 1e-9 {
				assert.Contains(t, scr, f2(l.Pct), "%s share of %s", k.name, l.Stock)
			}
		}
		assert.Contains(t, scr, f1(res.Properties.IV), "%s IV", k.name)
		assert.Contains(t, scr, f1(res.Properties.SAFA), "%s SAFA", k.name)
	}
	// a dearer palm cannot make the optimum cheaper, nor can leaving a stock out
	a, b := d.m.bench[1].snap.Result.CostPerTonne, d.m.bench[2].snap.Result.CostPerTonne
	assert.GreaterOrEqual(t, a, base.CostPerTonne-1e-9)
	assert.GreaterOrEqual(t, b, a-1e-9)
	for _, row := range []string{"IV", "SAFA %", "trans %", "SFC 20 °C", "SFC 40 °C", "blend, % of batch", "B ✎"} {
		assert.Contains(t, scr, row)
	}
	assert.NotContains(t, scr, "editing ✎", "the scenario being edited is variant B, shown once")
	d.requireFrame(100, 30)
}

func TestCompareSwitchAndDrop(t *testing.T) {
	d := benchOf(t, 80, 24)
	d.keys("6<left><left><right>")
	assert.Equal(t, 1, d.m.benchCol)
	d.keys("<enter>")
	assert.Same(t, d.m.bench[1].sc, d.m.Scenario(), "enter works on variant A itself")
	assert.Equal(t, 1100.0, price(d.m, "palm"))
	assert.False(t, d.m.Scenario().Excluded["pko"])
	assert.Contains(t, d.screen(), "A ✎")
	d.keys("u")
	assert.Same(t, d.m.bench[2].sc, d.m.Scenario(), "u goes back to what was being edited")
	// an edit after the switch leaves the kept scenario as it was and adds
	// the scenario being edited as its own column
	d.keys("<enter>2g" + downs(stockIndex(t, d.m, "palm")) + "]")
	assert.Equal(t, 1110.0, price(d.m, "palm"))
	kp, _ := d.m.bench[1].sc.Catalogue.Find("palm")
	assert.Equal(t, 1100.0, kp.Price, "a kept variant never changes")
	d.keys("6")
	assert.Contains(t, d.screen(), "editing ✎")
	d.keys("v<enter>")
	assert.Contains(t, d.m.Message(), "Kept as variant C")
	d.keys("2]v")
	assert.Contains(t, d.m.Message(), "3 variants are kept already")
	assert.Equal(t, promptNone, d.m.prompt.kind)
	d.keys("6g")
	d.m.benchCol = 0
	d.keys("d")
	assert.Contains(t, d.m.Message(), "The base stays")
	d.keys("<right>d")
	assert.Contains(t, d.m.Message(), "Dropped variant A")
	require.Len(t, d.m.bench, 3)
	assert.Equal(t, []string{"base", "B", "C"}, []string{d.m.bench[0].name, d.m.bench[1].name, d.m.bench[2].name})
	d.requireFrame(80, 24)
	// b: the scenario being edited becomes the base
	d.keys("b")
	assert.Same(t, d.m.Scenario(), d.m.bench[0].sc)
	require.NotNil(t, d.m.bench[0].snap)
	assert.InDelta(t, solveDirect(t, d.m.Scenario()).CostPerTonne, d.m.bench[0].snap.Result.CostPerTonne, 1e-9)
}

// Kept scenarios are solved off the keystroke path. Keeping one while its
// edit is still being solved draws "…" meanwhile and takes that edit's
// solve when it arrives, with no second solve of the same scenario (no
// command); keeping one whose edit waits behind another's solve gets a
// solve of its own, run as a command.
func TestKeptScenarioIsEvaluatedInTheBackground(t *testing.T) {
	m := demoModel(t, "laminating", Files{})
	first := m.Init()
	m.Update(first())
	m.Update(tea.KeyPressMsg{Code: '2', Text: "2"})
	_, edit := m.Update(tea.KeyPressMsg{Code: ']', Text: "]"})
	require.NotNil(t, edit)
	require.True(t, m.Pending())
	m.Update(tea.KeyPressMsg{Code: 'v', Text: "v"})
	_, cmd := m.Update(tea.KeyPressMsg{Code: tea.KeyEnter})
	require.Contains(t, m.Message(), "Kept as variant A")
	require.Nil(t, cmd, "no second solve of the scenario being solved")
	m.Update(tea.KeyPressMsg{Code: '6', Text: "6"})
	assert.Contains(t, m.Render(), "…")
	m.Update(edit())
	require.False(t, m.Pending())
	require.Same(t, m.Snapshot(), m.bench[1].snap, "the variant has the workspace's own solve")
	assert.InDelta(t, solveDirect(t, m.bench[1].sc).CostPerTonne, m.bench[1].snap.Result.CostPerTonne, 1e-9)

	m.Update(tea.KeyPressMsg{Code: '2', Text: "2"})
	_, edit = m.Update(tea.KeyPressMsg{Code: ']', Text: "]"})
	require.NotNil(t, edit)
	_, queued := m.Update(tea.KeyPressMsg{Code: ']', Text: "]"})
	require.Nil(t, queued, "the second edit waits for the first one's solve")
	m.Update(tea.KeyPressMsg{Code: 'v', Text: "v"})
	_, cmd = m.Update(tea.KeyPressMsg{Code: tea.KeyEnter})
	require.Contains(t, m.Message(), "Kept as variant B")
	require.NotNil(t, cmd, "a variant no running solve is of is solved by a command, not in Update")
	m.Update(cmd())
	require.NotNil(t, m.bench[2].snap)
	assert.InDelta(t, solveDirect(t, m.bench[2].sc).CostPerTonne, m.bench[2].snap.Result.CostPerTonne, 1e-9)
}

// Every view of 6 Compare, figures and curves, with the base, three
// variants and the scenario being edited (five columns), fits the window
// at 80x24 and larger and follows resizes.
func TestCompareFitsEveryWindow(t *testing.T) {
	d := benchOf(t, 80, 24)
	d.keys("2]v<enter>2]")
	d.keys("6")
	require.Len(t, d.m.columns(), 5)
	for _, sz := range [][2]int{{80, 24}, {100, 30}, {120, 40}, {200, 60}, {81, 25}, {80, 24}} {
		d.send(tea.WindowSizeMsg{Width: sz[0], Height: sz[1]})
		for _, mode := range []string{"figures", "curves"} {
			d.requireFrame(sz[0], sz[1])
			scr := d.screen()
			assert.Contains(t, scr, "Side by side", "%v %s", sz, mode)
			if mode == "curves" {
				assert.Contains(t, scr, "its spec band", "%v", sz)
				assert.Contains(t, scr, "●", "%v: curves meet their bands", sz)
			} else {
				assert.Contains(t, scr, "cost EUR/t", "%v", sz)
				assert.Contains(t, scr, "SFC 35 °C", "%v", sz)
			}
			d.keys("c")
		}
	}
	d.keys("?")
	d.requireFrame(80, 24)
	scr := d.screen()
	assert.Contains(t, scr, "q  ctrl+c", "the whole key list fits 80x24")
	assert.Contains(t, scr, "v / b")
}

// The key bar lists undo before redo.
func TestKeyBarUndoBeforeRedo(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	lines := strings.Split(d.screen(), "\n")
	bar := lines[len(lines)-1]
	u, r := strings.Index(bar, "u undo"), strings.Index(bar, "U redo")
	require.GreaterOrEqual(t, u, 0, bar)
	require.GreaterOrEqual(t, r, 0, bar)
	assert.Less(t, u, r, bar)
	for p := 1; p <= int(numPanels); p++ {
		d.keys(fmt.Sprint(p))
		lines := strings.Split(d.screen(), "\n")
		bar := lines[len(lines)-1]
		assert.Contains(t, bar, "? keys", "panel %d: the key bar fits 80 columns: %q", p, bar)
		if i := strings.Index(bar, "U redo"); i >= 0 {
			assert.Less(t, strings.Index(bar, "u undo"), i, "panel %d", p)
		}
	}
}

// R first shows what the relaxed spec costs; the cost is an independent
// solve of the relaxed scenario. esc leaves the spec as it was, enter
// applies it.
func TestRelaxationPreview(t *testing.T) {
	d := newDriver(t, demoModel(t, "laminating", Files{}), 80, 24)
	d.keys("3" + downs(rowIndex(t, d.m, "sfc.40")) + "<right><enter><ctrl+u>0.5<enter>")
	snap := d.m.Snapshot()
	require.Equal(t, optimise.Infeasible, snap.Result.Status)
	before, rev := d.m.Scenario(), d.m.rev
	relaxed, _, err := before.WithRelaxation(snap.Result.Relaxation)
	require.NoError(t, err)
	want := solveDirect(t, relaxed)
	require.Equal(t, optimise.Optimal, want.Status)
	cost := fmt.Sprintf("%.2f EUR/t", want.CostPerTonne)

	d.keys("1R")
	assert.Same(t, before, d.m.Scenario(), "R alone changes nothing")
	assert.Equal(t, rev, d.m.rev)
	scr := d.screen()
	assert.Contains(t, scr, "At these limits: "+cost)
	assert.Contains(t, d.m.Message(), cost)
	assert.Contains(t, scr, "enter apply")
	d.requireFrame(80, 24)
	d.keys("3]u") // ignored while the preview is open
	assert.Same(t, before, d.m.Scenario())
	d.keys("<esc>")
	assert.Same(t, before, d.m.Scenario())
	assert.Contains(t, d.m.Message(), "not applied")
	assert.Nil(t, d.m.relax)

	d.keys("1R<enter>")
	require.True(t, d.m.Snapshot().Feasible())
	assert.InDelta(t, want.CostPerTonne, d.m.Snapshot().Result.CostPerTonne, 1e-9)
	assert.Contains(t, d.m.Message(), "Cost now "+cost, "the status line gives the new cost")
	d.keys("u")
	assert.Same(t, before, d.m.Scenario(), "u undoes the relaxation")
}

// a writes the note; s saves it with the result the workspace shows; the
// file reads back with both, and o reports the saved cost.
func TestNoteAndResultSavedThroughKeys(t *testing.T) {
	dir := t.TempDir()
	d := newDriver(t, demoModel(t, "laminating", Files{Dir: dir}), 80, 24)
	// a note on a kept scenario is on its column too: it changes no number
	d.keys("awinter base<enter>")
	assert.Equal(t, "winter base", d.m.bench[0].sc.Note)
	assert.Equal(t, 0, d.m.keptIndex(), "the noted scenario is still the base")
	d.keys("2" + downs(stockIndex(t, d.m, "palm")) + "]]")
	d.keys("a<ctrl+u>palm up 20, winter \"quote\"<enter>")
	assert.Equal(t, `palm up 20, winter "quote"`, d.m.Scenario().Note)
	d.keys("6")
	assert.Contains(t, d.screen(), "palm up 20")
	start := time.Now().Add(-time.Second)
	d.keys("s<ctrl+u>mine.toml<enter>")
	require.Contains(t, d.m.Message(), "and its result")
	back, err := LoadScenario(filepath.Join(dir, "mine.toml"))
	require.NoError(t, err)
	assert.Equal(t, d.m.Scenario().Note, back.Note)
	require.NotNil(t, back.Saved)
	res := solveDirect(t, d.m.Scenario())
	assert.Equal(t, res.Status, back.Saved.Status)
	assert.InDelta(t, res.CostPerTonne, back.Saved.CostPerTonne, 1e-9)
	assert.Empty(t, back.Saved.Differences(res), "the saved result is today's solve")
	assert.WithinDuration(t, time.Now(), back.Saved.At, time.Since(start)+time.Second)
	assert.Equal(t, time.UTC, back.Saved.At.Location())
	d.keys("a<ctrl+u><enter>")
	assert.Empty(t, d.m.Scenario().Note)
	d.keys("o<ctrl+u>mine.toml<enter>")
	assert.Contains(t, d.m.Message(), fmt.Sprintf("saved at %.2f EUR/t", res.CostPerTonne))
	assert.Equal(t, `palm up 20, winter "quote"`, d.m.Scenario().Note)
}
