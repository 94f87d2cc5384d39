package main

import (
	"flag"
	"fmt"
	"io"
	"strings"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/optimise"
	"lipoplan/randomise"
)

func (a *app) routes(args []string) error {
	fs := a.newFlags("routes", `[--stocks F --spec F | --scenario F] [--feed id,id --process-cost 45] [--format text|json] [--temps "10,20,35"]`,
		"Solve the spec three ways over the same stocks and set them side by side: blended as they are\n"+
			"(physical), with the feed stocks chemically interesterified (random) and enzymatically\n"+
			"interesterified (sn-1,3 lipase): the cheapest blend of each, its cost, the share through the\n"+
			"reactor, IV, SAFA, the SFC and the TAG classes. The feed stocks and the processing cost are the\n"+
			"spec's [process] table, or --feed and --process-cost for a spec without one. The SFC of every\n"+
			"route is the TAG model's for the whole blend. Exit 3 when no route meets the spec.")
	in := a.inputFlags(fs, demoSpec, "product spec TOML (default: the embedded demo laminating spec)", "text", "json").takeScenario(fs)
	feed := fs.String("feed", "", "stocks that may pass through the reactor, comma-separated ids (for a spec without [process])")
	cost := fs.Float64("process-cost", 45, "processing cost per tonne processed, currency of the catalogue (for a spec without [process])")
	temps := fs.String("temps", "", `SFC temperatures to report, deg C (default 10,15,...,45 plus the spec's)`)
	calPath := fs.String("calibration", "", calibrationFlagHelp)
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if err := in.check(); err != nil {
		return err
	}
	costSet := false
	fs.Visit(func(f *flag.Flag) { costSet = costSet || f.Name == "process-cost" })
	model, err := a.sfcModel(*calPath)
	if err != nil {
		return err
	}
	cat, spec, ts, err := in.loadWithTemps(a, *temps)
	if err != nil {
		return err
	}
	switch {
	case spec.Process != nil && (*feed != "" || costSet):
		return catalogue.Badf("%s has a [process] table, which names the feed and the cost; leave out --feed and --process-cost (or edit the table)", specName(spec))
	case spec.Process == nil && *feed == "":
		return catalogue.Badf("%s has no [process] table: give the stocks that may be interesterified with --feed, e.g. --feed palm-st-hard,pko (and --process-cost, default 45 per tonne processed)", specName(spec))
	case spec.Process == nil:
		if err := catalogue.QtyPrice.Check("--process-cost", *cost); err != nil {
			return err
		}
		spec = spec.Clone()
		spec.Process = &catalogue.Process{Interesterify: splitIDs(*feed), Method: "chemical", Cost: *cost, SFC: "predicted"}
		if ps := spec.Check(cat); len(ps.Errors()) > 0 {
			return fmt.Errorf("--feed: %w", ps)
		}
	}
	routes, err := optimise.CompareRoutes(cat, spec, optimise.Options{Temps: ts, Model: model})
	if err != nil {
		return err
	}
	cols, err := routeColumns(routes, cat)
	if err != nil {
		return err
	}
	if in.json() {
		err = writeJSON(a.stdout, routesJSON(cols, spec, model))
	} else {
		writeRoutesText(a.stdout, cols, spec, ts)
	}
	if err != nil {
		return err
	}
	for _, c := range cols {
		if len(c.res.Blend) > 0 {
			return nil
		}
	}
	return errInfeasible
}

// specName names a spec for messages: its file, else its name.
func specName(spec *catalogue.Spec) string {
	if spec.File != "" {
		return "spec " + spec.File
	}
	return "spec " + fmt.Sprintf("%q", spec.Name)
}

// routeColumn is one solved route with the TAG classes of its blend.
type routeColumn struct {
	name    string
	res     *optimise.Result
	classes randomise.Shares
	through float64 // % of batch through the reactor
}

