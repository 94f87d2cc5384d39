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
	fs := a.newFlags("sweep", `--price ID[,ID...]=FROM:TO:STEPS [--stocks F --spec F | --scenario F] [--format text|json] [--svg FILE]`,
		"Solve the spec over a range of prices: the cheapest blend and its cost at each step, the change\n"+
			"against today's prices, and the prices at which the blend changes (breakpoints), with which stock\n"+
			"comes in or goes out there. FROM and TO are prices per tonne of one stock (palm=800:1400:13) or\n"+
			"changes in % of today's price (palm-st-hard=-10%:+20%:13); several stocks move together by the\n"+
			"same relative step (\"palm,palm-olein,palm-st-soft=-10%:+20%:13\"). Tells a buyer at what price a\n"+
			"stock starts or stops paying its way.")
	in := a.inputFlags(fs, demoSpec, "product spec TOML (default: the embedded demo laminating spec)", "text", "json").takeScenario(fs)
	price := fs.String("price", "", `stocks and price range, e.g. "palm=800:1400:13" or "palm,palm-olein=-10%:+20%:13"`)
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
	ps, err := parsePriceRange(*price)
	if err != nil {
		return err
	}
	cat, spec, err := in.load(a)
	if err != nil {
		return err
	}
	bar := a.progress("sweep")
	r, err := optimise.SweepPrices(cat, spec, ps, optimise.Options{Temps: blend.SpecTemps(spec), Progress: bar.callback()})
	bar.finish()
	if err != nil {
		return err
	}
	if *svg != "" {
		if err := a.write(svgOut, sweepSVG(r, spec), in.files()...); err != nil {
			return err
		}
	}
	if in.json() {
		err = writeJSON(report, sweepJSON(r))
	} else {
		writeSweepText(report, r, spec)
	}
	if err == nil && !sweepMet(r) {
		return errInfeasible // exit 3, as solve: no price of the range meets the spec
	}
	return err
}

// sweepMet reports whether the spec is met at some price of the sweep (a
// blend found, proven cheapest or not).
func sweepMet(r *optimise.SweepResult) bool {
	for _, p := range r.Points {
		if p.Status == optimise.Optimal || p.Status == optimise.NotProven {
			return true
		}
	}
	return false
}

// parsePriceRange reads "id[,id...]=FROM:TO:STEPS"; FROM and TO are prices
// per tonne, or both changes in % of today's price ("-10%", "+20%").
func parsePriceRange(s string) (optimise.PriceSweep, error) {
	var ps optimise.PriceSweep
	bad := func(why string) error {
		return catalogue.Badf("--price %q: %s; write it as id=FROM:TO:STEPS, e.g. palm=800:1400:13, or in %% of today's price, e.g. \"palm,palm-olein=-10%%:+20%%:13\"", s, why)
	}
	ids, rng, ok := strings.Cut(strings.TrimSpace(s), "=")
	if !ok || strings.TrimSpace(ids) == "" {
		return ps, bad("no stock id")
	}
	for _, id := range strings.Split(ids, ",") {
		id = strings.TrimSpace(id)
		if id == "" {
			return ps, bad("an empty stock id in the list")
		}
		ps.Stocks = append(ps.Stocks, id)
	}
	parts := strings.Split(rng, ":")
	if len(parts) != 3 {
		return ps, bad("need FROM, TO and STEPS separated by colons")
	}
	ends := [2]float64{}
	rel := [2]bool{}
	for k, name := range []string{"FROM", "TO"} {
		v := strings.TrimSpace(parts[k])
		v, rel[k] = strings.CutSuffix(v, "%")
		f, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if err != nil {
			return ps, bad(name + " is not a number")
		}
		ends[k] = f
	}
	if rel[0] != rel[1] {
		return ps, bad("FROM and TO must both be prices or both changes in %")
	}
	steps, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil {
		return ps, bad("STEPS is not a whole number")
	}
	ps.Relative, ps.From, ps.To, ps.Steps = rel[0], ends[0], ends[1], steps
	if !ps.Relative {
		for k, name := range []string{"FROM", "TO"} {
			if err := catalogue.QtyPrice.Check("--price "+name, ends[k]); err != nil {
				return ps, err
			}
		}
	}
	return ps, nil
}

