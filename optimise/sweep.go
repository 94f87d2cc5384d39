package optimise

import (
	"fmt"
	"math"

	"lipoplan/catalogue"
)

// SweepPoint is the cheapest blend at one price of the swept stock.
type SweepPoint struct {
	Value        float64 // the swept stock's price
	Status       Status
	CostPerTonne float64
	Blend        []Line
}

// SweepResult is a price sweep of one stock.
type SweepResult struct {
	Stock    string
	Currency string
	Points   []SweepPoint
	// Breakpoints are the prices at which the optimal blend changes, found
	// by bisection between neighbouring steps whose blends differ, to within
	// Tolerance. Between two breakpoints the blend is the same, and cost per
	// tonne is linear in the price (parametric LP: the optimal cost is a
	// piecewise-linear concave function of one cost coefficient).
	Breakpoints []float64
	// BreakpointCosts is the cost per tonne at each breakpoint (NaN where the
	// spec cannot be met there).
	BreakpointCosts []float64
	Tolerance       float64
}

// Sweep solves spec at steps prices of stock id spaced evenly from `from` to
// `to` (both included) and locates the prices where the optimal blend changes.
// The catalogue is not modified.
func Sweep(cat *catalogue.Catalogue, spec *catalogue.Spec, id string, from, to float64, steps int, opt Options) (*SweepResult, error) {
	if _, ok := cat.Find(id); !ok {
		return nil, catalogue.Badf("--price: no stock %q in the catalogue; give one of its stock ids", id)
	}
	if !finiteNum(from) || !finiteNum(to) || from < 0 || to < 0 || from == to {
		return nil, catalogue.Badf("--price %s=%g:%g: give two different prices >= 0 (FROM:TO:STEPS)", id, from, to)
	}
	if steps < 2 || steps > 1000 {
		return nil, catalogue.Badf("--price %s: %d steps; give 2 to 1000 steps", id, steps)
	}
	work := cat.Clone()
	st, _ := work.Find(id)
	// One Solver for every price: only a price changes between solves, so
	// its warm LP engine and the stocks' profiles serve them all.
	sv := NewSolver()
	defer sv.Close()
	at := func(p float64) (*Result, error) {
		st.Price = p
		r, err := sv.Solve(work, spec, opt)
		if err != nil {
			return nil, fmt.Errorf("sweep %s at price %g: %w", id, p, err)
		}
		return r, nil
	}
	out := &SweepResult{Stock: id, Currency: cat.Currency, Tolerance: 1e-6 * math.Max(1, math.Max(math.Abs(from), math.Abs(to)))}
	results := make([]*Result, steps)
	for i := 0; i < steps; i++ {
		p := from + (to-from)*float64(i)/float64(steps-1)
		r, err := at(p)
		if err != nil {
			return nil, err
		}
		results[i] = r
		out.Points = append(out.Points, SweepPoint{Value: p, Status: r.Status, CostPerTonne: r.CostPerTonne, Blend: r.Blend})
	}
	for i := 1; i < steps; i++ {
		if sameBlend(results[i-1], results[i]) {
			continue
		}
		lo, hi := out.Points[i-1].Value, out.Points[i].Value
		loR := results[i-1]
		for math.Abs(hi-lo) > out.Tolerance {
			mid := (lo + hi) / 2
			r, err := at(mid)
			if err != nil {
				return nil, err
			}
			if sameBlend(loR, r) {
				lo = mid
			} else {
				hi = mid
			}
		}
		bp := (lo + hi) / 2
		r, err := at(bp)
		if err != nil {
			return nil, err
		}
		cost := math.NaN()
		if r.Status == Optimal {
			cost = r.CostPerTonne
		}
		out.Breakpoints = append(out.Breakpoints, bp)
		out.BreakpointCosts = append(out.BreakpointCosts, cost)
	}
	return out, nil
}

// sameBlend reports whether two results hold the same stocks at the same
// shares (to 1e-6 % of batch).
func sameBlend(a, b *Result) bool {
	if a.Status != b.Status {
		return false
	}
	shares := map[string]float64{}
	for _, l := range a.Blend {
		shares[l.Stock] += l.Pct
	}
	for _, l := range b.Blend {
		shares[l.Stock] -= l.Pct
	}
	for _, d := range shares {
		if math.Abs(d) > 1e-6 {
			return false
		}
	}
	return true
}
