package optimise

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// ProcessReport describes the interesterification step of a spec's
// [process] table as solved.
type ProcessReport struct {
	Method     string  // "chemical" (random) or "enzymatic" (sn-1,3)
	SFCModel   string  // "measured" or "predicted": how the reacted fat's SFC was modelled
	Feed       []Line  // each stock fed to the reactor, % of batch and tonnes; empty when the reactor is not worth using
	Tonnes     float64 // tonnes processed per batch
	Cost       float64 // processing cost per batch (currency), included in Result.BatchCost
	Iterations int     // LP solves of the successive LP (1 for measured SFC)
	Converged  bool    // false when the successive LP stopped at its iteration cap
	// SFC of the interesterified product alone (% solid by temperature), at
	// the report temperatures; nil when the reactor is not used.
	SFC map[float64]float64
}

// Tolerances and limits of the successive LP.
const (
	slpMaxIter  = 50   // LP solves at most
	slpStepTol  = 1e-4 // % of batch: the reactor feed has stopped moving
	slpSFCTol   = 0.05 // % solid: the product's true SFC meets each limit within this
	slpFDStep   = 1e-3 // finite-difference step along e_k - q (fraction of the feed)
	slpBoxStart = 25.0 // initial trust region, % of batch per feed stock
	slpBoxMin   = 1e-6 // trust region below which a rejected step ends the search
	slpPenalty  = 10.0 // merit weight of SFC violation per unit of the largest SFC shadow price
)