// sweepValue prints one value of a sweep: a price, or a change in %.
func sweepValue(r *optimise.SweepResult, v float64) string {
	if r.Relative {
		return fmt.Sprintf("%+.2f %%", v)
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// signed prints a change of cost with its sign.
func signed(v float64) string {
	if math.IsNaN(v) {
		return "-"
	}
	return fmt.Sprintf("%+.2f", v)
}

func sweepJSON(r *optimise.SweepResult) map[string]any {
	points := []map[string]any{}
	for _, p := range r.Points {
		prices := map[string]float64{}
		for k, id := range r.Stocks {
			prices[id] = round(p.Prices[k], 4)
		}
		pt := map[string]any{"value": round(p.Value, 6), "status": string(p.Status), "blend": blendJSON(p.Blend), "prices": prices,
			"change_per_tonne": finiteOrNil(p.ChangePerTonne, 4)}
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
	changes := []map[string]any{}
	for i, c := range r.Changes {
		shifts := []map[string]any{}
		for _, x := range c.Shifts() {
			shifts = append(shifts, map[string]any{"stock": x.Stock, "pct_before": round(x.Before, 6), "pct_after": round(x.After, 6)})
		}
		changes = append(changes, map[string]any{"value": round(c.At, 4), "cost_per_tonne": finiteOrNil(r.BreakpointCosts[i], 4),
			"before": blendJSON(c.Before), "after": blendJSON(c.After), "shifts": shifts})
	}
	base := map[string]any{}
	for k, id := range r.Stocks {
		base[id] = round(r.BasePrices[k], 4)
	}
	unit := "price"
	if r.Relative {
		unit = "percent"
	}
	var baseCost any
	if r.BaseStatus == optimise.Optimal {
		baseCost = round(r.BaseCostPerTonne, 4)
	}
	return map[string]any{"stock": r.Stock, "stocks": r.Stocks, "value_unit": unit, "base_prices": base,
		"base_status": string(r.BaseStatus), "base_cost_per_tonne": baseCost, "base_blend": blendJSON(r.BaseBlend),
		"engine": r.Engine, "points": points, "breakpoints": bps, "breakpoint_changes": changes, "caution": cautionJSON}
}

func writeSweepText(w io.Writer, r *optimise.SweepResult, spec *catalogue.Spec) {
	if r.Relative {
		fmt.Fprintf(w, "Price sweep of %s, %s to %s of today's price, for %s\n\n", strings.Join(r.Stocks, ", "),
			sweepValue(r, r.Points[0].Value), sweepValue(r, r.Points[len(r.Points)-1].Value), spec.Name)
	} else {
		fmt.Fprintf(w, "Price sweep of %s for %s\n\n", r.Stock, spec.Name)
	}
	var today []string
	for k, id := range r.Stocks {
		today = append(today, fmt.Sprintf("%s %.2f", id, r.BasePrices[k]))
	}
	if r.BaseStatus == optimise.Optimal {
		fmt.Fprintf(w, "Base case, today's prices (%s %s/t): %s/t, %s\n\n", strings.Join(today, ", "), r.Currency,
			money(r.BaseCostPerTonne, r.Currency), blendWords(r.BaseBlend))
	} else {
		fmt.Fprintf(w, "Base case, today's prices (%s %s/t): the spec cannot be met\n\n", strings.Join(today, ", "), r.Currency)
	}
	one := len(r.Stocks) == 1
	if r.Relative && one {
		fmt.Fprintf(w, "  %10s %10s %12s %10s  %s\n", "change", "price/t", "cost/t", "vs base", "blend (% of batch)")
	} else if r.Relative {
		fmt.Fprintf(w, "  %10s %12s %10s  %s\n", "change", "cost/t", "vs base", "blend (% of batch)")
	} else {
		fmt.Fprintf(w, "  %10s %12s %10s  %s\n", "price/t", "cost/t", "vs base", "blend (% of batch)")
	}
	for _, p := range r.Points {
		lead := fmt.Sprintf("  %10s", sweepValue(r, p.Value))
		if r.Relative && one {
			lead += fmt.Sprintf(" %10.2f", p.Prices[0])
		}
		if p.Status != optimise.Optimal {
			fmt.Fprintf(w, "%s %12s %10s  spec cannot be met\n", lead, "-", "-")
			continue
		}
		fmt.Fprintf(w, "%s %12.2f %10s  %s\n", lead, p.CostPerTonne, signed(p.ChangePerTonne), blendWords(p.Blend))
	}
	fmt.Fprintln(w)
	if len(r.Breakpoints) == 0 {
		fmt.Fprintf(w, "The blend is the same over the whole range.\n")
	} else {
		at := joinFloats(r.Breakpoints) + " " + r.Currency + "/t"
		if r.Relative {
			var vs []string
			for _, b := range r.Breakpoints {
				vs = append(vs, fmt.Sprintf("%+.2f", b))
			}
			at = strings.Join(vs, ", ") + " % of today's price"
		}
		fmt.Fprintf(w, "The blend changes at %s (to within %.2g):\n", at, r.Tolerance)
		for i, c := range r.Changes {
			at := sweepValue(r, c.At)
			if r.Relative && one {
				at += fmt.Sprintf(" (%s %.2f/t)", r.Stocks[0], r.BasePrices[0]*(1+c.At/100))
			}
			cost := ""
			if !math.IsNaN(r.BreakpointCosts[i]) {
				cost = fmt.Sprintf(", blend cost %s/t", money(r.BreakpointCosts[i], r.Currency))
			}
			fmt.Fprintf(w, "  at %s%s:\n", at, cost)
			fmt.Fprintf(w, "      %s\n", wrapText(shiftWords(c.Shifts()), 92, "      "))
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionLine)
}

// blendWords is a blend in one line: "palm 40.0, soybean 60.0".
func blendWords(lines []optimise.Line) string {
	var items []string
	for _, l := range lines {
		items = append(items, fmt.Sprintf("%s %.1f", l.Stock, l.Pct))
	}
	return strings.Join(items, ", ")
}

// shiftWords says what a change of blend does, stock by stock: which comes
// in, which goes out, and the shares that move (% of batch).
func shiftWords(sh []optimise.Shift) string {
	var items []string
	for _, x := range sh {
		switch {
		case x.Before <= 1e-6:
			items = append(items, fmt.Sprintf("%s comes in (0 -> %.1f %%)", x.Stock, x.After))
		case x.After <= 1e-6:
			items = append(items, fmt.Sprintf("%s goes out (%.1f %% -> 0)", x.Stock, x.Before))
		default:
			items = append(items, fmt.Sprintf("%s %.1f -> %.1f %%", x.Stock, x.Before, x.After))
		}
	}
	if len(items) == 0 {
		return "the shares move by less than 0.000001 % of batch"
	}
	return strings.Join(items, "; ")
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
	xlabel := fmt.Sprintf("price of %s, %s/t", r.Stock, r.Currency)
	what := "blend cost per tonne against the price of " + r.Stock + "; dashed: the blend changes"
	if r.Relative {
		xlabel = "change in the price of " + strings.Join(r.Stocks, ", ") + ", % of today's"
		what = "blend cost per tonne against the change in the price of " + strings.Join(r.Stocks, ", ") + "; dashed: the blend changes"
	}
	svgTitle(&b, L, spec.Name, what)
	fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="black"/>`+"\n", L, H-B, W-R, H-B)
	fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="black"/>`+"\n", L, T, L, H-B)
	for i := 0; i <= 4; i++ {
		xv := x0 + (x1-x0)*float64(i)/4
		yv := y0 + (y1-y0)*float64(i)/4
		fmt.Fprintf(&b, `<text x="%.1f" y="%g" text-anchor="middle">%.0f</text>`+"\n", px(xv), H-B+18, xv)
		fmt.Fprintf(&b, `<text x="%g" y="%.1f" text-anchor="end">%.0f</text>`+"\n", L-6, py(yv)+4, yv)
	}
	fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle">%s</text>`+"\n", (L+W-R)/2, H-12, xmlEscape(clip(xlabel, 90)))
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
