package optimise

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"lipoplan/blend"
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
	// Through is the spec's bound on the share of the batch through the
	// reactor (% of batch), nil when the optimiser chooses it; FeedRatio
	// the spec's fixed feed (fractions by stock), nil when free.
	Through   *catalogue.Bound
	FeedRatio map[string]float64
}

// FedPct is the share of the batch through the reactor, % of batch: the
// feed lines summed (0 when the reactor is not used).
func (p *ProcessReport) FedPct() float64 {
	var sum float64
	for _, l := range p.Feed {
		sum += l.Pct
	}
	return sum
}

// Tolerances and limits of the successive LP.
const (
	slpMaxIter  = 90   // LP solves at most, over all starts
	slpStepTol  = 1e-4 // % of batch: the blend has stopped moving
	slpSFCTol   = 0.05 // % solid: the blend's predicted SFC meets each limit within this
	slpFDStep   = 1e-2 // % of batch: forward-difference step of the linearisation
	slpBoxStart = 25.0 // initial trust region, % of batch per column
	slpBoxMin   = 1e-3 // % of batch: trust region below which a rejected step ends the search
	slpPenalty  = 10.0 // merit weight of SFC violation per unit of the largest SFC shadow price
	slpReactor  = 30.0 // % of batch fed to the reactor in the reactor start point
	slpGainTol  = 1e-4 // relative to the cost: a promised saving below this ends the search
	// The best blend is tried again without the stocks it uses at less than
	// slpSmallShare % of the batch, with at most slpSmallIter more LP
	// solves (procModel.dropSmall).
	slpSmallShare = 1.0
	slpSmallIter  = 30
	slpSmallMin   = 5
)

// solveProcess is Solve for a spec with a [process] step: stocks listed
// under interesterify may pass through the reactor together (chemical:
// random interesterification; enzymatic: sn-1,3-specific) before the final
// blend, at the process cost per tonne processed. The model and the search
// are procModel's.
func solveProcess(cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	eng := reusableEngine()
	defer eng.close()
	return solveProcessIn(eng, nil, nil, cat, spec, opt)
}

// solveProcessIn is solveProcess on engine eng with stock profiles from pc
// and working buffers from buf (nil: computed, allocated), as solveIn.
func solveProcessIn(eng *engine, pc *profileCache, buf *scratch, cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	predicted := spec.Process == nil || spec.Process.SFC != "measured"
	base, lay, err := buildIn(cat, spec, pc, buf, predicted)
	if err != nil {
		return nil, err
	}
	pm, err := newProcModel(base, lay)
	if err != nil {
		return nil, err
	}
	res := &Result{Engine: eng.name(), Currency: cat.Currency, Spec: spec.Name, Batch: spec.Batch}
	pr := spec.Process
	rep := &ProcessReport{Method: pr.Method, SFCModel: pm.mode, Through: pm.through}
	if pm.ratio != nil {
		rep.FeedRatio = pr.FeedShares()
	}
	res.Process = rep

	if pm.mode == "measured" {
		return pm.once(eng, res, opt, nil, "[process] sfc = \"measured\": the interesterified fat is given the SFC of its feed as blended, because measured curves cannot show what the "+
			"reaction does; so the reactor only adds cost here. Use sfc = \"predicted\" to let the TAG model judge what interesterification does to the melting.")
	}

	wb, err := newWholeBlend(pm, randomise.Method(pr.Method), opt.Model)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
	}
	if len(pm.sfcRows) == 0 {
		// No SFC limit: one LP; the TAG model only reports the SFC.
		// Converged whatever the LP's outcome: there is no search to cap.
		rep.Converged = true
		return pm.once(eng, res, opt, wb, "[process] sfc = \"predicted\" with no SFC limit: the cheapest blend is found directly, and its SFC shown is the TAG model's for the whole blend.")
	}
	f, err := pm.search(eng, wb)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
	}
	rep.Iterations = f.iters
	if f.best == nil {
		if r, ok, err := pm.demandInfeasible(eng, res, pm.freeLin()); ok || err != nil {
			return r, err
		}
		if pm.demands() {
			if r, ok, err := pm.demandSearch(eng, wb, res); ok || err != nil {
				return r, err
			}
		}
		why := ""
		if f.linInfeasible {
			why = "even the straight-line estimate of the predicted SFC admits no blend; "
		}
		res.Notes = append(res.Notes, fmt.Sprintf("no blend was found whose predicted SFC meets the limits (within %.2g %% solid) in %d trial blends", slpSFCTol, rep.Iterations))
		return pm.infeasiblePredicted(eng, wb, res, f.last, why)
	}
	rep.Converged = f.best.converged
	if !f.best.converged {
		res.Notes = append(res.Notes, fmt.Sprintf("the search stopped at its cap of %d trial blends before the blend settled: this blend meets the limits but a slightly cheaper one may exist", slpMaxIter))
	}
	if boxed(f.m, pm) {
		res.Notes = append(res.Notes, "the search ended with the blend held close to its last step, so the savings per unit shown for the limits are for small moves only")
	}
	return pm.finish(res, f.m, f.sol, opt, wb, "[process] sfc = \"predicted\": the SFC of the final blend is predicted by the TAG model for the whole blend "+
		"(the stocks blended as they are and the interesterified fat together, so no stock needs a measured curve). The blend was found by "+
		"trying blends step by step; the cheapest found that meets the limits is shown, and the savings per unit and price ranges hold near it.")
}