// solveProcess is Solve for a spec with a [process] step: stocks listed
// under interesterify may pass through the reactor together (chemical:
// random interesterification; enzymatic: sn-1,3-specific) before the final
// blend, at the process cost per tonne processed.
//
// Model. Besides the column x_j (% of batch of stock j blended directly,
// cost price_j/100) each reactor-feed stock k gets a column z_k (% of batch
// of stock k fed to the reactor, cost (price_k + cost)/100, so the objective
// stays currency per tonne of product). Interesterification moves acids
// between glycerol positions and does not change the fatty-acid composition
// (the first principle of the reaction; randomise.Distribute conserves it),
// so every [limits] row (fatty acids, IV, SV, SAFA, trans, Cox ...) is linear
// in x and z with the stock's own coefficient in both. Availability and [use]
// bounds apply to the total inclusion x_k + z_k. (The LP is solved in an
// equivalent total form, see procModel.lp.) SFC rows: the directly blended stocks contribute their
// measured curves linearly (as the plain model); the interesterified product
// contributes g(z) = Z·S(z/Z), with Z = Σ z_k and S(q) the SFC of the reacted
// feed of proportions q; the final blend's SFC is the mass-weighted sum of
// the two (the usual first estimate: physical mixes of a reacted and an
// unreacted fat are not exactly additive either).
//
// With sfc = "measured", S(q) = Σ q_k S_k is linear in the feed stocks'
// measured curves, so g(z) = Σ z_k S_k and the model is one LP. Measured
// curves do not see the reaction: in this mode the reactor only adds cost
// and is never used unless it costs nothing.
//
// With sfc = "predicted", S(q) is the TAG model: randomise.Distribute of the
// feed (chemical or enzymatic, degree 1), then sle's solid-liquid
// equilibrium. g is positively homogeneous of degree 1, so by Euler's
// theorem its linearisation at z0 is g(z) ≈ ∇g(z0)·z, exact at z0 and along
// the ray through it. ∂g/∂z_k = S(q0) + ∇S(q0)·(e_k - q0), the directional
// derivative taken by a central difference of S along e_k - q0 (see
// reactor.gradient). The successive linear programme
// (SLP; e.g. Griffith & Stewart, Management Science 7 (1961) 379, and the
// trust-region form in Nocedal & Wright, Numerical Optimization (2006),
// ch. 4 and 18, references from memory) starts from the LP with measured
// curves for the product (which leaves the reactor idle unless it is free;
// when that LP is infeasible, from the LP linearised at equal proportions),
// linearised first at the feed stocks' proportions in that blend and then,
// in a second run, at equal proportions (the SLP finds a local optimum, and
// from a feed poor in hardstock the reaction's effect looks negligible); the
// cheaper answer that meets the limits wins, the two runs sharing the cap of
// 50 LP solves. Each iteration linearises at the current point
// and solves the LP with the feed boxed to ±Δ around it. The merit of a
// point is cost + μ·(Σ violation of the SFC limits by the true predicted
// SFC, % solid), μ ten times the largest SFC shadow price seen (an exact
// penalty); a step is accepted when the merit falls by at least a tenth of
// what the LP promised (Δ doubles when by three quarters), else Δ shrinks
// to half the step. The search stops
// when an accepted step moves the feed by less than 1e-4 % of batch and the
// product's true predicted SFC meets every limit within 0.05 % solid, or
// after 50 LP solves. Shadow prices and cost ranging are those of the final
// LP: of the linearised model at the answer.
//
// An impossible spec is reported with the relaxation of the plain model
// (measured curves, no reactor): for sfc = "measured" the two models have
// the same feasible blends, for "predicted" it is an estimate (a Note says
// so). Integer [rules] together with a [process] step are not supported.
func solveProcess(cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	base, lay, err := build(cat, spec)
	if err != nil {
		return nil, err
	}
	pm, err := newProcModel(base, lay)
	if err != nil {
		return nil, err
	}
	eng := reusableEngine()
	defer eng.close()
	res := &Result{Engine: eng.name(), Currency: cat.Currency, Spec: spec.Name, Batch: spec.Batch}
	temps := reportTemps(spec, opt)

	pr := spec.Process
	rep := &ProcessReport{Method: pr.Method, SFCModel: pm.mode}
	res.Process = rep

	// Start: the LP with measured curves for the product.
	m := pm.lp(pm.measuredCoef(), nil, 0)
	sol, err := eng.solveLP(m)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: process LP: %w", specWhere(spec), err)
	}
	rep.Iterations = 1
	if sol.status == solUnbounded {
		return nil, fmt.Errorf("optimise %s: the process programme is unbounded, which a blend with shares adding to 100 %% cannot be", specWhere(spec))
	}
	if sol.status != solOptimal && pm.mode == "measured" {
		return pm.infeasible(eng, res, base, "")
	}
	if pm.mode == "measured" {
		rep.Converged = true
		return pm.finish(res, m, sol, temps, nil, "[process] sfc = \"measured\": the reacted fat's SFC is taken as the mass-weighted sum of its feed stocks' measured curves, "+
			"which do not see the reaction, so the reactor only adds cost; use sfc = \"predicted\" to let the TAG model judge what interesterification does.")
	}

	// Predicted: successive LP with a trust region on the reactor feed,
	// from each start guess of the feed proportions; the cheapest blend
	// that meets the limits wins (the SLP finds a local optimum).
	ev := newReactor(pm.feedStocks(), randomise.Method(pr.Method), pm.sfcTemps)
	var best *slpRun
	linInfeasible := false
	starts := pm.starts(sol.x)
	if sol.status != solOptimal {
		// No physical blend meets the limits; the reaction may. Start
		// from the LP linearised at equal feed proportions instead.
		q0 := starts[len(starts)-1]
		starts = starts[len(starts)-1:]
		coef, err := ev.gradient(q0)
		if err != nil {
			return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
		}
		m = pm.lp(coef, nil, 0)
		if sol, err = eng.solveLP(m); err != nil {
			return nil, fmt.Errorf("optimise %s: process LP: %w", specWhere(spec), err)
		}
		rep.Iterations++
		if sol.status != solOptimal {
			return pm.infeasible(eng, res, base, "neither the physical blends nor the linearised model of the reacted fat (at equal feed proportions) meet the limits; ")
		}
	}
	for _, q0 := range starts {
		run, err := pm.slp(eng, ev, m, sol, q0, slpMaxIter-rep.Iterations)
		if err != nil {
			return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
		}
		rep.Iterations += run.iters
		linInfeasible = linInfeasible || run.linInfeasible
		if run.viol.max <= slpSFCTol && (best == nil || run.cost < best.cost-1e-9*(1+math.Abs(best.cost))) {
			best = run
		}
		if rep.Iterations >= slpMaxIter {
			break
		}
	}
	if best == nil {
		why := ""
		if linInfeasible {
			why = "the linearised model (predicted SFC of the reacted fat) has no feasible blend; "
		}
		res.Notes = append(res.Notes, fmt.Sprintf("the successive LP found no blend whose predicted SFC meets the limits within %.2g %% solid in %d LP solves", slpSFCTol, rep.Iterations))
		return pm.infeasible(eng, res, base, why)
	}
	rep.Converged = best.converged
	if !best.converged {
		res.Notes = append(res.Notes, fmt.Sprintf("the successive LP stopped at its cap of %d LP solves before the reactor feed settled; the blend meets the limits but may not be the cheapest", slpMaxIter))
	}
	curM, curSol := best.m, best.sol
	// Duals of the linearisation at the answer without the trust-region
	// box, when that LP stays at the answer; otherwise those of the boxed LP.
	if coef, err := ev.gradient(best.q); err == nil {
		fm := pm.lp(coef, nil, 0)
		if s, err := eng.solveLP(fm); err == nil && s.status == solOptimal {
			p := pm.point(s.x)
			if maxDiff(p.z, best.cur.z) < 1e3*slpStepTol && fm.objective(s.x) <= best.cost+1e-7*(1+math.Abs(best.cost)) {
				if v, err := pm.violation(ev, p); err == nil && v.max <= slpSFCTol {
					curM, curSol = fm, s
				}
			}
		}
	}
	if boxed(curM, pm) {
		res.Notes = append(res.Notes, "the last LP of the successive LP keeps the reactor feed in a trust-region box; shadow prices do not price that box")
	}
	return pm.finish(res, curM, curSol, temps, ev, "[process] sfc = \"predicted\": the reacted fat's SFC is the TAG model's (randomise, then solid-liquid equilibrium in blend/sle), "+
		"the directly blended stocks keep their measured curves, and the final blend's SFC is the mass-weighted sum of the two (the usual first estimate; "+
		"mixes of reacted and unreacted fat are not exactly additive). Shadow prices and cost ranging are those of the linearised model at the answer (the last LP of the successive LP).")
}

