package optimise

import (
	"fmt"
	"math"

	"lipoplan/catalogue"
)

// Route is one way of making a spec's product from its stocks, solved.
type Route struct {
	Name   string // "physical", "chemical" or "enzymatic"
	Result *Result
}

// routeNames are the routes CompareRoutes solves, in its order.
func routeNames() [3]string { return [3]string{"physical", "chemical", "enzymatic"} }

// CompareRoutes solves a spec with a [process] step three ways over the
// same stocks and limits: blended as they are (physical: nothing through
// the reactor), with the feed stocks chemically interesterified (random
// distribution over all three positions) and enzymatically
// interesterified (sn-1,3-specific lipase: sn-2 kept), each the cheapest
// blend of its route. Every route's SFC is the TAG model's for the whole
// blend (the [process] sfc = "predicted" model of solveProcess), so the
// three are judged alike: measured curves cannot show what the reaction
// does. The physical route drops the spec's demands on the reactor
// (through, feed_ratio); the two reactor routes keep them. A route that
// cannot meet the spec is reported as infeasible with its diagnosis; an
// input fault of the spec is an error.
func CompareRoutes(cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) ([]Route, error) {
	if spec == nil || spec.Process == nil {
		return nil, catalogue.Badf("%s: comparing routes needs a [process] step naming the stocks that may be interesterified (interesterify, cost)", specWhere(spec))
	}
	s := NewSolver()
	defer s.Close()
	out := make([]Route, 0, len(routeNames()))
	for _, name := range routeNames() {
		rs := spec.Clone()
		p := rs.Process
		p.SFC = "predicted"
		if name == "physical" {
			p.Through = &catalogue.Bound{Min: math.Inf(-1), Max: 0}
			p.FeedRatio = nil
		} else {
			p.Method = name
		}
		res, err := s.Solve(cat, rs, opt)
		if err != nil {
			return nil, fmt.Errorf("the %s route: %w", name, err)
		}
		out = append(out, Route{Name: name, Result: res})
	}
	return out, nil
}