// once solves the process model as one LP, its SFC rows linear in the
// measured curves: sfc = "measured", or "predicted" with no SFC limit (wb
// set: the TAG model only reports the SFC). note goes first in res.Notes.
func (pm *procModel) once(eng *engine, res *Result, opt Options, wb *wholeBlend, note string) (*Result, error) {
	spec := pm.lay.spec
	m := pm.lp(pm.measuredLin(), nil, 0)
	sol, err := eng.solveLP(m)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: process LP: %w", specWhere(spec), err)
	}
	res.Process.Iterations = 1
	if sol.status == solUnbounded {
		return nil, fmt.Errorf("optimise %s: the process programme is unbounded, which a blend with shares adding to 100 %% cannot be", specWhere(spec))
	}
	if sol.status != solOptimal {
		if r, ok, err := pm.demandInfeasible(eng, res, pm.measuredLin()); ok || err != nil {
			return r, err
		}
		return pm.infeasible(eng, res)
	}
	res.Process.Converged = true
	return pm.finish(res, m, sol, opt, wb, note)
}

// slpFound is what a successive-LP search (procModel.search) found.
type slpFound struct {
	// best is the cheapest run whose blend meets the SFC limits, nil when
	// none does; m and sol are the LP whose duals report it: the
	// linearisation at its blend without the trust-region box when that LP
	// stays at the blend, otherwise best's own.
	best          *slpRun
	m             *model
	sol           *solution
	last          *procPoint // the last blend tried; nil when none
	iters         int        // LP solves, the starts' included
	linInfeasible bool       // some run's linearised model admitted no blend
}

// search runs the successive LP from each of pm's starts, sharing the cap
// of slpMaxIter LP solves among them, and keeps the cheapest blend that
// meets the SFC limits (see procModel).
func (pm *procModel) search(eng *engine, wb *wholeBlend) (*slpFound, error) {
	starts, n0, err := pm.starts(eng, wb)
	if err != nil {
		return nil, err
	}
	f := &slpFound{iters: n0}
	for i, st := range starts {
		left := slpMaxIter - f.iters
		if left <= 0 {
			break
		}
		// each start its share of what is left (the last one all of it)
		run, err := pm.slp(eng, wb, st, max(left/(len(starts)-i), min(left, 8)))
		if err != nil {
			return nil, err
		}
		f.iters += run.iters
		f.linInfeasible = f.linInfeasible || run.linInfeasible
		if run.cur != nil {
			f.last = run.cur
		}
		if run.sol != nil && run.viol.max <= slpSFCTol && (f.best == nil || run.cost < f.best.cost-1e-9*(1+math.Abs(f.best.cost))) {
			f.best = run
		}
	}
	if f.best == nil {
		return f, nil
	}
	polished, err := pm.dropSmall(eng, wb, f)
	if err != nil {
		return nil, err
	}
	best := f.best
	f.m, f.sol = best.m, best.sol
	if polished {
		// best's own LP is the model without the stocks dropped; the
		// reports read the full model, boxed tightly around the blend
		// unless the unboxed LP below stays at it. Its SFC rows are
		// elastic as in the search's LPs: the blend meets them only
		// within slpSFCTol, and with hard rows inside a box of 1e-9 the LP
		// has no answer when it is even 1e-10 short, which left the
		// reports on the model with the dropped stocks capped at 0.
		if lin, err := wb.linearise(best.cur); err == nil {
			lin.mu = pm.mu
			lm := pm.lp(lin, best.cur, 1e-9)
			if s, err := eng.solveLP(lm); err == nil && s.status == solOptimal {
				f.m, f.sol = lm, s
				f.iters++
			}
		}
	}
	// Duals of the linearisation at the answer without the trust-region
	// box, when that LP stays at the answer; otherwise those of the boxed LP.
	if lin, err := wb.linearise(best.cur); err == nil {
		fm := pm.lp(lin, nil, 0)
		if s, err := eng.solveLP(fm); err == nil && s.status == solOptimal {
			p := pm.point(s.x)
			if pm.dist(p, best.cur) < 1e3*slpStepTol && fm.objective(s.x) <= best.cost+1e-7*(1+math.Abs(best.cost)) {
				if v, err := pm.violation(wb, p); err == nil && v.max <= slpSFCTol {
					f.m, f.sol = fm, s
				}
			}
		}
	}
	return f, nil
}

// dropSmall tries the search's best blend without the stocks it uses at
// less than slpSmallShare % of the batch (and that no [use] minimum keeps
// in): the successive LP is a local search, and a stock it leaves at a
// dose of a few kilograms is often one it took in on the way and could
// not quite let go of. The blend without them is searched again from the
// best blend with them taken out, at most slpSmallIter LP solves within
// the search's cap of slpMaxIter (none when fewer than slpSmallMin are
// left), and replaces f.best when it meets the SFC limits and costs less.
// It reports whether it did.
func (pm *procModel) dropSmall(eng *engine, wb *wholeBlend, f *slpFound) (bool, error) {
	// within the search's cap, keeping two LP solves for the duals (the
	// run's own and the report's)
	budget := min(slpSmallIter, slpMaxIter-f.iters-2)
	if budget < slpSmallMin {
		return false, nil
	}
	best := f.best
	q := pm.without(func(j int) bool {
		t := best.cur.x[j]
		if k := pm.isFeed[j]; k >= 0 {
			t += best.cur.z[k]
		}
		return t > 0 && t < slpSmallShare && pm.base.colLo[j] <= 0
	})
	if q == nil {
		return false, nil
	}
	start := q.newPoint()
	for j := range start.x {
		if q.base.colUp[j] > 0 {
			start.x[j] = best.cur.x[j]
		}
	}
	for k, j := range q.feed {
		if q.base.colUp[j] > 0 {
			start.z[k] = best.cur.z[k]
		}
	}
	run, err := q.slp(eng, wb, slpStart{at: start}, budget)
	if err != nil {
		return false, err
	}
	f.iters += run.iters
	if run.sol == nil || run.viol.max > slpSFCTol || run.cost >= best.cost-1e-9*(1+math.Abs(best.cost)) {
		return false, nil
	}
	f.best = run
	return true, nil
}

