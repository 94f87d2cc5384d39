package optimise

import (
	"fmt"
	"math"
	"strings"

	"lipoplan/catalogue"
)

// PriceSweep says which prices a sweep moves and over what range.
type PriceSweep struct {
	// Stocks are the ids of the stocks whose prices move; several move
	// together only by relative steps.
	Stocks []string
	// Relative: From and To are changes in % of each stock's price in the
	// catalogue (-10 is 10 % cheaper, +20 is 20 % dearer), every stock
	// moved by the same step. Otherwise From and To are the one stock's
	// prices per tonne.
	Relative bool
	From, To float64
	Steps    int // evenly spaced values from From to To, both included
}

// price is the price of a swept stock whose catalogue price is base at the
// sweep's value v.
func (ps PriceSweep) price(base, v float64) float64 {
	if ps.Relative {
		return base * (1 + v/100)
	}
	return v
}

// slope is d(price)/dv of a swept stock whose catalogue price is base.
func (ps PriceSweep) slope(base float64) float64 {
	if ps.Relative {
		return base / 100
	}
	return 1
}

// SweepPoint is the cheapest blend at one value of the sweep.
type SweepPoint struct {
	Value        float64   // the swept price, or for a relative sweep the change in %
	Prices       []float64 // each swept stock's price there, in the order of SweepResult.Stocks
	Status       Status
	CostPerTonne float64
	// ChangePerTonne is CostPerTonne less the base case's (NaN when either
	// cannot be met).
	ChangePerTonne float64
	Blend          []Line
}

// BlendChange is the change of the optimal blend at one breakpoint: the
// blend just before it (in the sweep's direction) and just after.
type BlendChange struct {
	At            float64 // the breakpoint's value (price, or change in %)
	Before, After []Line
}

// Shift is one stock's share before and after a change of blend, % of
// batch (0 where it is not in that blend).
type Shift struct {
	Stock         string
	Before, After float64
}

// Shifts lists every stock whose share changes at c by more than 1e-6 % of
// batch: those in the blend after it first (largest share first), then
// those that go out.
func (c BlendChange) Shifts() []Shift {
	before := map[string]float64{}
	for _, l := range c.Before {
		before[l.Stock] += l.Pct
	}
	var out []Shift
	seen := map[string]bool{}
	for _, l := range c.After {
		seen[l.Stock] = true
		if math.Abs(l.Pct-before[l.Stock]) > 1e-6 {
			out = append(out, Shift{Stock: l.Stock, Before: before[l.Stock], After: l.Pct})
		}
	}
	for _, l := range c.Before {
		if !seen[l.Stock] && l.Pct > 1e-6 {
			out = append(out, Shift{Stock: l.Stock, Before: l.Pct})
		}
	}
	return out
}

// SweepResult is a price sweep of one stock, or of several moved together.
type SweepResult struct {
	Stock      string   // the swept stocks' ids, joined by commas
	Stocks     []string // the swept stocks' ids
	Relative   bool     // Value is a change in % of today's prices, not a price
	BasePrices []float64
	Engine     string // the engine that solved
	Currency   string
	// The base case: the spec solved at today's prices (the catalogue's).
	BaseStatus       Status
	BaseCostPerTonne float64
	BaseBlend        []Line
	Points           []SweepPoint
	// Breakpoints are the values at which the optimal blend changes: the
	// ends of the parametric LP's cost ranges, or, for specs solved step by
	// step, found by bisection between neighbouring steps whose blends
	// differ, to within Tolerance. Between two breakpoints the blend is the
	// same, and cost per tonne is linear in the value (the optimal cost is
	// a piecewise-linear concave function of the parameter of a parametric
	// objective).
	Breakpoints []float64
	// BreakpointCosts is the cost per tonne at each breakpoint (NaN where the
	// spec cannot be met there).
	BreakpointCosts []float64
	// Changes are the blends on either side of each breakpoint.
	Changes []BlendChange
	// Tolerance is how closely a breakpoint is located: 1e-6 of the larger
	// end of the range; the parametric sweep's breakpoints are exact to
	// rounding.
	Tolerance float64
}

// Sweep solves spec at steps prices of stock id spaced evenly from `from` to
// `to` (both included) and locates the prices where the optimal blend
// changes: SweepPrices with one stock and absolute prices.
func Sweep(cat *catalogue.Catalogue, spec *catalogue.Spec, id string, from, to float64, steps int, opt Options) (*SweepResult, error) {
	return SweepPrices(cat, spec, PriceSweep{Stocks: []string{id}, From: from, To: to, Steps: steps}, opt)
}