// slpRun is one successive-LP search from a start guess.
type slpRun struct {
	cur           *procPoint
	q             []float64 // feed proportions the last linearisation used
	viol          viol      // true SFC violation at cur
	cost          float64
	m             *model    // the LP whose solution cur is
	sol           *solution // its solution
	iters         int
	converged     bool
	linInfeasible bool
}

// slp runs the successive LP from the start LP's solution (m, sol) with the
// feed proportions q0 as the first linearisation point, at most maxIter LP
// solves.
func (pm *procModel) slp(eng *engine, ev *reactor, m *model, sol *solution, q0 []float64, maxIter int) (*slpRun, error) {
	cur := pm.point(sol.x)
	q0 = ev.proportionsOf(cur, q0)
	v0, err := pm.violation(ev, cur)
	if err != nil {
		return nil, err
	}
	// The start has no reactor feed unless the reactor costs nothing, so
	// its true SFC is usually the measured one: a valid first point.
	run := &slpRun{cur: cur, q: q0, viol: v0, cost: m.objective(sol.x), m: m, sol: sol}
	mu := pm.penalty(sol, 0)
	delta := slpBoxStart
	for run.iters < maxIter {
		coef, err := ev.gradient(run.q)
		if err != nil {
			return nil, err
		}
		lm := pm.lp(coef, run.cur, delta)
		s, err := eng.solveLP(lm)
		run.iters++
		if err != nil {
			return nil, fmt.Errorf("process LP: %w", err)
		}
		if s.status != solOptimal && run.iters < maxIter {
			// The box may cut off every point the linearisation allows.
			lm = pm.lp(coef, nil, 0)
			s, err = eng.solveLP(lm)
			run.iters++
			if err != nil {
				return nil, fmt.Errorf("process LP: %w", err)
			}
		}
		if s.status != solOptimal {
			run.linInfeasible = true
			return run, nil
		}
		mu = pm.penalty(s, mu)
		next := pm.point(s.x)
		v, err := pm.violation(ev, next)
		if err != nil {
			return nil, err
		}
		cost := lm.objective(s.x)
		step := maxDiff(next.z, run.cur.z)
		merit := run.cost + mu*run.viol.sum
		pred := merit - cost // the LP point meets the linearised limits
		actual := merit - (cost + mu*v.sum)
		tiny := 1e-9 * (1 + math.Abs(merit))
		if step < slpStepTol && v.max <= slpSFCTol {
			run.cur, run.q, run.viol, run.cost, run.m, run.sol = next, ev.proportionsOf(next, run.q), v, cost, lm, s
			run.converged = true
			return run, nil
		}
		if pred > tiny && actual >= 0.1*pred {
			run.cur, run.q, run.viol, run.cost, run.m, run.sol = next, ev.proportionsOf(next, run.q), v, cost, lm, s
			if actual >= 0.75*pred {
				delta = math.Min(2*math.Max(delta, step), 100)
			}
			continue
		}
		if pred <= tiny && run.viol.max <= slpSFCTol {
			// No LP step promises a saving: the point is a stationary one
			// of the linearised model.
			run.converged = true
			return run, nil
		}
		delta = step / 2
		if delta < slpBoxMin {
			run.converged = run.viol.max <= slpSFCTol
			return run, nil
		}
	}
	return run, nil
}

