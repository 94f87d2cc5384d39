package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/optimise"
	"lipoplan/randomise"
)

func (a *app) replace(args []string) error {
	fs := a.newFlags("replace", `--incumbent ID [--stocks F] [--tolerance 3 | --tolerance "10=2,35=4"] [--temps "10,20,35"] [--process none|chemical|enzymatic --feed id,id] [--trans-max 1] [--format text|json] [--svg FILE]`,
		"Replace a fat (typically a partially hardened one) with the cheapest blend of the other stocks whose\n"+
			"SFC stays within a tolerance of the incumbent's measured curve, with trans at or under a limit. With\n"+
			"--process the --feed stocks may pass through a reactor first and the SFC is the TAG model's for the\n"+
			"whole blend. Reports the saving per tonne, the curves side by side, the largest deviation, the IV,\n"+
			"SAFA and trans change and the TAG classes before and after; when no blend matches, the smallest\n"+
			"tolerance that can be met and the blend at it (exit 3).")
	in := a.inputFlags(fs, optionalSpec, "optional spec TOML whose other limits and [use] bounds the new blend must meet too (its SFC limits are replaced by the match)", "text", "json")
	incumbent := fs.String("incumbent", "", "id of the stock to replace (it needs a measured SFC curve)")
	tol := fs.String("tolerance", "3", `% solid either side of the incumbent's curve: one number, or per temperature "10=2,35=4" (others 3)`)
	temps := fs.String("temps", "", `temperatures to match, deg C (default: every point of the incumbent's curve)`)
	process := fs.String("process", "none", "none, chemical (random) or enzymatic (sn-1,3) interesterification of the --feed stocks")
	feed := fs.String("feed", "", "stocks that may pass through the reactor, comma-separated ids")
	cost := fs.Float64("process-cost", 45, "processing cost per tonne processed (currency of the catalogue)")
	transMax := fs.Float64("trans-max", 1, "trans fat at most, % of fat")
	batch := fs.Float64("batch", 20, "batch size in tonnes (for tonnes in the report)")
	svg := fs.String("svg", "", "also draw the new blend's SFC against the incumbent's band into this SVG `file` (- = standard output)")
	calPath := fs.String("calibration", "", calibrationFlagHelp)
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if err := in.check(); err != nil {
		return err
	}
	svgOut := output{"--svg", *svg}
	w, err := a.reportTo(svgOut)
	if err != nil {
		return err
	}
	model, err := a.sfcModel(*calPath)
	if err != nil {
		return err
	}
	if strings.TrimSpace(*incumbent) == "" {
		return catalogue.Badf("--incumbent is required: give the id of the fat to replace")
	}
	cat, base, err := in.load(a)
	if err != nil {
		return err
	}
	r := optimise.Replacement{Incumbent: strings.TrimSpace(*incumbent), TransMax: *transMax, Batch: *batch, Base: base}
	if r.Tolerance, r.PerTemp, err = parseTolerance(*tol); err != nil {
		return err
	}
	if r.Temps, err = parseTemps(*temps); err != nil {
		return err
	}
	if err := catalogue.QtyTonnes.Check("--batch", *batch); err != nil {
		return err
	}
	if math.IsNaN(*transMax) || *transMax < 0 || *transMax > 100 {
		return catalogue.Badf("--trans-max %v is outside 0..100 %% of fat", *transMax)
	}
	switch *process {
	case "none", "":
		if *feed != "" {
			return catalogue.Badf("--feed names reactor stocks but --process is none; add --process chemical or enzymatic")
		}
	case "chemical", "enzymatic":
		ids := splitIDs(*feed)
		if len(ids) == 0 {
			return catalogue.Badf("--process %s needs --feed: the stocks that may pass through the reactor, e.g. --feed palm-st-hard,rapeseed", *process)
		}
		if err := catalogue.QtyPrice.Check("--process-cost", *cost); err != nil {
			return err
		}
		r.Process = &catalogue.Process{Interesterify: ids, Method: *process, Cost: *cost, SFC: "predicted"}
	default:
		return catalogue.Badf("--process %q is not known; use none, chemical or enzymatic", *process)
	}
	res, err := optimise.Replace(cat, r, optimise.Options{Model: model})
	if err != nil {
		return err
	}
	if *svg != "" && res.Result != nil && res.Result.Status == optimise.Optimal {
		if err := a.write(svgOut, sfcSVG(res.Result, res.Spec), in.files()...); err != nil {
			return err
		}
	}
	if in.json() {
		if err := writeJSON(w, replaceJSON(res, model)); err != nil {
			return err
		}
	} else {
		writeReplace(w, res, model)
	}
	if res.Status != optimise.Optimal {
		return errInfeasible
	}
	return nil
}

