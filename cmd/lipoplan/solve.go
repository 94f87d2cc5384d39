package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// mpsFormatHelp is the help of --mps-format (solve and plan).
const mpsFormatHelp = "layout of the --mps file: free (exact numbers, names as in lipoplan; glpsol --freemps, COIN-OR) or\n" +
	"fixed (fixed columns, names fitted to 8 characters with the mapping as comment lines at the top; glpsol --mps, strict readers)"

// mpsFormat reads --mps-format.
func mpsFormat(s string) (optimise.MPSFormat, error) {
	switch s {
	case "free":
		return optimise.FreeMPS, nil
	case "fixed":
		return optimise.FixedMPS, nil
	}
	return optimise.FreeMPS, catalogue.Badf("--mps-format %q is not known; use free or fixed", s)
}

func (a *app) solve(args []string) error {
	fs := a.newFlags("solve", `[--stocks F --spec F | --scenario F] [--format text|json|csv] [--mps FILE] [--mps-format free|fixed] [--svg FILE] [--sheet FILE] [--temps "5,10,37"]`,
		"Cheapest blend of the stocks that meets the spec: a linear programme (lipoplan's own simplex; integer\n"+
			"rules max_stocks and smallest_share by branch and bound), with the cost of every binding limit, price ranging per stock\n"+
			"and, when the spec cannot be met, the smallest relaxation that would make it feasible (exit 3).")
	in := a.inputFlags(fs, demoSpec, "product spec TOML (default: the embedded demo laminating spec)", "text", "json", "csv").takeScenario(fs)
	mps := fs.String("mps", "", "also write the model to this `file` in MPS format (- = standard output, the report then goes to standard error)")
	mpsLayout := fs.String("mps-format", "free", mpsFormatHelp)
	svg := fs.String("svg", "", "also draw the blend's SFC against the spec's bands into this SVG `file` (- = standard output)")
	sheet := fs.String("sheet", "", "also write a printable blend sheet (HTML, A4) of the solved blend into this `file` (- = standard output)")
	temps := fs.String("temps", "", `SFC temperatures to report, deg C (default 10,15,...,45 plus the spec's)`)
	maxNodes := fs.Int("max-nodes", 100000, "integer rules: branch and bound solves at most this many LPs")
	maxTime := fs.Duration("max-time", 60*time.Second, "integer rules: branch and bound runs at most this `duration`")
	calPath := fs.String("calibration", "", calibrationFlagHelp)
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if *maxNodes < 1 || *maxTime <= 0 {
		fmt.Fprintf(a.stderr, "lipoplan solve: --max-nodes must be at least 1 and --max-time above 0; run 'lipoplan solve --help'\n")
		return errUsage
	}
	if err := in.check(); err != nil {
		return err
	}
	layout, err := mpsFormat(*mpsLayout)
	if err != nil {
		return err
	}
	model, err := a.sfcModel(*calPath)
	if err != nil {
		return err
	}
	mpsOut, svgOut, sheetOut := output{"--mps", *mps}, output{"--svg", *svg}, output{"--sheet", *sheet}
	report, err := a.reportTo(mpsOut, svgOut, sheetOut)
	if err != nil {
		return err
	}
	cat, spec, ts, err := in.loadWithTemps(a, *temps)
	if err != nil {
		return err
	}
	if *mps != "" {
		lp, err := optimise.MPSIn(layout, cat, spec)
		if err != nil {
			return fmt.Errorf("--mps: %w", err)
		}
		if err := a.write(mpsOut, lp, in.files()...); err != nil {
			return err
		}
	}
	bar := a.progress("branch and bound")
	res, err := optimise.Solve(cat, spec, optimise.Options{Temps: ts, Model: model, MaxNodes: *maxNodes, MaxTime: *maxTime, Progress: bar.callback()})
	bar.finish()
	if err != nil {
		return err
	}
	if *svg != "" && res.Status == optimise.Optimal {
		if err := a.write(svgOut, sfcSVG(res, spec), in.files()...); err != nil {
			return err
		}
	}
	if *sheet != "" && len(res.Blend) > 0 {
		if err := a.writeSheet(sheetOut, res, spec, cat, ts, model, in, *calPath); err != nil {
			return err
		}
	}
	switch *in.format {
	case "json":
		out := solveJSON(res)
		if res.Process != nil && res.Process.SFCModel == "predicted" {
			out["sfc_model"] = sfcModelJSON(model)
		}
		err = writeJSON(report, out)
	case "csv":
		err = writeSolveCSV(report, res)
	default:
		writeSolveText(report, res, spec, ts)
	}
	if err != nil {
		return err
	}
	if res.Status == optimise.Infeasible || len(res.Blend) == 0 {
		return errInfeasible
	}
	return nil
}

