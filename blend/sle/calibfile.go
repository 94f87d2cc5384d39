package sle

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"lipoplan/catalogue"
)

// OptionsFrom turns a calibration file into model options: its solid model,
// polymorph and class shifts. Unknown names and shifts beyond MaxShift are
// bad input; the caller names the file.
func OptionsFrom(cal *catalogue.Calibration) (Options, error) {
	sm, err := ParseSolidModel(cal.Model)
	if err != nil {
		return Options{}, catalogue.Badf("%w", err)
	}
	p, err := ParsePolymorph(cal.Polymorph)
	if err != nil {
		return Options{}, catalogue.Badf("%w", err)
	}
	opt := Options{Polymorph: p, Solids: sm}
	// keys in byte order, not Go's random map order: the first problem
	// reported, and which of two spellings of one class wins, must be the
	// same on every run
	keys := make([]string, 0, len(cal.Shift))
	for k := range cal.Shift {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	given := make([]string, len(opt.Shift))
	for _, k := range keys {
		v := cal.Shift[k]
		c := -1
		for i := range opt.Shift {
			if strings.EqualFold(k, ClassName(i)) {
				c = i
			}
		}
		if c < 0 {
			names := make([]string, len(opt.Shift))
			for i := range names {
				names[i] = ClassName(i)
			}
			return Options{}, catalogue.Badf("[shift] %s is not a TAG class; the classes are %s", k, strings.Join(names, ", "))
		}
		if math.Abs(v) > MaxShift {
			return Options{}, catalogue.Badf("[shift] %s = %v K is beyond the model's bound of %v K; refit with lipoplan calibrate", k, v, MaxShift)
		}
		if given[c] != "" {
			return Options{}, catalogue.Badf("[shift] %s and %s both name the class %s; keep one of them", given[c], k, ClassName(c))
		}
		given[c] = k
		opt.Shift[c] = v
	}
	return opt, nil
}

// FileOf is the calibration as the file lipoplan writes: its model,
// polymorph, shifts and what it was fitted on (catName names the catalogue).
func (c *Calibration) FileOf(catName string) *catalogue.Calibration {
	out := &catalogue.Calibration{
		Model:     c.Options.Solids.Key(),
		Polymorph: c.Options.Polymorph.resolve().String(),
		Shift:     map[string]float64{},
		Fit: catalogue.CalibrationFit{
			Catalogue: catName, Stocks: c.FittedOn, Points: c.Points,
			RMSBefore: c.Before, RMSAfter: c.After, HeldOutRMS: c.HeldOut, HeldOutRMSBefore: c.HeldOutBefore,
		},
	}
	for i, v := range c.Options.Shift {
		out.Shift[ClassName(i)] = v
	}
	return out
}

// Describe names the model options in one line, as reports print them.
func Describe(opt Options) string {
	s := fmt.Sprintf("solid-liquid equilibrium with an ideal liquid and %s in their %s forms (Wesdorp melting points with published anchors, Hildebrand solubility)",
		opt.Solids.resolve(), opt.Polymorph.resolve())
	if opt.Shift == (Shifts{}) {
		return s + ", not calibrated"
	}
	parts := make([]string, 0, len(opt.Shift))
	for i, v := range opt.Shift {
		parts = append(parts, fmt.Sprintf("%s %+.1f K", ClassName(i), v))
	}
	return s + ", calibrated (" + strings.Join(parts, ", ") + ")"
}
