package tui

import (
	"fmt"
	"math"
	"sort"
	"strings"

	tea "charm.land/bubbletea/v2"
	"github.com/charmbracelet/x/ansi"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// Caution lines (README, "Cautions"), long and short for narrow terminals.
const (
	cautionLong  = "Estimates only: confirm by lab analysis (GC FAME, pulsed-NMR SFC) before use. Trans-fat and labelling rules are set by local food law."
	cautionShort = "Estimates: confirm by GC FAME and NMR SFC. Trans, labelling: local food law."
)

// View draws the whole screen from the latest snapshot; it never solves.
func (m *Model) View() tea.View {
	v := tea.NewView(m.Render())
	v.AltScreen = true
	v.WindowTitle = "lipoplan · " + m.sc.Spec.Name
	return v
}

// Render returns the screen as exactly height lines of at most width cells.
func (m *Model) Render() string {
	w, h := max(m.width, 20), max(m.height, 6)
	bodyH := h - 5
	lines := []string{m.header(w), m.tabs(w)}
	var body []string
	switch {
	case m.showKeys:
		body = m.keysPanel(w)
	case m.prompt.kind == promptWrite:
		body = m.writeSheet(w)
	case m.sheet != nil:
		body = m.sheet
	default:
		body = m.panelBody(w, bodyH)
	}
	for i := 0; i < bodyH; i++ {
		if i < len(body) {
			lines = append(lines, body[i])
		} else {
			lines = append(lines, "")
		}
	}
	lines = append(lines, m.statusLine(w))
	if w >= ansi.StringWidth(cautionLong)+1 {
		lines = append(lines, m.styles.caution.Render(" "+cautionLong))
	} else {
		lines = append(lines, m.styles.caution.Render(" "+cautionShort))
	}
	lines = append(lines, m.bottomLine(w))
	for i, l := range lines {
		lines[i] = ansi.Truncate(l, w, "…")
	}
	return strings.Join(lines, "\n")
}

func (m *Model) panelBody(w, bodyH int) []string {
	switch m.panel {
	case panelBlend:
		return m.blendPanel(w, bodyH)
	case panelStocks:
		return m.stocksPanel(w, bodyH)
	case panelLimits:
		return m.limitsPanel(w, bodyH)
	case panelSFC:
		return m.sfcPanel(w, bodyH)
	case panelCompare:
		return m.comparePanel(w, bodyH)
	}
	return m.tagPanel(w, bodyH)
}

func (m *Model) keysPanel(w int) []string {
	out := []string{" " + m.styles.head.Render("Keys") + m.styles.muted.Render("  (any key closes this list)")}
	for _, g := range m.keys.keyGroups() {
		out = append(out, " "+m.styles.key.Render(fit(g[0], 22))+g[1])
	}
	return out
}

// fit truncates plain text s to n cells (with an ellipsis) and pads it.
func fit(s string, n int) string {
	if n <= 0 {
		return ""
	}
	s = ansi.Truncate(s, n, "…")
	if d := n - ansi.StringWidth(s); d > 0 {
		s += strings.Repeat(" ", d)
	}
	return s
}

// rfit right-aligns plain text s in n cells.
func rfit(s string, n int) string {
	s = ansi.Truncate(s, n, "…")
	if d := n - ansi.StringWidth(s); d > 0 {
		s = strings.Repeat(" ", d) + s
	}
	return s
}

func f2(v float64) string {
	switch {
	case math.IsInf(v, 1):
		return "∞"
	case math.IsInf(v, -1):
		return "-∞"
	case math.IsNaN(v):
		return "—"
	}
	return fmt.Sprintf("%.2f", v)
}

func f1(v float64) string {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return f2(v)
	}
	return fmt.Sprintf("%.1f", v)
}

func (m *Model) currency() string { return currencyOf(m.sc) }

// currencyOf is the currency a scenario's prices are in, for display.
func currencyOf(sc *Scenario) string {
	if c := sc.Catalogue.Currency; c != "" {
		return c
	}
	return "cur."
}

