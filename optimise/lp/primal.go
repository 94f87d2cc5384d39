package lp

import "math"

// primal runs the primal simplex: phase 1 (minimise the sum of the basic
// variables' bound violations, Maros 2003, ch. 9) while the basis is
// primal infeasible, then phase 2 on the problem's costs, until no reduced
// cost prices a variable in (Optimal), a ray proves the objective
// unbounded, or phase 1 ends with infeasibility left (Infeasible).
func (s *Simplex) primal() (Status, error) {
	s.devex = resize(s.devex, s.n+s.m)
	for k := range s.devex {
		s.devex[k] = 1
	}
	perturbed := false
	phase1 := s.primalInfeasibility() > tolPrimal
	for {
		if s.iters >= s.maxIter {
			return 0, ErrIterationLimit
		}
		if s.lu.due() {
			if err := s.primalRefresh(phase1); err != nil {
				return 0, err
			}
		}
		if phase1 && !s.phase1Prices() {
			phase1 = false
			s.computeD()
			for k := range s.devex {
				s.devex[k] = 1
			}
		}
		q := s.primalPricing()
		if q < 0 {
			if s.lu.updates() > 0 {
				// Confirm on values recomputed from the factors.
				s.computeX()
				if !phase1 {
					s.computeD()
				}
				if phase1 && !s.phase1Prices() {
					continue
				}
				if q = s.primalPricing(); q >= 0 {
					continue
				}
			}
			if phase1 {
				// What violation is left may be within the verdict
				// tolerance; then it is rounding, and phase 2 goes on.
				small := true
				for _, k := range s.head {
					if (s.x[k] < s.lo[k]-tolPrimal || s.x[k] > s.up[k]+tolPrimal) && !s.accept(k) {
						small = false
					}
				}
				if small {
					continue
				}
				s.keepPhase1Farkas()
				return Infeasible, nil
			}
			return Optimal, nil
		}
		dir := 1.0 // x_q increases
		if s.d[q] > 0 {
			dir = -1
		}
		clear(s.wRow)
		s.addCol(q, 1, s.wRow)
		s.lu.ftran(s.wRow, s.alphaQ)
		r, theta, flip, atUpper := s.primalRatio(q, dir, phase1)
		if flip {
			// The entering variable reaches its other bound first.
			span := s.up[q] - s.lo[q]
			for i, a := range s.alphaQ {
				if a != 0 {
					s.x[s.head[i]] -= dir * span * a
				}
			}
			if s.stat[q] == AtLower {
				s.stat[q] = AtUpper
			} else {
				s.stat[q] = AtLower
			}
			s.x[q] = s.boundValue(q)
			s.iters++
			s.progress(false)
			continue
		}
		if r < 0 {
			if s.lu.updates() > 0 || phase1 {
				if err := s.trouble(); err != nil {
					return 0, err
				}
				if err := s.primalRefresh(phase1); err != nil {
					return 0, err
				}
				continue
			}
			s.keepRay(q, dir)
			return Unbounded, nil
		}
		p := s.head[r]
		s.pivotRowOf(r)
		aq := s.alphaQ[r]
		if math.Abs(aq-s.alphaR[q]) > tolCheck*(1+math.Abs(aq)) {
			if err := s.trouble(); err != nil {
				return 0, err
			}
			if err := s.primalRefresh(phase1); err != nil {
				return 0, err
			}
			continue
		}
		f := s.d[q] / aq
		if !phase1 {
			for _, k := range s.nzR {
				if s.stat[k] != Basic {
					s.d[k] -= f * s.alphaR[k]
				}
			}
		}
		// Devex reference weights (Forrest & Goldfarb 1992, section 2).
		wq := s.devex[q]
		reset := false
		for _, k := range s.nzR {
			if s.stat[k] != Basic && k != q {
				if a := s.alphaR[k]; a != 0 {
					g := a / aq
					if w := g * g * wq; w > s.devex[k] {
						s.devex[k] = w
						reset = reset || w > 1e6
					}
				}
			}
		}
		s.devex[p] = max(wq/(aq*aq), 1)
		if reset {
			for k := range s.devex {
				s.devex[k] = 1
			}
		}

		for i, a := range s.alphaQ {
			if a != 0 {
				s.x[s.head[i]] -= dir * theta * a
			}
		}
		s.x[q] += dir * theta
		s.swap(r, p, q, atUpper)
		s.x[p] = s.boundValue(p)
		s.d[q] = 0
		if !phase1 {
			s.d[p] = -f
		}
		s.lu.update(r, s.alphaQ)
		s.iters++
		if s.progress(theta <= 1e-12) && !perturbed && !s.opt.NoPerturbation {
			s.perturbBounds()
			perturbed = true
		}
	}
}

// primalRefresh factorises afresh and recomputes x and d.
func (s *Simplex) primalRefresh(phase1 bool) error {
	if _, err := s.refactor(); err != nil {
		return err
	}
	s.computeX()
	if !phase1 {
		s.computeD()
	}
	return nil
}

// phase1Prices sets the phase-1 reduced costs: the cost of a basic
// variable is -1 below its lower bound and +1 above its upper bound, 0
// otherwise, and 0 for nonbasic ones. It reports false when no basic
// variable is infeasible.
func (s *Simplex) phase1Prices() bool {
	e := s.wPos
	any := false
	for r, k := range s.head {
		v := s.x[k]
		switch {
		case v < s.lo[k]-tolPrimal:
			e[r] = -1
			any = true
		case v > s.up[k]+tolPrimal:
			e[r] = 1
			any = true
		default:
			e[r] = 0
		}
	}
	if !any {
		return false
	}
	s.lu.btran(e, s.y)
	s.priceCols(e, nil, nil)
	n := s.n
	for i := 0; i < s.m; i++ {
		k := n + i
		if s.stat[k] == Basic {
			s.d[k] = 0
		} else {
			s.d[k] = s.y[i]
		}
	}
	return true
}