// penalty is the merit weight of SFC violations: at least slpPenalty
// times the largest SFC-row shadow price seen (an exact penalty needs a
// weight above the multipliers), and never below the last weight mu.
func (pm *procModel) penalty(s *solution, mu float64) float64 {
	for _, i := range pm.sfcRows {
		mu = math.Max(mu, slpPenalty*math.Abs(s.y[i]))
	}
	return math.Max(mu, 1e-6)
}

// starts are the first linearisation points of the feed proportions: the
// feed stocks' shares among themselves in the start blend (when it has any),
// then equal shares.
func (pm *procModel) starts(x []float64) [][]float64 {
	K := len(pm.feed)
	eq := make([]float64, K)
	for k := range eq {
		eq[k] = 1 / float64(K)
	}
	if len(x) < pm.lay.n() { // no start blend
		return [][]float64{eq}
	}
	q := pm.startProportions(x)
	if K == 1 || maxDiff(q, eq) < 1e-6 {
		return [][]float64{eq}
	}
	return [][]float64{q, eq}
}

// procModel is the process model's layout: the base model's rows and
// stock columns, then one reactor column per feed stock.
type procModel struct {
	base     *model
	lay      *layout
	mode     string    // "measured" | "predicted"
	cost     float64   // process cost per tonne processed
	feed     []int     // stock column of each feed stock
	isFeed   []int     // feed index of each stock column, -1 when not fed
	sfcRows  []int     // base rows that are SFC limits
	sfcTemps []float64 // their temperatures
}

// newProcModel checks the [process] table against the model and lays out
// the reactor columns.
func newProcModel(base *model, lay *layout) (*procModel, error) {
	spec := lay.spec
	pr := spec.Process
	where := specWhere(spec) + ": [process]"
	if pr.Method != "chemical" && pr.Method != "enzymatic" {
		return nil, catalogue.Badf("%s method %q is not known; use \"chemical\" (random) or \"enzymatic\" (sn-1,3 lipase)", where, pr.Method)
	}
	mode := pr.SFC
	if mode == "" {
		mode = "predicted"
	}
	if mode != "measured" && mode != "predicted" {
		return nil, catalogue.Badf("%s sfc %q is not known; use \"measured\" (linear in the stocks' curves) or \"predicted\" (TAG model)", where, pr.SFC)
	}
	if !finiteNum(pr.Cost) || pr.Cost < 0 {
		return nil, catalogue.Badf("%s cost = %v is not a number >= 0; give the processing cost per tonne processed", where, pr.Cost)
	}
	if len(pr.Interesterify) == 0 {
		return nil, catalogue.Badf("%s interesterify is empty; list the stocks that go through the reactor, or remove [process]", where)
	}
	if lay.rules.Active() {
		return nil, catalogue.Badf("%s integer [rules] (max_stocks, min_if_used) together with a [process] step are not supported; remove one of the two", where)
	}
	n := lay.n()
	pm := &procModel{base: base, lay: lay, mode: mode, cost: pr.Cost, isFeed: make([]int, n)}
	for j := range pm.isFeed {
		pm.isFeed[j] = -1
	}
	for _, id := range pr.Interesterify {
		j := lay.index(id)
		if j < 0 {
			return nil, catalogue.Badf("%s interesterify names stock %q, which is not in the catalogue; check the id", where, id)
		}
		if pm.isFeed[j] >= 0 {
			return nil, catalogue.Badf("%s interesterify lists %q twice; list each stock once", where, id)
		}
		c := lay.cols[j]
		if c.use.HasMax() && c.use.Max <= 0 {
			return nil, catalogue.Badf("%s interesterify lists %q, but [use] %q = { max = 0 } excludes it from the batch; remove it from one of the two", where, id, id)
		}
		pm.isFeed[j] = len(pm.feed)
		pm.feed = append(pm.feed, j)
	}
	for i := 1; i < base.nRows; i++ {
		key := lay.rows[i].key
		for _, l := range spec.SFC {
			if sfcKey(l.Temp) == key {
				pm.sfcRows = append(pm.sfcRows, i)
				pm.sfcTemps = append(pm.sfcTemps, l.Temp)
				break
			}
		}
	}
	return pm, nil
}

func (pm *procModel) feedStocks() []*catalogue.Stock {
	out := make([]*catalogue.Stock, len(pm.feed))
	for k, j := range pm.feed {
		out[k] = pm.lay.cols[j].stock
	}
	return out
}

// measuredCoef is the SFC coefficient of each reactor column (per % of
// batch) for every SFC row, from the feed stocks' measured curves: row r,
// feed k at [r*K+k].
func (pm *procModel) measuredCoef() []float64 {
	K := len(pm.feed)
	out := make([]float64, len(pm.sfcRows)*K)
	for r, i := range pm.sfcRows {
		for k, j := range pm.feed {
			out[r*K+k] = pm.base.at(i, j)
		}
	}
	return out
}

