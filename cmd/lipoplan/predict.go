package main

import (
	"fmt"
	"io"
	"strings"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// predicted is the TAG model's SFC of a mix after its process, with the
// model's error against the measured curve of each stock in the mix.
type predicted struct {
	process randomise.Method
	opt     sle.Options
	sfc     map[float64]float64
	fits    []sle.Fit
	notes   []string
}

// predictMix runs the solid-liquid equilibrium model (blend/sle) on the mix
// after process (full reaction for chemical and enzymatic) and fits the
// model against the measured curve of every stock in the mix that has one.
func predictMix(parts []blend.Part, process randomise.Method, temps []float64, opt sle.Options) (*predicted, error) {
	sfc, notes, err := sle.PredictParts(parts, process, 1, temps, opt)
	if err != nil {
		return nil, err
	}
	p := &predicted{process: process, opt: opt, sfc: sfc, notes: notes}
	for _, pt := range parts {
		if pt.Pct <= 0 || len(pt.Stock.SFC) == 0 {
			continue
		}
		f, err := sle.FitStock(pt.Stock, opt)
		if err != nil {
			return nil, err
		}
		p.fits = append(p.fits, f)
	}
	return p, nil
}

// model names the method in one line, for text and JSON.
func (p *predicted) model() string {
	return sle.Describe(p.opt) + ", TAGs " + processWords(p.process)
}

func processWords(m randomise.Method) string {
	switch m {
	case randomise.Chemical:
		return "after chemical (random) interesterification"
	case randomise.Enzymatic:
		return "after enzymatic (sn-1,3) interesterification"
	}
	return "native (no reaction)"
}

// addJSON adds sfc_predicted and the model's description and fit to a mix
// JSON object (README, JSON output).
func (p *predicted) addJSON(out map[string]any) {
	sfc := map[string]float64{}
	for t, v := range p.sfc {
		sfc[catalogue.TempKey(t)] = round(v, 3)
	}
	out["sfc_predicted"] = sfc
	out["process"] = string(p.process)
	fits := make([]map[string]any, 0, len(p.fits))
	for _, f := range p.fits {
		fits = append(fits, map[string]any{
			"stock": f.Stock, "rms": round(f.RMS, 2), "mae": round(f.MAE, 2), "max": round(f.Max, 2),
			"bias": round(f.Bias, 2), "points": len(f.Points),
		})
	}
	out["sfc_model"] = map[string]any{"method": p.model(), "error_vs_measured": fits, "measured_error": sle.MeasuredError}
	mp := blend.CurveMeltingPoints(p.sfc)
	if mp.SlipFound {
		out["slip_point_predicted"] = round(mp.Slip, 1)
	}
	if len(p.notes) > 0 {
		prev, _ := out["notes"].([]string)
		out["notes"] = append(prev, p.notes...)
	}
}

// writeText prints the predicted SFC row under the measured one, then the
// model's error against the stocks' measured curves.
func (p *predicted) writeText(w io.Writer, temps []float64) {
	fmt.Fprintln(w)
	writeSFCRow(w, fmt.Sprintf("  SFC (%% solid, predicted by the TAG model, %s)", processWords(p.process)), p.sfc, temps)
	fmt.Fprintf(w, "    Model: %s.\n", wrapText(p.model(), 96, "    "))
	if len(p.fits) == 0 {
		fmt.Fprintln(w, "    Model error: no stock in this mix has a measured SFC curve to compare with.")
	} else {
		items := make([]string, len(p.fits))
		for i, f := range p.fits {
			items[i] = fmt.Sprintf("%s %.1f (worst %.1f)", f.Stock, f.RMS, f.Max)
		}
		fmt.Fprintf(w, "    Model error against each stock's own measured curve, RMS %% solid: %s.\n", wrapText(strings.Join(items, ", "), 96, "    "))
	}
	fmt.Fprintf(w, "    %s.\n", wrapText("In general "+sle.MeasuredError, 96, "    "))
	writeMeltingPoints(w, p.sfc, "    Predicted curve: ")
	for _, n := range p.notes {
		fmt.Fprintf(w, "    Note: %s\n", n)
	}
}