// primalPricing chooses the entering variable: the largest d²/weight among
// the dual infeasible (Devex), the largest |d| with Options.Dantzig, the
// least index under Bland's rule; -1 when none.
func (s *Simplex) primalPricing() int {
	best, bestScore := -1, 0.0
	for k, st := range s.stat {
		if st == Basic || st == Fixed || !s.dualInfeasible(k) {
			continue
		}
		if s.bland {
			return k // the least index: the loop runs in index order
		}
		score := s.d[k] * s.d[k]
		if !s.opt.Dantzig {
			score /= s.devex[k]
		}
		if score > bestScore {
			best, bestScore = k, score
		}
	}
	return best
}

// primalRatio is Harris' two-pass ratio test for entering variable q moving
// in direction dir (Harris 1973; Maros 2003, ch. 9; in phase 1 an
// infeasible basic variable stops the step where it reaches the bound it
// violates). Pass one finds the least ratio with every bound relaxed by
// tolPrimal, pass two the largest pivot among the exact ratios up to it.
// It returns the leaving position r (or -1 when nothing stops the step),
// the step, whether q just flips to its other bound instead, and whether
// the leaving variable leaves at its upper bound.
func (s *Simplex) primalRatio(q int, dir float64, phase1 bool) (r int, theta float64, flip, atUpper bool) {
	tmax := math.Inf(1)
	cand := s.cand[:0]
	for i, a := range s.alphaQ {
		if math.Abs(a) <= tolPivot {
			continue
		}
		k := s.head[i]
		rate := -dir * a // change of x_k per unit step
		v := s.x[k]
		var exact, relaxed float64
		up := rate > 0
		switch {
		case phase1 && v < s.lo[k]-tolPrimal:
			if rate < 0 {
				continue
			}
			exact = (s.lo[k] - v) / rate
			relaxed, up = exact, false
		case phase1 && v > s.up[k]+tolPrimal:
			if rate > 0 {
				continue
			}
			exact = (v - s.up[k]) / -rate
			relaxed, up = exact, true
		case rate < 0:
			if math.IsInf(s.lo[k], -1) {
				continue
			}
			exact = (v - s.lo[k]) / -rate
			relaxed = (v - s.lo[k] + tolPrimal) / -rate
		default:
			if math.IsInf(s.up[k], 1) {
				continue
			}
			exact = (s.up[k] - v) / rate
			relaxed = (s.up[k] - v + tolPrimal) / rate
		}
		tmax = min(tmax, relaxed)
		c := candidate{k: i, a: a, ratio: exact}
		if up {
			c.bound = 1
		}
		cand = append(cand, c)
	}
	s.cand = cand
	if span := s.up[q] - s.lo[q]; span <= tmax && !math.IsInf(span, 1) {
		return -1, span, true, false
	}
	if len(cand) == 0 {
		return -1, 0, false, false
	}
	best := -1
	if s.bland {
		tmin := math.Inf(1)
		for _, c := range cand {
			tmin = min(tmin, c.ratio)
		}
		for i, c := range cand {
			if c.ratio <= tmin+1e-12 && (best < 0 || s.head[c.k] < s.head[cand[best].k]) {
				best = i
			}
		}
	} else {
		for i, c := range cand {
			if c.ratio <= tmax && (best < 0 || math.Abs(c.a) > math.Abs(cand[best].a)) {
				best = i
			}
		}
	}
	c := cand[best]
	return c.k, max(c.ratio, 0), false, c.bound == 1
}

// perturbBounds widens the bounds of the basic variables by small random
// amounts (Maros 2003, ch. 9, on bound perturbation against stalling), so
// that degenerate basic variables get room; restoreBounds takes it back.
func (s *Simplex) perturbBounds() {
	for _, k := range s.head {
		xi := perturbEp * (0.5 + 0.5*s.random())
		if !math.IsInf(s.lo[k], -1) {
			s.lo[k] -= xi * (1 + math.Abs(s.lo[k]))
		}
		if !math.IsInf(s.up[k], 1) {
			s.up[k] += xi * (1 + math.Abs(s.up[k]))
		}
	}
	s.perturbedUp = true
}

// keepRay records the unbounded direction of entering variable q: x_q
// moves by dir, the basic variables by -dir·B⁻¹a_q (unscaled, largest
// entry 1).
func (s *Simplex) keepRay(q int, dir float64) {
	ray := make([]float64, s.n)
	if q < s.n {
		ray[q] = dir * s.cs[q]
	}
	for i, a := range s.alphaQ {
		if k := s.head[i]; k < s.n {
			ray[k] = -dir * a * s.cs[k]
		}
	}
	big := 0.0
	for _, v := range ray {
		big = max(big, math.Abs(v))
	}
	if big > 0 {
		for j := range ray {
			ray[j] /= big
		}
	}
	s.rayX = ray
}

func (s *Simplex) ray() []float64 { return s.rayX }

// keepPhase1Farkas keeps the phase-1 duals as the certificate of
// infeasibility when they prove it (one orientation or the other).
func (s *Simplex) keepPhase1Farkas() {
	u := make([]float64, s.m)
	for sign := 1.0; sign >= -1; sign -= 2 {
		for i, v := range s.y {
			u[i] = sign * v * s.rs[i]
		}
		if FarkasGap(&s.prob, u) > 1e-9 {
			s.farkasU = u
			return
		}
	}
}