// parseTolerance reads "3" or "10=2,35=4" (others the default 3).
func parseTolerance(s string) (float64, map[float64]float64, error) {
	s = strings.TrimSpace(s)
	if !strings.Contains(s, "=") {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || math.IsNaN(v) || v < 0 || v > 100 {
			return 0, nil, catalogue.Badf("--tolerance %q is not a number of %% solid within 0..100; write e.g. --tolerance 3", s)
		}
		return v, nil, nil
	}
	per := map[float64]float64{}
	for _, item := range strings.Split(s, ",") {
		k, v, ok := strings.Cut(strings.TrimSpace(item), "=")
		t, err1 := strconv.ParseFloat(strings.TrimSpace(k), 64)
		x, err2 := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if !ok || err1 != nil || err2 != nil || math.IsNaN(t) || t < -40 || t > 100 || math.IsNaN(x) || x < 0 || x > 100 {
			return 0, nil, catalogue.Badf("--tolerance: %q is not temp=%% solid; write e.g. --tolerance \"10=2,35=4\"", item)
		}
		per[t] = x
	}
	return 3, per, nil
}

func splitIDs(s string) []string {
	var out []string
	for _, id := range strings.Split(s, ",") {
		if id = strings.TrimSpace(id); id != "" {
			out = append(out, id)
		}
	}
	return out
}

// writeReplace prints the replacement report.
func writeReplace(w io.Writer, res *optimise.ReplaceResult, model sle.Options) {
	inc := res.Incumbent
	r := res.Result
	fmt.Fprintln(w, wrapText(fmt.Sprintf("Replacement for %s (%s), %s per tonne", inc.ID, inc.Name, money(inc.Price, r.Currency)), 100, "  "))
	var match string
	if res.Status == optimise.Optimal {
		match = fmt.Sprintf("Match: SFC within ±%.1f %% solid of its measured curve", res.Tolerance)
	} else {
		match = fmt.Sprintf("No blend stays within ±%.1f %% solid; the smallest tolerance that can be met is about ±%.1f, and this is the cheapest blend at it", res.Requested, res.Tolerance)
	}
	if r.Process != nil {
		match += fmt.Sprintf("; SFC predicted by the TAG model for the whole blend, with a %s reactor over %s", r.Process.Method, strings.Join(res.Spec.Process.Interesterify, ", "))
	} else {
		match += "; SFC linear in the stocks' measured curves"
	}
	fmt.Fprintln(w, wrapText(match+".", 100, "  "))
	for _, n := range res.Notes {
		fmt.Fprintf(w, "Note: %s\n", wrapText(n, 96, "      "))
	}
	fmt.Fprintln(w)
	writeBlendLines(w, r)
	if res.Saving >= 0 {
		fmt.Fprintf(w, "  Cost: %s per tonne: %s per tonne less than %s\n\n", money(r.CostPerTonne, r.Currency), money(res.Saving, r.Currency), inc.ID)
	} else {
		fmt.Fprintf(w, "  Cost: %s per tonne: %s per tonne more than %s\n\n", money(r.CostPerTonne, r.Currency), money(-res.Saving, r.Currency), inc.ID)
	}
	if r.Process != nil && len(r.Process.Feed) > 0 {
		var items []string
		for _, l := range r.Process.Feed {
			items = append(items, fmt.Sprintf("%s %.1f %%", l.Stock, l.Pct))
		}
		fmt.Fprintf(w, "  Through the reactor: %s of the batch (%.2f t per %.0f t batch).\n\n", strings.Join(items, ", "), r.Process.Tonnes, r.Batch)
	} else if r.Process != nil {
		fmt.Fprintln(w, "  The reactor is not worth using for this match: nothing goes through it.")
		fmt.Fprintln(w)
	}

	fmt.Fprintln(w, "SFC, % solid        incumbent   new blend   new blend    off by   tolerance")
	fmt.Fprintln(w, "                    (measured)  (measured   (TAG model)")
	fmt.Fprintln(w, "                                 curves)")
	for _, p := range res.Points {
		fmt.Fprintf(w, "  %5s C %16.1f %11s %12.1f %+9.1f %10s\n", catalogue.TempKey(p.Temp), p.Incumbent, strconv2(p.Linear, 1), p.Predicted, p.By,
			fmt.Sprintf("±%.1f", p.Bound+res.Tolerance-res.Requested))
	}
	md := res.MaxDeviation
	fmt.Fprintf(w, "  Largest deviation: %+.1f %% solid at %s C.\n", md.By, catalogue.TempKey(md.Temp))
	incCurve, newCurve := map[float64]float64{}, map[float64]float64{}
	for _, p := range res.Points {
		incCurve[p.Temp] = p.Incumbent
		if r.Process != nil {
			newCurve[p.Temp] = p.Predicted
		} else {
			newCurve[p.Temp] = p.Linear
		}
	}
	mi, mn := blend.CurveMeltingPoints(incCurve), blend.CurveMeltingPoints(newCurve)
	fmt.Fprintf(w, "  Slip melting point (where the SFC falls to %.0f %% solid; an estimate read off the curve, common practice):\n", blend.SlipThreshold)
	fmt.Fprintf(w, "    incumbent %s, new blend %s\n", slipWords(mi), slipWords(mn))
	fmt.Fprintln(w)

	b, n := res.Incumbents, r.Properties
	fmt.Fprintln(w, "Change            incumbent  new blend")
	fmt.Fprintf(w, "  IV (calc.)     %9.1f  %9.1f\n", b.IV, n.IV)
	fmt.Fprintf(w, "  SAFA, %%        %9.1f  %9.1f\n", b.SAFA, n.SAFA)
	fmt.Fprintf(w, "  trans, %%       %9.1f  %9.1f\n", b.Trans, n.Trans)
	fmt.Fprintln(w)
	fmt.Fprintln(w, "TAG classes, mol %   S3     SUS    SSU    SU2    U3")
	writeClassRow(w, "incumbent", res.Before, res.BeforeErr)
	writeClassRow(w, "new blend", res.After, res.AfterErr)
	fmt.Fprintln(w)
	for _, note := range r.Notes {
		fmt.Fprintf(w, "Note: %s\n", wrapText(note, 96, "      "))
	}
	if r.Process == nil {
		fmt.Fprintf(w, "Note: %s\n", wrapText(modelErrorNote(model)+" (the TAG model column only; the match is judged on the measured curves)", 96, "      "))
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionLine)
	if r.Process != nil {
		fmt.Fprintln(w, processCaution)
	}
}