// without is pm with the stock columns j for which drop(j) holds capped at
// 0 (a copy of the base model's column bounds; everything else shared), or
// nil when drop holds for none.
func (pm *procModel) without(drop func(j int) bool) *procModel {
	var colUp []float64
	for j := 0; j < pm.lay.n(); j++ {
		if !drop(j) {
			continue
		}
		if colUp == nil {
			colUp = append([]float64(nil), pm.base.colUp...)
		}
		colUp[j] = 0
	}
	if colUp == nil {
		return nil
	}
	base := *pm.base
	base.colUp = colUp
	q := *pm
	q.base = &base
	return &q
}

// slpRun is one successive-LP search from a start point.
type slpRun struct {
	cur           *procPoint
	viol          viol // predicted SFC violation at cur
	cost          float64
	m             *model    // the LP whose solution cur is; nil until one is accepted
	sol           *solution // its solution
	iters         int
	converged     bool
	linInfeasible bool
}

// slpStart is a start point of the successive LP: the blend to linearise at
// first, and whether it is an LP answer (then the first box is around it).
type slpStart struct {
	at       *procPoint
	feasible bool // an LP answer meeting every linear row
}

// slp runs the successive LP from start st, at most maxIter LP solves. Its
// LPs are elastic in the SFC rows (Fletcher & de la Maza (1989), "Nonlinear
// programming and nonsmooth optimization by successive linear programming",
// Math. Programming 43:235): each row may give way by a slack costing
// pm.mu per % solid, so every LP has an answer and its objective is the
// linear model of the merit function cost + mu · Σ violation.
func (pm *procModel) slp(eng *engine, wb *wholeBlend, st slpStart, maxIter int) (*slpRun, error) {
	v0, err := pm.violation(wb, st.at)
	if err != nil {
		return nil, err
	}
	run := &slpRun{cur: st.at, viol: v0, cost: pm.costOf(st.at)}
	mu := pm.mu
	delta := slpBoxStart
	var lin *sfcLin
	for run.iters < maxIter {
		if lin, err = wb.linearise(run.cur); err != nil {
			return nil, err
		}
		lin.mu = mu
		lm := pm.lp(lin, run.cur, delta)
		s, err := eng.solveLP(lm)
		run.iters++
		if err != nil {
			return nil, fmt.Errorf("process LP: %w", err)
		}
		if s.status != solOptimal && run.iters < maxIter {
			// The box around a start that breaks other limits may hold no
			// blend that meets them: the elastic LP unboxed.
			lm = pm.lp(lin, nil, 0)
			if s, err = eng.solveLP(lm); err != nil {
				return nil, fmt.Errorf("process LP: %w", err)
			}
			run.iters++
		}
		if s.status != solOptimal {
			run.linInfeasible = true
			return run, nil
		}
		next := pm.point(s.x)
		v, err := pm.violation(wb, next)
		if err != nil {
			return nil, err
		}
		cost := pm.costOf(next)
		if run.m == nil && !st.feasible {
			// A start that is not an LP answer: the first LP answer is the
			// search's first point.
			run.cur, run.viol, run.cost, run.m, run.sol = next, v, cost, lm, s
			continue
		}
		step := pm.dist(next, run.cur)
		merit := run.cost + mu*run.viol.sum
		pred := merit - lm.objective(s.x) // the LP's own model of the merit
		actual := merit - (cost + mu*v.sum)
		tiny := 1e-9 * (1 + math.Abs(merit))
		if step < slpStepTol && v.max <= slpSFCTol {
			run.cur, run.viol, run.cost, run.m, run.sol = next, v, cost, lm, s
			run.converged = true
			return run, nil
		}
		if pred > tiny && actual >= 0.1*pred {
			run.cur, run.viol, run.cost, run.m, run.sol = next, v, cost, lm, s
			if actual >= 0.75*pred {
				delta = math.Min(2*math.Max(delta, step), 100)
			}
			continue
		}
		if pred <= math.Max(tiny, slpGainTol*math.Abs(run.cost)) && run.viol.max <= slpSFCTol {
			// No LP step promises a saving worth having: the point is a
			// stationary one of the linearised model.
			run.converged = true
			break
		}
		delta = step / 2
		if delta < slpBoxMin {
			run.converged = run.viol.max <= slpSFCTol
			break
		}
	}
	if run.m == nil && lin != nil && run.iters < maxIter+1 {
		// Stopped at the start itself: the LP boxed tightly around it
		// gives its duals.
		lm := pm.lp(lin, run.cur, 1e-9)
		if s, err := eng.solveLP(lm); err == nil && s.status == solOptimal {
			run.m, run.sol = lm, s
			run.iters++
		}
	}
	return run, nil
}