func (m *Model) header(w int) string {
	st := m.styles
	var right string
	s := m.snap
	switch {
	case s == nil:
		right = st.warn.Render("solving…")
	case s.Err != nil:
		right = st.bad.Render("solve failed")
	case s.Result.Status == optimise.NotProven && hasBlend(s.Result):
		right = st.warn.Render(fmt.Sprintf("%.2f %s/t, not proven cheapest", s.Result.CostPerTonne, m.currency()))
	case s.Result.Status == optimise.Optimal:
		right = st.ok.Render(fmt.Sprintf("%.2f %s/t", s.Result.CostPerTonne, m.currency()))
	case s.Result.Status == optimise.NotProven:
		right = st.bad.Render("no blend found in time")
	default:
		right = st.bad.Render("spec cannot be met")
	}
	if m.Pending() && s != nil {
		right = st.warn.Render("re-solving… ") + right
	}
	right += " "
	batch := fmt.Sprintf(" │ batch %s t", num(m.sc.Spec.Batch))
	room := w - ansi.StringWidth(right) - ansi.StringWidth(" lipoplan │ ") - ansi.StringWidth(batch) - 1
	name := ansi.Truncate(m.sc.Spec.Name, max(room, 4), "…")
	left := st.title.Render(" lipoplan ") + st.muted.Render("│ ") + st.head.Render(name) + st.muted.Render(batch)
	gap := w - ansi.StringWidth(left) - ansi.StringWidth(right)
	return left + strings.Repeat(" ", max(gap, 1)) + right
}

func (m *Model) tabs(w int) string {
	var b strings.Builder
	b.WriteString(" ")
	for p := panel(0); p < numPanels; p++ {
		label := fmt.Sprintf(" %d %s ", p+1, p.title())
		if p == m.panel {
			b.WriteString(m.styles.tabOn.Render(label))
		} else {
			b.WriteString(m.styles.tab.Render(label))
		}
	}
	if m.dirty {
		b.WriteString(m.styles.muted.Render("  • edited"))
	}
	return b.String()
}

func (m *Model) statusLine(w int) string {
	if m.message != "" {
		if m.msgError {
			return m.styles.msgErr.Render(" ✗ " + m.message)
		}
		return m.styles.msg.Render(" " + m.message)
	}
	s := m.snap
	switch {
	case s == nil:
		return m.styles.muted.Render(" Solving the first blend…")
	case s.Err != nil:
		return m.styles.msgErr.Render(" ✗ The solve failed; see 1 Blend. Undo (u) or change the last edit.")
	case s.Result.Status == optimise.NotProven && len(s.Result.Notes) > 0:
		return m.styles.msgErr.Render(" ✗ " + ansi.Truncate(s.Result.Notes[0], max(w-4, 10), "…"))
	case s.Result.Status != optimise.Optimal:
		return m.styles.msgErr.Render(" ✗ The spec cannot be met: 1 Blend shows the smallest relaxation; R costs it first.")
	}
	return m.styles.muted.Render(fmt.Sprintf(" Solved in %.1f ms by %s. Edit on 2 Stocks or 3 Limits; the blend follows.", float64(s.Took.Microseconds())/1000, s.Result.Engine))
}

func (m *Model) bottomLine(w int) string {
	switch m.prompt.kind {
	case promptRelax:
		return " " + m.styles.key.Render("Apply the relaxation?") + m.styles.muted.Render("   enter apply · esc keep the spec as it is")
	case promptWrite:
		return " " + m.styles.key.Render("Write these files?") + m.styles.muted.Render("   y/enter write · n/esc cancel")
	}
	if m.prompt.kind != promptNone {
		return " " + m.input.view() + m.styles.muted.Render("   enter apply · esc cancel")
	}
	infeasible := m.snap != nil && m.snap.Result != nil && !hasBlend(m.snap.Result)
	return " " + m.help.ShortHelpView(m.keys.helpFor(m.panel, infeasible))
}

// window keeps the cursor row of panel p visible in n rows and returns the
// first row to draw.
func (m *Model) window(p panel, total, n int) int {
	c := m.cursor[p]
	off := m.offset[p]
	if c < off {
		off = c
	}
	if c >= off+n {
		off = c - n + 1
	}
	off = max(0, min(off, total-n))
	m.offset[p] = off
	return off
}

// ---- 1 Blend ----

