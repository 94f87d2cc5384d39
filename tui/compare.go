package tui

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"charm.land/bubbles/v2/key"
	tea "charm.land/bubbletea/v2"
	"github.com/charmbracelet/x/ansi"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// maxVariants is how many variants the workspace keeps beside the base.
const maxVariants = 3

// kept is a scenario kept for comparison: the base or a variant. Its
// scenario never changes; its snapshot arrives from the background.
type kept struct {
	id   int
	name string
	sc   *Scenario
	snap *Snapshot // nil until its evaluation is in
}

// keptMsg carries the evaluation of a kept scenario.
type keptMsg struct {
	id   int
	snap *Snapshot
}

// newKept names sc for the bench, with its snapshot when one is at hand.
func (m *Model) newKept(name string, sc *Scenario, snap *Snapshot) kept {
	m.benchID++
	return kept{id: m.benchID, name: name, sc: sc, snap: snap}
}

// currentSnap is the snapshot of the scenario being edited, or nil while
// it is being solved.
func (m *Model) currentSnap() *Snapshot {
	if m.Pending() {
		return nil
	}
	return m.snap
}

// evaluateKept evaluates the kept scenario k in the background unless its
// snapshot is in already or the workspace's own evaluation of it is
// running (fillKept then gives it that one).
func (m *Model) evaluateKept(k kept) tea.Cmd {
	if k.snap != nil || m.flying == k.sc {
		return nil
	}
	return func() tea.Msg { return keptMsg{id: k.id, snap: Evaluate(k.sc, 0)} }
}

// fillKept gives a workspace evaluation to every kept scenario it is of.
func (m *Model) fillKept(s *Snapshot) {
	for i := range m.bench {
		if m.bench[i].snap == nil && m.bench[i].sc == s.Scenario {
			m.bench[i].snap = s
		}
	}
}

func (m *Model) keptArrived(msg keptMsg) {
	for i := range m.bench {
		if m.bench[i].id == msg.id && m.bench[i].snap == nil {
			m.bench[i].snap = msg.snap
		}
	}
}

// keptIndex is the bench position of the scenario being edited, or -1 when
// it has been edited since it was kept (or was never kept).
func (m *Model) keptIndex() int {
	for i, k := range m.bench {
		if k.sc == m.sc {
			return i
		}
	}
	return -1
}

// variantName offers the first of A, B, C not yet taken.
func (m *Model) variantName() string {
	for _, n := range []string{"A", "B", "C", "D"} {
		taken := false
		for _, k := range m.bench {
			taken = taken || k.name == n
		}
		if !taken {
			return n
		}
	}
	return "variant"
}

// keep adds the scenario being edited to the bench as a variant named name.
func (m *Model) keep(name string) tea.Cmd {
	name = strings.Join(strings.Fields(name), " ")
	switch {
	case name == "":
		m.failf("give the variant a name, such as %s", m.variantName())
		return nil
	case len(m.bench) > maxVariants:
		m.failf("%d variants are kept already: drop one on 6 Compare (d) first", maxVariants)
		return nil
	}
	if i := m.keptIndex(); i >= 0 {
		m.failf("this scenario is kept already as %s; edit it first", m.bench[i].name)
		return nil
	}
	k := m.newKept(name, m.sc, m.currentSnap())
	m.bench = append(m.bench, k)
	m.benchCol = len(m.bench) - 1
	m.info(fmt.Sprintf("Kept as variant %s (%d of %d); 6 Compare sets it beside the base.", name, len(m.bench)-1, maxVariants))
	return m.evaluateKept(k)
}

// makeBase makes the scenario being edited the base of the comparison.
func (m *Model) makeBase() tea.Cmd {
	if m.keptIndex() == 0 {
		m.info("This scenario is the base already.")
		return nil
	}
	m.bench[0] = m.newKept("base", m.sc, m.currentSnap())
	m.info("The scenario you are editing is now the base of 6 Compare.")
	return m.evaluateKept(m.bench[0])
}

