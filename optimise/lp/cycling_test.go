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

// cycling is a classic LP on which the textbook simplex method cycles
// (Dantzig's rule, ties broken by the least index), min c·x subject to
// A x <= b, x >= 0, with its optimum.
type cycling struct {
	name string
	a    [][]float64
	b, c []float64
	opt  float64
}

// cyclingExamples are, from memory and each checked below against gonum's
// simplex and GLPK's glpsol:
//
//   - Beale (1955), "Cycling in the dual simplex algorithm", Naval Res.
//     Logist. Q. 2, 269, in the form Chvátal 1983 and Bazaraa, Jarvis &
//     Sherali give it: optimum -5/4 at x4 = x6 = 1;
//   - Kuhn's example, as given in Bazaraa, Jarvis & Sherali, Linear
//     Programming and Network Flows, section 4.6 on cycling: optimum -2;
//   - the example of Chvátal 1983, ch. 3 (max 10x1 - 57x2 - 9x3 - 24x4,
//     here minimised with the signs turned): optimum -1 at x1 = x3 = 1.
func cyclingExamples() []cycling {
	third := 1.0 / 3
	return []cycling{
		{"Beale", [][]float64{{0.25, -8, -1, 9}, {0.5, -12, -0.5, 3}, {0, 0, 1, 0}}, []float64{0, 0, 1}, []float64{-0.75, 20, -0.5, 6}, -1.25},
		{"Kuhn", [][]float64{{-2, -9, 1, 9}, {third, 1, -third, -2}, {2, 3, -1, -12}}, []float64{0, 0, 2}, []float64{-2, -3, 1, 12}, -2},
		{"Chvatal", [][]float64{{0.5, -5.5, -2.5, 9}, {0.5, -1.5, -0.5, 1}, {1, 0, 0, 0}}, []float64{0, 0, 1}, []float64{-10, 57, 9, 24}, -1},
	}
}

func (c cycling) problem() *lp.Problem {
	m, n := len(c.a), len(c.c)
	flat := make([]float64, 0, m*n)
	for _, r := range c.a {
		flat = append(flat, r...)
	}
	p := &lp.Problem{Obj: c.c, ColLo: make([]float64, n), ColUp: make([]float64, n), RowLo: make([]float64, m), RowUp: c.b}
	for j := range p.ColUp {
		p.ColUp[j] = math.Inf(1)
	}
	for i := range p.RowLo {
		p.RowLo[i] = math.Inf(-1)
	}
	p.Dense(m, n, flat)
	return p
}

// TestCyclingExamples solves each classic cycling example with every
// combination of method (auto, primal, dual), pricing (steepest edge /
// Devex, or Dantzig's rule) and perturbation (on, or off so that only
// Bland's rule guards against cycling), with and without scaling, and with
// Bland's rule from the first iteration (unscaled, Dantzig): each
// must reach the optimum in a handful of iterations, the optimum must meet
// the optimality conditions, and gonum and glpsol must agree on it.
func TestCyclingExamples(t *testing.T) {
	for _, c := range cyclingExamples() {
		p := c.problem()
		g := solveWith(t, lp.NewGonum(), p)
		require.Equal(t, lp.Optimal, g.Status, c.name)
		assert.InDelta(t, c.opt, g.Obj, 1e-9, "%s: gonum", c.name)
		if lptest.HaveGlpsol() {
			path := t.TempDir() + "/" + c.name + ".mps"
			require.NoError(t, writeFile(path, lp.MPS(p, c.name, nil, nil, nil)))
			assert.InDelta(t, c.opt, lptest.Glpsol(t, path, false).Obj, 1e-9, "%s: glpsol", c.name)
		}
		for _, m := range []lp.Method{lp.Auto, lp.Primal, lp.Dual} {
			for _, dantzig := range []bool{false, true} {
				for _, noPerturb := range []bool{false, true} {
					for _, noScale := range []bool{false, true} {
						opt := lp.Options{Method: m, Dantzig: dantzig, NoPerturbation: noPerturb, NoScaling: noScale, Bland: noScale && dantzig}
						name := fmt.Sprintf("%s %+v", c.name, opt)
						s := solveWith(t, lp.NewWith(opt), p)
						require.Equal(t, lp.Optimal, s.Status, name)
						assert.InDelta(t, c.opt, s.Obj, 1e-9, name)
						assert.NoError(t, lptest.Optimality(p, s, 1e-9), name)
						assert.Less(t, s.Iterations, 50, name)
					}
				}
			}
		}
	}
}

// TestBlandsRuleAlone solves 120 random problems of every kind with Bland's
// rule from the first iteration (the anti-cycling fallback's code path on
// its own, without perturbation) and compares each with the default
// engine: same status and optimum to 1e-9 relative, and the optimality
// conditions hold.
func TestBlandsRuleAlone(t *testing.T) {
	for c := 0; c < 120; c++ {
		kind := lptest.Kinds[c%len(lptest.Kinds)]
		r := rand.New(rand.NewPCG(1977, uint64(c)))
		p := lptest.Random(r, kind)
		name := fmt.Sprintf("case %d (%v)", c, kind)
		want := solveWith(t, lp.New(), p)
		for _, m := range []lp.Method{lp.Primal, lp.Dual} {
			got := solveWith(t, lp.NewWith(lp.Options{Bland: true, NoPerturbation: true, Method: m}), p)
			if assert.Equal(t, want.Status, got.Status, "%s method %d", name, m) && got.Status == lp.Optimal {
				assert.True(t, lptest.RelClose(want.Obj, got.Obj, 1e-9), "%s method %d: Bland %v, default %v", name, m, got.Obj, want.Obj)
				assert.NoError(t, lptest.Optimality(p, got, 1e-7), name)
			}
		}
	}
}
