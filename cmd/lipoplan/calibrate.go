package main

import (
	"fmt"
	"math"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
)

func (a *app) calibrate(args []string) error {
	fs := a.newFlags("calibrate", "[--stocks F] [--solids pure|isomorph] [--polymorph beta|beta'|alpha] [--write FILE] [--format text|json]",
		"Fit the TAG model's melting-point shift per TAG class (S3, SUS, SSU, SU2, U3) to the measured SFC\n"+
			"curves of the catalogue's stocks (least squares, Nelder-Mead), report the error before and after and\n"+
			"a leave-one-stock-out check (each stock predicted with shifts fitted on the others), and with --write\n"+
			"save the calibration for --calibration FILE in mix, check, solve, explore and serve.")
	in := a.inputFlags(fs, noSpec, "", "text", "json")
	solids := fs.String("solids", "pure", "solid-phase model: pure (pure-TAG solids) or isomorph (ideal solid solutions of one pattern and carbon number)")
	poly := fs.String("polymorph", "beta", "pure-TAG melting properties: beta, beta' or alpha")
	write := fs.String("write", "", "write the calibration to this TOML file")
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if err := in.check(); err != nil {
		return err
	}
	rep, err := a.reportTo(output{"--write", *write})
	if err != nil {
		return err
	}
	sm, err := sle.ParseSolidModel(*solids)
	if err != nil {
		return catalogue.Badf("--solids: %w", err)
	}
	p, err := sle.ParsePolymorph(*poly)
	if err != nil {
		return catalogue.Badf("--polymorph: %w", err)
	}
	cat, _, err := in.load(a)
	if err != nil {
		return err
	}
	var sts []*catalogue.Stock
	for i := range cat.Stocks {
		sts = append(sts, &cat.Stocks[i])
	}
	cal, err := sle.Calibrate(sts, sle.Options{Polymorph: p, Solids: sm}, true)
	if err != nil {
		return err
	}
	before, err := sle.FitCatalogue(cat, sle.Options{Polymorph: p, Solids: sm})
	if err != nil {
		return err
	}
	after, err := sle.FitCatalogue(cat, cal.Options)
	if err != nil {
		return err
	}
	catName := cat.File
	if catName == "" {
		catName = "embedded demo stocks"
	}
	file := cal.FileOf(catName)
	if *write != "" {
		if err := a.write(output{"--write", *write}, catalogue.FormatCalibration(file), in.files()...); err != nil {
			return err
		}
	}
	if in.json() {
		shift := map[string]float64{}
		for k, v := range file.Shift {
			shift[k] = round(v, 3)
		}
		out := map[string]any{
			"solids": file.Model, "polymorph": file.Polymorph, "shift": shift,
			"stocks": cal.FittedOn, "points": cal.Points,
			"rms_before": round(cal.Before, 3), "rms_after": round(cal.After, 3),
			"before": fitJSON(before, sle.Options{Polymorph: p, Solids: sm}), "after": fitJSON(after, cal.Options),
			"caution": cautionJSON,
		}
		if !math.IsNaN(cal.HeldOut) {
			out["held_out_rms"], out["held_out_rms_before"] = round(cal.HeldOut, 3), round(cal.HeldOutBefore, 3)
		}
		if *write != "" {
			out["written"] = *write
		}
		return writeJSON(rep, out)
	}
	fmt.Fprintf(rep, "Calibration of the TAG model on %s: %d stocks with measured curves, %d points\n\n", catName, len(cal.FittedOn), cal.Points)
	fmt.Fprint(rep, "  melting-point shift per TAG class:")
	for i, v := range cal.Options.Shift {
		fmt.Fprintf(rep, "  %s %+.2f K", sle.ClassName(i), v)
	}
	fmt.Fprintf(rep, "\n  RMS error on these stocks: %.2f %% solid before, %.2f after\n", cal.Before, cal.After)
	if !math.IsNaN(cal.HeldOut) {
		fmt.Fprintf(rep, "  held-out check (each stock predicted with shifts fitted on the others): %.2f %% solid, against %.2f uncalibrated\n", cal.HeldOut, cal.HeldOutBefore)
		if cal.HeldOut >= cal.HeldOutBefore {
			fmt.Fprintln(rep, "  The calibration does not improve predictions for stocks it has not seen: prefer the uncalibrated model.")
		}
	} else {
		fmt.Fprintln(rep, "  held-out check: needs at least 3 stocks with measured curves")
	}
	fmt.Fprintln(rep)
	writeFitText(rep, after, cal.Options)
	if *write != "" {
		fmt.Fprintf(rep, "\nWritten to %s; pass it with --calibration %s.\n", *write, *write)
	}
	fmt.Fprintln(rep)
	fmt.Fprintln(rep, cautionLine)
	return nil
}