func routeColumns(routes []optimise.Route, cat *catalogue.Catalogue) ([]routeColumn, error) {
	out := make([]routeColumn, len(routes))
	for i, r := range routes {
		c := routeColumn{name: r.Name, res: r.Result}
		if len(r.Result.Blend) > 0 {
			cl, _, _, err := blendClasses(r.Result, cat)
			if err != nil {
				return nil, fmt.Errorf("the %s route: TAG classes: %w", r.Name, err)
			}
			c.classes = cl
			c.through = r.Result.Process.FedPct()
		}
		out[i] = c
	}
	return out, nil
}

// routeTitle is a route's column heading.
func routeTitle(name string) string {
	if name == "physical" {
		return "physical blend"
	}
	return name + " IE"
}

// Widths of the routes table: the label column and each route's column.
const routeLabelWidth, routeColWidth = 26, 17

// writeRoutesText prints the routes side by side: cost and its change
// against the physical blend, the share through the reactor, the blend,
// IV, SAFA, trans, the SFC at every report temperature with the spec's
// band, and the TAG classes; then the routes that cannot meet the spec
// with their notes, and the cautions.
func writeRoutesText(w io.Writer, cols []routeColumn, spec *catalogue.Spec, temps []float64) {
	p := spec.Process
	fmt.Fprintf(w, "Spec: %s (%g t batch): three routes over the same stocks\n", spec.Name, spec.Batch)
	fmt.Fprintf(w, "Reactor feed: %s; processing %s per tonne processed", strings.Join(p.Interesterify, ", "), money(p.Cost, cols[0].res.Currency))
	if d := demandWords(&optimise.ProcessReport{Through: p.Through, FeedRatio: p.FeedShares()}); d != "" {
		fmt.Fprintf(w, "; the spec asks for %s (not in the physical blend)", d)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "SFC of every route: the TAG model's for the whole blend (the stocks as they are and the reacted fat).")
	fmt.Fprintln(w)
	anyFound := false
	for _, c := range cols {
		anyFound = anyFound || len(c.res.Blend) > 0
	}
	if anyFound {
		writeRouteTable(w, cols, spec, temps)
	}
	for _, c := range cols {
		if len(c.res.Blend) > 0 {
			continue
		}
		fmt.Fprintf(w, "The %s cannot meet the spec.\n", routeTitle(c.name))
		for _, n := range c.res.Notes {
			fmt.Fprintln(w, wrapText("  Note: "+n, 100, "        "))
		}
		for _, x := range c.res.Relaxation {
			fmt.Fprintf(w, "  %-22s %s\n", x.Name, relaxWords(x))
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w, wrapText("Each route is the cheapest blend it allows; 'lipoplan solve' on the spec with that [process] method gives its full report (what holds it, price ranges).", 100, ""))
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionLine)
	fmt.Fprintln(w, processCaution)
}