func (m *Model) blendPanel(w, h int) []string {
	st := m.styles
	s := m.snap
	if s == nil {
		return []string{"", st.warn.Render(" Solving the first blend…")}
	}
	if s.Err != nil {
		out := []string{"", st.bad.Render(" The solve failed:")}
		for _, l := range strings.Split(ansi.Wordwrap(s.Err.Error(), w-4, " "), "\n") {
			out = append(out, "   "+l)
		}
		return append(out, "", st.muted.Render(" Undo the last edit (u) or correct it on 2 Stocks / 3 Limits."))
	}
	r := s.Result
	if !hasBlend(r) {
		return m.relaxationLines(w, r)
	}
	cur := m.currency()
	title := "Cheapest blend"
	if r.Status == optimise.NotProven {
		title = "Best blend found, not proven cheapest"
	}
	out := []string{" " + st.head.Render(fmt.Sprintf("%s  %.2f %s/t", title, r.CostPerTonne, cur)) +
		st.muted.Render(fmt.Sprintf("   batch %s t costs %.0f %s", num(r.Batch), r.BatchCost, cur))}
	nameW := max(8, w-48)
	out = append(out, st.muted.Render(" "+fit("stock", 13)+fit("name", nameW)+rfit("%", 8)+rfit("t", 9)+rfit("cost share", 12)))
	lines := append([]optimise.Line(nil), r.Blend...)
	sort.SliceStable(lines, func(i, j int) bool { return lines[i].Pct > lines[j].Pct })
	for _, l := range lines {
		price := 0.0
		if stk, ok := m.sc.Catalogue.Find(l.Stock); ok {
			price = stk.Price
		}
		out = append(out, " "+fit(l.Stock, 12)+" "+fit(l.Name, nameW)+rfit(f2(l.Pct), 8)+rfit(f2(l.Tonnes), 9)+rfit(f2(l.Pct/100*price), 12))
	}
	if pr := r.Process; pr != nil {
		text := "not used: blending the stocks as they are is cheaper"
		if len(pr.Feed) > 0 {
			feed := make([]string, len(pr.Feed))
			for i, f := range pr.Feed {
				feed[i] = f.Stock + " " + f2(f.Pct) + " %"
			}
			text = fmt.Sprintf("%s IE of %s (%s t, %.0f %s per batch; SFC %s)",
				pr.Method, strings.Join(feed, " + "), f2(pr.Tonnes), pr.Cost, cur, pr.SFCModel)
		}
		out = append(out, wrapped(w, st.head.Render("Reactor")+"  ", text)...)
	}
	p := r.Properties
	out = append(out, "")
	out = append(out, wrapped(w, st.head.Render("Properties")+"  ", keepTogether(
		"IV "+f1(p.IV), "SV "+f1(p.SV), "SAFA "+f1(p.SAFA)+" %", "MUFA "+f1(p.MUFA)+" %",
		"PUFA "+f1(p.PUFA)+" %", "trans "+f2(p.Trans)+" %", "Cox "+f2(p.Cox)))...)
	if len(p.SFC) > 0 {
		// the report temperatures: the defaults and the spec's, not the
		// chart's whole 1 °C grid
		var temps []float64
		for _, t := range blend.SpecTemps(m.sc.Spec) {
			if _, ok := p.SFC[t]; ok {
				temps = append(temps, t)
			}
		}
		sort.Float64s(temps)
		items := make([]string, len(temps))
		for i, t := range temps {
			items[i] = catalogue.TempKey(t) + "° " + f1(p.SFC[t])
		}
		out = append(out, wrapped(w, st.head.Render("SFC %")+"       ", keepTogether(items...))...)
	}
	holding, left := r.Holding(), r.LeftOut()
	out = append(out, "", " "+st.head.Render("What holds the blend")+st.muted.Render("  (dearest first: what moving each bound saves, and how far)"))
	if len(holding) == 0 {
		out = append(out, st.muted.Render("   nothing: the blend is simply the cheapest mix of the stocks allowed"))
	}
	for _, l := range holding {
		out = append(out, wrapped(w, "   "+st.bad.Render(fit(l.Label, 24))+" ", l.Explain)...)
	}
	if len(left) > 0 {
		out = append(out, wrapped(w, "   "+st.muted.Render("left out by the spec: "), strings.Join(left, ", "))...)
	}
	return out
}

