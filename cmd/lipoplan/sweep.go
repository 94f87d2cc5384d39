package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/optimise"
)

func (a *app) sweep(args []string) error {
	fs := a.newFlags("sweep", `--price id=FROM:TO:STEPS [--stocks F --spec F | --scenario F] [--format text|json] [--svg FILE]`,
		"Solve the spec over a range of one stock's price: the cheapest blend and its cost at each step,\n"+
			"and the prices at which the blend changes (breakpoints). Tells a buyer at what price a stock\n"+
			"starts or stops paying its way.")
	in := a.inputFlags(fs, demoSpec, "product spec TOML (default: the embedded demo laminating spec)", "text", "json").takeScenario(fs)
	price := fs.String("price", "", `stock and price range, e.g. "palm=800:1400:13"`)
	svg := fs.String("svg", "", "also draw cost per tonne against price into this SVG `file` (- = standard output, the report then goes to standard error)")
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if err := in.check(); err != nil {
		return err
	}
	svgOut := output{"--svg", *svg}
	report, err := a.reportTo(svgOut)
	if err != nil {
		return err
	}
	id, from, to, steps, err := parsePriceRange(*price)
	if err != nil {
		return err
	}
	cat, spec, err := in.load(a)
	if err != nil {
		return err
	}
	r, err := optimise.Sweep(cat, spec, id, from, to, steps, optimise.Options{Temps: blend.SpecTemps(spec)})
	if err != nil {
		return err
	}
	if *svg != "" {
		if err := a.write(svgOut, sweepSVG(r, spec), in.files()...); err != nil {
			return err
		}
	}
	if in.json() {
		return writeJSON(report, sweepJSON(r))
	}
	writeSweepText(report, r, spec)
	return nil
}

// parsePriceRange reads "id=FROM:TO:STEPS".
func parsePriceRange(s string) (id string, from, to float64, steps int, err error) {
	bad := func(why string) error {
		return catalogue.Badf("--price %q: %s; write it as id=FROM:TO:STEPS, e.g. palm=800:1400:13", s, why)
	}
	id, rng, ok := strings.Cut(strings.TrimSpace(s), "=")
	if !ok || id == "" {
		return "", 0, 0, 0, bad("no stock id")
	}
	parts := strings.Split(rng, ":")
	if len(parts) != 3 {
		return "", 0, 0, 0, bad("need FROM, TO and STEPS separated by colons")
	}
	if from, err = strconv.ParseFloat(parts[0], 64); err != nil {
		return "", 0, 0, 0, bad("FROM is not a number")
	}
	if to, err = strconv.ParseFloat(parts[1], 64); err != nil {
		return "", 0, 0, 0, bad("TO is not a number")
	}
	if steps, err = strconv.Atoi(parts[2]); err != nil {
		return "", 0, 0, 0, bad("STEPS is not a whole number")
	}
	for _, end := range []struct {
		name string
		v    float64
	}{{"FROM", from}, {"TO", to}} {
		if err := catalogue.QtyPrice.Check("--price "+end.name, end.v); err != nil {
			return "", 0, 0, 0, err
		}
	}
	return id, from, to, steps, nil
}

func sweepJSON(r *optimise.SweepResult) map[string]any {
	points := []map[string]any{}
	for _, p := range r.Points {
		bl := []map[string]any{}
		for _, l := range p.Blend {
			bl = append(bl, map[string]any{"stock": l.Stock, "pct": round(l.Pct, 6), "tonnes": round(l.Tonnes, 6)})
		}
		pt := map[string]any{"value": round(p.Value, 6), "status": string(p.Status), "blend": bl}
		if p.Status == optimise.Optimal {
			pt["cost_per_tonne"] = round(p.CostPerTonne, 4)
		} else {
			pt["cost_per_tonne"] = nil
		}
		points = append(points, pt)
	}
	bps := []float64{}
	for _, b := range r.Breakpoints {
		bps = append(bps, round(b, 4))
	}
	return map[string]any{"stock": r.Stock, "engine": r.Engine, "points": points, "breakpoints": bps, "caution": cautionJSON}
}

func writeSweepText(w io.Writer, r *optimise.SweepResult, spec *catalogue.Spec) {
	fmt.Fprintf(w, "Price sweep of %s for %s\n\n", r.Stock, spec.Name)
	fmt.Fprintf(w, "  %10s %12s  %s\n", "price/t", "cost/t", "blend (% of batch)")
	for _, p := range r.Points {
		if p.Status != optimise.Optimal {
			fmt.Fprintf(w, "  %10.2f %12s  spec cannot be met\n", p.Value, "-")
			continue
		}
		var items []string
		for _, l := range p.Blend {
			items = append(items, fmt.Sprintf("%s %.1f", l.Stock, l.Pct))
		}
		fmt.Fprintf(w, "  %10.2f %12.2f  %s\n", p.Value, p.CostPerTonne, strings.Join(items, ", "))
	}
	fmt.Fprintln(w)
	if len(r.Breakpoints) == 0 {
		fmt.Fprintf(w, "The blend is the same over the whole range.\n")
	} else {
		fmt.Fprintf(w, "The blend changes at %s %s/t (to within %.2g).\n", joinFloats(r.Breakpoints), r.Currency, r.Tolerance)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionLine)
}