// finiteOrNil writes an infinite range end as JSON null.
func finiteOrNil(v float64, digits int) any {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return nil
	}
	return round(v, digits)
}

// limitJSON is one entry of a solve's "limits" (README, JSON output), and
// rangingJSON one of its "ranging". They are structs rather than maps, one
// per limit and one per stock, because a 300-stock solve has hundreds of
// each and encoding/json sorts a map's keys and reflects on every value;
// the fields are declared in the order of their keys, so the output is the
// same as a map's, byte for byte.
type limitJSON struct {
	Binding     bool    `json:"binding"`
	Bound       float64 `json:"bound"`
	Excluded    bool    `json:"excluded"`
	HoldsFrom   any     `json:"holds_from"` // null for no end
	HoldsTo     any     `json:"holds_to"`
	Label       string  `json:"label"`
	Name        string  `json:"name"`
	Room        float64 `json:"room"`
	ShadowPrice float64 `json:"shadow_price"`
	Value       float64 `json:"value"`
}

type rangingJSON struct {
	PriceHigh any    `json:"price_high"` // null for no upper limit
	PriceLow  any    `json:"price_low"`  // null for no lower limit
	Stock     string `json:"stock"`
}

// solveJSON is the stable JSON shape of a solve (README, JSON output).
func solveJSON(r *optimise.Result) map[string]any {
	out := map[string]any{"status": string(r.Status), "engine": r.Engine, "caution": cautionJSON}
	limits := []limitJSON{}
	ranging := []rangingJSON{}
	if len(r.Blend) > 0 {
		out["cost_per_tonne"] = round(r.CostPerTonne, 4)
		out["batch_cost"] = round(r.BatchCost, 2)
		out["properties"] = propertiesJSON(r.Properties)
		limits = make([]limitJSON, 0, len(r.Limits))
		for _, l := range r.Limits {
			limits = append(limits, limitJSON{
				Name: l.Name, Label: l.Label, Value: round(l.Value, 6), Bound: round(l.Bound, 6), Room: round(l.Room(), 6),
				Binding: l.Binding, ShadowPrice: round(l.ShadowPrice, 6),
				HoldsFrom: finiteOrNil(l.HoldsFrom, 6), HoldsTo: finiteOrNil(l.HoldsTo, 6), Excluded: l.Excluded,
			})
		}
		ranging = make([]rangingJSON, 0, len(r.Ranging))
		for _, g := range r.Ranging {
			low := finiteOrNil(g.PriceLow, 4)
			if g.PriceLow < 0 {
				low = nil // any price down to nothing keeps the blend: no lower limit
			}
			ranging = append(ranging, rangingJSON{Stock: g.Stock, PriceLow: low, PriceHigh: finiteOrNil(g.PriceHigh, 4)})
		}
	} else {
		out["cost_per_tonne"] = nil
		out["batch_cost"] = nil
		out["properties"] = nil
		out["relaxation"] = relaxJSON(r.Relaxation)
	}
	out["blend"] = blendJSON(r.Blend)
	out["limits"] = limits
	out["ranging"] = ranging
	if r.Process != nil {
		out["process"] = processJSON(r.Process)
	}
	if len(r.Notes) > 0 {
		out["notes"] = r.Notes
	}
	return out
}