// relaxationLines explains an impossible spec and what would fix it.
func (m *Model) relaxationLines(w int, r *optimise.Result) []string {
	st := m.styles
	if r.Status == optimise.NotProven {
		out := []string{"", " " + st.bad.Render("No blend found within the limits of branch and bound."), ""}
		for _, n := range r.Notes {
			for _, l := range strings.Split(ansi.Wordwrap(n, max(w-4, 20), " "), "\n") {
				out = append(out, "   "+l)
			}
		}
		return out
	}
	out := []string{"", " " + st.bad.Render("This spec cannot be met with the stocks allowed."), ""}
	if len(r.Relaxation) == 0 {
		return append(out, " No single relaxation was found. Allow more stocks (2 Stocks) or widen limits (3 Limits).")
	}
	out = append(out, " "+st.head.Render("Smallest change that makes it possible:"))
	rows := m.sc.Rows()
	for _, x := range r.Relaxation {
		verb, from, to := "move", "", ""
		stem, side, _ := strings.Cut(x.Name, ".")
		if i := strings.LastIndex(x.Name, "."); i > 0 {
			stem, side = x.Name[:i], x.Name[i+1:]
		}
		switch {
		case strings.HasPrefix(x.Name, "avail."):
			verb = "buy"
			if stk, ok := m.sc.Catalogue.Find(strings.TrimPrefix(x.Name, "avail.")); ok && stk.Limited() {
				from, to = num(stk.Available)+" t", num(stk.Available+x.By)+" t"
			}
		case side == "max":
			verb = "raise"
		case side == "min":
			verb = "lower"
		}
		for _, row := range rows {
			if row.Key != stem {
				continue
			}
			switch side {
			case "max":
				from, to = f2(row.Bound.Max), f2(row.Bound.Max+x.By)
			case "min":
				from, to = f2(row.Bound.Min), f2(row.Bound.Min-x.By)
			}
		}
		line := "   " + st.warn.Render(fit(x.Name, 20)) + fit(fmt.Sprintf("%s by %s", verb, f2(x.By)), 18)
		if from != "" {
			line += st.muted.Render(from + " → " + to)
		}
		out = append(out, line)
	}
	if p := m.relax; p != nil {
		line := st.warn.Render(" Costing the relaxed limits…")
		if p.snap.Feasible() {
			line = " " + st.head.Render(fmt.Sprintf("At these limits: %.2f %s/t", p.snap.Result.CostPerTonne, m.currency())) +
				st.muted.Render(" · enter applies, esc keeps the spec")
		} else if p.snap != nil {
			line = st.bad.Render(" Even relaxed, the spec cannot be met") + st.muted.Render(" · enter applies anyway, esc keeps the spec")
		}
		return append(out, "", line)
	}
	return append(out, "",
		" Press "+st.key.Render("R")+" to see what these changes cost, then enter to apply them (u undoes),",
		" or edit limits on 3 Limits, allow stocks or buy more on 2 Stocks.")
}

// keepTogether joins items with two spaces, binding each item's own words
// with no-break spaces so that word wrapping breaks only between items.
func keepTogether(items ...string) string {
	for i, it := range items {
		items[i] = strings.ReplaceAll(it, " ", "\u00a0")
	}
	return strings.Join(items, "  ")
}

// wrapped word-wraps text after a lead (which may be styled) and indents the
// following lines under the text.
func wrapped(w int, lead, text string) []string {
	lw := ansi.StringWidth(lead)
	lines := strings.Split(ansi.Wordwrap(text, max(10, w-lw-2), " "), "\n")
	out := []string{" " + lead + lines[0]}
	for _, l := range lines[1:] {
		out = append(out, " "+strings.Repeat(" ", lw)+l)
	}
	return out
}

// ---- 2 Stocks ----