// lp is the process LP with reactor SFC coefficients sfc (per % of batch,
// as measuredCoef), the reactor feed boxed to ±delta around at.z when at is
// non-nil.
//
// It is written in total form: the column of a feed stock is its total
// inclusion t_k = x_k + z_k (cost price/100, [use] and availability as its
// column bounds, as in the plain model), and the reactor column z_k costs
// the process alone, cost/100, with coefficients (reacted - as blended):
// zero in the sum and every fatty-acid-linear row, S'_k - S_k in an SFC
// row; a row "direct.<id>" t_k - z_k >= 0 keeps x_k >= 0. It is the model
// of solveProcess's doc comment with x_k = t_k - z_k substituted, so that
// each stock's price sits in one column (exact cost ranging) and its
// bounds stay column bounds (shadow prices as the plain report's).
func (pm *procModel) lp(sfc []float64, at *procPoint, delta float64) *model {
	b, n, K := pm.base, pm.lay.n(), len(pm.feed)
	m := newModel(n + K)
	copy(m.colName, b.colName)
	copy(m.obj, b.obj)
	copy(m.colLo, b.colLo)
	copy(m.colUp, b.colUp)
	for k, j := range pm.feed {
		c := n + k
		m.colName[c] = "ie." + b.colName[j]
		m.obj[c] = pm.cost / 100
		m.colLo[c], m.colUp[c] = 0, b.colUp[j]
		if at != nil {
			m.colLo[c] = math.Max(0, at.z[k]-delta)
			m.colUp[c] = math.Min(m.colUp[c], at.z[k]+delta)
		}
	}
	m.a = make([]float64, 0, (b.nRows+K)*(n+K))
	coef := make([]float64, n+K)
	sfcAt := make(map[int]int, len(pm.sfcRows))
	for r, i := range pm.sfcRows {
		sfcAt[i] = r
	}
	for i := 0; i < b.nRows; i++ {
		copy(coef, b.row(i))
		r, isSFC := sfcAt[i]
		for k, j := range pm.feed {
			coef[n+k] = 0 // interesterification keeps the fatty acids
			if isSFC {
				coef[n+k] = sfc[r*K+k] - b.at(i, j)
			}
		}
		m.addRow(b.rowName[i], coef, b.rowLo[i], b.rowUp[i])
	}
	for k, j := range pm.feed {
		clear(coef)
		coef[j], coef[n+k] = 1, -1
		m.addRow("direct."+b.colName[j], coef, 0, math.Inf(1))
	}
	return m
}

// boxed reports whether a reactor column of m is held by a trust-region
// bound rather than by its own.
func boxed(m *model, pm *procModel) bool {
	n := pm.lay.n()
	for k, j := range pm.feed {
		if m.colLo[n+k] > 0 || m.colUp[n+k] < pm.base.colUp[j] {
			return true
		}
	}
	return false
}

// procPoint is a blend of the process model: direct shares x (per stock
// column) and reactor feed z (per feed stock), % of batch.
type procPoint struct {
	x, z []float64
}

func (pm *procModel) point(sol []float64) *procPoint {
	n := pm.lay.n()
	p := &procPoint{x: make([]float64, n), z: make([]float64, len(pm.feed))}
	for j := range p.x {
		p.x[j] = math.Max(sol[j], 0)
	}
	for k, j := range pm.feed {
		p.z[k] = math.Max(sol[n+k], 0)
		p.x[j] = math.Max(p.x[j]-p.z[k], 0)
	}
	return p
}

// startProportions is the first guess of the feed proportions: the feed
// stocks' shares among themselves in the start blend, or equal shares.
func (pm *procModel) startProportions(x []float64) []float64 {
	q := make([]float64, len(pm.feed))
	var s float64
	for k, j := range pm.feed {
		q[k] = math.Max(x[j], 0) // the feed stock's total inclusion
		s += q[k]
	}
	for k := range q {
		if s > usedTol {
			q[k] /= s
		} else {
			q[k] = 1 / float64(len(q))
		}
	}
	return q
}

// violation is how far the true SFC of point p (measured curves for
// direct stocks, the reactor's model for the product) lies outside each
// SFC limit: the largest and the sum, in % solid.
type viol struct{ max, sum float64 }

func (pm *procModel) violation(ev *reactor, p *procPoint) (viol, error) {
	vals, err := pm.trueSFC(ev, p)
	if err != nil {
		return viol{}, err
	}
	var v viol
	for r, i := range pm.sfcRows {
		b := pm.lay.rows[i].bound
		e := math.Max(0, math.Max(b.Min-vals[r], vals[r]-b.Max))
		v.sum += e
		v.max = math.Max(v.max, e)
	}
	return v, nil
}

