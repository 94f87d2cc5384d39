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
	Engine   string // the engine that solved
	Currency string
	Points   []SweepPoint
	// Breakpoints are the prices at which the optimal blend changes: the
	// ends of the parametric LP's cost ranges, or, for specs solved step by
	// step, found by bisection between neighbouring steps whose blends
	// differ, to within Tolerance. Between two breakpoints the blend is the
	// same, and cost per tonne is linear in the price (the optimal cost is
	// a piecewise-linear concave function of one cost coefficient).
	Breakpoints []float64
	// BreakpointCosts is the cost per tonne at each breakpoint (NaN where the
	// spec cannot be met there).
	BreakpointCosts []float64
	// Tolerance is how closely a breakpoint is located: 1e-6 of the larger
	// price; the parametric sweep's breakpoints are exact to rounding.
	Tolerance float64
}

// Sweep solves spec at steps prices of stock id spaced evenly from `from` to
// `to` (both included) and locates the prices where the optimal blend changes.
// The catalogue is not modified.
//
// A plain spec is swept by parametric linear programming on the one cost
// coefficient (Gass & Saaty, Naval Res. Logist. Q. 2 (1955) 39; Chvátal
// 1983, ch. 10 on parametric analysis): the basis of the optimum at one
// price stays optimal over the price range cost ranging gives; at its end
// the price is moved just past it and the engine re-solves from that basis
// (a few primal pivots), giving the next range, until the sweep's end. The
// breakpoints are exact (the ends of the ranges where the blend changes;
// ranges shorter than 1e-6 of the price are stepped over), and every step
// price is answered from the range that holds it, without a solve of its
// own. A spec with integer rules or a [process] step is solved at every
// step (warm-started), its breakpoints found by bisection to Tolerance.
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
	out := &SweepResult{Stock: id, Currency: cat.Currency, Tolerance: 1e-6 * math.Max(1, math.Max(math.Abs(from), math.Abs(to)))}
	prices := make([]float64, steps)
	for i := range prices {
		prices[i] = from + (to-from)*float64(i)/float64(steps-1)
	}
	if spec != nil && spec.Process == nil && !spec.Rules.Active() {
		return out, sweepParametric(out, cat, spec, id, prices)
	}
	return out, sweepBySolves(out, cat, spec, id, prices, opt)
}

// sweepParametric fills out by parametric LP (see Sweep).
func sweepParametric(out *SweepResult, cat *catalogue.Catalogue, spec *catalogue.Spec, id string, prices []float64) error {
	m, lay, err := build(cat, spec)
	if err != nil {
		return err
	}
	j := lay.index(id)
	eng := reusableEngine()
	defer eng.close()
	out.Engine = eng.name()
	at := func(p float64) (*solution, error) {
		m.obj[j] = p / 100
		s, err := eng.solveLP(m)
		if err != nil {
			return nil, fmt.Errorf("sweep %s at price %g: %w", id, p, err)
		}
		if s.status == solUnbounded {
			return nil, fmt.Errorf("sweep %s at price %g: the programme is unbounded, which a blend with shares adding to 100 %% cannot be", id, p)
		}
		return s, nil
	}
	from, to := prices[0], prices[len(prices)-1]
	dir := 1.0
	if to < from {
		dir = -1
	}
	s, err := at(from)
	if err != nil {
		return err
	}
	if s.status != solOptimal {
		// Prices do not change what can be met: every step is impossible.
		for _, p := range prices {
			out.Points = append(out.Points, SweepPoint{Value: p, Status: Infeasible})
		}
		return nil
	}
	// cost is the cost per tonne of solution x with stock j at price p.
	cost := func(x []float64, p float64) float64 {
		c := 0.0
		for k, col := range lay.cols {
			pk := col.stock.Price
			if k == j {
				pk = p
			}
			c += pk * math.Max(x[k], 0) / 100
		}
		return c
	}
	next := 0 // the next step price to answer
	cur := from
	blendNow := lay.lines(s.x)
	for guard := 0; ; guard++ {
		if guard > 10000 {
			return fmt.Errorf("sweep %s: more than 10000 bases between %g and %g", id, from, to)
		}
		rg, err := rangingOf(m, s)
		if err != nil {
			return fmt.Errorf("sweep %s: ranging: %w", id, err)
		}
		lo, hi := rg.CostRange(j)
		end := cur + 100*hi // the far end of this basis's range, in the sweep's direction
		if dir < 0 {
			end = cur + 100*lo
		}
		// Answer every step price this range holds.
		for next < len(prices) && (dir > 0 && prices[next] <= end || dir < 0 && prices[next] >= end) {
			p := prices[next]
			out.Points = append(out.Points, SweepPoint{Value: p, Status: Optimal, CostPerTonne: cost(s.x, p), Blend: blendNow})
			next++
		}
		if next == len(prices) {
			return nil
		}
		// Step just past the end and re-solve from this basis.
		step := 1e-6 * math.Max(1, math.Abs(end))
		cur = end + dir*step
		ns, err := at(cur)
		if err != nil {
			return err
		}
		if ns.status != solOptimal {
			return fmt.Errorf("sweep %s at price %g: %s after a price change", id, cur, ns.status)
		}
		nb := lay.lines(ns.x)
		if !sameLines(blendNow, nb) {
			out.Breakpoints = append(out.Breakpoints, end)
			out.BreakpointCosts = append(out.BreakpointCosts, cost(s.x, end))
		}
		s, blendNow = ns, nb
	}
}

