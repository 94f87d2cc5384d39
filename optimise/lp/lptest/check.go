package lptest

import (
	"fmt"
	"math"

	"lipoplan/optimise/lp"
)

// Optimality checks the Karush-Kuhn-Tucker conditions of an LP answer on
// the problem as given (Chvátal 1983, Linear Programming, ch. 5, the
// complementary slackness theorem; for bounded variables, Bazaraa, Jarvis
// & Sherali, Linear Programming and Network Flows, ch. 5): x within its
// bounds and A x within the row ranges (to tol relative), D = c - AᵀY,
// every dual sign matching the bound it prices (Y[i] > 0 only at a row's
// lower bound, < 0 only at its upper bound; likewise D[j] for columns),
// and Obj = c·x. It returns the first violation, or nil.
func Optimality(p *lp.Problem, s *lp.Solution, tol float64) error {
	if s.Status != lp.Optimal {
		return fmt.Errorf("status %v", s.Status)
	}
	if len(s.X) != p.Cols || len(s.Y) != p.Rows || len(s.D) != p.Cols || len(s.RowAct) != p.Rows {
		return fmt.Errorf("answer arrays have the wrong lengths")
	}
	near := func(a, b float64) bool { return math.Abs(a-b) <= tol*(1+math.Abs(b)) }
	scale := 1.0
	for _, c := range p.Obj {
		scale = max(scale, math.Abs(c))
	}
	dtol := tol * scale
	act := p.Activity(s.X, nil)
	for j, x := range s.X {
		if x < p.ColLo[j]-tol*(1+math.Abs(p.ColLo[j])) || x > p.ColUp[j]+tol*(1+math.Abs(p.ColUp[j])) {
			return fmt.Errorf("column %d = %v outside %v..%v", j, x, p.ColLo[j], p.ColUp[j])
		}
	}
	for i, a := range act {
		if a < p.RowLo[i]-tol*(1+math.Abs(p.RowLo[i])) || a > p.RowUp[i]+tol*(1+math.Abs(p.RowUp[i])) {
			return fmt.Errorf("row %d = %v outside %v..%v", i, a, p.RowLo[i], p.RowUp[i])
		}
		if !near(a, s.RowAct[i]) {
			return fmt.Errorf("row %d: activity %v reported as %v", i, a, s.RowAct[i])
		}
		switch y := s.Y[i]; {
		case y > dtol && !near(a, p.RowLo[i]):
			return fmt.Errorf("row %d: dual %v > 0 but activity %v is off its lower bound %v", i, y, a, p.RowLo[i])
		case y < -dtol && !near(a, p.RowUp[i]):
			return fmt.Errorf("row %d: dual %v < 0 but activity %v is off its upper bound %v", i, y, a, p.RowUp[i])
		}
	}
	for j := 0; j < p.Cols; j++ {
		d := p.Obj[j]
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			d -= p.Value[k] * s.Y[p.Index[k]]
		}
		if math.Abs(d-s.D[j]) > dtol {
			return fmt.Errorf("column %d: reduced cost %v, but c - Aᵀy = %v", j, s.D[j], d)
		}
		switch x := s.X[j]; {
		case d > dtol && !near(x, p.ColLo[j]):
			return fmt.Errorf("column %d: reduced cost %v > 0 but value %v is off its lower bound %v", j, d, x, p.ColLo[j])
		case d < -dtol && !near(x, p.ColUp[j]):
			return fmt.Errorf("column %d: reduced cost %v < 0 but value %v is off its upper bound %v", j, d, x, p.ColUp[j])
		}
	}
	if obj := p.Objective(s.X); !near(obj, s.Obj) {
		return fmt.Errorf("objective %v reported as %v", obj, s.Obj)
	}
	return nil
}

// Ray checks an unboundedness certificate: Obj·ray < 0, and moving along
// the ray never meets a bound: a column or row activity that grows has no
// upper bound, one that falls no lower bound (entries below tol relative
// to the largest are taken as zero).
func Ray(p *lp.Problem, ray []float64, tol float64) error {
	if len(ray) != p.Cols {
		return fmt.Errorf("ray has %d entries for %d columns", len(ray), p.Cols)
	}
	big := 0.0
	for _, v := range ray {
		big = max(big, math.Abs(v))
	}
	if big == 0 {
		return fmt.Errorf("ray is zero")
	}
	cscale := 0.0
	for _, c := range p.Obj {
		cscale = max(cscale, math.Abs(c))
	}
	if c := p.Objective(ray); c >= -tol*big*cscale {
		return fmt.Errorf("objective along the ray is %v, not negative", c)
	}
	for j, v := range ray {
		if v > tol*big && !math.IsInf(p.ColUp[j], 1) || v < -tol*big && !math.IsInf(p.ColLo[j], -1) {
			return fmt.Errorf("column %d moves by %v into a bound %v..%v", j, v, p.ColLo[j], p.ColUp[j])
		}
	}
	act := p.Activity(ray, nil)
	abig := 0.0
	for _, a := range act {
		abig = max(abig, math.Abs(a))
	}
	for i, a := range act {
		if a > tol*max(big, abig) && !math.IsInf(p.RowUp[i], 1) || a < -tol*max(big, abig) && !math.IsInf(p.RowLo[i], -1) {
			return fmt.Errorf("row %d moves by %v into a bound %v..%v", i, a, p.RowLo[i], p.RowUp[i])
		}
	}
	return nil
}

// Nondegenerate reports whether an optimal basis is nondegenerate both
// ways: every basic variable strictly inside its bounds (so the duals are
// unique) and every nonbasic variable that is not fixed with a nonzero
// reduced cost (so the primal optimum is unique). Then any two correct
// engines must agree on x, y, d and the cost ranges.
func Nondegenerate(p *lp.Problem, s *lp.Solution, tol float64) bool {
	if s.Basis == nil {
		return false
	}
	for k, st := range s.Basis {
		var v, lo, up, d float64
		if k < p.Cols {
			v, lo, up, d = s.X[k], p.ColLo[k], p.ColUp[k], s.D[k]
		} else {
			i := k - p.Cols
			v, lo, up, d = s.RowAct[i], p.RowLo[i], p.RowUp[i], s.Y[i]
		}
		switch st {
		case lp.Basic:
			if math.Abs(v-lo) < tol*(1+math.Abs(lo)) || math.Abs(v-up) < tol*(1+math.Abs(up)) {
				return false
			}
		case lp.Fixed:
		default:
			if math.Abs(d) < tol {
				return false
			}
		}
	}
	return true
}

// RelClose reports whether a and b agree to rel relative (of the larger
// magnitude, at least 1); equal infinities agree.
func RelClose(a, b, rel float64) bool {
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return a == b
	}
	return math.Abs(a-b) <= rel*max(1, math.Abs(a), math.Abs(b))
}
