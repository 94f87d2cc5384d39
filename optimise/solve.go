package optimise

import (
	"fmt"
	"math"
	"sort"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/optimise/lp"
)

// solve runs one Solve on an engine of its own, freed before it returns
// (the LPs of one call, the base LP, the LP after a MILP, an elastic
// programme, each get an LP engine of their own structure). Stocks are
// profiled once each, without a cache (one build has nothing to share it
// with).
func solve(cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	eng := reusableEngine()
	defer eng.close()
	return solveIn(eng, nil, nil, cat, spec, opt)
}

// solveWith is Solve on a chosen engine.
//
// Without integer rules the base LP is solved once; its duals, reduced
// costs and basis give shadow prices and cost ranging. With integer rules
// the MILP (branch and bound) picks which stocks enter; the LP with those choices fixed
// (excluded stocks at 0, included ones at >= smallest_share) is then solved for
// duals and ranging, the usual way to price a MILP answer. max_stocks is
// priced by solving again with one stock more.
func solveWith(eng *engine, cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	return solveIn(eng, nil, nil, cat, spec, opt)
}

// solveIn is solveWith taking stock profiles from pc (nil: computed) and
// working buffers from buf (nil: allocated).
func solveIn(eng *engine, pc *profileCache, buf *scratch, cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	base, lay, err := buildIn(cat, spec, pc, buf, false)
	if err != nil {
		return nil, err
	}
	// Progress: the MILP, and with max_stocks its second MILP that prices
	// the rule (or an elastic MILP when the rules cannot be met), each half.
	parts := 1
	if lay.rules.MaxStocks > 0 {
		parts = 2
	}
	eng.withLimits(opt.MaxNodes, opt.MaxTime, stage(opt.Progress, 0, parts))
	res := &Result{Engine: eng.name(), Currency: cat.Currency, Spec: spec.Name, Batch: spec.Batch}
	if spec.Process != nil {
		res.Notes = append(res.Notes, "the spec's [process] step (interesterification) is not modelled by solve: "+
			"the blend is of the stocks as they are, with SFC linear in their measured curves")
	}
	lpm := base
	var choice []bool
	status := Optimal
	if lay.rules.Active() {
		res.Engine = eng.milpName() + "+" + eng.name()
		s, err := solveRules(eng, base, lay, lay.rules)
		if err != nil {
			return nil, err
		}
		eng.limits.Progress = nil
		if parts == 2 {
			eng.limits.Progress = stage(opt.Progress, 1, parts)
		}
		switch s.status {
		case solOptimal:
		case solNotProven:
			// The best blend branch and bound found, and it says so.
			status = NotProven
			res.Notes = append(res.Notes, notProvenNote(s, true))
		case solNoSolution:
			res.Status = NotProven
			res.Notes = append(res.Notes, notProvenNote(s, false))
			return res, nil
		case solUnbounded:
			return nil, fmt.Errorf("optimise %s: the programme is unbounded, which a blend with shares adding to 100 %% cannot be", specWhere(spec))
		default:
			return infeasible(eng, res, base, lay)
		}
		choice = lay.choices(s.x)
		lpm = lay.fixChoices(base, choice)
	}
	sol, err := eng.solveLP(lpm)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
	}
	switch sol.status {
	case solInfeasible:
		return infeasible(eng, res, base, lay)
	case solUnbounded:
		return nil, fmt.Errorf("optimise %s: the programme is unbounded, which a blend with shares adding to 100 %% cannot be", specWhere(spec))
	}
	res.Status = status
	if err := lay.report(res, lpm, sol, choice, opt, nil); err != nil {
		return nil, err
	}
	if lay.rules.MaxStocks > 0 {
		if err := lay.priceMaxStocks(eng, base, res); err != nil {
			return nil, err
		}
	}
	if opt.Progress != nil && lay.rules.Active() && res.Status == Optimal {
		// complete, also when max_stocks needed no pricing MILP
		opt.Progress(parts*lp.ProgressTotal, parts*lp.ProgressTotal)
	}
	return res, nil
}

// solveRules solves the MILP of base with the given rules.
func solveRules(eng *engine, base *model, lay *layout, rules catalogue.Rules) (*solution, error) {
	saved := lay.rules
	lay.rules = rules
	defer func() { lay.rules = saved }()
	mm := lay.withRules(base, func(j int) float64 { return math.Min(base.colUp[j], 100) })
	s, err := eng.solveMILP(mm)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: %w", specWhere(lay.spec), err)
	}
	return s, nil
}