func slipWords(mp blend.MeltingPoints) string {
	if !mp.SlipFound {
		return "not within the curve's range"
	}
	return fmt.Sprintf("about %.1f C", mp.Slip)
}

func writeClassRow(w io.Writer, label string, c randomise.Classes, err error) {
	if err != nil {
		fmt.Fprintf(w, "  %-16s (not formed: %v)\n", label, err)
		return
	}
	m := c.Mol
	fmt.Fprintf(w, "  %-16s %6.1f %6.1f %6.1f %6.1f %6.1f\n", label, m.S3, m.SUS, m.SSU, m.SU2, m.U3)
}

// replaceJSON is the replacement's JSON shape.
func replaceJSON(res *optimise.ReplaceResult, model sle.Options) map[string]any {
	r := res.Result
	out := map[string]any{
		"status":              string(res.Status),
		"incumbent":           map[string]any{"id": res.Incumbent.ID, "price": res.Incumbent.Price},
		"tolerance":           round(res.Tolerance, 3),
		"requested_tolerance": round(res.Requested, 3),
		"caution":             cautionJSON,
		"engine":              r.Engine,
	}
	out["cost_per_tonne"] = round(r.CostPerTonne, 4)
	out["saving_per_tonne"] = round(res.Saving, 4)
	out["blend"] = blendJSON(r.Blend)
	curve := map[string]any{}
	for _, p := range res.Points {
		c := map[string]any{"incumbent": round(p.Incumbent, 3), "predicted": round(p.Predicted, 3), "blend": nil}
		if !math.IsNaN(p.Linear) {
			c["blend"] = round(p.Linear, 3)
		}
		curve[catalogue.TempKey(p.Temp)] = c
	}
	out["curve"] = curve
	out["max_deviation"] = map[string]any{"temp": res.MaxDeviation.Temp, "by": round(res.MaxDeviation.By, 3)}
	out["properties"] = propertiesJSON(r.Properties)
	out["incumbent_properties"] = map[string]any{"iv": round(res.Incumbents.IV, 3), "safa": round(res.Incumbents.SAFA, 4), "trans": round(res.Incumbents.Trans, 4)}
	if res.BeforeErr == nil {
		out["classes_before"] = classesJSON(res.Before)
	}
	if res.AfterErr == nil {
		out["classes_after"] = classesJSON(res.After)
	}
	if r.Process != nil {
		out["process"] = processJSON(r.Process)
		out["sfc_model"] = sfcModelJSON(model)
	}
	inc := map[float64]float64{}
	pred := map[float64]float64{}
	for _, p := range res.Points {
		inc[p.Temp], pred[p.Temp] = p.Incumbent, p.Predicted
	}
	if mp := blend.CurveMeltingPoints(inc); mp.SlipFound {
		out["incumbent_slip_point"] = round(mp.Slip, 1)
	}
	if mp := blend.CurveMeltingPoints(pred); mp.SlipFound {
		out["slip_point_predicted"] = round(mp.Slip, 1)
	}
	notes := append(append([]string(nil), res.Notes...), r.Notes...)
	if len(notes) > 0 {
		out["notes"] = notes
	}
	return out
}

func classesJSON(c randomise.Classes) map[string]any {
	m := c.Mol
	return map[string]any{"S3": round(m.S3, 3), "SUS": round(m.SUS, 3), "SSU": round(m.SSU, 3), "SU2": round(m.SU2, 3), "U3": round(m.U3, 3)}
}