// SweepPrices solves spec at ps.Steps values of the swept prices and
// locates the values where the optimal blend changes, with the base case
// (today's prices) for comparison. The catalogue is not modified.
//
// A plain spec is swept by parametric linear programming on the objective
// c + v·d, d the prices' rate of change with the swept value v (Gass &
// Saaty, Naval Res. Logist. Q. 2 (1955) 39; Chvátal 1983, ch. 10 on
// parametric analysis): the basis of the optimum at one value stays optimal
// over the range the direction's cost ranging gives
// (lp.Ranging.CostDirectionRange); at its end the value is moved just past
// it and the engine re-solves from that basis (a few primal pivots), giving
// the next range, until the sweep's end. The breakpoints are exact (the
// ends of the ranges where the blend changes; ranges shorter than 1e-6 of
// the value are stepped over), and every step is answered from the range
// that holds it, without a solve of its own. A spec with integer rules or a
// [process] step is solved at every step (warm-started), its breakpoints
// found by bisection to Tolerance.
//
// opt.Progress, when set, is told the steps answered of ps.Steps (and, by
// step, the bisection solves once the steps are done); the solves inside
// report nothing of their own.
func SweepPrices(cat *catalogue.Catalogue, spec *catalogue.Spec, ps PriceSweep, opt Options) (*SweepResult, error) {
	out, err := newSweep(cat, ps)
	if err != nil {
		return nil, err
	}
	values := make([]float64, ps.Steps)
	for i := range values {
		values[i] = ps.From + (ps.To-ps.From)*float64(i)/float64(ps.Steps-1)
	}
	progress := opt.Progress
	opt.Progress = nil
	if spec != nil && spec.Process == nil && !spec.Rules.Active() {
		err = sweepParametric(out, cat, spec, ps, values, progress)
	} else {
		err = sweepBySolves(out, cat, spec, ps, values, opt, progress)
	}
	if err != nil {
		return nil, err
	}
	for i := range out.Points {
		p := &out.Points[i]
		p.ChangePerTonne = math.NaN()
		if p.Status != Infeasible && len(p.Blend) > 0 && out.BaseStatus != Infeasible && len(out.BaseBlend) > 0 {
			p.ChangePerTonne = p.CostPerTonne - out.BaseCostPerTonne
		}
	}
	return out, nil
}

// newSweep checks ps against the catalogue and starts its result.
func newSweep(cat *catalogue.Catalogue, ps PriceSweep) (*SweepResult, error) {
	what := "--price " + strings.Join(ps.Stocks, ",")
	if len(ps.Stocks) == 0 {
		return nil, catalogue.Badf("--price: no stock named; give a stock id, e.g. palm=800:1400:13")
	}
	out := &SweepResult{Stock: strings.Join(ps.Stocks, ","), Stocks: ps.Stocks, Relative: ps.Relative, Currency: cat.Currency}
	seen := map[string]bool{}
	for _, id := range ps.Stocks {
		st, ok := cat.Find(id)
		if !ok {
			return nil, catalogue.Badf("--price: no stock %q in the catalogue; give one of its stock ids", id)
		}
		if seen[id] {
			return nil, catalogue.Badf("%s: stock %q is named twice; give each stock once", what, id)
		}
		seen[id] = true
		out.BasePrices = append(out.BasePrices, st.Price)
	}
	if ps.Steps < 2 || ps.Steps > 1000 {
		return nil, catalogue.Badf("%s: %d steps; give 2 to 1000 steps", what, ps.Steps)
	}
	if !finiteNum(ps.From) || !finiteNum(ps.To) || ps.From == ps.To {
		return nil, catalogue.Badf("%s=%g:%g: give two different values (FROM:TO:STEPS)", what, ps.From, ps.To)
	}
	if !ps.Relative {
		if len(ps.Stocks) > 1 {
			return nil, catalogue.Badf("%s: several stocks move together by relative steps only; write e.g. %s=-10%%:+20%%:13", what, what[len("--price "):])
		}
		if ps.From < 0 || ps.To < 0 {
			return nil, catalogue.Badf("%s=%g:%g: give two different prices >= 0 (FROM:TO:STEPS)", what, ps.From, ps.To)
		}
	} else {
		if ps.From < -100 || ps.To < -100 {
			return nil, catalogue.Badf("%s=%g%%:%g%%: a price cannot fall by more than 100 %%; give changes of -100 %% or more", what, ps.From, ps.To)
		}
		for k, id := range ps.Stocks {
			for _, v := range []float64{ps.From, ps.To} {
				if err := catalogue.QtyPrice.Check(fmt.Sprintf("--price %s at %+g %%", id, v), ps.price(out.BasePrices[k], v)); err != nil {
					return nil, err
				}
			}
		}
	}
	out.Tolerance = 1e-6 * math.Max(1, math.Max(math.Abs(ps.From), math.Abs(ps.To)))
	return out, nil
}