func infeasible(eng *engine, res *Result, base *model, lay *layout) (*Result, error) {
	res.Status = Infeasible
	r, note, err := lay.relaxationNoted(eng, base)
	if err != nil {
		return nil, err
	}
	res.Relaxation = r
	if note != "" {
		res.Notes = append(res.Notes, note)
	}
	return res, nil
}

// choices reads which stocks the MILP put in the blend.
func (l *layout) choices(x []float64) []bool {
	out := make([]bool, l.n())
	for j, c := range l.used {
		out[j] = c >= 0 && x[c] > 0.5
	}
	return out
}

// fixChoices is base with the integer choices fixed: a stock left out is
// bounded to 0, a stock in use to at least smallest_share.
func (l *layout) fixChoices(base *model, choice []bool) *model {
	m := base.clone()
	for j, in := range choice {
		if !in {
			m.colLo[j], m.colUp[j] = 0, 0
		} else if l.rules.SmallestShare > m.colLo[j] {
			m.colLo[j] = math.Min(l.rules.SmallestShare, m.colUp[j])
		}
	}
	return m
}

// tolerances for reading an answer.
const (
	usedTol = 1e-7 // a share above this % is in the blend
)

func near(v, b float64) bool { return math.Abs(v-b) <= 1e-6*(1+math.Abs(b)) }

// reportAdds is what the report of a model beyond the plain blend adds to
// it: the [process] step's processing cost and its predicted SFC. The zero
// value (or nil) is the plain report.
type reportAdds struct {
	cost float64 // currency per tonne of product on top of the stocks' prices
	// value is what to show for base row i instead of the LP's activity
	// (ok false: the activity), e.g. the predicted SFC of the whole blend
	value func(i int) (float64, bool)
	sfc   map[float64]float64 // the blend's SFC instead of the measured-linear one
	// rows are limits of the model beyond the layout's rows, reported
	// after them (the share through a reactor)
	rows []extraRow
}

// extraRow is a limit row of a model beyond the layout's rows: its index
// in the model and what to call it.
type extraRow struct {
	at   int
	info rowInfo
}