// trueSFC is the blend's SFC at each SFC row: Σ_j x_j S_j/100 over direct
// stocks (measured) plus Z/100 · S(q) of the reacted feed.
func (pm *procModel) trueSFC(ev *reactor, p *procPoint) ([]float64, error) {
	out := make([]float64, len(pm.sfcRows))
	for r, i := range pm.sfcRows {
		for j, x := range p.x {
			out[r] += pm.base.at(i, j) * x
		}
	}
	var Z float64
	for _, z := range p.z {
		Z += z
	}
	if Z <= usedTol {
		return out, nil
	}
	q := make([]float64, len(p.z))
	for k, z := range p.z {
		q[k] = z / Z
	}
	s, err := ev.sfc(q)
	if err != nil {
		return nil, err
	}
	for r := range out {
		out[r] += Z / 100 * s[r]
	}
	return out, nil
}

// reactor evaluates S(q), the predicted SFC of the reacted feed of
// proportions q, at the SFC limit temperatures. It keeps one sle.Set per
// acid set (the acids present change only when a feed share is zero).
type reactor struct {
	stocks []*catalogue.Stock
	method randomise.Method
	temps  []float64
	sets   map[string]*sle.Set
	work   sle.Work
	parts  []blend.Part
}

func newReactor(stocks []*catalogue.Stock, method randomise.Method, temps []float64) *reactor {
	return &reactor{stocks: stocks, method: method, temps: temps, sets: map[string]*sle.Set{}}
}

// distribute is the TAG distribution of the feed of proportions q after the
// reaction run to equilibrium (degree 1).
func (ev *reactor) distribute(q []float64) (*randomise.Distribution, error) {
	ev.parts = ev.parts[:0]
	for k, v := range q {
		if v > 0 {
			ev.parts = append(ev.parts, blend.Part{Stock: ev.stocks[k], Pct: 100 * v})
		}
	}
	d, err := randomise.Distribute(ev.parts, ev.method, 1)
	if err != nil {
		return nil, fmt.Errorf("[process] %s interesterification of the reactor feed: %w", ev.method, err)
	}
	return d, nil
}

// sfcAt is S(q) at the given temperatures.
func (ev *reactor) sfcAt(q []float64, temps []float64) ([]float64, error) {
	d, err := ev.distribute(q)
	if err != nil {
		return nil, err
	}
	var key strings.Builder
	for _, a := range d.Acids {
		key.WriteString(a.Key)
		key.WriteByte(' ')
	}
	set, ok := ev.sets[key.String()]
	if !ok {
		set = sle.NewSet(d.Acids, sle.DefaultOptions())
		ev.sets[key.String()] = set
	}
	out := make([]float64, len(temps))
	if err := set.Curve(d.Mol, temps, out, &ev.work); err != nil {
		return nil, fmt.Errorf("[process] predicted SFC of the reacted feed: %w", err)
	}
	return out, nil
}

func (ev *reactor) sfc(q []float64) ([]float64, error) { return ev.sfcAt(q, ev.temps) }

// gradient is ∂g/∂z_k = S(q) + dS along (e_k - q), per % of batch: row r,
// feed k at [r*K+k] (as procModel.measuredCoef). The directional derivative
// is a central difference of step slpFDStep, (S(q + ε(e_k - q)) -
// S(q - ε(e_k - q))) / 2ε, whose points stay within the feed proportions
// while q_k >= ε/(1+ε); otherwise a forward difference.
func (ev *reactor) gradient(q []float64) ([]float64, error) {
	K, R := len(q), len(ev.temps)
	s0, err := ev.sfc(q)
	if err != nil {
		return nil, err
	}
	out := make([]float64, R*K)
	qe := make([]float64, K)
	const h = slpFDStep
	for k := range q {
		for i := range qe {
			qe[i] = (1 - h) * q[i]
		}
		qe[k] += h
		s1, err := ev.sfc(qe)
		if err != nil {
			return nil, err
		}
		sb, span := s0, h
		if q[k] >= h/(1+h) {
			for i := range qe {
				qe[i] = (1 + h) * q[i]
			}
			qe[k] -= h
			if sb, err = ev.sfc(qe); err != nil {
				return nil, err
			}
			span = 2 * h
		}
		for r := range s0 {
			out[r*K+k] = (s0[r] + (s1[r]-sb[r])/span) / 100
		}
	}
	return out, nil
}