// prices are the swept stocks' prices at value v.
func (r *SweepResult) prices(ps PriceSweep, v float64) []float64 {
	out := make([]float64, len(r.BasePrices))
	for k, b := range r.BasePrices {
		out[k] = ps.price(b, v)
	}
	return out
}

// sweepParametric fills out by parametric LP (see SweepPrices).
func sweepParametric(out *SweepResult, cat *catalogue.Catalogue, spec *catalogue.Spec, ps PriceSweep, values []float64, progress func(done, total int)) error {
	m, lay, err := build(cat, spec)
	if err != nil {
		return err
	}
	cols := make([]int, len(ps.Stocks))
	dir := make([]float64, m.nCols)
	for k, id := range ps.Stocks {
		cols[k] = lay.index(id)
		dir[cols[k]] = ps.slope(out.BasePrices[k]) / 100
	}
	eng := reusableEngine()
	defer eng.close()
	out.Engine = eng.name()
	// price is column j's price per tonne at value v.
	price := func(j int, v float64) float64 {
		for k, c := range cols {
			if c == j {
				return ps.price(out.BasePrices[k], v)
			}
		}
		return lay.cols[j].stock.Price
	}
	where := func(v float64) string {
		if ps.Relative {
			return fmt.Sprintf("sweep %s at %+g %%", out.Stock, v)
		}
		return fmt.Sprintf("sweep %s at price %g", out.Stock, v)
	}
	at := func(v float64) (*solution, error) {
		for k, j := range cols {
			m.obj[j] = ps.price(out.BasePrices[k], v) / 100
		}
		s, err := eng.solveLP(m)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", where(v), err)
		}
		if s.status == solUnbounded {
			return nil, fmt.Errorf("%s: the programme is unbounded, which a blend with shares adding to 100 %% cannot be", where(v))
		}
		return s, nil
	}
	// cost is the cost per tonne of solution x at value v.
	cost := func(x []float64, v float64) float64 {
		c := 0.0
		for j := range lay.cols {
			c += price(j, v) * math.Max(x[j], 0) / 100
		}
		return c
	}
	// The base case: today's prices.
	for _, j := range cols {
		m.obj[j] = lay.cols[j].stock.Price / 100
	}
	bs, err := eng.solveLP(m)
	if err != nil {
		return fmt.Errorf("sweep %s at today's prices: %w", out.Stock, err)
	}
	out.BaseStatus = Infeasible
	if bs.status == solOptimal {
		out.BaseStatus, out.BaseBlend = Optimal, lay.lines(bs.x)
		c := 0.0
		for j, col := range lay.cols {
			c += col.stock.Price * math.Max(bs.x[j], 0) / 100
		}
		out.BaseCostPerTonne = c
	}
	from, to := values[0], values[len(values)-1]
	sign := 1.0
	if to < from {
		sign = -1
	}
	report := func() {
		if progress != nil {
			progress(len(out.Points), len(values))
		}
	}
	report()
	s, err := at(from)
	if err != nil {
		return err
	}
	if s.status != solOptimal {
		// Prices do not change what can be met: every step is impossible.
		for _, v := range values {
			out.Points = append(out.Points, SweepPoint{Value: v, Prices: out.prices(ps, v), Status: Infeasible})
		}
		report()
		return nil
	}
	next := 0 // the next step to answer
	cur := from
	blendNow := lay.lines(s.x)
	for guard := 0; ; guard++ {
		if guard > 10000 {
			return fmt.Errorf("sweep %s: more than 10000 bases between %g and %g", out.Stock, from, to)
		}
		rg, err := rangingOf(m, s)
		if err != nil {
			return fmt.Errorf("sweep %s: ranging: %w", out.Stock, err)
		}
		lo, hi := rg.CostDirectionRange(dir)
		end := cur + hi // the far end of this basis's range, in the sweep's direction
		if sign < 0 {
			end = cur + lo
		}
		// Answer every step this range holds.
		for next < len(values) && (sign > 0 && values[next] <= end || sign < 0 && values[next] >= end) {
			v := values[next]
			out.Points = append(out.Points, SweepPoint{Value: v, Prices: out.prices(ps, v), Status: Optimal, CostPerTonne: cost(s.x, v), Blend: blendNow})
			next++
		}
		report()
		if next == len(values) {
			return nil
		}
		// Step just past the end and re-solve from this basis.
		step := 1e-6 * math.Max(1, math.Abs(end))
		cur = end + sign*step
		ns, err := at(cur)
		if err != nil {
			return err
		}
		if ns.status != solOptimal {
			return fmt.Errorf("%s: %s after a price change", where(cur), ns.status)
		}
		nb := lay.lines(ns.x)
		if !sameLines(blendNow, nb) {
			out.Breakpoints = append(out.Breakpoints, end)
			out.BreakpointCosts = append(out.BreakpointCosts, cost(s.x, end))
			out.Changes = append(out.Changes, BlendChange{At: end, Before: blendNow, After: nb})
		}
		s, blendNow = ns, nb
	}
}

