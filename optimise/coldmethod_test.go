package optimise

import (
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp"
)

// TestColdMethod solves blends, the LP relaxation of a blend with integer
// rules and plans of four sizes from the slack basis with the dual and the
// primal method forced, requires the same optimum of both (1e-9 relative),
// and logs iterations and the best of seven times: the measurement behind
// lp's choice of method for cold starts (its coldPrimalRows).
func TestColdMethod(t *testing.T) {
	if testing.Short() {
		t.Skip("a measurement; skipped in -short mode")
	}
	type mc struct {
		name string
		p    *lp.Problem
	}
	var ms []mc
	of := func(m *model) *lp.Problem { return (&engine{}).problem(m) }
	cat, spec := bench30x20(t)
	b, _, err := build(cat, spec)
	require.NoError(t, err)
	ms = append(ms, mc{"blend30x20", of(b)})
	spec4 := spec.Clone()
	spec4.Rules = catalogue.Rules{MaxStocks: 4}
	b4, lay4, _ := build(cat, spec4)
	ms = append(ms, mc{"milp-relax", of(lay4.withRules(b4, func(j int) float64 { return min(b4.colUp[j], 100) }))})
	for k, sz := range [][2]int{{20, 50}, {5, 20}, {10, 30}, {30, 60}} {
		c, o := randomPlan(rand.New(rand.NewPCG(uint64(k), 9)), sz[0], sz[1])
		pm, _, _ := buildPlan(c, o, &profileCache{})
		ms = append(ms, mc{"plan", &pm.prob})
	}
	r := rand.New(rand.NewPCG(1, 1))
	for k := 0; k < 3; k++ {
		c := genStocks(r, 30+r.IntN(270))
		s := genSpec(r, c, 20)
		bm, _, _ := build(c, s)
		ms = append(ms, mc{"blend", of(bm)})
	}
	for _, x := range ms {
		p := x.p
		line := ""
		var objs []float64
		for _, o := range []lp.Options{{Method: lp.Dual}, {Method: lp.Primal}} {
			best := time.Hour
			var sol *lp.Solution
			for k := 0; k < 7; k++ {
				s := lp.NewWith(o)
				require.NoError(t, s.Load(p))
				t0 := time.Now()
				var err error
				sol, err = s.Solve()
				require.NoError(t, err)
				best = min(best, time.Since(t0))
			}
			require.Equal(t, lp.Optimal, sol.Status, x.name)
			objs = append(objs, sol.Obj)
			line += fmt.Sprintf(" | %s %d iterations %v", o.Method, sol.Iterations, best)
		}
		assert.True(t, relClose(objs[0], objs[1], 1e-9), "%s: dual %v, primal %v", x.name, objs[0], objs[1])
		t.Logf("%-10s %4dx%-4d %s", x.name, x.p.Rows, x.p.Cols, line)
	}
}
