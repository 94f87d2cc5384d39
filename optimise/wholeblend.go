package optimise

import (
	"fmt"
	"strings"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// wholeBlend is the predicted-SFC model of a [process] spec: the SFC of the
// final blend (stocks blended as they are plus the reactor's product) from
// the TAG model of the whole blend, at the spec's SFC temperatures
// (sle.BlendModel). Only stocks that may enter are modelled; one that lacks
// a composition the TAG model can use is bad input naming it.
type wholeBlend struct {
	pm      *procModel
	method  randomise.Method
	opt     sle.Options
	stocks  []*catalogue.Stock
	pos     []int // model position of each stock column, -1 when it cannot enter
	model   *sle.BlendModel
	direct  []float64 // scratch, per model stock
	feed    []float64
	out     []float64
	fd      []float64 // scratch: a perturbed prediction
	perturb *procPoint
}

func newWholeBlend(pm *procModel, method randomise.Method, opt sle.Options) (*wholeBlend, error) {
	wb := &wholeBlend{pm: pm, method: method, opt: opt, pos: make([]int, pm.lay.n())}
	for j, c := range pm.lay.cols {
		wb.pos[j] = -1
		if pm.base.colUp[j] > 0 {
			wb.pos[j] = len(wb.stocks)
			wb.stocks = append(wb.stocks, c.stock)
		}
	}
	if len(wb.stocks) == 0 {
		return nil, catalogue.Badf("%s: every stock is excluded; allow at least one", specWhere(pm.lay.spec))
	}
	m, err := sle.NewBlendModel(wb.stocks, method, pm.sfcTemps, opt)
	if err != nil {
		return nil, fmt.Errorf("[process] sfc = \"predicted\": %w (or exclude the stock with [use] ... = { max = 0 })", err)
	}
	wb.model = m
	k := len(wb.stocks)
	wb.direct, wb.feed = make([]float64, k), make([]float64, k)
	wb.out, wb.fd = make([]float64, len(pm.sfcTemps)), make([]float64, len(pm.sfcTemps))
	wb.perturb = pm.newPoint()
	return wb, nil
}

// shares fills the model's direct and feed shares from blend p.
func (wb *wholeBlend) shares(p *procPoint) {
	clear(wb.direct)
	clear(wb.feed)
	for j, x := range p.x {
		if q := wb.pos[j]; q >= 0 {
			wb.direct[q] = x
		}
	}
	for k, j := range wb.pm.feed {
		if q := wb.pos[j]; q >= 0 {
			wb.feed[q] = p.z[k]
		}
	}
}

// predict writes the predicted SFC of p at the SFC rows' temperatures.
func (wb *wholeBlend) predict(p *procPoint, out []float64) error {
	wb.shares(p)
	return wb.model.SFC(wb.direct, wb.feed, out)
}

// rows is the predicted SFC of blend p at each SFC row (a new slice).
func (wb *wholeBlend) rows(p *procPoint) ([]float64, error) {
	out := make([]float64, len(wb.out))
	if err := wb.predict(p, out); err != nil {
		return nil, err
	}
	return out, nil
}

// linearise is the SFC rows linearised at blend p, in the LP's columns (the
// total form of procModel.lp): G(w) ≈ G(p) + Σ_c g_c (w_c - p_c) with g_c
// the forward difference of the predicted SFC along column c (step
// slpFDStep % of batch; the TAG model scales shares to the blend it is
// given, so a step along one column is a slightly larger share of it).
// A stock column's step adds to the stock blended as it is; a reactor
// column's moves the stock from direct blending into the reactor feed (the
// total form's z_k at fixed t_k). Columns that cannot enter get zero.
func (wb *wholeBlend) linearise(p *procPoint) (*sfcLin, error) {
	pm := wb.pm
	n, K, R := pm.lay.n(), len(pm.feed), len(pm.sfcRows)
	g0 := make([]float64, R)
	if err := wb.predict(p, g0); err != nil {
		return nil, err
	}
	lin := &sfcLin{coef: make([][]float64, R), shift: make([]float64, R)}
	for r := range lin.coef {
		lin.coef[r] = make([]float64, n+K)
	}
	q := wb.perturb
	const h = slpFDStep
	step := func(c int) error {
		if err := wb.predict(q, wb.fd); err != nil {
			return err
		}
		for r := range g0 {
			lin.coef[r][c] = (wb.fd[r] - g0[r]) / h
		}
		return nil
	}
	for j := 0; j < n; j++ {
		if wb.pos[j] < 0 {
			continue
		}
		copy(q.x, p.x)
		copy(q.z, p.z)
		q.x[j] += h
		if err := step(j); err != nil {
			return nil, err
		}
	}
	for k, j := range pm.feed {
		if wb.pos[j] < 0 {
			continue
		}
		// dG/dz_k at fixed t_k: one unit moved from direct into the feed
		// = (dG/dz_k as an added feed) - (dG/dx_j); the added-feed
		// derivative first, then the direct one is subtracted.
		copy(q.x, p.x)
		copy(q.z, p.z)
		q.z[k] += h
		if err := step(n + k); err != nil {
			return nil, err
		}
		for r := range lin.coef {
			lin.coef[r][n+k] -= lin.coef[r][j]
		}
	}
	// Carry the constant to the bounds: Σ_c g_c w_c ∈ [lo, up] - G(p) + g·p.
	for r := range lin.coef {
		gp := 0.0
		for j := 0; j < n; j++ {
			t := p.x[j]
			if k := pm.isFeed[j]; k >= 0 {
				t += p.z[k]
			}
			gp += lin.coef[r][j] * t
		}
		for k := range pm.feed {
			gp += lin.coef[r][n+k] * p.z[k]
		}
		lin.shift[r] = gp - g0[r]
	}
	return lin, nil
}

// report is the predicted SFC of blend p at temps: of the whole blend, and
// of the reactor's product alone (nil when nothing is fed).
func (wb *wholeBlend) report(p *procPoint, temps []float64) (whole, product map[float64]float64, err error) {
	m, err := sle.NewBlendModel(wb.stocks, wb.method, temps, wb.opt)
	if err != nil {
		return nil, nil, err
	}
	out := make([]float64, len(temps))
	wb.shares(p)
	if err := m.SFC(wb.direct, wb.feed, out); err != nil {
		return nil, nil, err
	}
	whole = make(map[float64]float64, len(temps))
	for i, t := range temps {
		whole[t] = out[i]
	}
	var fed float64
	for _, v := range wb.feed {
		fed += v
	}
	if fed <= usedTol {
		return whole, nil, nil
	}
	if err := m.SFC(nil, wb.feed, out); err != nil {
		return nil, nil, err
	}
	product = make(map[float64]float64, len(temps))
	for i, t := range temps {
		product[t] = out[i]
	}
	return whole, product, nil
}

// notes are the TAG model's assumptions about the stocks used and its
// error: against each used stock's own measured curve, and as measured on
// typical curves (sle.MeasuredError).
func (wb *wholeBlend) notes(used []blend.Part) []string {
	var out []string
	// the model's notes once each, in the model's order (not a map's
	// random one, which shuffled the report's notes from run to run)
	var inModel []string
	seen := map[string]bool{}
	for _, n := range wb.model.Notes() {
		if !seen[n] {
			seen[n] = true
			inModel = append(inModel, n)
		}
	}
	var fits []string
	for _, pt := range used {
		for _, n := range inModel {
			if strings.Contains(n, fmt.Sprintf("%q", pt.Stock.ID)) {
				out = append(out, n)
			}
		}
		if len(pt.Stock.SFC) == 0 {
			continue
		}
		if f, err := sle.FitStock(pt.Stock, wb.opt); err == nil {
			fits = append(fits, fmt.Sprintf("%s %.1f", f.Stock, f.RMS))
		}
	}
	model := "TAG model: " + sle.Describe(wb.opt)
	if len(fits) > 0 {
		model += "; its error against the measured curves of the stocks used, RMS % solid: " + strings.Join(fits, ", ")
	}
	out = append(out, model, "In general "+sle.MeasuredError)
	return out
}
