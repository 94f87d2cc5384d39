package lp

import (
	"fmt"
	"math"
)

// candidate is a breakpoint of a ratio test.
type candidate struct {
	k     int
	a     float64 // the pivot-row entry, signed for the direction of the step
	ratio float64 // exact ratio
	bound float64 // Harris' relaxed ratio
}

// makeDualFeasible prepares the dual simplex (its phase 1): a nonbasic
// variable whose reduced cost has the wrong sign is moved to its other
// bound when it is boxed, and otherwise its cost is shifted so that its
// reduced cost is just feasible (Koberstein 2005, ch. 4, on the cost
// modification approach; the shifts are removed when the dual finishes and
// the primal simplex cleans up).
func (s *Simplex) makeDualFeasible() {
	flipped := false
	for k, st := range s.stat {
		if st == Basic || st == Fixed || !s.dualInfeasible(k) {
			continue
		}
		if !math.IsInf(s.lo[k], -1) && !math.IsInf(s.up[k], 1) {
			if st == AtLower {
				s.stat[k] = AtUpper
			} else {
				s.stat[k] = AtLower
			}
			s.x[k] = s.boundValue(k)
			flipped = true
			continue
		}
		target := 0.0
		switch st {
		case AtLower:
			target = tolDual * (1 + s.random())
		case AtUpper:
			target = -tolDual * (1 + s.random())
		}
		s.shift[k] += target - s.d[k]
		s.d[k] = target
		s.shifted = true
	}
	if flipped {
		s.computeX()
	}
}

// dual runs the dual simplex from a dual feasible basis until it is primal
// feasible (Optimal) or a row proves the problem infeasible.
func (s *Simplex) dual() (Status, error) {
	perturbed := false
	for {
		if s.iters >= s.maxIter {
			return 0, ErrIterationLimit
		}
		if s.lu.due() {
			if err := s.dualRefresh(); err != nil {
				return 0, err
			}
		}
		r, delta := s.dualPricing()
		if r < 0 {
			if s.lu.updates() > 0 {
				// Confirm on values recomputed from the factors rather
				// than the updated ones.
				s.computeX()
				s.computeD()
				s.makeDualFeasible()
				if r, _ = s.dualPricing(); r >= 0 {
					continue
				}
			}
			return Optimal, nil
		}
		p := s.head[r]
		s.pivotRowOf(r)
		sgn := 1.0 // leaves at its lower bound; its reduced cost becomes >= 0
		if delta > 0 {
			sgn = -1
		}
		q := s.dualRatio(sgn, math.Abs(delta))
		if q < 0 {
			if s.lu.updates() > 0 {
				if err := s.dualRefresh(); err != nil {
					return 0, err
				}
				continue
			}
			if s.accept(p) {
				continue
			}
			if s.keepFarkas(r, sgn) {
				return Infeasible, nil
			}
			// The row's evidence is too weak to trust: let the primal
			// phase 1 decide.
			s.removeShifts()
			s.computeD()
			return s.primal()
		}
		clear(s.wRow)
		s.addCol(q, 1, s.wRow)
		s.lu.ftran(s.wRow, s.alphaQ)
		aq := s.alphaQ[r]
		if math.Abs(aq) < tolPivot || math.Abs(aq-s.alphaR[q]) > tolCheck*(1+math.Abs(aq)) {
			if err := s.trouble(); err != nil {
				return 0, err
			}
			if err := s.dualRefresh(); err != nil {
				return 0, err
			}
			continue
		}
		copy(s.wRow, s.rho)
		s.lu.ftran(s.wRow, s.tau)

		// Dual step: d_k -= θ·ᾱ_k with ᾱ_k = -sgn·α_rk.
		abar := -sgn * s.alphaR[q]
		thetaD := s.d[q] / abar
		if thetaD < 0 {
			// d_q was infeasible within the tolerance (Harris): shift its
			// cost so that the step is zero rather than backwards.
			s.shift[q] -= s.d[q]
			s.shifted = true
			thetaD = 0
		}
		if thetaD != 0 {
			for _, k := range s.nzR {
				if s.stat[k] != Basic {
					s.d[k] += sgn * thetaD * s.alphaR[k]
				}
			}
		}
		s.d[q] = 0
		if len(s.flips) > 0 {
			s.applyFlips()
		}

		// Primal step: x_p reaches the bound it violated.
		bound := s.lo[p]
		if sgn < 0 {
			bound = s.up[p]
		}
		thetaP := (s.x[p] - bound) / aq
		for i, a := range s.alphaQ {
			if a != 0 {
				s.x[s.head[i]] -= thetaP * a
			}
		}
		s.x[q] += thetaP
		s.x[p] = bound

		// Dual steepest-edge weights (Forrest & Goldfarb 1992, section 3):
		// ρ_i' = ρ_i - (α_iq/α_rq)ρ_r, so ‖ρ_i'‖² = w_i - 2(α_iq/α_rq)τ_i +
		// (α_iq/α_rq)²w_r with τ = B⁻¹ρ_r, and w_r' = w_r/α_rq².
		wr := s.dse[r]
		for i, a := range s.alphaQ {
			if i != r && a != 0 {
				f := a / aq
				s.dse[i] = max(s.dse[i]+f*(f*wr-2*s.tau[i]), minWeight)
			}
		}
		s.dse[r] = max(wr/(aq*aq), minWeight)

		s.swap(r, p, q, sgn < 0)
		s.d[p] = sgn * thetaD
		s.lu.update(r, s.alphaQ)
		s.iters++
		if s.progress(thetaD*math.Abs(delta) <= 1e-12) && !perturbed && !s.opt.NoPerturbation {
			s.perturbCosts()
			perturbed = true
		}
	}
}