// proportionsOf is the feed proportions of p, or q when the reactor is not
// used.
func (ev *reactor) proportionsOf(p *procPoint, q []float64) []float64 {
	var Z float64
	for _, z := range p.z {
		Z += z
	}
	if Z <= usedTol {
		return q
	}
	out := make([]float64, len(p.z))
	for k, z := range p.z {
		out[k] = z / Z
	}
	return out
}

func maxDiff(a, b []float64) float64 {
	var d float64
	for i := range a {
		d = math.Max(d, math.Abs(a[i]-b[i]))
	}
	return d
}

// reportTemps are the SFC temperatures of a report: opt.Temps, or the
// defaults plus the spec's.
func reportTemps(spec *catalogue.Spec, opt Options) []float64 {
	if opt.Temps != nil {
		return opt.Temps
	}
	return blend.SpecTemps(spec)
}

// infeasible reports an impossible process spec with the relaxation of the
// plain model (no reactor, measured curves).
func (pm *procModel) infeasible(eng *engine, res *Result, base *model, why string) (*Result, error) {
	res.Status = Infeasible
	res.Process.Feed = nil
	r, err := pm.lay.relaxation(eng, base)
	if err != nil {
		return nil, err
	}
	res.Relaxation = r
	res.Notes = append(res.Notes, why+"the relaxation shown is that of the plain blend model (no reactor, SFC linear in measured curves)")
	return res, nil
}