func joinFloats(vs []float64) string {
	s := make([]string, len(vs))
	for i, v := range vs {
		s[i] = strconv.FormatFloat(v, 'f', 2, 64)
	}
	return strings.Join(s, ", ")
}

// sweepSVG draws cost per tonne against the swept price, with the
// breakpoints as dashed lines. Plain SVG 1.1, no scripts.
func sweepSVG(r *optimise.SweepResult, spec *catalogue.Spec) []byte {
	const W, H, L, R, T, B = 640.0, 400.0, 70.0, 20.0, 60.0, 50.0
	x0, x1 := r.Points[0].Value, r.Points[len(r.Points)-1].Value
	if x0 > x1 {
		x0, x1 = x1, x0
	}
	y0, y1 := math.Inf(1), math.Inf(-1)
	for _, p := range r.Points {
		if p.Status == optimise.Optimal {
			y0, y1 = math.Min(y0, p.CostPerTonne), math.Max(y1, p.CostPerTonne)
		}
	}
	if math.IsInf(y0, 1) {
		y0, y1 = 0, 1
	}
	if y1-y0 < 1e-9 {
		y0, y1 = y0-1, y1+1
	}
	pad := (y1 - y0) * 0.08
	y0, y1 = y0-pad, y1+pad
	px := func(v float64) float64 { return L + (v-x0)/(x1-x0)*(W-L-R) }
	py := func(v float64) float64 { return H - B - (v-y0)/(y1-y0)*(H-T-B) }
	var b bytes.Buffer
	fmt.Fprintf(&b, `<?xml version="1.0" encoding="UTF-8"?>`+"\n")
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%g" height="%g" viewBox="0 0 %g %g" font-family="sans-serif" font-size="12">`+"\n", W, H, W, H)
	fmt.Fprintf(&b, `<rect width="100%%" height="100%%" fill="white"/>`+"\n")
	svgTitle(&b, L, spec.Name, "blend cost per tonne against the price of "+r.Stock+"; dashed: the blend changes")
	fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="black"/>`+"\n", L, H-B, W-R, H-B)
	fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="black"/>`+"\n", L, T, L, H-B)
	for i := 0; i <= 4; i++ {
		xv := x0 + (x1-x0)*float64(i)/4
		yv := y0 + (y1-y0)*float64(i)/4
		fmt.Fprintf(&b, `<text x="%.1f" y="%g" text-anchor="middle">%.0f</text>`+"\n", px(xv), H-B+18, xv)
		fmt.Fprintf(&b, `<text x="%g" y="%.1f" text-anchor="end">%.0f</text>`+"\n", L-6, py(yv)+4, yv)
	}
	fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle">price of %s, %s/t</text>`+"\n", (L+W-R)/2, H-12, xmlEscape(r.Stock), xmlEscape(r.Currency))
	fmt.Fprintf(&b, `<text x="16" y="%g" transform="rotate(-90 16 %g)" text-anchor="middle">blend cost, %s/t</text>`+"\n", (T+H-B)/2, (T+H-B)/2, xmlEscape(r.Currency))
	for _, bp := range r.Breakpoints {
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%g" x2="%.1f" y2="%g" stroke="gray" stroke-dasharray="4 3"/>`+"\n", px(bp), T, px(bp), H-B)
		fmt.Fprintf(&b, `<text x="%.1f" y="%g" text-anchor="middle" fill="gray">%.0f</text>`+"\n", px(bp), T-4, bp)
	}
	// the cost is linear between breakpoints, so the steps and the
	// breakpoints together draw it exactly
	type xy struct{ x, y float64 }
	var line []xy
	for _, p := range r.Points {
		if p.Status == optimise.Optimal {
			line = append(line, xy{p.Value, p.CostPerTonne})
		}
	}
	for i, bp := range r.Breakpoints {
		if i < len(r.BreakpointCosts) && !math.IsNaN(r.BreakpointCosts[i]) {
			line = append(line, xy{bp, r.BreakpointCosts[i]})
		}
	}
	sort.Slice(line, func(i, j int) bool { return line[i].x < line[j].x })
	var pts []string
	for _, p := range line {
		pts = append(pts, fmt.Sprintf("%.1f,%.1f", px(p.x), py(p.y)))
	}
	fmt.Fprintf(&b, `<polyline fill="none" stroke="#1f5f8b" stroke-width="2" points="%s"/>`+"\n", strings.Join(pts, " "))
	b.WriteString("</svg>\n")
	return b.Bytes()
}

func xmlEscape(s string) string {
	return strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&quot;").Replace(s)
}
