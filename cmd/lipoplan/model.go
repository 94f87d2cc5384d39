package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
)

// sfcModel returns the TAG model's options: the defaults, or those of the
// calibration file at path.
func (a *app) sfcModel(path string) (sle.Options, error) {
	if path == "" {
		return sle.DefaultOptions(), nil
	}
	cal, ps := catalogue.LoadCalibration(path)
	a.warn(ps)
	if len(ps.Errors()) > 0 {
		return sle.Options{}, ps.Errors()
	}
	opt, err := sle.OptionsFrom(cal)
	if err != nil {
		return sle.Options{}, catalogue.Badf("%s: %w", path, err)
	}
	return opt, nil
}

// calibrationFlagHelp is the --calibration flag's help line.
const calibrationFlagHelp = "SFC-model calibration file written by 'lipoplan calibrate' (default: the uncalibrated model)"

// modelErrorNote is the line every report with predicted SFC carries: the
// model's error as measured on typical curves, and the options used.
func modelErrorNote(opt sle.Options) string {
	note := "Model: " + sle.Describe(opt) + ". "
	if opt.Shift == (sle.Shifts{}) {
		return note + "Measured error: " + sle.MeasuredError + "."
	}
	return note + "Uncalibrated, " + sle.MeasuredError + "; the calibration file gives its own figures."
}

// writeFitText prints the model's predicted SFC against each stock's
// measured curve, two rows a stock, and the RMS error.
func writeFitText(w io.Writer, fits []sle.Fit, opt sle.Options) {
	fmt.Fprintln(w, "SFC model against the measured curves (native TAGs of each stock, % solid):")
	fmt.Fprintf(w, "  %s.\n", wrapText(sle.Describe(opt), 100, "  "))
	if len(fits) == 0 {
		fmt.Fprintln(w, "  no stock has both a composition and a measured SFC curve to compare with.")
		return
	}
	width := 14
	for _, f := range fits {
		width = max(width, len(f.Stock))
	}
	for _, f := range fits {
		var temps, meas, pred strings.Builder
		for _, p := range f.Points {
			fmt.Fprintf(&temps, " %5s", catalogue.TempKey(p.Temp))
			fmt.Fprintf(&meas, " %5.1f", p.Measured)
			fmt.Fprintf(&pred, " %5.1f", p.Predicted)
		}
		fmt.Fprintf(w, "  %-*s deg C    %s\n", width, f.Stock, temps.String())
		fmt.Fprintf(w, "  %-*s measured %s\n", width, "", meas.String())
		fmt.Fprintf(w, "  %-*s model    %s   RMS %.1f, worst %+.1f at %s C\n", width, "", pred.String(), f.RMS, worstSigned(f), catalogue.TempKey(f.MaxAt))
	}
	fmt.Fprintf(w, "  all %d stocks: RMS %.1f %% solid over every point\n", len(fits), sle.PooledRMS(fits))
}

// worstSigned is the signed deviation at the fit's worst point.
func worstSigned(f sle.Fit) float64 {
	for _, p := range f.Points {
		if p.Temp == f.MaxAt && math.Abs(math.Abs(p.Predicted-p.Measured)-f.Max) < 1e-9 {
			return p.Predicted - p.Measured
		}
	}
	return f.Max
}

// sfcModelJSON names the TAG model behind predicted SFC and its error as
// measured on typical curves, for a report's JSON.
func sfcModelJSON(opt sle.Options) map[string]any {
	return map[string]any{"method": sle.Describe(opt), "measured_error": sle.MeasuredError}
}

// fitJSON is the JSON shape of a model fit (check --sfc-fit, calibrate).
func fitJSON(fits []sle.Fit, opt sle.Options) map[string]any {
	stocks := make([]map[string]any, 0, len(fits))
	for _, f := range fits {
		pts := make([]map[string]any, 0, len(f.Points))
		for _, p := range f.Points {
			pts = append(pts, map[string]any{"temp": p.Temp, "measured": round(p.Measured, 2), "predicted": round(p.Predicted, 2)})
		}
		stocks = append(stocks, map[string]any{
			"stock": f.Stock, "points": pts, "rms": round(f.RMS, 2), "mae": round(f.MAE, 2),
			"max": round(f.Max, 2), "max_at": f.MaxAt, "bias": round(f.Bias, 2),
		})
	}
	return map[string]any{"model": sle.Describe(opt), "stocks": stocks, "rms": round(sle.PooledRMS(fits), 2)}
}