// dualRefresh factorises afresh, recomputes x and d, and restores dual
// feasibility lost to rounding by flips or shifts.
func (s *Simplex) dualRefresh() error {
	repaired, err := s.refactor()
	if err != nil {
		return err
	}
	if repaired {
		s.initDSE()
	}
	s.computeX()
	s.computeD()
	s.makeDualFeasible()
	return nil
}

// trouble counts a numerical difficulty; too many end the solve.
func (s *Simplex) trouble() error {
	s.troubles++
	if s.troubles > 20 {
		return fmt.Errorf("%w: pivots computed two ways keep disagreeing", errTrouble)
	}
	return nil
}

// progress records whether an iteration was degenerate and reports when a
// run of them calls for perturbation; a longer run switches on Bland's
// rule, which stays until an iteration makes progress.
func (s *Simplex) progress(degenerate bool) (perturb bool) {
	if !degenerate {
		s.degenerate, s.bland = 0, s.opt.Bland
		return false
	}
	s.degenerate++
	limit := blandRun
	if s.opt.NoPerturbation {
		limit = stallRun
	}
	if s.degenerate >= limit {
		s.bland = true
	}
	return s.degenerate == stallRun
}

// perturbCosts shifts the cost of every nonbasic variable by a small
// random amount in its feasible direction (Koberstein 2005, ch. 5:
// perturbation of the dual against stalling), so that ties among the
// dual ratios break.
func (s *Simplex) perturbCosts() {
	for k, st := range s.stat {
		var sign float64
		switch st {
		case AtLower:
			sign = 1
		case AtUpper:
			sign = -1
		default:
			continue
		}
		xi := sign * perturbEp * (0.5 + 0.5*s.random()) * (1 + math.Abs(s.cost[k]))
		s.shift[k] += xi
		s.d[k] += xi
	}
	s.shifted = true
}

// dualPricing chooses the leaving row: the largest infeasibility²/weight
// (dual steepest edge), the largest infeasibility with Options.Dantzig, or
// under Bland's rule the infeasible basic variable of least index. It
// returns the position and the infeasibility δ = x - bound (negative below
// the lower bound), or -1.
func (s *Simplex) dualPricing() (int, float64) {
	best, bestScore, bestDelta := -1, 0.0, 0.0
	x, lo, up, dse := s.x, s.lo, s.up, s.dse[:len(s.head)]
	for r, k := range s.head {
		v := x[k]
		var delta float64
		switch {
		case v < lo[k]-tolPrimal:
			delta = v - lo[k]
		case v > up[k]+tolPrimal:
			delta = v - up[k]
		default:
			continue
		}
		if s.bland {
			if best < 0 || k < s.head[best] {
				best, bestDelta = r, delta
			}
			continue
		}
		score := delta * delta
		if !s.opt.Dantzig {
			score /= dse[r]
		}
		if score > bestScore {
			best, bestScore, bestDelta = r, score, delta
		}
	}
	return best, bestDelta
}