func (m *Model) stocksPanel(w, h int) []string {
	st := m.styles
	cat := m.sc.Catalogue
	nameW := max(6, w-65)
	out := []string{st.muted.Render("   " + fit("use", 4) + fit("stock", 13) + fit("name", nameW) +
		rfit("price", 9) + rfit("on hand t", 10) + rfit("blend %", 8) + "  " + fit("range / comes in", 16))}
	n := max(1, h-3)
	off := m.window(panelStocks, len(cat.Stocks), n)
	for i := off; i < min(len(cat.Stocks), off+n); i++ {
		s := cat.Stocks[i]
		sel := i == m.cursor[panelStocks]
		mark := "  "
		if sel {
			mark = st.key.Render("› ")
		}
		allowed := !m.sc.Excluded[s.ID]
		box := "[✓] "
		if !allowed {
			box = "[ ] "
		}
		avail := "unlimited"
		if s.Limited() {
			avail = f1(s.Available)
		}
		price := rfit(f2(s.Price), 9)
		availC := rfit(avail, 10)
		if sel {
			if m.col == 0 {
				price = " " + st.cell.Render(rfit(f2(s.Price), 8))
			} else {
				availC = " " + st.cell.Render(rfit(avail, 9))
			}
		}
		pct, rng := rfit("", 8), ""
		switch {
		case !allowed:
			pct, rng = rfit("out", 8), st.muted.Render("left out")
		case m.snap.Feasible():
			if l, ok := m.snap.Line(s.ID); ok && l.Pct > 1e-9 {
				pct = rfit(f2(l.Pct), 8)
			} else {
				pct = rfit("·", 8)
			}
			if r, ok := m.snap.Range(s.ID); ok {
				rng = rangeText(r)
			}
		}
		id, name := fit(s.ID, 12)+" ", fit(s.Name, nameW)
		line := mark + " " + box + id + name + price + availC + pct + "  " + rng
		if !allowed {
			line = mark + " " + st.muted.Render(box+id+name) + price + availC + st.muted.Render(pct) + "  " + rng
		}
		out = append(out, line)
	}
	for len(out) < h-2 {
		out = append(out, "")
	}
	if s, ok := m.selectedStock(); ok {
		out = append(out, m.stockDetail(w, s)...)
	}
	return out
}

// rangeText is the price range over which the blend keeps its make-up:
// for a stock in the blend its low and high ("no limit" where unbounded,
// as the CLI writes it), for one outside the price at which it would come
// in.
func rangeText(r optimise.Range) string {
	lo, hi := r.PriceLow, r.PriceHigh
	f0 := func(v float64) string {
		if math.IsInf(v, 0) {
			return "no limit"
		}
		return fmt.Sprintf("%.0f", v)
	}
	if r.InBlend {
		l := "no limit"
		if !math.IsInf(lo, -1) && lo > 0 {
			l = f0(lo)
		}
		return l + " – " + f0(hi)
	}
	if math.IsInf(lo, -1) || lo <= 0 {
		return "not at any price"
	}
	return "comes in at " + f0(lo)
}

func (m *Model) stockDetail(w int, s *catalogue.Stock) []string {
	st := m.styles
	a := fmt.Sprintf(" %s: %s", s.ID, s.Name)
	if len(s.SFC) > 0 {
		if v, ok := s.SFC.At(20); ok {
			a += fmt.Sprintf(" · SFC 20 °C %.1f %%", v)
		}
	} else {
		a += " · no measured SFC"
	}
	b := " enter edits the " + [...]string{"price", "amount on hand"}[m.col] + " · ←→ column · [ ] nudge · space allow/leave out"
	if rep, ok := m.snap.Limit("avail." + s.ID); ok && rep.Binding {
		b = " " + st.bad.Render("all on hand is used: ") + rep.Explain
	}
	return []string{st.head.Render(fit(a, w)), st.muted.Render(fit(b, w))}
}

// ---- 3 Limits ----

