package lp_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp"
	"lipoplan/optimise/lp/lptest"
)

// scaledEngines are the engines the commands solve with, behind lp.Scaled:
// lipoplan's simplex, and CLP in the coin build.
func scaledEngines() []lp.Engine {
	out := []lp.Engine{lp.NewScaled()}
	for _, e := range coinEngines() {
		out = append(out, lp.Scaled(e))
	}
	return out
}

// inUnitsOf turns an answer to q — p with rows multiplied by rs, columns
// by cs and the objective by f (rescaled) — into an answer to p: x = C·x_q,
// r = R⁻¹·r_q, y = R·y_q/f, d = d_q/(f·C), Farkas u = R·u_q, ray = C·ray_q.
func inUnitsOf(s *lp.Solution, rs, cs []float64, f float64) *lp.Solution {
	out := &lp.Solution{Status: s.Status, Obj: s.Obj / f, Basis: s.Basis}
	mul := func(v, by []float64, div bool) []float64 {
		if v == nil {
			return nil
		}
		w := make([]float64, len(v))
		for i := range v {
			if div {
				w[i] = v[i] / by[i]
			} else {
				w[i] = v[i] * by[i]
			}
		}
		return w
	}
	out.X, out.RowAct, out.Farkas, out.Ray = mul(s.X, cs, false), mul(s.RowAct, rs, true), mul(s.Farkas, rs, false), mul(s.Ray, cs, false)
	if s.Y != nil {
		out.Y = mul(s.Y, rs, false)
		out.D = mul(s.D, cs, true)
		for i := range out.Y {
			out.Y[i] /= f
		}
		for j := range out.D {
			out.D[j] /= f
		}
	}
	return out
}

// TestScaledEnginesOnBadlyScaledProblems: 120 random problems of every
// kind are written in other units — rows and columns multiplied by powers
// of ten up to 1e±6 and the whole objective by 1e-8 or 1e8, coefficients
// spanning up to 1e24 and costs from about 1e-14 to 1e14 — and solved by
// every engine behind lp.Scaled. Each must reach the status and objective
// GLPK's glpsol finds on the problem in its original units (1e-7
// relative, the objective in the new units), and its answer, taken back to
// the original units, must meet the optimality conditions (1e-7) or carry
// a valid Farkas certificate or ray there.
func TestScaledEnginesOnBadlyScaledProblems(t *testing.T) {
	haveGLPK := lptest.HaveGlpsol()
	if !haveGLPK {
		t.Log("glpsol (glpk-utils) is not on PATH: comparing with lipoplan's simplex on the original units only; .ci/run installs it")
	}
	dir := t.TempDir()
	engines := scaledEngines()
	defer func() {
		for _, e := range engines {
			e.Close()
		}
	}()
	for c := 0; c < 120; c++ {
		kind := lptest.Kinds[c%len(lptest.Kinds)]
		r := rand.New(rand.NewPCG(1975, 1000+uint64(c)))
		p := lptest.Random(r, kind)
		q, rs, cs := rescaled(r, p, 6)
		f := []float64{1e-8, 1e8}[c%2]
		for j := range q.Obj {
			q.Obj[j] *= f
		}
		name := fmt.Sprintf("case %d (%v)", c, kind)
		want := solveWith(t, lp.New(), p)
		if haveGLPK {
			path := filepath.Join(dir, fmt.Sprintf("case%03d.mps", c))
			require.NoError(t, os.WriteFile(path, lp.MPS(p, "case", nil, nil, nil), 0o644))
			g := lptest.Glpsol(t, path, false)
			require.Equal(t, want.Status.String(), g.Status, name+": glpsol on the original units")
			if g.Status == "optimal" {
				require.True(t, lptest.RelClose(g.Obj, want.Obj, 1e-7), name)
			}
		}
		for _, e := range engines {
			got := solveWith(t, e, q)
			if !assert.Equal(t, want.Status, got.Status, "%s %s", name, e.Name()) {
				continue
			}
			back := inUnitsOf(got, rs, cs, f)
			switch got.Status {
			case lp.Optimal:
				assert.True(t, lptest.RelClose(want.Obj*f, got.Obj, 1e-7), "%s %s: objective %v, want %v", name, e.Name(), got.Obj, want.Obj*f)
				assert.NoError(t, lptest.Optimality(p, back, 1e-7), "%s %s", name, e.Name())
			case lp.Infeasible:
				if back.Farkas != nil {
					assert.Greater(t, lp.FarkasGap(p, back.Farkas), 1e-9, "%s %s", name, e.Name())
				}
			case lp.Unbounded:
				if back.Ray != nil {
					assert.NoError(t, lptest.Ray(p, back.Ray, 1e-7), "%s %s", name, e.Name())
				}
			}
		}
	}
}

