package sle

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// MaxShift bounds each fitted melting-point shift (K): a larger one would no
// longer be a correction of the pure-TAG data but a different fat.
const MaxShift = 10.0

// Calibration is a fit of the melting-point shifts per TAG class (Options
// .Shift) to measured SFC curves.
type Calibration struct {
	Options  Options  // the base options with the fitted shifts
	FittedOn []string // stock ids
	Points   int      // measured points fitted
	// Pooled RMS deviation (% solid) on the fitted stocks before and after.
	Before, After float64
	// HeldOut is the pooled RMS of a leave-one-stock-out check: each stock
	// predicted with shifts fitted on the others; HeldOutBefore the same
	// stocks uncalibrated. NaN when fewer than three stocks were fitted or
	// the check was not asked for.
	HeldOut, HeldOutBefore float64
}

// fitCase is one stock prepared for fitting: its native TAGs, its TAG set
// with no shift, and its measured points.
type fitCase struct {
	id    string
	mol   []float64
	set   *Set
	temps []float64
	meas  []float64
	out   []float64
}

// Calibrate fits the five class shifts (S3, SUS, SSU, SU2, U3) of base to
// the measured curves of stocks by least squares on the pooled deviations
// (predicted - measured, % solid), with the Nelder-Mead simplex method of
// gonum/optimize (Nelder & Mead (1965), The Computer Journal 7:308) and each
// shift bounded by MaxShift (a quadratic penalty outside). Stocks without a
// measured curve are skipped; a stock whose TAGs cannot be formed is an
// error naming it. With heldOut set it also runs the leave-one-stock-out
// check.
func Calibrate(stocks []*catalogue.Stock, base Options, heldOut bool) (*Calibration, error) {
	base.Shift = Shifts{}
	var cases []fitCase
	for _, st := range stocks {
		if len(st.SFC) == 0 {
			continue
		}
		d, err := randomise.Distribute([]catalogue.Part{{Stock: st, Pct: 100}}, randomise.Native, 0)
		if err != nil {
			return nil, fmt.Errorf("calibration: stock %q: %w", st.ID, err)
		}
		c := fitCase{id: st.ID, mol: d.Mol, set: NewSet(d.Acids, base)}
		for _, p := range st.SFC {
			c.temps = append(c.temps, p.Temp)
			c.meas = append(c.meas, p.Solid)
		}
		c.out = make([]float64, len(c.temps))
		cases = append(cases, c)
	}
	if len(cases) == 0 {
		return nil, catalogue.Badf("calibration needs stocks with a measured SFC curve ([stock.sfc]); none has one")
	}
	cal := &Calibration{Options: base, HeldOut: math.NaN(), HeldOutBefore: math.NaN()}
	for _, c := range cases {
		cal.FittedOn = append(cal.FittedOn, c.id)
		cal.Points += len(c.temps)
	}
	var err error
	if cal.Before, err = pooled(cases, Shifts{}); err != nil {
		return nil, err
	}
	shift, err := fitShifts(cases)
	if err != nil {
		return nil, err
	}
	cal.Options.Shift = shift
	if cal.After, err = pooled(cases, shift); err != nil {
		return nil, err
	}
	if heldOut && len(cases) >= 3 {
		var se, se0 float64
		var n int
		for k := range cases {
			rest := append(append([]fitCase(nil), cases[:k]...), cases[k+1:]...)
			sh, err := fitShifts(rest)
			if err != nil {
				return nil, err
			}
			e, err := sumSquares(cases[k:k+1], sh)
			if err != nil {
				return nil, err
			}
			e0, err := sumSquares(cases[k:k+1], Shifts{})
			if err != nil {
				return nil, err
			}
			se, se0, n = se+e, se0+e0, n+len(cases[k].temps)
		}
		cal.HeldOut, cal.HeldOutBefore = math.Sqrt(se/float64(n)), math.Sqrt(se0/float64(n))
	}
	return cal, nil
}

// fitShifts minimises the pooled squared deviations over the cases.
func fitShifts(cases []fitCase) (Shifts, error) {
	var fault error
	problem := optimize.Problem{Func: func(x []float64) float64 {
		var sh Shifts
		pen := 0.0
		for i := range sh {
			sh[i] = x[i]
			if over := math.Abs(x[i]) - MaxShift; over > 0 {
				pen += 1e3 * over * over
				sh[i] = math.Copysign(MaxShift, x[i])
			}
		}
		e, err := sumSquares(cases, sh)
		if err != nil {
			fault = err
			return math.Inf(1)
		}
		return e + pen
	}}
	settings := &optimize.Settings{
		FuncEvaluations: 3000,
		Converger:       &optimize.FunctionConverge{Absolute: 1e-4, Relative: 1e-6, Iterations: 60},
	}
	res, err := optimize.Minimize(problem, make([]float64, len(Shifts{})), settings, &optimize.NelderMead{SimplexSize: 2})
	if fault != nil {
		return Shifts{}, fault
	}
	if err != nil && res == nil {
		return Shifts{}, fmt.Errorf("calibration: %w", err)
	}
	var sh Shifts
	for i := range sh {
		sh[i] = math.Max(-MaxShift, math.Min(MaxShift, res.X[i]))
	}
	return sh, nil
}

// sumSquares is the sum of squared deviations of the cases with shifts sh.
func sumSquares(cases []fitCase, sh Shifts) (float64, error) {
	var se float64
	var w Work
	for i := range cases {
		c := &cases[i]
		if err := c.set.Shifted(sh).Curve(c.mol, c.temps, c.out, &w); err != nil {
			return 0, fmt.Errorf("calibration: stock %q: %w", c.id, err)
		}
		for k, v := range c.out {
			d := v - c.meas[k]
			se += d * d
		}
	}
	return se, nil
}

// pooled is the pooled RMS deviation of the cases with shifts sh.
func pooled(cases []fitCase, sh Shifts) (float64, error) {
	se, err := sumSquares(cases, sh)
	if err != nil {
		return 0, err
	}
	n := 0
	for _, c := range cases {
		n += len(c.temps)
	}
	return math.Sqrt(se / float64(n)), nil
}