// sweepBySolves fills out by solving spec at every step price with one
// Solver (warm starts), and locating each change of blend by bisection.
func sweepBySolves(out *SweepResult, cat *catalogue.Catalogue, spec *catalogue.Spec, id string, prices []float64, opt Options) error {
	work := cat.Clone()
	st, _ := work.Find(id)
	sv := NewSolver()
	defer sv.Close()
	at := func(p float64) (*Result, error) {
		st.Price = p
		r, err := sv.Solve(work, spec, opt)
		if err != nil {
			return nil, fmt.Errorf("sweep %s at price %g: %w", id, p, err)
		}
		out.Engine = r.Engine
		return r, nil
	}
	results := make([]*Result, len(prices))
	for i, p := range prices {
		r, err := at(p)
		if err != nil {
			return err
		}
		results[i] = r
		out.Points = append(out.Points, SweepPoint{Value: p, Status: r.Status, CostPerTonne: r.CostPerTonne, Blend: r.Blend})
	}
	for i := 1; i < len(prices); i++ {
		if sameBlend(results[i-1], results[i]) {
			continue
		}
		lo, hi := out.Points[i-1].Value, out.Points[i].Value
		loR := results[i-1]
		for math.Abs(hi-lo) > out.Tolerance {
			mid := (lo + hi) / 2
			r, err := at(mid)
			if err != nil {
				return err
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
			return err
		}
		cost := math.NaN()
		if r.Status == Optimal {
			cost = r.CostPerTonne
		}
		out.Breakpoints = append(out.Breakpoints, bp)
		out.BreakpointCosts = append(out.BreakpointCosts, cost)
	}
	return nil
}

// sameBlend reports whether two results hold the same stocks at the same
// shares (to 1e-6 % of batch).
func sameBlend(a, b *Result) bool {
	return a.Status == b.Status && sameLines(a.Blend, b.Blend)
}

// sameLines reports whether two blends hold the same stocks at the same
// shares (to 1e-6 % of batch).
func sameLines(a, b []Line) bool {
	shares := map[string]float64{}
	for _, l := range a {
		shares[l.Stock] += l.Pct
	}
	for _, l := range b {
		shares[l.Stock] -= l.Pct
	}
	for _, d := range shares {
		if math.Abs(d) > 1e-6 {
			return false
		}
	}
	return true
}