// pivotRowOf computes row r of B⁻¹ into s.rho (BTRAN of e_r) and the pivot
// row from it.
func (s *Simplex) pivotRowOf(r int) {
	clear(s.wPos)
	s.wPos[r] = 1
	s.lu.btran(s.wPos, s.rho)
	s.pivotRow(s.rho)
}

// pivotRow computes α_rk = ρᵀa_k for every variable from ρ = B⁻ᵀe_r,
// row-wise: only the rows where ρ is nonzero are read, and the variables
// they touch are listed in s.nzR (every other α_rk is zero), so the ratio
// tests and updates that follow visit only those (in a plan's block
// structure a small part of the columns).
func (s *Simplex) pivotRow(rho []float64) {
	n := s.n
	a, mark := s.alphaR, s.inR
	for _, k := range s.nzR {
		a[k], mark[k] = 0, false
	}
	nz := s.nzR[:0]
	rStart, rIdx, rVal := s.rStart[:len(rho)+1], s.rIdx, s.rVal
	for i, v := range rho {
		if v == 0 {
			continue
		}
		a[n+i], mark[n+i] = -v, true
		nz = append(nz, n+i)
		idx := rIdx[rStart[i]:rStart[i+1]]
		val := rVal[rStart[i]:rStart[i+1]]
		val = val[:len(idx)]
		for q, j := range idx {
			if !mark[j] {
				mark[j] = true
				nz = append(nz, j)
			}
			a[j] += v * val[q]
		}
	}
	s.nzR = nz
}

// dualRatio is the bound-flipping ratio test with Harris' tolerances
// (Koberstein 2005, algorithm 4 with the Harris pass of algorithm 5;
// Fourer, "Notes on the dual simplex method", 1994, for the long step).
// The leaving variable's infeasibility is slope; stepping the dual past
// the breakpoint of a boxed variable flips it to its other bound and
// lowers the slope by |ᾱ_k|·(u_k - l_k). Breakpoints are passed in groups
// while the slope stays positive; within the last group the largest |ᾱ_k|
// enters (Harris: every ratio up to the least relaxed ratio is eligible).
// It returns the entering variable, or -1 when no breakpoint stops the
// dual ray (the problem is infeasible), with the variables to flip in
// s.flips.
func (s *Simplex) dualRatio(sgn, slope float64) int {
	s.flips = s.flips[:0]
	cand := s.cand[:0]
	for _, k := range s.nzR {
		st := s.stat[k]
		if st == Basic || st == Fixed {
			continue
		}
		a := -sgn * s.alphaR[k]
		if math.Abs(a) <= tolPivot {
			continue
		}
		d := s.d[k]
		var bound float64
		switch {
		case st == AtLower && a > 0, st == Free && a > 0:
			bound = (d + tolDual) / a
		case st == AtUpper && a < 0, st == Free && a < 0:
			bound = (d - tolDual) / a
		default:
			continue
		}
		cand = append(cand, candidate{k: k, a: a, ratio: d / a, bound: bound})
	}
	s.cand = cand
	if len(cand) == 0 {
		return -1
	}
	if s.bland {
		best := 0
		for i, c := range cand[1:] {
			b := cand[best]
			if c.ratio < b.ratio-1e-12 || c.ratio <= b.ratio+1e-12 && c.k < b.k {
				best = i + 1
			}
		}
		return cand[best].k
	}
	for {
		tmax := math.Inf(1)
		for _, c := range cand {
			tmax = min(tmax, c.bound)
		}
		best, group := -1, 0
		total := 0.0
		for i, c := range cand {
			if c.ratio > tmax {
				continue
			}
			group++
			if best < 0 || math.Abs(c.a) > math.Abs(cand[best].a) {
				best = i
			}
			total += math.Abs(c.a) * (s.up[c.k] - s.lo[c.k]) // +Inf unless boxed
		}
		rest := slope - total
		if rest < 0 || math.IsNaN(rest) {
			return cand[best].k
		}
		if group == len(cand) {
			if rest > tolPrimal*(1+slope) {
				return -1 // every breakpoint passed and still infeasible
			}
			return cand[best].k
		}
		slope = rest
		keep := cand[:0]
		for _, c := range cand {
			if c.ratio > tmax {
				keep = append(keep, c)
			} else {
				s.flips = append(s.flips, c.k)
			}
		}
		cand = keep
	}
}