func (m *Model) limitsPanel(w, h int) []string {
	st := m.styles
	rows := m.sc.Rows()
	cur := m.currency()
	// The label column grows on a wide window, up to the longest label
	// ("smallest share if used"); the other columns take 70 cells.
	lw := max(14, min(24, w-70))
	out := []string{st.muted.Render("   " + fit("limit", lw) + rfit("min", 9) + rfit("max", 9) + rfit("blend", 9) + "  " +
		fit("binds", 7) + rfit("saves "+cur+"/t per 1", 17) + "  unit")}
	n := max(1, h-4)
	off := m.window(panelLimits, len(rows), n)
	relax := map[string]optimise.Relax{}
	if m.snap != nil && m.snap.Result != nil {
		for _, x := range m.snap.Result.Relaxation {
			relax[x.Name] = x
		}
	}
	for i := off; i < min(len(rows), off+n); i++ {
		r := rows[i]
		sel := i == m.cursor[panelLimits]
		mark := "  "
		if sel {
			mark = st.key.Render("› ")
		}
		minS, maxS := "", f2(r.Bound.Max)
		if r.Kind == RowMaxStocks && r.Bound.Max == 0 || r.Kind == RowSmallestShare && r.Bound.Max == 0 {
			maxS = "none"
		}
		if !r.Single() {
			minS, maxS = "", ""
			if r.Bound.HasMin() {
				minS = f2(r.Bound.Min)
			}
			if r.Bound.HasMax() {
				maxS = f2(r.Bound.Max)
			}
		}
		minC, maxC := rfit(minS, 9), rfit(maxS, 9)
		if sel {
			if m.col == 0 && !r.Single() {
				minC = " " + st.cell.Render(rfit(orDash(minS), 8))
			} else {
				maxC = " " + st.cell.Render(rfit(orDash(maxS), 8))
			}
		}
		val, binds, worth := m.rowValue(r)
		bindC := fit(binds, 7)
		if binds != "" {
			bindC = st.bad.Render(bindC)
		}
		for _, sd := range []string{"min", "max"} {
			if x, ok := relax[r.Key+"."+sd]; ok {
				bindC = st.warn.Render(fit("relax", 7))
				worth = fmt.Sprintf("by %s", f2(x.By))
			}
		}
		out = append(out, mark+" "+fit(r.Label, lw)+minC+maxC+rfit(val, 9)+"  "+bindC+rfit(worth, 17)+"  "+st.muted.Render(r.Unit))
	}
	for len(out) < h-2 {
		out = append(out, "")
	}
	if r, ok := m.selectedRow(); ok {
		out = append(out, m.rowDetail(w, r)...)
	}
	return out
}

func orDash(s string) string {
	if s == "" {
		return "–"
	}
	return s
}

// rowValue is the blend's value on a row, which side binds and its shadow price.
func (m *Model) rowValue(r Row) (val, binds, worth string) {
	s := m.snap
	if !s.Feasible() {
		return "", "", ""
	}
	res := s.Result
	switch r.Kind {
	case RowBatch:
		return num(res.Batch), "", ""
	case RowMaxStocks:
		n := 0
		for _, l := range res.Blend {
			if l.Pct > 1e-9 {
				n++
			}
		}
		return fmt.Sprint(n), "", ""
	case RowSmallestShare:
		lo := math.Inf(1)
		for _, l := range res.Blend {
			if l.Pct > 1e-9 {
				lo = math.Min(lo, l.Pct)
			}
		}
		return f2(lo), "", ""
	}
	for _, sd := range []string{"min", "max"} {
		if rep, ok := s.Limit(r.Key + "." + sd); ok {
			val = f2(rep.Value)
			if rep.Binding {
				// the saving per unit of moving the bound outwards: raising a
				// maximum or lowering a minimum (shadow price, sign dropped)
				binds = "◆ " + sd
				worth = f2(math.Abs(rep.ShadowPrice))
			}
		}
	}
	if val == "" {
		switch r.Kind {
		case RowLimit:
			if v, ok := res.Properties.Value(r.Key); ok {
				val = f2(v)
			}
		case RowSFC:
			if v, ok := res.Properties.SFC[r.temp]; ok {
				val = f2(v)
			}
		case RowUse:
			if l, ok := s.Line(r.stock); ok {
				val = f2(l.Pct)
			} else {
				val = "0.00"
			}
		case RowThrough:
			if p := res.Process; p != nil {
				val = f2(p.FedPct())
			}
		}
	}
	return val, binds, worth
}

func (m *Model) rowDetail(w int, r Row) []string {
	st := m.styles
	a := ""
	for _, sd := range []string{"min", "max"} {
		if rep, ok := m.snap.Limit(r.Key + "." + sd); ok && rep.Binding && rep.Explain != "" {
			a = rep.Explain
		}
	}
	if a == "" {
		switch {
		case r.Single():
			a = r.Label + " (" + r.Unit + ")"
		case !m.snap.Feasible():
			a = r.Label + ": no blend to compare with"
		default:
			a = r.Label + " does not bind: the blend has room, so moving it changes nothing"
		}
	}
	b := " enter edits the " + [...]string{"minimum", "maximum"}[m.col] + ", ←→ picks the side, [ ] nudge, n adds a limit, d drops it"
	if r.Single() {
		b = " enter edits the value, [ ] nudge"
	}
	return []string{st.head.Render(fit(" "+a, w)), st.muted.Render(fit(b, w))}
}
