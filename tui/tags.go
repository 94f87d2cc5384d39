package tui

import (
	"fmt"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// TAGColumn is one process applied to the optimal blend.
type TAGColumn struct {
	Method  randomise.Method
	Classes randomise.Shares // mol %
	Top     []randomise.Species
	Notes   []string
	Err     error
	// Predicted is the SFC the TAG model (blend/sle: solid-liquid
	// equilibrium, Wesdorp melting points, beta) gives for these TAGs on the
	// chart's 1 °C grid; nil when the model could not run (PredErr says why).
	Predicted []catalogue.Point
	PredErr   error
}

// TAGView holds the TAG classes of the blend as mixed (native) and after full
// chemical or enzymatic (sn-1,3) interesterification, from package randomise.
type TAGView struct {
	Columns []TAGColumn
}

// topSpecies is how many species (positional isomers merged) each column keeps.
const topSpecies = 6

// tagView distributes the blend three ways and predicts each one's SFC at
// temps (the chart's grid). Each method fails on its own (e.g. an acid with
// no letter code) without hiding the others.
func tagView(parts []blend.Part, temps []float64, opt sle.Options) TAGView {
	var v TAGView
	for _, m := range []randomise.Method{randomise.Native, randomise.Chemical, randomise.Enzymatic} {
		c := TAGColumn{Method: m}
		d, err := randomise.Distribute(parts, m, 1)
		if err != nil {
			c.Err = fmt.Errorf("%s TAGs: %w", m, err)
		} else {
			c.Classes = d.Classes().Mol
			sp := d.SpeciesBy(randomise.Regio)
			c.Top = sp[:min(topSpecies, len(sp))]
			c.Notes = d.Notes
			c.Predicted, c.PredErr = predicted(d, temps, opt)
		}
		v.Columns = append(v.Columns, c)
	}
	return v
}

// predicted runs the TAG model over temps and returns the curve sorted by
// temperature.
func predicted(d *randomise.Distribution, temps []float64, opt sle.Options) ([]catalogue.Point, error) {
	vals, err := sle.Predict(d, temps, opt)
	if err != nil {
		return nil, err
	}
	return pointsOf(vals), nil
}

// Column returns the column of method m.
func (v TAGView) Column(m randomise.Method) (TAGColumn, bool) {
	for _, c := range v.Columns {
		if c.Method == m {
			return c, true
		}
	}
	return TAGColumn{}, false
}