// finish fills res from the optimal solution sol of the process LP m. ev is
// nil for measured SFC. note, the model's caveats, goes first in res.Notes.
func (pm *procModel) finish(res *Result, m *model, sol *solution, temps []float64, ev *reactor, note string) (*Result, error) {
	lay, spec := pm.lay, pm.lay.spec
	n, batch := lay.n(), spec.Batch
	p := pm.point(sol.x)
	rep := res.Process
	res.Status = Optimal

	total := make([]float64, n)
	copy(total, p.x)
	var Z float64
	for k, j := range pm.feed {
		total[j] += p.z[k]
		Z += p.z[k]
		if p.z[k] > usedTol {
			s := lay.cols[j].stock
			rep.Feed = append(rep.Feed, Line{Stock: s.ID, Name: s.Name, Pct: p.z[k], Tonnes: p.z[k] * batch / 100})
		}
	}
	sort.SliceStable(rep.Feed, func(a, b int) bool { return rep.Feed[a].Pct > rep.Feed[b].Pct })
	if len(rep.Feed) == 0 {
		Z = 0
	}
	rep.Tonnes = Z * batch / 100
	rep.Cost = rep.Tonnes * pm.cost

	var cost float64
	var parts []blend.Part
	for j, v := range total {
		s := lay.cols[j].stock
		cost += s.Price * v / 100
		if v > usedTol {
			res.Blend = append(res.Blend, Line{Stock: s.ID, Name: s.Name, Pct: v, Tonnes: v * batch / 100})
			parts = append(parts, blend.Part{Stock: s, Pct: v})
		}
	}
	sort.SliceStable(res.Blend, func(a, b int) bool { return res.Blend[a].Pct > res.Blend[b].Pct })
	cost += pm.cost * Z / 100
	res.CostPerTonne = cost
	res.BatchCost = cost * batch

	// Fatty acids and everything linear in them: interesterification
	// conserves the fatty-acid composition, so the product has the
	// properties of the physical mix of all stocks used.
	props, err := blend.Mix(parts, temps)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: properties of the blend: %w", specWhere(spec), err)
	}
	var rowSFC []float64 // true SFC at each SFC row
	if ev != nil {
		rowSFC, err = pm.trueSFC(ev, p)
		if err != nil {
			return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
		}
		if Z > 0 {
			q := make([]float64, len(p.z))
			for k, z := range p.z {
				q[k] = z / Z
			}
			prod, err := ev.sfcAt(q, temps)
			if err != nil {
				return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
			}
			rep.SFC = make(map[float64]float64, len(temps))
			for i, t := range temps {
				rep.SFC[t] = prod[i]
			}
			d, err := ev.distribute(q)
			if err == nil {
				res.Notes = appendUnique(res.Notes, d.Notes...)
			}
			var direct []blend.Part
			for j, x := range p.x {
				if x > usedTol {
					direct = append(direct, blend.Part{Stock: lay.cols[j].stock, Pct: x})
				}
			}
			dsfc, missing := blend.SFC(direct, temps)
			props.SFC, props.SFCMissing = map[float64]float64{}, missing
			for i, t := range temps {
				if _, lack := missing[t]; lack {
					continue
				}
				var xs float64
				for _, pt := range direct {
					xs += pt.Pct
				}
				props.SFC[t] = (xs*dsfc[t] + Z*prod[i]) / 100
			}
		}
	} else if Z > 0 {
		rep.SFC, _ = blend.SFC(feedParts(lay, pm, p), temps)
	}

	res.Properties = props

	w := words{cur: lay.cat.Currency, tiny: 1e-7 * math.Max(1, cost)}
	sfcIdx := make(map[int]int, len(pm.sfcRows))
	for r, i := range pm.sfcRows {
		sfcIdx[i] = r
	}
	for i := 1; i < pm.base.nRows; i++ {
		ri := &lay.rows[i]
		v, y := sol.act[i], sol.y[i]
		val := v
		if r, ok := sfcIdx[i]; ok && rowSFC != nil {
			val = rowSFC[r]
		}
		if ri.bound.HasMin() {
			lr := LimitReport{Name: ri.key + ".min", Value: val, Bound: ri.bound.Min, Binding: near(v, ri.bound.Min)}
			if y > 0 {
				lr.ShadowPrice = -y
			}
			lr.Explain = string(w.limit(nil, lr, ri.label, ri.unit, false))
			res.Limits = append(res.Limits, lr)
		}
		if ri.bound.HasMax() {
			lr := LimitReport{Name: ri.key + ".max", Value: val, Bound: ri.bound.Max, Binding: near(v, ri.bound.Max)}
			if y < 0 {
				lr.ShadowPrice = -y
			}
			lr.Explain = string(w.limit(nil, lr, ri.label, ri.unit, true))
			res.Limits = append(res.Limits, lr)
		}
	}
	for j := 0; j < n; j++ {
		c := &lay.cols[j]
		id := c.stock.ID
		x := total[j]
		// [use] and availability are column bounds (of the total
		// inclusion for a feed stock), as in the plain report.
		d := sol.d[j]
		atLo := sol.basis[j] == stLower || sol.basis[j] == stFixed && d > 0
		atUp := sol.basis[j] == stUpper || sol.basis[j] == stFixed && d < 0
		dLo, dUp := d, d
		if c.use.HasMin() {
			lr := LimitReport{Name: "use." + id + ".min", Value: x, Bound: c.use.Min, Binding: near(x, c.use.Min)}
			if atLo && lr.Binding {
				lr.ShadowPrice = -dLo
			}
			lr.Explain = string(w.useLimit(nil, lr, id, false))
			res.Limits = append(res.Limits, lr)
		}
		useTight := c.use.HasMax() && c.use.Max <= c.availPct
		if c.use.HasMax() {
			lr := LimitReport{Name: "use." + id + ".max", Value: x, Bound: c.use.Max, Binding: near(x, c.use.Max)}
			if atUp && useTight && lr.Binding {
				lr.ShadowPrice = -dUp
			}
			lr.Explain = string(w.useLimit(nil, lr, id, true))
			res.Limits = append(res.Limits, lr)
		}
		if c.stock.Limited() {
			lr := LimitReport{Name: "avail." + id, Value: x * batch / 100, Bound: c.stock.Available, Binding: near(x, c.availPct)}
			if atUp && !useTight && lr.Binding {
				lr.ShadowPrice = -dUp * 100 / batch
			}
			lr.Explain = string(w.avail(nil, lr, id, batch))
			res.Limits = append(res.Limits, lr)
		}
	}

	// Cost ranging: in the total form each stock's price is the cost of
	// one column, so the plain ratio test applies to every stock.
	rg, ferr := rangingOf(m, sol)
	if ferr != nil {
		return nil, fmt.Errorf("optimise %s: ranging: %w", specWhere(spec), ferr)
	}
	for j := 0; j < n; j++ {
		s := lay.cols[j].stock
		lo, hi := rg.CostRange(j)
		res.Ranging = append(res.Ranging, Range{Stock: s.ID, InBlend: sol.x[j] > usedTol, Price: s.Price,
			PriceLow: s.Price + 100*lo, PriceHigh: s.Price + 100*hi})
	}
	res.Notes = append([]string{note}, res.Notes...)
	return res, nil
}

func feedParts(lay *layout, pm *procModel, p *procPoint) []blend.Part {
	var out []blend.Part
	for k, j := range pm.feed {
		if p.z[k] > usedTol {
			out = append(out, blend.Part{Stock: lay.cols[j].stock, Pct: p.z[k]})
		}
	}
	return out
}

func appendUnique(list []string, add ...string) []string {
	for _, a := range add {
		dup := false
		for _, s := range list {
			if s == a {
				dup = true
				break
			}
		}
		if !dup {
			list = append(list, a)
		}
	}
	return list
}