// report fills res from an optimal LP solution of m, whose first columns
// are the stock columns (each stock's total inclusion, % of batch) and whose
// first rows are the layout's rows; a model may carry more of both after
// them (the reactor's columns and rows, a trust region's box: a limit's
// shadow price is claimed only when the LP holds it at the limit's own
// bound). adds is nil for the plain blend.
func (l *layout) report(res *Result, m *model, sol *solution, choice []bool, opt Options, adds *reportAdds) error {
	if adds == nil {
		adds = &reportAdds{}
	}
	n := l.n()
	batch := l.spec.Batch
	nl := 2 + 2*(len(l.rows)+len(adds.rows))
	for _, c := range l.cols {
		if c.use.HasMin() {
			nl++
		}
		if c.use.HasMax() {
			nl++
		}
		if c.stock.Limited() {
			nl++
		}
	}
	res.Limits = make([]LimitReport, 0, nl)
	res.Ranging = make([]Range, 0, n)
	parts, idx := l.buf.blendParts(m.nRows)
	var cost float64
	res.Blend = l.lines(sol.x)
	for j := 0; j < n; j++ {
		x := math.Max(sol.x[j], 0)
		s := l.cols[j].stock
		cost += s.Price * x / 100
		if x > usedTol {
			parts = append(parts, blend.Part{Stock: s, Pct: x})
			idx = append(idx, j)
		}
	}
	cost += adds.cost
	res.CostPerTonne = cost
	res.BatchCost = cost * batch
	props, err := l.mix(parts, idx, reportTemps(l.spec, opt))
	if err != nil {
		return fmt.Errorf("optimise %s: properties of the blend: %w", specWhere(l.spec), err)
	}
	if adds.sfc != nil {
		props.SFC, props.SFCMissing = adds.sfc, nil
	}
	res.Properties = props

	// Ranging: of costs (the stock's price) and of bounds (how far a
	// holding limit's shadow price holds), on the final basis.
	rg, ferr := rangingOf(m, sol)
	if ferr != nil {
		return fmt.Errorf("optimise %s: ranging: %w", specWhere(l.spec), ferr)
	}
	nan := math.NaN()
	holds := func(lr *LimitReport, lo, hi, shift, scale float64) {
		if lr.Binding && !math.IsNaN(lo) {
			lr.HoldsFrom, lr.HoldsTo = (lo-shift)*scale, (hi-shift)*scale
		}
	}
	w := phrasing{cur: l.cat.Currency, tiny: 1e-7 * math.Max(1, cost)}
	tx := l.buf.texts(nl)
	add := func(lr LimitReport) { res.Limits = append(res.Limits, lr) }
	for k := 1; k < len(l.rows)+len(adds.rows); k++ { // row 0 is the sum
		i := k
		var ri *rowInfo
		if k < len(l.rows) {
			ri = &l.rows[k]
		} else {
			e := &adds.rows[k-len(l.rows)]
			i, ri = e.at, &e.info
		}
		v, y := sol.act[i], sol.y[i]
		shown := v
		if adds.value != nil {
			if x, ok := adds.value(i); ok {
				shown = x
			}
		}
		// binding: the LP holds the row at its bound (a linearised row's
		// bound is moved by the linearisation's constant)
		if ri.bound.HasMin() {
			lr := LimitReport{Label: ri.label + ", at least", Unit: ri.unit, Value: shown, Bound: ri.bound.Min, Binding: near(v, m.rowLo[i]), HoldsFrom: nan, HoldsTo: nan}
			if y > 0 {
				lr.ShadowPrice = -y
			}
			lo, hi := rg.RowBoundRange(i, false)
			holds(&lr, lo, hi, m.rowLo[i]-ri.bound.Min, 1)
			tx.b = append(append(tx.b, ri.key...), ".min"...)
			tx.endName()
			tx.b = w.limit(tx.b, lr, ri.label, ri.unit, false)
			tx.endExplanation()
			add(lr)
		}
		if ri.bound.HasMax() {
			lr := LimitReport{Label: ri.label + ", at most", Unit: ri.unit, Value: shown, Bound: ri.bound.Max, Binding: near(v, m.rowUp[i]), HoldsFrom: nan, HoldsTo: nan}
			if y < 0 {
				lr.ShadowPrice = -y
			}
			lo, hi := rg.RowBoundRange(i, true)
			holds(&lr, lo, hi, m.rowUp[i]-ri.bound.Max, 1)
			tx.b = append(append(tx.b, ri.key...), ".max"...)
			tx.endName()
			tx.b = w.limit(tx.b, lr, ri.label, ri.unit, true)
			tx.endExplanation()
			add(lr)
		}
	}

	var minDose float64 // Σ d_j of stocks held at smallest_share
	minUsed := math.Inf(1)
	for j := 0; j < n; j++ {
		c := &l.cols[j]
		x, d := math.Max(sol.x[j], 0), sol.d[j]
		id := c.stock.ID
		atLo := sol.basis[j] == stLower || sol.basis[j] == stFixed && d > 0
		atUp := sol.basis[j] == stUpper || sol.basis[j] == stFixed && d < 0
		ruleLo := choice != nil && choice[j] && l.rules.SmallestShare > 0 && m.colLo[j] == math.Min(l.rules.SmallestShare, m.colUp[j]) &&
			(!c.use.HasMin() || l.rules.SmallestShare > c.use.Min)
		if choice != nil && choice[j] {
			minUsed = math.Min(minUsed, x)
			if ruleLo && atLo {
				minDose += d
			}
		}
		if c.use.HasMin() {
			lr := LimitReport{Stock: id, Label: id + ", share at least", Unit: " %", Value: x, Bound: c.use.Min, Binding: near(x, c.use.Min), HoldsFrom: nan, HoldsTo: nan}
			if atLo && !ruleLo && m.colLo[j] == c.use.Min {
				lr.ShadowPrice = -d
				lo, hi := rg.ColBoundRange(j, false)
				holds(&lr, lo, hi, 0, 1)
			}
			tx.b = append(append(append(tx.b, "use."...), id...), ".min"...)
			tx.endName()
			tx.b = w.useLimit(tx.b, lr, id, false)
			tx.endExplanation()
			add(lr)
		}
		useTight := c.use.HasMax() && c.use.Max <= c.availPct
		if c.use.HasMax() {
			lr := LimitReport{Stock: id, Label: id + ", share at most", Unit: " %", Value: x, Bound: c.use.Max, Binding: near(x, c.use.Max), HoldsFrom: nan, HoldsTo: nan, Excluded: c.use.Max <= 0}
			if atUp && useTight && m.colUp[j] == c.use.Max {
				lr.ShadowPrice = -d
				lo, hi := rg.ColBoundRange(j, true)
				holds(&lr, lo, hi, 0, 1)
			}
			tx.b = append(append(append(tx.b, "use."...), id...), ".max"...)
			tx.endName()
			tx.b = w.useLimit(tx.b, lr, id, true)
			tx.endExplanation()
			add(lr)
		}
		if c.stock.Limited() {
			lr := LimitReport{Stock: id, Label: id + " on hand", Unit: " t", Value: x * batch / 100, Bound: c.stock.Available, Binding: near(x, c.availPct), HoldsFrom: nan, HoldsTo: nan}
			if atUp && !useTight && m.colUp[j] == c.availPct {
				lr.ShadowPrice = -d * 100 / batch
				lo, hi := rg.ColBoundRange(j, true)
				holds(&lr, lo, hi, 0, batch/100)
			}
			tx.b = append(append(tx.b, "avail."...), id...)
			tx.endName()
			tx.b = w.avail(tx.b, lr, id, batch)
			tx.endExplanation()
			add(lr)
		}
	}
	if choice != nil && l.rules.SmallestShare > 0 {
		if math.IsInf(minUsed, 1) {
			minUsed = 0
		}
		lr := LimitReport{Label: "smallest share of a stock in use", Unit: " %", Value: minUsed, Bound: l.rules.SmallestShare, Binding: near(minUsed, l.rules.SmallestShare), ShadowPrice: -minDose, HoldsFrom: nan, HoldsTo: nan}
		tx.b = append(tx.b, "smallest_share"...)
		tx.endName()
		tx.b = w.smallestShare(tx.b, lr)
		tx.endExplanation()
		add(lr)
	}
	tx.done(res.Limits)
	l.buf.keepTexts(tx)

	// Cost ranging: objective coefficients are price/100, so a change δ
	// of the coefficient is a price change of 100·δ. (In a [process] model
	// each stock's price sits in its total-inclusion column, so the same
	// ratio test covers the reactor-feed stocks.)
	for j := 0; j < n; j++ {
		s := l.cols[j].stock
		r := Range{Stock: s.ID, InBlend: sol.x[j] > usedTol, Price: s.Price, PriceLow: math.Inf(-1), PriceHigh: math.Inf(1)}
		switch {
		case choice != nil && !choice[j]:
			// Left out by the integer choice: the price at which it would
			// pay to take it in at the margin, rules permitting.
			if d := sol.d[j]; d > 0 {
				r.PriceLow = s.Price - 100*d
			}
		default:
			lo, hi := rg.CostRange(j)
			r.PriceLow, r.PriceHigh = s.Price+100*lo, s.Price+100*hi
		}
		res.Ranging = append(res.Ranging, r)
	}
	return nil
}

