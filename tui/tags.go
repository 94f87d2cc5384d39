package tui

import (
	"fmt"

	"lipoplan/blend"
	"lipoplan/randomise"
)

// TAGColumn is one process applied to the optimal blend.
type TAGColumn struct {
	Method  randomise.Method
	Classes randomise.Shares // mol %
	Top     []randomise.Species
	Notes   []string
	Err     error
}

// TAGView holds the TAG classes of the blend as mixed (native) and after full
// chemical or enzymatic (sn-1,3) interesterification, from package randomise.
type TAGView struct {
	Columns []TAGColumn
}

// topSpecies is how many species (positional isomers merged) each column keeps.
const topSpecies = 6

// tagView distributes the blend three ways. Each method fails on its own
// (e.g. an acid with no letter code) without hiding the others.
func tagView(parts []blend.Part) TAGView {
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
		}
		v.Columns = append(v.Columns, c)
	}
	return v
}
