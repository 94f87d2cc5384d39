package optimise

import (
	"errors"

	"lipoplan/catalogue"
)

// solve is replaced by the model builder and engines (work in progress).
func solve(cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	return nil, errors.New("optimise: not built yet")
}