// writeRouteTable is the side-by-side table of writeRoutesText.
func writeRouteTable(w io.Writer, cols []routeColumn, spec *catalogue.Spec, temps []float64) {
	res := make([]*optimise.Result, len(cols))
	for i, c := range cols {
		res[i] = c.res
	}
	tb := sideTable{w: w, lw: routeLabelWidth, cw: routeColWidth, res: res}
	tb.row("", func(i int) string { return routeTitle(cols[i].name) })
	cur := cols[0].res.Currency
	tb.row("cost per tonne, "+cur, func(i int) string {
		if len(res[i].Blend) == 0 {
			return "cannot be met"
		}
		return fmt.Sprintf("%.2f", res[i].CostPerTonne)
	})
	base := cols[0]
	tb.row("  change against physical", func(i int) string {
		c := cols[i]
		if c.name == "physical" || len(c.res.Blend) == 0 || len(base.res.Blend) == 0 {
			return ""
		}
		return costChange(c.res.CostPerTonne - base.res.CostPerTonne)
	})
	tb.row("through the reactor, %", tb.found(func(i int) string {
		if cols[i].name == "physical" {
			return "-"
		}
		return fmt.Sprintf("%.2f", cols[i].through)
	}))
	tb.blendRows()
	fmt.Fprintln(w, "  SFC, % solid (spec band)")
	for _, t := range temps {
		label := "    " + catalogue.TempKey(t) + " C"
		for _, l := range spec.SFC {
			if l.Temp == t {
				label += " (" + bandShort(l.Bound) + ")"
			}
		}
		tb.row(label, tb.found(func(i int) string {
			if v, ok := res[i].Properties.SFC[t]; ok {
				return fmt.Sprintf("%.1f", v)
			}
			return "n/a"
		}))
	}
	fmt.Fprintln(w, "  TAG classes, mol %")
	for _, k := range []struct {
		label string
		v     func(s randomise.Shares) float64
	}{
		{"S3", func(s randomise.Shares) float64 { return s.S3 }},
		{"S2U", func(s randomise.Shares) float64 { return s.S2U }},
		{"  SUS (symmetric)", func(s randomise.Shares) float64 { return s.SUS }},
		{"SU2", func(s randomise.Shares) float64 { return s.SU2 }},
		{"U3", func(s randomise.Shares) float64 { return s.U3 }},
	} {
		tb.row("    "+k.label, tb.found(func(i int) string { return fmt.Sprintf("%.1f", k.v(cols[i].classes)) }))
	}
	fmt.Fprintln(w)
}

// bandShort is an SFC band in a few characters: "12-22", "<= 2", ">= 30".
func bandShort(b catalogue.Bound) string {
	switch {
	case b.HasMin() && b.HasMax():
		return fmt.Sprintf("%g-%g", b.Min, b.Max)
	case b.HasMin():
		return fmt.Sprintf(">= %g", b.Min)
	case b.HasMax():
		return fmt.Sprintf("<= %g", b.Max)
	}
	return ""
}

// routesJSON is the JSON shape of routes (README, JSON output).
func routesJSON(cols []routeColumn, spec *catalogue.Spec, model sle.Options) map[string]any {
	list := make([]map[string]any, 0, len(cols))
	base := cols[0].res
	for _, c := range cols {
		r := c.res
		m := map[string]any{"route": c.name, "status": string(r.Status), "engine": r.Engine, "blend": blendJSON(r.Blend),
			"cost_per_tonne": nil, "cost_change": nil, "through_pct": nil, "properties": nil, "tag_classes": nil, "process": processJSON(r.Process)}
		if len(r.Blend) > 0 {
			m["cost_per_tonne"] = round(r.CostPerTonne, 4)
			if c.name != "physical" {
				m["through_pct"] = round(c.through, 6)
				if len(base.Blend) > 0 {
					m["cost_change"] = round(r.CostPerTonne-base.CostPerTonne, 4)
				}
			}
			m["properties"] = propertiesJSON(r.Properties)
			m["tag_classes"] = map[string]float64{"S3": round(c.classes.S3, 4), "S2U": round(c.classes.S2U, 4), "SUS": round(c.classes.SUS, 4),
				"SSU": round(c.classes.SSU, 4), "SU2": round(c.classes.SU2, 4), "U3": round(c.classes.U3, 4)}
		}
		if len(r.Relaxation) > 0 {
			m["relaxation"] = relaxJSON(r.Relaxation)
		}
		if len(r.Notes) > 0 {
			m["notes"] = r.Notes
		}
		list = append(list, m)
	}
	return map[string]any{"spec": spec.Name, "currency": base.Currency, "batch": spec.Batch, "feed": spec.Process.Interesterify,
		"process_cost": spec.Process.Cost, "routes": list, "sfc_model": sfcModelJSON(model),
		"caution": cautionJSON + " " + strings.ReplaceAll(processCaution, "\n", " ")}
}
