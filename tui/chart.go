package tui

import (
	"fmt"
	"math"
	"strings"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// overlayMethods are the TAG distributions whose predicted SFC the chart can
// overlay, in the order p steps through them.
var overlayMethods = [...]randomise.Method{randomise.Native, randomise.Chemical, randomise.Enzymatic}

func overlayTitle(m randomise.Method) string {
	switch m {
	case randomise.Chemical:
		return "after chemical interesterification"
	case randomise.Enzymatic:
		return "after enzymatic (sn-1,3) interesterification"
	}
	return "as blended"
}

// cell kinds of the SFC chart canvas.
type cellKind uint8

const (
	cellEmpty cellKind = iota
	cellGrid
	cellBand
	cellPred // TAG-model prediction overlay
	cellCurve
	cellIn  // curve point at a spec temperature, inside the band
	cellOut // curve point at a spec temperature, outside the band
)

// sfcChart is the canvas of the SFC panel: the spec band as shaded columns
// at the spec temperatures and the blend's curve across the range.
type sfcChart struct {
	w, h   int
	lo, hi float64 // temperature range, °C
	top    float64 // % solid at the top row
	cells  []cellKind
}

func (c *sfcChart) col(t float64) int {
	if c.hi <= c.lo {
		return 0
	}
	return int(math.Round((t - c.lo) / (c.hi - c.lo) * float64(c.w-1)))
}

func (c *sfcChart) row(v float64) int {
	r := int(math.Round((1 - v/c.top) * float64(c.h-1)))
	return min(max(r, 0), c.h-1)
}

func (c *sfcChart) set(x, y int, k cellKind) {
	if x < 0 || x >= c.w || y < 0 || y >= c.h {
		return
	}
	if i := y*c.w + x; k > c.cells[i] {
		c.cells[i] = k
	}
}

// interp reads the curve at t (linear between grid points).
func interp(pts []catalogue.Point, t float64) (float64, bool) {
	return catalogue.Curve(pts).At(t)
}

// inBand reports whether v meets the spec limit l.
func inBand(l catalogue.SFCLimit, v float64) bool {
	const tol = 1e-6
	return (!l.HasMin() || v >= l.Min-tol) && (!l.HasMax() || v <= l.Max+tol)
}

func (m *Model) sfcPanel(w, h int) []string {
	st := m.styles
	spec := m.sc.Spec
	lo, hi := chartTemps(spec)
	var pts []catalogue.Point
	var gaps map[float64][]string
	if m.snap.Feasible() {
		pts, gaps = m.snap.Curve, m.snap.CurveGaps
	}
	top := math.Max(10, bandTop(spec))
	for _, p := range pts {
		top = math.Max(top, p.Solid)
	}
	var pred []catalogue.Point
	var predNote string
	if m.overlay > 0 && m.snap.Feasible() {
		method := overlayMethods[m.overlay-1]
		if col, ok := m.snap.TAG.Column(method); ok {
			switch {
			case col.Err != nil:
				predNote = col.Err.Error()
			case col.PredErr != nil:
				predNote = col.PredErr.Error()
			default:
				pred = col.Predicted
			}
		}
		for _, p := range pred {
			top = math.Max(top, p.Solid)
		}
	}
	top = math.Min(100, math.Ceil(top/10)*10)
	c := newSFCChart(max(10, w-8), max(3, h-5), lo, hi, top, spec.SFC)
	plot(c, pred, cellPred)
	plot(c, pts, cellCurve) // the blend, drawn over the prediction
	markSpec(c, spec.SFC, pts)

	sub := " · blend (linear in measured curves) and spec band"
	if m.snap.Feasible() && m.snap.Result.Process != nil && len(m.snap.Result.Process.Feed) > 0 &&
		m.snap.Result.Process.SFCModel == "predicted" {
		sub = " · blend (reacted part by the TAG model) and spec band"
	}
	if m.overlay > 0 {
		sub = " · measured-linear • and TAG model ∘ " + overlayTitle(overlayMethods[m.overlay-1])
	}
	out := []string{" " + st.head.Render("SFC, % solid, against °C") + st.muted.Render(fit(sub, max(0, w-26)))}
	labels := axisLabels(c, top)
	for y := 0; y < c.h; y++ {
		label, ok := labels[y]
		if !ok {
			label = "     "
		}
		out = append(out, st.muted.Render(label+"┤")+m.chartRow(c, y))
	}
	out = append(out, st.muted.Render("     └"+strings.Repeat("─", c.w)))
	axis := []rune(strings.Repeat(" ", c.w+8))
	for t := math.Ceil(lo/5) * 5; t <= hi; t += 5 {
		s := catalogue.TempKey(t)
		x := 6 + c.col(t) - len(s)/2
		for i, r := range s {
			if x+i >= 0 && x+i < len(axis) {
				axis[x+i] = r
			}
		}
	}
	out = append(out, st.muted.Render(strings.TrimRight(string(axis), " ")))
	legend := " " + st.curve.Render("•") + " blend   " + st.band.Render("▒") + " spec band   " +
		st.ok.Render("●") + " meets   " + st.bad.Render("✗") + " misses"
	if m.overlay > 0 {
		legend += "   " + st.pred.Render("∘") + " predicted"
	} else {
		legend += st.muted.Render("   p predicted")
	}
	out = append(out, legend)
	switch {
	case predNote != "":
		out = append(out, st.muted.Render(fit(" Prediction unavailable: "+predNote, w)))
	case len(pred) > 0:
		out = append(out, m.predSummary(pred))
	default:
		out = append(out, m.sfcSummary(pts, gaps))
	}
	return out
}

// bandTop is the highest % solid a spec's SFC limits name.
func bandTop(spec *catalogue.Spec) float64 {
	top := 0.0
	for _, l := range spec.SFC {
		if l.HasMax() {
			top = math.Max(top, l.Max)
		} else if l.HasMin() {
			top = math.Max(top, l.Min)
		}
	}
	return top
}

// newSFCChart is an empty w×h canvas over lo..hi °C and 0..top % solid with
// a faint grid every 10 % solid and the spec's bands shaded, three columns
// wide at each limit's temperature.
func newSFCChart(w, h int, lo, hi, top float64, bands []catalogue.SFCLimit) *sfcChart {
	c := &sfcChart{w: w, h: h, lo: lo, hi: hi, top: top, cells: make([]cellKind, w*h)}
	for v := 10.0; v < top; v += 10 {
		y := c.row(v)
		for x := 0; x < c.w; x += 2 {
			c.set(x, y, cellGrid)
		}
	}
	for _, l := range bands {
		lo, hi := 0.0, top
		if l.HasMin() {
			lo = l.Min
		}
		if l.HasMax() {
			hi = math.Min(l.Max, top)
		}
		x := c.col(l.Temp)
		for y := c.row(hi); y <= c.row(lo); y++ {
			for dx := -1; dx <= 1; dx++ {
				c.set(x+dx, y, cellBand)
			}
		}
	}
	return c
}

// markSpec marks the curve at each limit's temperature: inside its band or not.
func markSpec(c *sfcChart, bands []catalogue.SFCLimit, pts []catalogue.Point) {
	for _, l := range bands {
		if v, ok := interp(pts, l.Temp); ok {
			k := cellOut
			if inBand(l, v) {
				k = cellIn
			}
			c.set(c.col(l.Temp), c.row(v), k)
		}
	}
}

// axisLabels are the % solid labels of the canvas rows: every 10, or every
// 20 where the rows are too few.
func axisLabels(c *sfcChart, top float64) map[int]string {
	labels := map[int]string{}
	step := 10.0
	if float64(c.h-1)/(top/10) < 2 {
		step = 20
	}
	for v := 0.0; v <= top+1e-9; v += step {
		labels[c.row(v)] = fmt.Sprintf("%4.0f ", v)
	}
	return labels
}

// plot draws a curve on the canvas, joined with vertical strokes where it
// falls steeply.
func plot(c *sfcChart, pts []catalogue.Point, k cellKind) {
	prev := -1
	for x := 0; x < c.w; x++ {
		t := c.lo + float64(x)/float64(max(1, c.w-1))*(c.hi-c.lo)
		v, ok := interp(pts, t)
		if !ok {
			prev = -1
			continue
		}
		y := c.row(v)
		c.set(x, y, k)
		if prev >= 0 {
			for yy := min(prev, y) + 1; yy < max(prev, y); yy++ {
				c.set(x, yy, k)
			}
		}
		prev = y
	}
}

// predSummary is one line: the predicted SFC at each spec temperature, with
// the caution that it is a model estimate.
func (m *Model) predSummary(pred []catalogue.Point) string {
	st := m.styles
	var b strings.Builder
	b.WriteString(" model ")
	for _, l := range m.sc.Spec.SFC {
		if v, ok := interp(pred, l.Temp); ok {
			mark := st.ok.Render("✓")
			if !inBand(l, v) {
				mark = st.bad.Render("✗")
			}
			fmt.Fprintf(&b, "%s° %.1f%s  ", catalogue.TempKey(l.Temp), v, mark)
		}
	}
	b.WriteString(st.muted.Render("(estimate; the blend is optimised on measured curves)"))
	return b.String()
}

func (m *Model) chartRow(c *sfcChart, y int) string {
	st := m.styles
	var b strings.Builder
	for x := 0; x < c.w; x++ {
		switch c.cells[y*c.w+x] {
		case cellEmpty:
			b.WriteByte(' ')
		case cellGrid:
			b.WriteString(st.muted.Render("·"))
		case cellBand:
			b.WriteString(st.band.Render("▒"))
		case cellPred:
			b.WriteString(st.pred.Render("∘"))
		case cellCurve:
			b.WriteString(st.curve.Render("•"))
		case cellIn:
			b.WriteString(st.ok.Render("●"))
		case cellOut:
			b.WriteString(st.bad.Render("✗"))
		}
	}
	return b.String()
}

// sfcSummary is one line: the blend's SFC at each spec temperature.
func (m *Model) sfcSummary(pts []catalogue.Point, gaps map[float64][]string) string {
	st := m.styles
	s := m.snap
	switch {
	case s == nil:
		return st.muted.Render(" solving…")
	case !s.Feasible():
		return st.muted.Render(" No blend curve: the spec cannot be met (see 1 Blend).")
	case len(pts) == 0:
		return st.muted.Render(" No blend curve: a stock in the blend has no measured SFC.")
	}
	var b strings.Builder
	b.WriteString(" ")
	for _, l := range m.sc.Spec.SFC {
		v, ok := interp(pts, l.Temp)
		if !ok {
			fmt.Fprintf(&b, "%s° no data  ", catalogue.TempKey(l.Temp))
			continue
		}
		mark := st.ok.Render("✓")
		if !inBand(l, v) {
			mark = st.bad.Render("✗")
		}
		fmt.Fprintf(&b, "%s° %.1f%s  ", catalogue.TempKey(l.Temp), v, mark)
	}
	if len(gaps) > 0 {
		b.WriteString(st.muted.Render(fmt.Sprintf("(%d °C points lack stock data)", len(gaps))))
	}
	return b.String()
}

// ---- 5 TAG classes ----

func (m *Model) tagPanel(w, h int) []string {
	st := m.styles
	s := m.snap
	switch {
	case s == nil:
		return []string{"", st.warn.Render(" Solving…")}
	case !s.Feasible():
		return []string{"", st.muted.Render(" No blend to analyse: the spec cannot be met (see 1 Blend).")}
	}
	cols := s.TAG.Columns
	colW := 14
	titles := map[string]string{"native": "as blended", "chemical": "chemical IE", "enzymatic": "enzymatic IE"}
	head := " " + fit("class, mol %", 14)
	for _, c := range cols {
		head += rfit(titles[string(c.Method)], colW)
	}
	out := []string{" " + st.head.Render("TAG classes of the blend") +
		st.muted.Render(" · S saturated, U unsaturated acid · IE interesterified"), st.muted.Render(head)}
	type row struct {
		name string
		get  func(c TAGColumn) float64
	}
	rows := []row{
		{"S3", func(c TAGColumn) float64 { return c.Classes.S3 }},
		{"S2U", func(c TAGColumn) float64 { return c.Classes.S2U }},
		{"  SUS", func(c TAGColumn) float64 { return c.Classes.SUS }},
		{"  SSU", func(c TAGColumn) float64 { return c.Classes.SSU }},
		{"SU2", func(c TAGColumn) float64 { return c.Classes.SU2 }},
		{"U3", func(c TAGColumn) float64 { return c.Classes.U3 }},
	}
	for _, r := range rows {
		line := " " + fit(r.name, 14)
		for _, c := range cols {
			if c.Err != nil {
				line += rfit("—", colW)
				continue
			}
			line += rfit(fmt.Sprintf("%.1f", r.get(c)), colW)
		}
		if barW := w - 16 - colW*len(cols) - 4; barW > 6 && len(cols) > 0 && cols[0].Err == nil {
			line += "  " + st.band.Render(strings.Repeat("█", int(math.Round(r.get(cols[0])/100*float64(barW)))))
		}
		out = append(out, line)
	}
	if len(m.sc.Spec.SFC) > 0 && h >= 16 {
		out = append(out, " "+st.head.Render("SFC predicted")+st.muted.Render(" (TAG model, % solid; an estimate)"))
		for _, l := range m.sc.Spec.SFC {
			line := " " + fit(catalogue.TempKey(l.Temp)+" °C", 14)
			for _, c := range cols {
				v, ok := interp(c.Predicted, l.Temp)
				if c.Err != nil || c.PredErr != nil || !ok {
					line += rfit("—", colW)
					continue
				}
				mark := " "
				if !inBand(l, v) {
					mark = st.bad.Render("✗")
				}
				line += rfit(fmt.Sprintf("%.1f", v), colW-1) + mark
			}
			out = append(out, line)
		}
	}
	out = append(out, "", " "+st.head.Render("Main TAGs")+st.muted.Render(" (mirror images merged, sn-2 kept; mol %)"))
	tagHead := " " + fit("TAG  mol %", 14)
	for _, c := range cols {
		tagHead += rfit(titles[string(c.Method)], colW)
	}
	out = append(out, st.muted.Render(tagHead))
	for i := 0; i < topSpecies && len(out) < h-2; i++ {
		line := " " + fit("", 14)
		for _, c := range cols {
			cell := ""
			if c.Err == nil && i < len(c.Top) {
				cell = fmt.Sprintf("%-6s%5.1f", c.Top[i].Tag, c.Top[i].MolPct)
			}
			line += rfit(cell, colW)
		}
		out = append(out, line)
	}
	var notes []string
	for _, c := range cols {
		if c.Err != nil {
			notes = append(notes, c.Err.Error())
		}
		notes = append(notes, c.Notes...)
	}
	if len(notes) > 0 && len(out) < h {
		out = append(out, st.muted.Render(fit(" Note: "+dedupe(notes)[0], w)))
	}
	return out
}

func dedupe(xs []string) []string {
	seen := map[string]bool{}
	var out []string
	for _, x := range xs {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}