// column is one column of 6 Compare.
type column struct {
	name string
	sc   *Scenario
	snap *Snapshot // nil while it is being solved
	now  bool      // the scenario being edited, not kept
}

// columns are the base, the variants and, when it has been edited since it
// was kept, the scenario being edited.
func (m *Model) columns() []column {
	var out []column
	for _, k := range m.bench {
		out = append(out, column{name: k.name, sc: k.sc, snap: k.snap})
	}
	if i := m.keptIndex(); i >= 0 {
		out[i].name += " ✎"
	} else {
		out = append(out, column{name: "editing ✎", sc: m.sc, snap: m.currentSnap(), now: true})
	}
	return out
}

// compareKey handles the keys 6 Compare gives its own meaning; ok is false
// for every other key.
func (m *Model) compareKey(k tea.KeyPressMsg) (tea.Cmd, bool) {
	ks := m.keys
	cols := m.columns()
	m.benchCol = min(m.benchCol, len(cols)-1)
	switch {
	case key.Matches(k, ks.Left):
		m.benchCol = max(0, m.benchCol-1)
	case key.Matches(k, ks.Right):
		m.benchCol = min(len(cols)-1, m.benchCol+1)
	case key.Matches(k, ks.Curves):
		m.curves = !m.curves
	case key.Matches(k, ks.Choose):
		c := cols[m.benchCol]
		if c.now || c.sc == m.sc {
			m.info("That is the scenario you are editing.")
			return nil, true
		}
		return m.apply(c.sc, "Working on "+c.name+" (u goes back to what you had)."), true
	case key.Matches(k, ks.Drop):
		c := cols[m.benchCol]
		switch {
		case c.now:
			m.info("The scenario you are editing is not kept; v keeps it as a variant.")
		case m.benchCol == 0:
			m.info("The base stays; b makes the scenario you are editing the base instead.")
		default:
			m.bench = append(m.bench[:m.benchCol:m.benchCol], m.bench[m.benchCol+1:]...)
			m.benchCol = min(m.benchCol, len(m.columns())-1)
			m.info("Dropped variant " + strings.TrimSuffix(c.name, " ✎") + ".")
		}
	default:
		return nil, false
	}
	return nil, true
}

// ---- 6 Compare ----

// compareCell is the width of one of n columns of 6 Compare in w cells, after
// a label column of label cells, at most most cells wide.
func compareCell(w, n, label, most int) int {
	return min(most, max(7, (w-2-label)/max(n, 1)))
}

// nameRow heads the columns with their names, the one under the cursor
// marked and highlighted.
func (m *Model) nameRow(cols []column, lw, cw int) string {
	line := " " + fit("", lw)
	for i, c := range cols {
		if i == m.benchCol {
			line += m.styles.cell.Render(rfit("› "+c.name, cw-1)) + " "
			continue
		}
		line += rfit(c.name, cw-1) + " "
	}
	return line
}

// curvesRoom is the least height worth drawing the SFC curves in.
const curvesRoom = 10

func (m *Model) comparePanel(w, h int) []string {
	cols := m.columns()
	m.benchCol = min(m.benchCol, len(cols)-1)
	st := m.styles
	what := fmt.Sprintf("base and %d of %d variants", len(m.bench)-1, maxVariants)
	mode := "c shows the SFC curves"
	if m.curves {
		mode = "c shows the figures"
	}
	out := []string{" " + st.head.Render("Side by side") + st.muted.Render(fit(" · "+what+" · "+mode, max(0, w-14)))}
	if m.curves {
		return append(out, m.compareCurves(cols, w, h-len(out))...)
	}
	const lw = 14
	out = append(out, m.nameRow(cols, lw, compareCell(w, len(cols), lw, 16)))
	out = append(out, m.compareFigures(cols, w, h-len(out), lw, compareCell(w, len(cols), lw, 16))...)
	// a tall window has room for the curves under the figures
	if room := h - len(out) - 1; room >= curvesRoom {
		out = append(out, "")
		out = append(out, m.compareCurves(cols, w, room)...)
	}
	return out
}