// writeSolveCSV writes the answer as one long table for spreadsheets: a
// section column (status, cost, blend, limit, ranging, relaxation) and the
// fields that section uses.
func writeSolveCSV(w io.Writer, r *optimise.Result) error {
	cw := csv.NewWriter(w)
	f := func(v float64) string {
		if math.IsInf(v, 0) || math.IsNaN(v) {
			return ""
		}
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	rows := [][]string{
		{"section", "name", "value", "tonnes", "bound", "room", "saving_per_unit", "holds_from", "holds_to", "price", "price_low", "price_high"},
		{"status", string(r.Status), "", "", "", "", "", "", "", "", "", ""},
	}
	low := func(v float64) string {
		if v < 0 {
			return "" // no lower limit
		}
		return f(v)
	}
	if r.Status == optimise.Optimal {
		rows = append(rows,
			[]string{"cost", "cost_per_tonne", f(r.CostPerTonne), "", "", "", "", "", "", "", "", ""},
			[]string{"cost", "batch_cost", f(r.BatchCost), "", "", "", "", "", "", "", "", ""})
		for _, l := range r.Blend {
			rows = append(rows, []string{"blend", l.Stock, f(l.Pct), f(l.Tonnes), "", "", "", "", "", "", "", ""})
		}
		for _, l := range r.Limits {
			section := "limit"
			if l.Excluded {
				section = "left_out"
			}
			rows = append(rows, []string{section, l.Name, f(l.Value), "", f(l.Bound), f(l.Room()), f(l.ShadowPrice), f(l.HoldsFrom), f(l.HoldsTo), "", "", ""})
		}
		for _, g := range r.Ranging {
			rows = append(rows, []string{"stock", g.Stock, "", "", "", "", "", "", "", f(g.Price), low(g.PriceLow), f(g.PriceHigh)})
		}
	}
	for _, x := range r.Relaxation {
		rows = append(rows, []string{"relaxation", x.Name, f(x.By), "", "", "", "", "", "", "", "", ""})
	}
	if err := cw.WriteAll(rows); err != nil {
		return fmt.Errorf("writing CSV: %w", err)
	}
	return nil
}

func money(v float64, cur string) string {
	s := strconv.FormatFloat(v, 'f', 2, 64)
	if cur == "" {
		return s
	}
	return s + " " + cur
}

// writeBlendLines prints the blend table: each stock's share, tonnes and
// price, and the totals.
func writeBlendLines(w io.Writer, r *optimise.Result) {
	fmt.Fprintf(w, "  %-14s %-34s %8s %9s %11s\n", "stock", "name", "%", "tonnes", "price/t")
	prices := map[string]float64{}
	for _, g := range r.Ranging {
		prices[g.Stock] = g.Price
	}
	var sum, tonnes float64
	for _, l := range r.Blend {
		fmt.Fprintf(w, "  %-14s %-34s %8.2f %9.3f %11s\n", l.Stock, clip(l.Name, 34), l.Pct, l.Tonnes, money(prices[l.Stock], ""))
		sum += l.Pct
		tonnes += l.Tonnes
	}
	fmt.Fprintf(w, "  %-14s %-34s %8.2f %9.3f\n\n", "total", "", sum, tonnes)
}

// writeSolveText prints the report: blend table, costs, properties,
// limits against the blend, what each binding limit costs, price ranging,
// stocks left out, and the caution.
func writeSolveText(w io.Writer, r *optimise.Result, spec *catalogue.Spec, temps []float64) {
	title := spec.Name
	if title == "" {
		title = spec.File
	}
	engine := r.Engine
	fmt.Fprintf(w, "Spec: %s (%g t batch)\n", title, r.Batch)
	for _, n := range r.Notes {
		fmt.Fprintln(w, wrapText("Note: "+n, 100, "      "))
	}
	if len(r.Blend) == 0 {
		writeDiagnosis(w, r, spec)
		fmt.Fprintln(w)
		writeCautions(w, spec)
		return
	}
	if r.Status == optimise.NotProven {
		fmt.Fprintf(w, "Best blend found, NOT PROVEN the cheapest (%s):\n\n", engine)
	} else {
		fmt.Fprintf(w, "Cheapest blend found (%s):\n\n", engine)
	}
	writeBlendLines(w, r)
	fmt.Fprintf(w, "  Cost: %s per tonne, %s per batch\n\n", money(r.CostPerTonne, r.Currency), money(r.BatchCost, r.Currency))

	if r.Process != nil {
		writeReactor(w, r, temps)
	}
	fmt.Fprintln(w, "Properties of the blend")
	heading := "SFC (% solid, linear in measured curves)"
	if r.Process != nil && r.Process.SFCModel == "predicted" {
		heading = "SFC (% solid, predicted by the TAG model for the whole blend: the stocks as they are and the reacted fat)"
	}
	writePropertiesAs(w, r.Properties, temps, heading)
	fmt.Fprintln(w)

	writeLimits(w, r)
	writeStocks(w, r)
	writeCautions(w, spec)
}

// writeLimits prints the limits in two groups: those that hold the blend,
// dearest first, each with what moving it saves and over which values of
// its bound that holds; then the others with the room they leave. Stocks
// the spec leaves out (a [use] cap of 0) are named once.
func writeLimits(w io.Writer, r *optimise.Result) {
	out := r.LeftOut()
	gone := map[string]bool{}
	for _, id := range out {
		gone[id] = true
	}
	var holding, others []optimise.LimitReport
	for _, l := range r.Holding() {
		if !gone[l.Stock] {
			holding = append(holding, l)
		}
	}
	for _, l := range r.Limits {
		if !l.Excluded && !l.Binding && !gone[l.Stock] {
			others = append(others, l) // a left-out stock's other limits are moot
		}
	}
	fmt.Fprintln(w, "What holds the blend (dearest first)")
	if len(holding) == 0 {
		fmt.Fprintln(w, "  nothing: the blend is simply the cheapest mix of the stocks allowed")
	}
	for _, l := range holding {
		fmt.Fprintf(w, "  %-30s %s%s\n", l.Label, quantity(l.Bound, l.Unit), l.Unit)
		fmt.Fprintf(w, "      %s\n", wrapText(l.Explain, 92, "      "))
	}
	fmt.Fprintln(w)
	if len(others) > 0 {
		fmt.Fprintln(w, "Limits with room left")
		fmt.Fprintf(w, "  %-30s %12s %12s %12s\n", "", "bound", "blend", "room")
		for _, l := range others {
			fmt.Fprintf(w, "  %-30s %12s %12s %12s%s\n", clip(l.Label, 30), quantity(l.Bound, l.Unit), quantity(l.Value, l.Unit), quantity(l.Room(), l.Unit), l.Unit)
		}
		fmt.Fprintln(w)
	}
	if len(out) > 0 {
		fmt.Fprintf(w, "Left out by the spec: %s\n\n", strings.Join(out, ", "))
	}
}

// writeStocks prints every stock once: its share in the blend, its price
// and the price range over which the blend keeps its make-up, or for a
// stock not in the blend the price at which it would come in.
func writeStocks(w io.Writer, r *optimise.Result) {
	share := map[string]float64{}
	for _, l := range r.Blend {
		share[l.Stock] = l.Pct
	}
	excluded := map[string]bool{}
	for _, id := range r.LeftOut() {
		excluded[id] = true
	}
	fmt.Fprintln(w, "Stocks and their prices (the blend keeps its make-up while a price stays in its range)")
	fmt.Fprintf(w, "  %-14s %9s %11s   %s\n", "stock", "share %", "price/t", "keeps the blend / would come in")
	for _, g := range r.Ranging {
		if excluded[g.Stock] {
			continue
		}
		if g.InBlend {
			fmt.Fprintf(w, "  %-14s %9.2f %11.2f   %s to %s\n", g.Stock, share[g.Stock], g.Price, priceFrom(g.PriceLow), rangeEnd(g.PriceHigh))
			continue
		}
		switch {
		case math.IsInf(g.PriceLow, -1) || g.PriceLow < 0:
			fmt.Fprintf(w, "  %-14s %9s %11.2f   not at any price: a limit or rule keeps it out\n", g.Stock, "-", g.Price)
		default:
			fmt.Fprintf(w, "  %-14s %9s %11.2f   would come in at %.2f or less (%.2f cheaper)\n", g.Stock, "-", g.Price, g.PriceLow, g.Price-g.PriceLow)
		}
	}
	fmt.Fprintln(w)
}

// quantity prints a limit's value by the rounding rule of its unit: tonnes
// to 3 decimals, shares and % solid to 2, IV, SV and Cox to 2.
func quantity(v float64, unit string) string {
	if unit == " t" {
		return f3(v)
	}
	return f2(v)
}

// priceFrom is a price range's lower end: below zero or unbounded is "no
// lower limit" (any price down to nothing keeps the blend).
func priceFrom(v float64) string {
	if math.IsInf(v, -1) || v < 0 {
		return "no lower limit"
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// writeCautions closes a solve report: the general caution, and the plant
// hazard caution when the spec names an interesterification step
// (README, Cautions).
func writeCautions(w io.Writer, spec *catalogue.Spec) {
	fmt.Fprintln(w, cautionLine)
	if spec.Process != nil {
		fmt.Fprintln(w, processCaution)
	}
}

func rangeEnd(v float64) string {
	switch {
	case math.IsInf(v, 1):
		return "no limit"
	case math.IsInf(v, -1):
		return "no limit"
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// writeDiagnosis explains an impossible spec and the smallest relaxation.
func writeDiagnosis(w io.Writer, r *optimise.Result, spec *catalogue.Spec) {
	if r.Status == optimise.NotProven {
		fmt.Fprintln(w, "No blend found within the limits of branch and bound; the spec is not proven impossible (see the note).")
		return
	}
	fmt.Fprintln(w, "The spec cannot be met with these stocks.")
	if len(r.Relaxation) == 0 {
		return
	}
	fmt.Fprintln(w)
	if len(r.Relaxation) == 1 && r.Relaxation[0].Name == "process.through.min" {
		fmt.Fprintln(w, "Change to the reactor demand that would make it feasible (see the note):")
	} else {
		fmt.Fprintln(w, "Smallest change that would make it feasible (elastic programme; each move is weighed against")
		fmt.Fprintln(w, "the spread of that quantity over the stocks, so IV units and % points compare fairly):")
	}
	if spec.Rules.Active() {
		fmt.Fprintln(w, "(the integer rules under [rules] are kept as written)")
	}
	for _, x := range r.Relaxation {
		line := relaxWords(x)
		if b, ok := boundOf(spec, x.Name); ok {
			to := b + x.By
			if strings.HasSuffix(x.Name, ".min") {
				to = b - x.By
			}
			u := relaxUnit(x.Name)
			line += " (from " + quantity(b, u) + " to " + quantity(to, u) + ")"
		}
		fmt.Fprintf(w, "  %-22s %s\n", x.Name, line)
	}
}

// relaxUnit is the unit of a relaxation's limit, for its rounding rule
// (tonnes for availability, as the limits print them).
func relaxUnit(name string) string {
	if strings.HasPrefix(name, "avail.") {
		return " t"
	}
	return ""
}

// boundOf finds the bound a relaxation name refers to in the spec.
func boundOf(spec *catalogue.Spec, name string) (float64, bool) {
	dot := strings.LastIndexByte(name, '.')
	if dot < 0 {
		return 0, false
	}
	key, side := name[:dot], name[dot+1:]
	pick := func(b catalogue.Bound) (float64, bool) {
		if side == "min" && b.HasMin() {
			return b.Min, true
		}
		if side == "max" && b.HasMax() {
			return b.Max, true
		}
		return 0, false
	}
	if id, ok := strings.CutPrefix(key, "use."); ok {
		for _, u := range spec.Use {
			if u.Stock == id {
				return pick(u.Bound)
			}
		}
		return 0, false
	}
	if key == "process.through" {
		if spec.Process == nil || spec.Process.Through == nil {
			return 0, false
		}
		return pick(*spec.Process.Through)
	}
	if t, ok := strings.CutPrefix(key, "sfc."); ok {
		for _, l := range spec.SFC {
			if catalogue.TempKey(l.Temp) == t {
				return pick(l.Bound)
			}
		}
		return 0, false
	}
	for _, l := range spec.Limits {
		if l.Name == key {
			return pick(l.Bound)
		}
	}
	return 0, false
}

func relaxWords(x optimise.Relax) string {
	by := quantity(x.By, relaxUnit(x.Name))
	switch {
	case strings.HasPrefix(x.Name, "avail."):
		return "have " + by + " t more of " + strings.TrimPrefix(x.Name, "avail.") + " on hand"
	case strings.HasSuffix(x.Name, ".max"):
		return "raise the maximum by " + by
	case strings.HasSuffix(x.Name, ".min"):
		return "lower the minimum by " + by
	}
	return "move by " + by
}

// writeReactor prints the interesterification step of a process spec: what
// goes through the reactor, what it costs and the reacted fat's SFC.
func writeReactor(w io.Writer, r *optimise.Result, temps []float64) {
	p := r.Process
	if len(p.Feed) == 0 {
		if r.Status != optimise.Optimal && r.Status != optimise.NotProven {
			return // the diagnosis says why
		}
		fmt.Fprintf(w, "Reactor (%s interesterification): not used, nothing goes through it; blending the stocks as they are is cheaper.\n\n", p.Method)
		return
	}
	fmt.Fprintf(w, "Reactor (%s interesterification, SFC of the reacted fat %s)\n", p.Method, p.SFCModel)
	if d := demandWords(p); d != "" {
		fmt.Fprintf(w, "  the spec asks for %s\n", d)
	}
	for _, l := range p.Feed {
		fmt.Fprintf(w, "  %-14s %8.2f %% of batch %9.3f t\n", l.Stock, l.Pct, l.Tonnes)
	}
	fmt.Fprintf(w, "  %.3f t processed per batch, processing %s per batch", p.Tonnes, money(p.Cost, r.Currency))
	if p.SFCModel == "predicted" {
		state := "settled"
		if !p.Converged {
			state = "stopped at the cap before it settled; treat the answer as approximate"
		}
		fmt.Fprintf(w, "; %d trial blends, %s", p.Iterations, state)
	}
	fmt.Fprintln(w)
	if len(p.SFC) > 0 {
		writeSFCRow(w, "  SFC of the reacted fat alone", p.SFC, temps)
	}
	fmt.Fprintln(w)
}

// demandWords is what the spec demands of the reactor, e.g. "at least
// 30.00 % of the batch through it, the feed as palm-st-hard 60 % : pko 40 %";
// "" when it demands nothing.
func demandWords(p *optimise.ProcessReport) string {
	var parts []string
	if t := p.Through; t != nil {
		switch {
		case t.HasMin() && t.HasMax():
			parts = append(parts, fmt.Sprintf("%.2f to %.2f %% of the batch through it", t.Min, t.Max))
		case t.HasMin():
			parts = append(parts, fmt.Sprintf("at least %.2f %% of the batch through it", t.Min))
		case t.HasMax():
			parts = append(parts, fmt.Sprintf("at most %.2f %% of the batch through it", t.Max))
		}
	}
	if len(p.FeedRatio) > 0 {
		ids := make([]string, 0, len(p.FeedRatio))
		for id := range p.FeedRatio {
			ids = append(ids, id)
		}
		sort.Slice(ids, func(a, b int) bool {
			return p.FeedRatio[ids[a]] > p.FeedRatio[ids[b]] || p.FeedRatio[ids[a]] == p.FeedRatio[ids[b]] && ids[a] < ids[b]
		})
		feed := make([]string, len(ids))
		for i, id := range ids {
			feed[i] = fmt.Sprintf("%s %.4g %%", id, 100*p.FeedRatio[id])
		}
		parts = append(parts, "the feed as "+strings.Join(feed, " : "))
	}
	return strings.Join(parts, ", ")
}

// processJSON is the reactor step in JSON (additive to the README's JSON output).
func processJSON(p *optimise.ProcessReport) map[string]any {
	sfc := map[string]float64{}
	for t, v := range p.SFC {
		sfc[catalogue.TempKey(t)] = round(v, 3)
	}
	out := map[string]any{"method": p.Method, "sfc_model": p.SFCModel, "feed": blendJSON(p.Feed), "tonnes": round(p.Tonnes, 6),
		"cost": round(p.Cost, 4), "iterations": p.Iterations, "converged": p.Converged, "sfc": sfc, "through": nil, "feed_ratio": nil}
	if t := p.Through; t != nil {
		b := map[string]any{}
		if t.HasMin() {
			b["min"] = round(t.Min, 6)
		}
		if t.HasMax() {
			b["max"] = round(t.Max, 6)
		}
		out["through"] = b
	}
	if len(p.FeedRatio) > 0 {
		fr := map[string]float64{}
		for id, f := range p.FeedRatio {
			fr[id] = round(100*f, 6)
		}
		out["feed_ratio"] = fr
	}
	return out
}

// wrapText folds s at spaces to lines of at most width runes, indenting
// the continuation lines.
func wrapText(s string, width int, indent string) string {
	var b strings.Builder
	line := 0
	for i, word := range strings.Fields(s) {
		n := len([]rune(word))
		if i > 0 && line+1+n > width {
			b.WriteString("\n" + indent)
			line = len(indent)
		} else if i > 0 {
			b.WriteByte(' ')
			line++
		}
		b.WriteString(word)
		line += n
	}
	return b.String()
}
