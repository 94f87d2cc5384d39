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

// TestCostDirectionRange checks the parametric objective's range on
// nondegenerate random blends and plans: along a unit direction e_j it is
// CostRange(j) (two ratio tests, one answer); along a random direction over
// a few columns, moving every cost to just inside an end (1e-6 relative)
// leaves gonum's optimal point where it was and moving just beyond (1e-4)
// moves it, the definition of the range (Gass & Saaty 1955; Chvátal 1983,
// ch. 10), with gonum's simplex as the independent engine.
func TestCostDirectionRange(t *testing.T) {
	g := lp.NewGonum()
	var cases, checked int
	for c := 0; cases < 50 && c < 1000; c++ {
		kind := []lptest.Kind{lptest.Blend, lptest.Plan}[c%2]
		r := rand.New(rand.NewPCG(1955, uint64(c)))
		p := lptest.Random(r, kind)
		s := solveWith(t, lp.New(), p)
		if s.Status != lp.Optimal || !lptest.Nondegenerate(p, s, 1e-6) {
			continue
		}
		cases++
		rg, err := lp.NewRanging(p, s)
		require.NoError(t, err)
		name := fmt.Sprintf("case %d (%v)", c, kind)
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
				require.NoError(t, g.Load(q))
				gs, err := g.Solve()
				if err != nil || gs.Status != lp.Optimal {
					continue // gonum gives up on some degenerate vertices
				}
				moved := false
				for k := range gs.X {
					moved = moved || !lptest.RelClose(gs.X[k], s.X[k], 1e-7)
				}
				assert.Equal(t, f > 0, moved, "%s: costs moved to %v of the direction's range end %v", name, f, end)
				checked++
			}
		}
	}
	t.Logf("%d cases, %d range ends checked by re-solving", cases, checked)
	assert.Greater(t, checked, 40)
}