// starts are the start points of the successive LP (see solveProcess):
// the cheapest blend ignoring the SFC limits, that blend with slpReactor %
// of the batch through the reactor in equal parts of its feed stocks, and
// the LP with measured curves when every stock that may enter has them. It
// returns them with the number of LP solves spent. A start LP without a
// feasible answer gives no start; with none at all the SFC-free blend's
// absence means the other limits cannot be met, and the linearisation at
// an equal mix of the allowed stocks is the one start.
func (pm *procModel) starts(eng *engine, wb *wholeBlend) ([]slpStart, int, error) {
	var out []slpStart
	iters := 0
	solve := func(lin *sfcLin) (*solution, error) {
		s, err := eng.solveLP(pm.lp(lin, nil, 0))
		iters++
		if err != nil {
			return nil, fmt.Errorf("process LP: %w", err)
		}
		if s.status == solUnbounded {
			return nil, fmt.Errorf("the process programme is unbounded, which a blend with shares adding to 100 %% cannot be")
		}
		return s, nil
	}
	s, err := solve(pm.freeLin())
	if err != nil {
		return nil, iters, err
	}
	if s.status != solOptimal {
		// The limits other than SFC cannot be met: start anywhere, the
		// search will say the spec is impossible.
		return []slpStart{{at: pm.equalMix()}}, iters, nil
	}
	free := pm.point(s.x)
	out = append(out, slpStart{at: free, feasible: true}, slpStart{at: pm.withReactor(free, slpReactor)})
	if pm.curvesFor() {
		s, err := solve(pm.measuredLin())
		if err != nil {
			return nil, iters, err
		}
		if s.status == solOptimal {
			out = append(out, slpStart{at: pm.point(s.x), feasible: true})
		}
	}
	return out, iters, nil
}

// equalMix is the blend of equal shares of every stock that may enter.
func (pm *procModel) equalMix() *procPoint {
	p := pm.newPoint()
	var open []int
	for j := range p.x {
		if pm.base.colUp[j] > 0 {
			open = append(open, j)
		}
	}
	for _, j := range open {
		p.x[j] = 100 / float64(len(open))
	}
	return p
}

// withReactor is p scaled to (100 - f) % with f % of the batch fed to the
// reactor in equal parts of the feed stocks (in the spec's feed ratio when
// it fixes one; f moved into the spec's through bound): a start that tries
// the reaction.
func (pm *procModel) withReactor(p *procPoint, f float64) *procPoint {
	if t := pm.through; t != nil {
		f = math.Min(math.Max(f, t.Min), t.Max)
	}
	q := pm.newPoint()
	for j, x := range p.x {
		q.x[j] = x * (100 - f) / 100
	}
	for k, z := range p.z {
		part := 1 / float64(len(p.z))
		if pm.ratio != nil {
			part = pm.ratio[k]
		}
		q.z[k] = z*(100-f)/100 + f*part
	}
	return q
}

// costOf is the cost per tonne of product of blend p.
func (pm *procModel) costOf(p *procPoint) float64 {
	var c float64
	for j, x := range p.x {
		c += pm.base.obj[j] * x
	}
	for k, j := range pm.feed {
		c += (pm.base.obj[j] + pm.cost/100) * p.z[k]
	}
	return c
}

// procModel is the model of a spec with a [process] step (solveProcess):
// the base model's rows and stock columns, then one reactor column per feed
// stock.
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
// equivalent total form, see procModel.lp.)
//
// With sfc = "measured" the SFC rows are linear in the stocks' measured
// curves, the reacted fat's curve being its feed's mass-weighted one, so the
// model is one LP. Measured curves do not see the reaction: in this mode the
// reactor only adds cost and is never used unless it costs nothing.
//
// With sfc = "predicted" the SFC of the final blend is the TAG model's for
// the whole blend (wholeBlend): the native TAGs of the stocks blended as
// they are and the interesterified TAGs of the reactor's product go through
// one solid-liquid equilibrium (sle.BlendModel). Solid fat does not add up
// over the parts of a mix, and no stock needs a measured curve. The SFC rows
// are then nonlinear in (x, z) and the cheapest blend is found by
// successive linear programming (SLP; Griffith & Stewart, Management
// Science 7 (1961) 379; the trust-region form in Nocedal & Wright,
// Numerical Optimization, 2nd ed. (2006), ch. 4 and 18): each LP has the SFC
// rows linearised at the current blend (forward differences of the TAG
// model along every column) and every column boxed to ±Δ around it. The
// merit of a blend is cost + μ·(Σ violation of the SFC limits by its
// predicted SFC, % solid), μ ten times the largest SFC shadow price seen (an
// exact penalty); a step is accepted when the merit falls by at least a
// tenth of what the LP promised (Δ doubles when by three quarters), else Δ
// shrinks to half the step. A search stops when an accepted step moves the
// blend by less than 1e-4 % of batch and the predicted SFC meets every limit
// within 0.05 % solid, or at the shared cap of 90 LP solves. SLP finds a
// local optimum, so it runs from up to three starts and keeps the cheapest
// blend that meets the limits: the LP with measured curves (when every
// stock that may enter has them), the cheapest blend ignoring the SFC
// limits, and that blend with 30 % of the batch sent through the reactor in
// equal parts of its feed stocks. The cheapest is then searched once more
// without the stocks it holds at under 1 % of the batch, and replaced when
// that is cheaper (procModel.dropSmall). Shadow prices and cost ranging are those
// of the final LP: of the linearised model at the answer.
//
// An impossible spec is reported with the relaxation of a model without
// the reactor: for "measured" the plain model (the two have the same
// feasible blends), for "predicted" the blend model with its SFC rows
// linearised at the last blend tried (an estimate; a Note says so). Integer
// [rules] together with a [process] step are not supported.
type procModel struct {
	base     *model
	lay      *layout
	mode     string    // "measured" | "predicted"
	mu       float64   // merit weight of SFC violation, currency per tonne per % solid
	cost     float64   // process cost per tonne processed
	feed     []int     // stock column of each feed stock
	isFeed   []int     // feed index of each stock column, -1 when not fed
	sfcRows  []int     // base rows that are SFC limits
	sfcTemps []float64 // their temperatures
	// The spec's demands on the reactor ([process] through, feed_ratio):
	// through bounds Σ z (% of batch), nil when free; ratio[k] is feed
	// stock k's fraction of the feed, nil when free. Trials and diagnoses
	// of other demands work on a copy (procModel.with).
	through *catalogue.Bound
	ratio   []float64
}

