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
// of the ranges (Chvátal 1983, ch. 10).
func TestRangesByResolving(t *testing.T) {
	var checkedCost, checkedRow, cases int
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
			lo, hi := rg.CostRange(j)
			for _, end := range []float64{lo, hi} {
				if math.IsInf(end, 0) || math.Abs(end) < 1e-5 {
					continue
				}
				sign := math.Copysign(1, end)
				for _, f := range []float64{-1e-6, 1e-4} { // inside, beyond
					q := p.Clone()
					q.Obj[j] = p.Obj[j] + end + sign*f*max(1, math.Abs(end))
					gs := solveG(q)
					if gs == nil || gs.Status != lp.Optimal {
						continue
					}
					moved := false
					for k := range gs.X {
						moved = moved || !lptest.RelClose(gs.X[k], s.X[k], 1e-7)
					}
					assert.Equal(t, f > 0, moved, "%s column %d: cost moved to %v of its range end %v", name, j, f, end)
					checkedCost++
				}
			}
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
	}
	t.Logf("%d cases: %d cost-range ends and %d row-range ends checked by re-solving", cases, checkedCost, checkedRow)
	assert.Greater(t, checkedCost, 100)
	assert.Greater(t, checkedRow, 50)
}