// sweepBySolves fills out by solving spec at every step with one Solver
// (warm starts), and locating each change of blend by bisection.
func sweepBySolves(out *SweepResult, cat *catalogue.Catalogue, spec *catalogue.Spec, ps PriceSweep, values []float64, opt Options, progress func(done, total int)) error {
	work := cat.Clone()
	stocks := make([]*catalogue.Stock, len(ps.Stocks))
	for k, id := range ps.Stocks {
		stocks[k], _ = work.Find(id)
	}
	sv := NewSolver()
	defer sv.Close()
	solveAt := func(what string, prices []float64) (*Result, error) {
		for k, st := range stocks {
			st.Price = prices[k]
		}
		r, err := sv.Solve(work, spec, opt)
		if err != nil {
			return nil, fmt.Errorf("sweep %s %s: %w", out.Stock, what, err)
		}
		out.Engine = r.Engine
		return r, nil
	}
	at := func(v float64) (*Result, error) {
		what := fmt.Sprintf("at price %g", v)
		if ps.Relative {
			what = fmt.Sprintf("at %+g %%", v)
		}
		return solveAt(what, out.prices(ps, v))
	}
	total := len(values)
	report := func(done int) {
		if progress != nil {
			progress(done, total)
		}
	}
	report(0)
	base, err := solveAt("at today's prices", out.BasePrices)
	if err != nil {
		return err
	}
	out.BaseStatus, out.BaseCostPerTonne, out.BaseBlend = base.Status, base.CostPerTonne, base.Blend
	results := make([]*Result, len(values))
	for i, v := range values {
		r, err := at(v)
		if err != nil {
			return err
		}
		results[i] = r
		out.Points = append(out.Points, SweepPoint{Value: v, Prices: out.prices(ps, v), Status: r.Status, CostPerTonne: r.CostPerTonne, Blend: r.Blend})
		report(i + 1)
	}
	// Every bisection halves its interval down to Tolerance, then solves
	// at the breakpoint: the solves still to come are known now.
	done := total
	for i := 1; i < len(values); i++ {
		if !sameBlend(results[i-1], results[i]) {
			total += bisections(math.Abs(values[i]-values[i-1]), out.Tolerance) + 1
		}
	}
	for i := 1; i < len(values); i++ {
		if sameBlend(results[i-1], results[i]) {
			continue
		}
		lo, hi := values[i-1], values[i]
		loR, hiR := results[i-1], results[i]
		for math.Abs(hi-lo) > out.Tolerance {
			mid := (lo + hi) / 2
			r, err := at(mid)
			if err != nil {
				return err
			}
			done++
			report(done)
			if sameBlend(loR, r) {
				lo, loR = mid, r
			} else {
				hi, hiR = mid, r
			}
		}
		bp := (lo + hi) / 2
		r, err := at(bp)
		if err != nil {
			return err
		}
		done++
		report(done)
		cost := math.NaN()
		if r.Status == Optimal {
			cost = r.CostPerTonne
		}
		out.Breakpoints = append(out.Breakpoints, bp)
		out.BreakpointCosts = append(out.BreakpointCosts, cost)
		out.Changes = append(out.Changes, BlendChange{At: bp, Before: loR.Blend, After: hiR.Blend})
	}
	return nil
}

// bisections is how many halvings take an interval of width w to at most
// tol (the loop of sweepBySolves).
func bisections(w, tol float64) int {
	n := 0
	for w > tol {
		w /= 2
		n++
	}
	return n
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