// newProcModel checks the [process] step against the model (what build's
// catalogue.Spec.CheckModel does not: integer rules, a feed stock that
// [use] leaves out) and lays out the reactor columns.
func newProcModel(base *model, lay *layout) (*procModel, error) {
	spec := lay.spec
	pr := spec.Process
	where := specWhere(spec) + ": [process]"
	// build has checked the table (catalogue.Spec.CheckModel): method, sfc
	// and cost are known, every feed stock is in the catalogue once.
	mode := pr.SFC
	if mode == "" {
		mode = "predicted"
	}
	if lay.rules.Active() {
		return nil, catalogue.Badf("%s integer [rules] (max_stocks, smallest_share) together with a [process] step are not supported; remove one of the two", where)
	}
	n := lay.n()
	pm := &procModel{base: base, lay: lay, mode: mode, cost: pr.Cost, isFeed: make([]int, n)}
	// An exact penalty needs a weight above every SFC shadow price; a
	// shadow price is a cost per tonne per % solid, which no blend of these
	// stocks can make larger than ten times the dearest stock's price.
	pm.mu = 1000.0
	for j := 0; j < n; j++ {
		pm.mu = math.Max(pm.mu, 10*100*base.obj[j])
	}
	for j := range pm.isFeed {
		pm.isFeed[j] = -1
	}
	for _, id := range pr.Interesterify {
		j := lay.index(id)
		if j < 0 || pm.isFeed[j] >= 0 {
			return nil, fmt.Errorf("optimise: %s feed %q not checked (catalogue.Spec.CheckModel)", where, id)
		}
		c := lay.cols[j]
		if c.use.HasMax() && c.use.Max <= 0 {
			return nil, catalogue.Badf("%s interesterify lists %q, but [use] %q = { max = 0 } excludes it from the batch; remove it from one of the two", where, id, id)
		}
		pm.isFeed[j] = len(pm.feed)
		pm.feed = append(pm.feed, j)
	}
	if pr.Through != nil {
		b := *pr.Through
		pm.through = &b
	}
	if shares := pr.FeedShares(); shares != nil {
		pm.ratio = make([]float64, len(pm.feed))
		for k, j := range pm.feed {
			pm.ratio[k] = shares[lay.cols[j].stock.ID]
		}
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

// curvesFor reports whether every stock that may enter has a measured SFC
// at each of the spec's SFC temperatures.
func (pm *procModel) curvesFor() bool {
	for j, c := range pm.lay.cols {
		if c.noCurve && pm.base.colUp[j] > 0 {
			return false
		}
	}
	return true
}

// sfcLin is a linear model of the SFC rows: row r has coefficient
// coef[r][c] per % of batch for LP column c (the n stock totals, then the K
// reactor columns) and its bounds moved by shift[r] (the constant of a
// linearisation carried to the right-hand side). With free set the rows
// hold no limit. With mu > 0 each side of an SFC row may give way by a
// slack column ("slack.<row>.min"/".max", cost mu per % solid).
type sfcLin struct {
	coef  [][]float64
	shift []float64
	free  bool
	mu    float64 // > 0: each SFC row side gets an elastic slack costing mu per % solid
}

// measuredLin is the SFC rows linear in the measured curves: a stock's
// coefficient is its curve's value, and a reactor column's is zero, since
// the reacted fat's measured-linear curve is its feed's.
func (pm *procModel) measuredLin() *sfcLin {
	n, K := pm.lay.n(), len(pm.feed)
	lin := &sfcLin{coef: make([][]float64, len(pm.sfcRows)), shift: make([]float64, len(pm.sfcRows))}
	for r, i := range pm.sfcRows {
		lin.coef[r] = make([]float64, n+K)
		copy(lin.coef[r], pm.base.row(i))
	}
	return lin
}

// freeLin is the SFC rows holding no limit: the cheapest blend that meets
// every other limit.
func (pm *procModel) freeLin() *sfcLin {
	lin := pm.measuredLin()
	for r := range lin.coef {
		clear(lin.coef[r])
	}
	lin.free = true
	return lin
}

// lp is the process LP with the SFC rows of lin, every column boxed to
// ±delta around blend at when at is non-nil.
//
// It is written in total form: the column of a feed stock is its total
// inclusion t_k = x_k + z_k (cost price/100, [use] and availability as its
// column bounds, as in the plain model), and the reactor column z_k costs
// the process alone, cost/100, with coefficient zero in the sum and every
// fatty-acid-linear row and lin's in the SFC rows; a row "direct.<id>"
// t_k - z_k >= 0 keeps x_k >= 0. It is the model of solveProcess's doc
// comment with x_k = t_k - z_k substituted, so that each stock's price sits
// in one column (exact cost ranging) and its bounds stay column bounds
// (shadow prices as the plain report's).
func (pm *procModel) lp(lin *sfcLin, at *procPoint, delta float64) *model {
	b, n, K := pm.base, pm.lay.n(), len(pm.feed)
	E := 0
	if lin.mu > 0 && !lin.free {
		E = 2 * len(pm.sfcRows)
	}
	m := newModel(n + K + E)
	copy(m.colName, b.colName)
	copy(m.obj, b.obj)
	copy(m.colLo, b.colLo)
	copy(m.colUp, b.colUp)
	for k, j := range pm.feed {
		c := n + k
		m.colName[c] = "ie." + b.colName[j]
		m.obj[c] = pm.cost / 100
		m.colLo[c], m.colUp[c] = 0, b.colUp[j]
	}
	if at != nil {
		for j := 0; j < n; j++ {
			t := at.x[j]
			if k := pm.isFeed[j]; k >= 0 {
				t += at.z[k]
			}
			m.colLo[j] = math.Max(b.colLo[j], t-delta)
			m.colUp[j] = math.Min(b.colUp[j], t+delta)
			if m.colLo[j] > m.colUp[j] { // at lies outside the bounds: keep them
				m.colLo[j], m.colUp[j] = b.colLo[j], b.colUp[j]
			}
		}
		for k := range pm.feed {
			c := n + k
			m.colLo[c] = math.Max(0, at.z[k]-delta)
			m.colUp[c] = math.Min(m.colUp[c], at.z[k]+delta)
			if m.colLo[c] > m.colUp[c] {
				m.colLo[c], m.colUp[c] = 0, b.colUp[pm.feed[k]]
			}
		}
	}
	for r, i := range pm.sfcRows {
		if E == 0 {
			break
		}
		for side, name := range []string{".min", ".max"} {
			c := n + K + 2*r + side
			m.colName[c] = "slack." + b.rowName[i] + name
			m.obj[c] = lin.mu
			m.colLo[c], m.colUp[c] = 0, math.Inf(1)
		}
	}
	m.a = make([]float64, 0, (b.nRows+K)*(n+K+E))
	coef := make([]float64, n+K+E)
	sfcAt := make(map[int]int, len(pm.sfcRows))
	for r, i := range pm.sfcRows {
		sfcAt[i] = r
	}
	for i := 0; i < b.nRows; i++ {
		lo, up := b.rowLo[i], b.rowUp[i]
		clear(coef)
		if r, isSFC := sfcAt[i]; isSFC {
			copy(coef, lin.coef[r])
			lo, up = lo+lin.shift[r], up+lin.shift[r]
			if lin.free {
				lo, up = math.Inf(-1), math.Inf(1)
			}
			if E > 0 {
				coef[n+K+2*r], coef[n+K+2*r+1] = 1, -1 // row + s_min - s_max
			}
		} else {
			copy(coef, b.row(i))
			for k := range pm.feed {
				coef[n+k] = 0 // interesterification keeps the fatty acids
			}
		}
		m.addRow(b.rowName[i], coef, lo, up)
	}
	for k, j := range pm.feed {
		clear(coef)
		coef[j], coef[n+k] = 1, -1
		m.addRow("direct."+b.colName[j], coef, 0, math.Inf(1))
	}
	if t := pm.through; t != nil {
		clear(coef)
		for k := range pm.feed {
			coef[n+k] = 1
		}
		m.addRow(throughKey, coef, t.Min, t.Max)
	}
	// z_k - r_k·Σ z = 0 for every feed stock but the last (the last
	// follows from the others)
	for k := 0; k+1 < len(pm.ratio); k++ {
		clear(coef)
		for q := range pm.feed {
			coef[n+q] = -pm.ratio[k]
		}
		coef[n+k] += 1
		m.addRow("ratio."+b.colName[pm.feed[k]], coef, 0, 0)
	}
	return m
}

// throughKey is the row of the share of the batch through the reactor;
// its limits are reported as "process.through.min" and ".max".
const throughKey = "process.through"

// throughRow is the report row of the through bound in an LP of pm.lp:
// after the base rows and the K "direct" rows.
func (pm *procModel) throughRow() (extraRow, bool) {
	if pm.through == nil {
		return extraRow{}, false
	}
	return extraRow{at: pm.base.nRows + len(pm.feed), info: rowInfo{
		key: throughKey, label: "reactor throughput", unit: " % of the batch", bound: *pm.through, scale: 1,
	}}, true
}

// boxed reports whether a column of m is held by a trust-region bound
// rather than by its own.
func boxed(m *model, pm *procModel) bool {
	n := pm.lay.n()
	for j := 0; j < n; j++ {
		if m.colLo[j] > pm.base.colLo[j] || m.colUp[j] < pm.base.colUp[j] {
			return true
		}
	}
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

func (pm *procModel) newPoint() *procPoint {
	return &procPoint{x: make([]float64, pm.lay.n()), z: make([]float64, len(pm.feed))}
}

// point is the blend of an LP solution (total form: t then z).
func (pm *procModel) point(sol []float64) *procPoint {
	n := pm.lay.n()
	p := pm.newPoint()
	for j := range p.x {
		p.x[j] = math.Max(sol[j], 0)
	}
	for k, j := range pm.feed {
		p.z[k] = math.Max(sol[n+k], 0)
		p.x[j] = math.Max(p.x[j]-p.z[k], 0)
	}
	return p
}

// dist is the largest difference between p and q in any LP column (a
// stock's total inclusion or a reactor column), % of batch: the measure of
// the trust-region box.
func (pm *procModel) dist(p, q *procPoint) float64 {
	d := maxDiff(p.z, q.z)
	for j := range p.x {
		tp, tq := p.x[j], q.x[j]
		if k := pm.isFeed[j]; k >= 0 {
			tp, tq = tp+p.z[k], tq+q.z[k]
		}
		d = math.Max(d, math.Abs(tp-tq))
	}
	return d
}

// violation is how far the predicted SFC of point p lies outside each SFC
// limit: the largest and the sum, in % solid.
type viol struct{ max, sum float64 }

func (pm *procModel) violation(wb *wholeBlend, p *procPoint) (viol, error) {
	vals, err := wb.rows(p)
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

// demands reports whether the spec makes demands on the reactor: a share
// through it or a fixed feed.
func (pm *procModel) demands() bool { return pm.through != nil || pm.ratio != nil }

// with is pm with the reactor demands through and ratio (nil: none) in
// place of the spec's: a copy sharing everything else, for the trials and
// diagnoses of other demands.
func (pm *procModel) with(through *catalogue.Bound, ratio []float64) *procModel {
	q := *pm
	q.through, q.ratio = through, ratio
	return &q
}

// fed is the share of the batch that blend p sends through the reactor (the
// feed stocks above usedTol), % of batch.
func (pm *procModel) fed(p *procPoint) float64 {
	var Z float64
	for _, z := range p.z {
		if z > usedTol {
			Z += z
		}
	}
	return Z
}

// demandInfeasible reports an impossible spec whose reactor demands are
// the cause (ok true): the largest share of the batch that can pass
// through the reactor under the limits of lin (every linear limit, and the
// SFC rows as lin has them) and the feed ratio, against the spec's
// minimum, or a feed ratio that the limits leave no blend for. It is not
// the cause (ok false) when the spec is impossible without the demands
// too, or when they are not what blocks it.
func (pm *procModel) demandInfeasible(eng *engine, res *Result, lin *sfcLin) (*Result, bool, error) {
	if !pm.demands() {
		return nil, false, nil
	}
	spec := pm.lay.spec
	solve := func(m *model) (*solution, error) {
		s, err := eng.solveLP(m)
		if err != nil {
			return nil, fmt.Errorf("optimise %s: reactor demands: %w", specWhere(spec), err)
		}
		return s, nil
	}
	s, err := solve(pm.with(nil, nil).lp(lin, nil, 0))
	if err != nil || s.status != solOptimal {
		return nil, false, err // impossible without the demands: the plain diagnosis
	}
	// The most that can go through with the feed ratio: max Σ z.
	m := pm.with(nil, pm.ratio).lp(lin, nil, 0)
	clear(m.obj)
	n := pm.lay.n()
	for k := range pm.feed {
		m.obj[n+k] = -1
	}
	if s, err = solve(m); err != nil {
		return nil, false, err
	}
	res.Status = Infeasible
	res.Process.Feed = nil
	basis := "with the other limits"
	if lin.free {
		basis = "with the limits other than SFC"
	}
	if s.status != solOptimal {
		res.Notes = append(res.Notes, fmt.Sprintf("the fixed feed_ratio of the reactor (%s) leaves no blend that meets the spec %s: change the parts or remove feed_ratio to let the blend choose the feed", pm.ratioWords(), basis))
		return res, true, nil
	}
	most := -s.obj
	t := pm.through
	if t == nil || !t.HasMin() || most >= t.Min-1e-7 {
		return nil, false, nil
	}
	with := ""
	if pm.ratio != nil {
		with = " and the feed held at " + pm.ratioWords()
	}
	res.Relaxation = []Relax{{Name: throughKey + ".min", By: t.Min - math.Max(most, 0)}}
	res.Notes = append(res.Notes, fmt.Sprintf("the spec asks for at least %.2f %% of the batch through the reactor, but %s%s at most %.2f %% can go through; "+
		"lower through min, or allow more of the feed stocks (what is on hand, their [use] caps, the limits they fill)", t.Min, basis, with, math.Max(most, 0)))
	return res, true, nil
}

// demandSearch diagnoses a predicted-SFC spec that no blend was found for
// when its reactor demands may be the cause (ok true when they are): the
// search is run again without the through minimum (the feed ratio kept),
// then without the feed ratio; when a blend is found, the largest through
// minimum that still admits one is found by bisection between the share
// that blend sends through the reactor and the spec's minimum, to within
// demandTol % of the batch, and offered as the relaxation
// process.through.min. Each trial is a search of its own on the same model
// (procModel.with).
func (pm *procModel) demandSearch(eng *engine, wb *wholeBlend, res *Result) (*Result, bool, error) {
	spec := pm.lay.spec
	try := func(through *catalogue.Bound, ratio []float64) (*slpFound, error) {
		f, err := pm.with(through, ratio).search(eng, wb)
		if err != nil {
			return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
		}
		return f, nil
	}
	t := pm.through
	if t != nil && t.HasMin() && t.Min > 0 {
		rest := *t
		rest.Min = math.Inf(-1)
		var loose *catalogue.Bound
		if rest.HasMax() {
			loose = &rest
		}
		f, err := try(loose, pm.ratio)
		if err != nil {
			return nil, false, err
		}
		if f.best != nil {
			lo, hi := pm.fed(pm.point(f.sol.x)), t.Min // feasible, infeasible
			for hi-lo > demandTol {
				mid := (lo + hi) / 2
				b := *t
				b.Min = mid
				f, err := try(&b, pm.ratio)
				if err != nil {
					return nil, false, err
				}
				if f.best != nil {
					lo = mid
				} else {
					hi = mid
				}
			}
			with := ""
			if pm.ratio != nil {
				with = " with the feed held at " + pm.ratioWords()
			}
			res.Process.Feed = nil
			res.Status = Infeasible
			res.Relaxation = []Relax{{Name: throughKey + ".min", By: t.Min - lo}}
			res.Notes = append(res.Notes, fmt.Sprintf("the spec asks for at least %.2f %% of the batch through the reactor%s, but then no blend's predicted SFC meets the limits; "+
				"by trial, about %.1f %% can go through (to within %.1f %% of the batch): lower through min, or widen the SFC limits", t.Min, with, lo, demandTol))
			return res, true, nil
		}
	}
	if pm.ratio == nil {
		return nil, false, nil
	}
	f, err := try(t, nil)
	if err != nil {
		return nil, false, err
	}
	if f.best == nil {
		return nil, false, nil // impossible without the demands too
	}
	res.Process.Feed = nil
	res.Status = Infeasible
	res.Notes = append(res.Notes, fmt.Sprintf("with the reactor feed held at %s no blend's predicted SFC meets the limits, but with the feed left free one does (%.2f %s per tonne): change the parts or remove feed_ratio",
		pm.ratioWords(), pm.costOf(pm.point(f.sol.x)), res.Currency))
	return res, true, nil
}

// demandTol is the precision, % of batch, of the largest share through the
// reactor that demandSearch reports.
const demandTol = 0.5

// ratioWords is the fixed feed in words, e.g. "palm-st-hard 60 % : pko 40 %".
func (pm *procModel) ratioWords() string {
	parts := make([]string, len(pm.feed))
	for k, j := range pm.feed {
		parts[k] = fmt.Sprintf("%s %.4g %%", pm.lay.cols[j].stock.ID, 100*pm.ratio[k])
	}
	return strings.Join(parts, " : ")
}

// infeasible reports an impossible process spec with the relaxation of the
// plain model (no reactor, measured curves).
func (pm *procModel) infeasible(eng *engine, res *Result) (*Result, error) {
	res.Status = Infeasible
	res.Process.Feed = nil
	r, err := pm.lay.relaxation(eng, pm.base)
	if err != nil {
		return nil, err
	}
	res.Relaxation = r
	res.Notes = append(res.Notes, "the change shown is for the blend without the reactor, with SFC from the measured curves")
	return res, nil
}

// infeasiblePredicted reports an impossible predicted-SFC spec with the
// relaxation of the blend model without the reactor whose SFC rows are the
// TAG model linearised at the physical mix of last (the last blend the
// search tried; an equal mix of the allowed stocks when there is none).
func (pm *procModel) infeasiblePredicted(eng *engine, wb *wholeBlend, res *Result, last *procPoint, why string) (*Result, error) {
	res.Status = Infeasible
	res.Process.Feed = nil
	at := pm.equalMix()
	if last != nil {
		copy(at.x, last.x)
		for k, j := range pm.feed {
			at.x[j] += last.z[k]
		}
	}
	lin, err := wb.linearise(at)
	if err != nil {
		return nil, fmt.Errorf("optimise %s: %w", specWhere(pm.lay.spec), err)
	}
	m := pm.base.clone()
	n := pm.lay.n()
	for r, i := range pm.sfcRows {
		copy(m.row(i), lin.coef[r][:n])
		m.rowLo[i] += lin.shift[r]
		m.rowUp[i] += lin.shift[r]
	}
	rel, err := pm.lay.relaxation(eng, m)
	if err != nil {
		return nil, err
	}
	res.Relaxation = rel
	res.Notes = append(res.Notes, why+"the change shown is for the blend without the reactor, with the TAG model's SFC estimated near the last blend tried: an estimate; apply it and solve again to check")
	return res, nil
}

// finish fills res from the optimal solution sol of the process LP m: the
// plain report (layout.report) of the stocks' total inclusions, with the
// processing cost, the reactor's lines and, for predicted SFC (wb not nil),
// the whole blend's predicted SFC. note, the model's caveats, goes first in
// res.Notes.
func (pm *procModel) finish(res *Result, m *model, sol *solution, opt Options, wb *wholeBlend, note string) (*Result, error) {
	lay, spec := pm.lay, pm.lay.spec
	batch := spec.Batch
	temps := reportTemps(spec, opt)
	p := pm.point(sol.x)
	rep := res.Process
	res.Status = Optimal
	for k, j := range pm.feed {
		if p.z[k] > usedTol {
			s := lay.cols[j].stock
			rep.Feed = append(rep.Feed, Line{Stock: s.ID, Name: s.Name, Pct: p.z[k], Tonnes: p.z[k] * batch / 100})
		}
	}
	Z := pm.fed(p)
	sort.SliceStable(rep.Feed, func(a, b int) bool { return rep.Feed[a].Pct > rep.Feed[b].Pct })
	rep.Tonnes = Z * batch / 100
	rep.Cost = rep.Tonnes * pm.cost

	// Fatty acids and everything linear in them: interesterification
	// conserves the fatty-acid composition, so the product has the
	// properties of the physical mix of all stocks used (the plain report).
	adds := &reportAdds{cost: pm.cost * Z / 100}
	if r, ok := pm.throughRow(); ok {
		adds.rows = append(adds.rows, r)
	}
	if wb != nil {
		rowSFC, err := wb.rows(p)
		if err != nil {
			return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
		}
		sfcIdx := make(map[int]int, len(pm.sfcRows))
		for r, i := range pm.sfcRows {
			sfcIdx[i] = r
		}
		adds.value = func(i int) (float64, bool) {
			r, ok := sfcIdx[i]
			if !ok {
				return 0, false
			}
			return rowSFC[r], true
		}
		whole, product, err := wb.report(p, temps)
		if err != nil {
			return nil, fmt.Errorf("optimise %s: %w", specWhere(spec), err)
		}
		adds.sfc = whole
		if Z > 0 {
			rep.SFC = product
		}
	} else if Z > 0 {
		rep.SFC, _ = blend.SFC(feedParts(lay, pm, p), temps)
	}
	if err := lay.report(res, m, sol, nil, opt, adds); err != nil {
		return nil, err
	}
	if wb != nil {
		var used []blend.Part
		for _, l := range res.Blend {
			s, _ := lay.cat.Find(l.Stock)
			used = append(used, blend.Part{Stock: s, Pct: l.Pct})
		}
		res.Notes = appendUnique(res.Notes, wb.notes(used)...)
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