// compareFigures is the table: cost and its change against the base, the
// blend, IV, SAFA, trans, SFC at the spec temperatures and the notes.
func (m *Model) compareFigures(cols []column, w, h, lw, cw int) []string {
	st := m.styles
	row := func(label string, cell func(c column) string) string {
		line := " " + fit(label, lw)
		for _, c := range cols {
			v := "…"
			if c.snap != nil {
				v = cell(c)
			}
			line += rfit(v, cw-1) + " "
		}
		return line
	}
	feasible := func(c column, f func(c column) string) string {
		if !c.snap.Feasible() {
			return "—"
		}
		return f(c)
	}
	base := cols[0]
	out := []string{
		row("cost "+m.currency()+"/t", func(c column) string {
			if !c.snap.Feasible() {
				return "no blend"
			}
			return f2(c.snap.Result.CostPerTonne)
		}),
		st.muted.Render(row("  vs base", func(c column) string {
			if c.sc == base.sc || base.snap == nil || !base.snap.Feasible() || !c.snap.Feasible() {
				return ""
			}
			return fmt.Sprintf("%+.2f", c.snap.Result.CostPerTonne-base.snap.Result.CostPerTonne)
		})),
	}
	var temps []float64
	seen := map[float64]bool{}
	for _, c := range cols {
		for _, l := range c.sc.Spec.SFC {
			if !seen[l.Temp] {
				seen[l.Temp] = true
				temps = append(temps, l.Temp)
			}
		}
	}
	sort.Float64s(temps)
	var tail []string
	for _, p := range []struct{ label, key string }{{"IV", "iv"}, {"SAFA %", "safa"}, {"trans %", "trans"}} {
		tail = append(tail, row(p.label, func(c column) string {
			return feasible(c, func(c column) string {
				v, _ := c.snap.Result.Properties.Value(p.key)
				if p.key == "trans" {
					return f2(v)
				}
				return f1(v)
			})
		}))
	}
	for _, t := range temps {
		tail = append(tail, row("SFC "+catalogue.TempKey(t)+" °C", func(c column) string {
			return feasible(c, func(c column) string {
				if v, ok := interp(c.snap.Curve, t); ok {
					return f1(v)
				}
				return "no data"
			})
		}))
	}
	tail = append(tail, st.muted.Render(row("note", func(c column) string { return OneLine(c.sc.Note) })))
	// the blend gets what room is left, largest shares first
	ids, share := blendUnion(cols)
	room := h - len(out) - len(tail) - 2
	out = append(out, st.muted.Render(" blend, % of batch"))
	shown := ids
	if len(ids) > room {
		shown = ids[:max(0, room-1)]
	}
	for _, id := range shown {
		out = append(out, row("  "+id, func(c column) string {
			return feasible(c, func(c column) string {
				if v := share[c.sc][id]; v > 1e-9 {
					return f2(v)
				}
				return "·"
			})
		}))
	}
	if len(shown) < len(ids) {
		out = append(out, st.muted.Render(fmt.Sprintf("   + %d more with smaller shares (a taller window shows them)", len(ids)-len(shown))))
	}
	out = append(out, tail...)
	if c := cols[m.benchCol]; c.sc.Note != "" && len(out) < h {
		out = append(out, st.muted.Render(fit(" "+strings.TrimSuffix(c.name, " ✎")+": "+OneLine(c.sc.Note), w)))
	}
	return out
}

// blendUnion lists every stock in any column's blend, largest share first,
// with each column's shares by scenario.
func blendUnion(cols []column) ([]string, map[*Scenario]map[string]float64) {
	share := map[*Scenario]map[string]float64{}
	var blends [][]optimise.Line
	for _, c := range cols {
		if !c.snap.Feasible() {
			continue
		}
		blends = append(blends, c.snap.Result.Blend)
		share[c.sc] = map[string]float64{}
		for _, l := range c.snap.Result.Blend {
			share[c.sc][l.Stock] = l.Pct
		}
	}
	return StocksByShare(blends...), share
}