// applyFlips moves the variables of s.flips to their other bounds and
// updates the basic variables: x_B -= B⁻¹·Σ a_k Δ_k.
func (s *Simplex) applyFlips() {
	clear(s.wRow)
	for _, k := range s.flips {
		old := s.x[k]
		if s.stat[k] == AtLower {
			s.stat[k] = AtUpper
		} else {
			s.stat[k] = AtLower
		}
		s.x[k] = s.boundValue(k)
		s.addCol(k, s.x[k]-old, s.wRow)
	}
	s.lu.ftran(s.wRow, s.wPos)
	for r, k := range s.head {
		s.x[k] -= s.wPos[r]
	}
	s.flips = s.flips[:0]
}

// swap makes q basic at position r in place of p, which leaves at its
// upper bound when atUpper and otherwise at its lower bound.
func (s *Simplex) swap(r, p, q int, atUpper bool) {
	s.head[r], s.pos[q], s.stat[q] = q, r, Basic
	s.pos[p] = -1
	switch {
	case s.lo[p] == s.up[p]:
		s.stat[p] = Fixed
	case atUpper:
		s.stat[p] = AtUpper
	default:
		s.stat[p] = AtLower
	}
}

// keepFarkas turns row r of B⁻¹ into the certificate of infeasibility of
// Solution.Farkas (unscaled, and oriented so that Aᵀu·x stays below u·r)
// and reports whether it proves infeasibility on the problem as given.
func (s *Simplex) keepFarkas(r int, sgn float64) bool {
	u := make([]float64, s.m)
	for i, v := range s.rho {
		u[i] = -sgn * v * s.rs[i]
	}
	if FarkasGap(&s.prob, u) <= 1e-9 {
		return false
	}
	s.farkasU = u
	return true
}

// farkas is the certificate kept by keepFarkas.
func (s *Simplex) farkas() []float64 { return s.farkasU }

// FarkasGap measures how well the row multipliers u prove p infeasible:
// the smallest value of u·r over the row bounds less the largest value of
// (Aᵀu)·x over the column bounds, relative to the size of the terms (one
// plus the sum of their magnitudes). A gap above zero proves that no x
// meets the rows (Farkas' lemma); lipoplan's engine accepts its own
// certificate only when the gap exceeds 1e-9. An entry of u below 1e-9 of
// the largest, and an entry of Aᵀu below 1e-9 of the sum of the magnitudes
// it adds up, are taken as zero (rounding in the certificate, not
// evidence).
func FarkasGap(p *Problem, u []float64) float64 {
	if len(u) != p.Rows {
		return math.Inf(-1)
	}
	umax := 0.0
	for _, v := range u {
		umax = max(umax, math.Abs(v))
	}
	if umax == 0 {
		return math.Inf(-1)
	}
	var maxAx, minUr, size float64
	for j := 0; j < p.Cols; j++ {
		var vj, vabs float64
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			a := p.Value[k] * u[p.Index[k]]
			vj += a
			vabs += math.Abs(a)
		}
		var t float64
		switch {
		case vj > 1e-9*vabs:
			t = vj * p.ColUp[j]
		case vj < -1e-9*vabs:
			t = vj * p.ColLo[j]
		}
		maxAx += t
		size += math.Abs(t)
	}
	for i, ui := range u {
		var t float64
		switch {
		case ui > 1e-9*umax:
			t = ui * p.RowLo[i]
		case ui < -1e-9*umax:
			t = ui * p.RowUp[i]
		}
		minUr += t
		size += math.Abs(t)
	}
	gap := (minUr - maxAx) / (1 + size)
	if math.IsNaN(gap) || math.IsInf(size, 0) {
		return math.Inf(-1)
	}
	return gap
}