// lines is the blend of the stock columns' values x: every stock above
// usedTol, in % of batch and tonnes, the largest share first.
func (l *layout) lines(x []float64) []Line {
	var out []Line
	for j, c := range l.cols {
		if v := math.Max(x[j], 0); v > usedTol {
			out = append(out, Line{Stock: c.stock.ID, Name: c.stock.Name, Pct: v, Tonnes: v * l.spec.Batch / 100})
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].Pct > out[b].Pct })
	return out
}

// priceMaxStocks sets the shadow price of max_stocks: the saving per tonne
// from allowing one stock more (a finite difference, as the rule is an
// integer), by solving the MILP again with max_stocks + 1.
func (l *layout) priceMaxStocks(eng *engine, base *model, res *Result) error {
	r := l.rules
	used := len(res.Blend)
	lr := LimitReport{Name: "max_stocks", Label: "stocks in the blend, at most", Value: float64(used), Bound: float64(r.MaxStocks), Binding: used >= r.MaxStocks, HoldsFrom: math.NaN(), HoldsTo: math.NaN()}
	if lr.Binding && r.MaxStocks < l.n() && res.Status == Optimal {
		more := r
		more.MaxStocks++
		s, err := solveRules(eng, base, l, more)
		if err != nil {
			return err
		}
		switch s.status {
		case solNotProven:
			res.Notes = append(res.Notes, "max_stocks is not priced: "+notProvenNote(s, true))
		case solOptimal:
			var c float64
			for j := 0; j < l.n(); j++ {
				c += l.cols[j].stock.Price * math.Max(s.x[j], 0) / 100
			}
			lr.ShadowPrice = math.Max(res.CostPerTonne-c, 0)
		}
	}
	w := phrasing{cur: l.cat.Currency, tiny: 1e-7 * math.Max(1, res.CostPerTonne)}
	lr.Explain = string(w.maxStocks(nil, lr))
	res.Limits = append(res.Limits, lr)
	return nil
}