// StocksByShare lists every stock with a share in any of the blends, the
// largest share (in whichever blend) first, ties by id.
func StocksByShare(blends ...[]optimise.Line) []string {
	most := map[string]float64{}
	for _, b := range blends {
		for _, l := range b {
			if l.Pct > 1e-9 {
				most[l.Stock] = math.Max(most[l.Stock], l.Pct)
			}
		}
	}
	ids := make([]string, 0, len(most))
	for id := range most {
		ids = append(ids, id)
	}
	sort.Slice(ids, func(i, j int) bool {
		if most[ids[i]] != most[ids[j]] {
			return most[ids[i]] > most[ids[j]]
		}
		return ids[i] < ids[j]
	})
	return ids
}

// OneLine flattens a note for a table cell: control characters and line
// breaks become spaces, so a note from a file cannot move the cursor.
func OneLine(s string) string {
	s = strings.Map(func(r rune) rune {
		if r < ' ' || r == 0x7f || r >= 0x80 && r < 0xa0 {
			return ' '
		}
		return r
	}, s)
	return strings.Join(strings.Fields(s), " ")
}

// compareCurves draws each column's SFC curve against its own spec band,
// side by side on one scale, with the cost under each, in h lines.
func (m *Model) compareCurves(cols []column, w, h int) []string {
	st := m.styles
	const lw = 6 // the % solid axis
	cw := compareCell(w, len(cols), lw, 40)
	lo, hi := math.Inf(1), math.Inf(-1)
	top := 10.0
	for _, c := range cols {
		l, u := chartTemps(c.sc.Spec)
		lo, hi = math.Min(lo, l), math.Max(hi, u)
		top = math.Max(top, bandTop(c.sc.Spec))
		if c.snap.Feasible() {
			for _, p := range c.snap.Curve {
				top = math.Max(top, p.Solid)
			}
		}
	}
	top = math.Min(100, math.Ceil(top/10)*10)
	chartH := max(3, h-5)
	charts := make([]*sfcChart, len(cols))
	for i, c := range cols {
		var pts []catalogue.Point
		if c.snap.Feasible() {
			pts = c.snap.Curve
		}
		charts[i] = newSFCChart(cw-2, chartH, lo, hi, top, c.sc.Spec.SFC)
		plot(charts[i], pts, cellCurve)
		markSpec(charts[i], c.sc.Spec.SFC, pts)
	}
	labels := axisLabels(charts[0], top)
	out := []string{m.nameRow(cols, lw, cw)}
	for y := 0; y < chartH; y++ {
		label, ok := labels[y]
		if !ok {
			label = "     "
		}
		line := " " + st.muted.Render(rfit(label+"┤", lw))
		for _, c := range charts {
			line += m.chartRow(c, y) + "  "
		}
		out = append(out, line)
	}
	rule, ends := " "+rfit("└", lw), " "+rfit("°C ", lw)
	hiKey := catalogue.TempKey(hi) + "°"
	for range charts {
		rule += strings.Repeat("─", cw-2) + "  "
		ends += fit(catalogue.TempKey(lo)+"°", cw-2-ansi.StringWidth(hiKey)) + hiKey + "  "
	}
	out = append(out, st.muted.Render(rule), st.muted.Render(ends))
	costs := " " + fit("", lw)
	for _, c := range cols {
		v := "…"
		switch {
		case c.snap == nil:
		case c.snap.Feasible():
			v = f2(c.snap.Result.CostPerTonne) + " " + currencyOf(c.sc) + "/t"
		default:
			v = "no blend"
		}
		costs += rfit(v, cw-1) + " "
	}
	out = append(out, costs)
	legend := " " + st.curve.Render("•") + " blend   " + st.band.Render("▒") + " its spec band   " +
		st.ok.Render("●") + " meets   " + st.bad.Render("✗") + " misses"
	return append(out, ansi.Truncate(legend, w, "…"))
}