// TestScaledWarmEdits: edits through lp.Scaled (a cost, a row range, a
// column bound) and a re-solve reach the objective of a fresh engine on
// the edited problem, on random blends and plans with costs multiplied by
// 1e-8 (the fresh engine solves them with the costs in their original
// units).
func TestScaledWarmEdits(t *testing.T) {
	for c := 0; c < 60; c++ {
		kind := []lptest.Kind{lptest.Blend, lptest.Plan}[c%2]
		r := rand.New(rand.NewPCG(2005, uint64(c)))
		p := lptest.Random(r, kind)
		for j := range p.Obj {
			p.Obj[j] *= 1e-8
		}
		e := lp.NewScaled()
		if solveWith(t, e, p).Status != lp.Optimal {
			continue
		}
		q := p.Clone()
		switch c % 3 {
		case 0:
			j := r.IntN(q.Cols)
			q.Obj[j] *= 0.5 + r.Float64()
			e.SetObj(j, q.Obj[j])
		case 1:
			i := r.IntN(q.Rows)
			if !math.IsInf(q.RowUp[i], 1) {
				q.RowUp[i] += 0.1 * (1 + math.Abs(q.RowUp[i]))
			}
			e.SetRowBounds(i, q.RowLo[i], q.RowUp[i])
		default:
			j := r.IntN(q.Cols)
			if !math.IsInf(q.ColUp[j], 1) {
				q.ColUp[j] *= 0.9
			}
			q.ColUp[j] = max(q.ColUp[j], q.ColLo[j])
			e.SetColBounds(j, q.ColLo[j], q.ColUp[j])
		}
		warm, err := e.Solve()
		require.NoError(t, err)
		// The reference: a fresh engine on the edited problem with its
		// costs back in the original units.
		orig := q.Clone()
		for j := range orig.Obj {
			orig.Obj[j] /= 1e-8
		}
		cold := solveWith(t, lp.New(), orig)
		cold.Obj *= 1e-8
		name := fmt.Sprintf("case %d (%v) edit %d", c, kind, c%3)
		if assert.Equal(t, cold.Status, warm.Status, name) && cold.Status == lp.Optimal {
			assert.True(t, lptest.RelClose(cold.Obj, warm.Obj, 1e-9), "%s: warm %v, cold %v", name, warm.Obj, cold.Obj)
		}
	}
}

// TestScaledMIPAgainstEnumeration: random blends with integer rules,
// written in other units (rows and continuous columns multiplied by powers
// of ten up to 1e±4, the costs by 1e-8 or 1e8), solve behind lp.ScaledMIP
// (lipoplan's branch and bound, and CBC in the coin build) to the optimum
// found by enumerating the integer values of the programme in its original
// units with gonum (1e-7 relative), with the integer columns' values
// integers.
func TestScaledMIPAgainstEnumeration(t *testing.T) {
	solvers := []lp.MIPSolver{lp.ScaledMIP(lp.NewBranchAndBound())}
	if c := coinMIP(); c != nil {
		solvers = append(solvers, lp.ScaledMIP(c))
	}
	checked := 0
	for c := 0; c < 40; c++ {
		r := rand.New(rand.NewPCG(1960, 5000+uint64(c)))
		base := lptest.Random(r, lptest.Blend)
		for base.Cols > 7 {
			base = lptest.Random(r, lptest.Blend)
		}
		p, ints := cardinality(base, 1+r.IntN(3), 0)
		want := enumerate(t, p, ints)
		q, _, _ := rescaled(r, p, 4, ints...)
		f := []float64{1e-8, 1e8}[c%2]
		for j := range q.Obj {
			q.Obj[j] *= f
		}
		name := fmt.Sprintf("case %d", c)
		for _, m := range solvers {
			s, err := m.SolveMIP(q, ints, lp.Limits{})
			require.NoError(t, err, "%s %s", name, m.Name())
			if math.IsInf(want, 1) {
				assert.Equal(t, lp.Infeasible, s.Status, "%s %s", name, m.Name())
				continue
			}
			require.Equal(t, lp.Optimal, s.Status, "%s %s", name, m.Name())
			assert.True(t, lptest.RelClose(want*f, s.Obj, 1e-7), "%s %s: %v, enumeration %v", name, m.Name(), s.Obj, want*f)
			assert.True(t, lptest.RelClose(s.Obj, q.Objective(s.X), 1e-9), "%s %s: objective of X", name, m.Name())
			for _, j := range ints { // integral to branch and bound's tolerance, 1e-6
				assert.InDelta(t, math.Round(s.X[j]), s.X[j], 1e-6, "%s %s: column %d", name, m.Name(), j)
			}
			checked++
		}
	}
	assert.Greater(t, checked, 20)
}
