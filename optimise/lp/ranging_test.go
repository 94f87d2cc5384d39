package lp_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp"
	"lipoplan/optimise/lp/lptest"
)

// TestRangesByResolving checks cost ranges and row-bound ranges of optimal
// bases by re-solving with gonum's simplex (an engine independent of
// lipoplan's) on nondegenerate random blends and plans, for three columns
// and three binding rows each: a cost moved to just inside an end of its
// range (1e-6 relative) leaves gonum's optimal point where it was (to
// 1e-7); moved just beyond (1e-4) it moves it. A binding row's bound moved
// to just inside its range changes gonum's optimum by exactly the dual
// times the move (to 1e-7 relative); moved beyond, gonum's optimal basis is
// another (or the problem has become infeasible). That is the definition
// of the ranges (Chvátal 1983, ch. 10). The range along a direction of
// several costs is checked the same way (checkDirection).
func TestRangesByResolving(t *testing.T) {
	var checkedCost, checkedRow, checkedDir, cases int
	g := lp.NewGonum()
	solveG := func(p *lp.Problem) *lp.Solution {
		require.NoError(t, g.Load(p))
		s, err := g.Solve()
		if err != nil {
			return nil // gonum gives up on some degenerate vertices
		}
		return s
	}
	for c := 0; cases < 60 && c < 1000; c++ {
		kind := []lptest.Kind{lptest.Blend, lptest.Plan}[c%2]
		r := rand.New(rand.NewPCG(1983, uint64(c)))
		p := lptest.Random(r, kind)
		s := solveWith(t, lp.New(), p)
		if s.Status != lp.Optimal || !lptest.Nondegenerate(p, s, 1e-6) {
			continue
		}
		cases++
		rg, err := lp.NewRanging(p, s)
		require.NoError(t, err)
		name := fmt.Sprintf("case %d (%v)", c, kind)
		for _, j := range r.Perm(p.Cols)[:min(3, p.Cols)] {
			e := make([]float64, p.Cols)
			e[j] = 1
			lo, hi := rg.CostRange(j)
			checkedCost += checkCostEnds(t, fmt.Sprintf("%s column %d", name, j), p, s, e, lo, hi, solveG)
		}
		for _, i := range r.Perm(p.Rows)[:min(3, p.Rows)] {
			st := s.Basis[p.Cols+i]
			if st != lp.AtLower && st != lp.AtUpper {
				continue
			}
			upper := st == lp.AtUpper
			b := p.RowLo[i]
			if upper {
				b = p.RowUp[i]
			}
			lo, hi := rg.RowBoundRange(i, upper)
			for _, end := range []float64{lo, hi} {
				if math.IsInf(end, 0) || math.Abs(end-b) < 1e-5*(1+math.Abs(b)) {
					continue
				}
				for _, f := range []float64{1 - 1e-6, 1 + 1e-3} { // inside, beyond
					nb := b + f*(end-b)
					q := p.Clone()
					if upper {
						q.RowUp[i] = nb
					} else {
						q.RowLo[i] = nb
					}
					if q.RowLo[i] > q.RowUp[i] {
						continue
					}
					gs := solveG(q)
					if gs == nil {
						continue
					}
					if f < 1 {
						require.Equal(t, lp.Optimal, gs.Status, name)
						want := s.Obj + s.Y[i]*(nb-b)
						assert.True(t, lptest.RelClose(want, gs.Obj, 1e-7), "%s row %d: bound %v -> %v inside its range: objective %v, dual predicts %v", name, i, b, nb, gs.Obj, want)
					} else if gs.Status == lp.Optimal {
						same := true
						for k := range gs.Basis {
							same = same && (gs.Basis[k] == lp.Basic) == (s.Basis[k] == lp.Basic)
						}
						assert.False(t, same, "%s row %d: bound %v -> %v beyond its range keeps the basis", name, i, b, nb)
					}
					checkedRow++
				}
			}
		}
		checkedDir += checkDirection(t, name, r, p, s, rg, solveG)
	}
	t.Logf("%d cases: %d cost-range ends, %d row-range ends and %d ends of a direction's range checked by re-solving", cases, checkedCost, checkedRow, checkedDir)
	assert.Greater(t, checkedCost, 100)
	assert.Greater(t, checkedRow, 50)
	assert.Greater(t, checkedDir, 40)
}

// checkDirection checks CostDirectionRange on an optimal basis: along a
// unit direction e_j it is CostRange(j) (two ratio tests, one answer);
// along a random direction over a few columns, moving every cost to just
// inside an end (1e-6 relative) leaves gonum's optimal point where it was
// and moving just beyond (1e-4) moves it, the definition of the range of a
// parametric objective (Gass & Saaty 1955; Chvátal 1983, ch. 10). It
// returns the ends checked by re-solving.
func checkDirection(t *testing.T, name string, r *rand.Rand, p *lp.Problem, s *lp.Solution, rg *lp.Ranging, solveG func(*lp.Problem) *lp.Solution) int {
	for j := 0; j < p.Cols; j++ {
		e := make([]float64, p.Cols)
		e[j] = 1
		lo, hi := rg.CostDirectionRange(e)
		wlo, whi := rg.CostRange(j)
		assert.True(t, lptest.RelClose(wlo, lo, 1e-9) && lptest.RelClose(whi, hi, 1e-9), "%s column %d: direction range [%v, %v], cost range [%v, %v]", name, j, lo, hi, wlo, whi)
	}
	dir := make([]float64, p.Cols)
	for _, j := range r.Perm(p.Cols)[:min(4, p.Cols)] {
		dir[j] = p.Obj[j] * (0.2 + r.Float64()) // a relative move of each
	}
	lo, hi := rg.CostDirectionRange(dir)
	return checkCostEnds(t, name+" along a direction", p, s, dir, lo, hi, solveG)
}

// checkCostEnds moves p's costs along dir to just inside each end of the
// range [lo, hi] (1e-6 relative) and just beyond it (1e-4): inside, gonum's
// optimal point is s's (to 1e-7); beyond, it has moved. It returns the ends
// checked (an infinite end, one within 1e-5 of 0 or one gonum cannot solve
// is passed over).
func checkCostEnds(t *testing.T, what string, p *lp.Problem, s *lp.Solution, dir []float64, lo, hi float64, solveG func(*lp.Problem) *lp.Solution) int {
	checked := 0
	for _, end := range []float64{lo, hi} {
		if math.IsInf(end, 0) || math.Abs(end) < 1e-5 {
			continue
		}
		sign := math.Copysign(1, end)
		for _, f := range []float64{-1e-6, 1e-4} { // inside, beyond
			q := p.Clone()
			step := end + sign*f*max(1, math.Abs(end))
			for j := range q.Obj {
				q.Obj[j] += step * dir[j]
			}
			gs := solveG(q)
			if gs == nil || gs.Status != lp.Optimal {
				continue
			}
			moved := false
			for k := range gs.X {
				moved = moved || !lptest.RelClose(gs.X[k], s.X[k], 1e-7)
			}
			assert.Equal(t, f > 0, moved, "%s: costs moved to %v of the range end %v", what, f, end)
			checked++
		}
	}
	return checked
}
