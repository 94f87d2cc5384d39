package lp_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp"
	"lipoplan/optimise/lp/lptest"
)

// referenceCases is the size of the random reference suite: 300 by
// default (a quick go test ./...), LIPOPLAN_REFERENCE_CASES in CI (.ci/run
// sets 2400).
func referenceCases(t *testing.T) int {
	if v := os.Getenv("LIPOPLAN_REFERENCE_CASES"); v != "" {
		n, err := strconv.Atoi(v)
		require.NoError(t, err, "LIPOPLAN_REFERENCE_CASES")
		return n
	}
	if testing.Short() {
		return 60
	}
	return 300
}

func expected(k lptest.Kind) lp.Status {
	switch k {
	case lptest.Infeasible:
		return lp.Infeasible
	case lptest.Unbounded:
		return lp.Unbounded
	}
	return lp.Optimal
}

func solveWith(t *testing.T, e lp.Engine, p *lp.Problem) *lp.Solution {
	t.Helper()
	require.NoError(t, e.Load(p))
	s, err := e.Solve()
	require.NoError(t, err, e.Name())
	return s
}

// TestReferenceSuite solves seeded random problems of every kind (blend and
// plan shapes, degenerate and redundant rows, free rows and columns,
// infeasible and unbounded cases; lptest.Random) with lipoplan's simplex
// and checks each answer against outside references:
//
//   - the optimality conditions (KKT) on the problem as given, the
//     Farkas certificate of every infeasible case and the ray of every
//     unbounded one;
//   - gonum's lp.Simplex (where every column has a finite lower bound, as
//     its standard form needs): status and objective to 1e-7 relative;
//   - GLPK's glpsol on the MPS file written by lp.MPS: status and
//     objective to 1e-7 relative; where the optimum is nondegenerate both
//     ways (unique x and y), every dual and reduced cost to 1e-7 relative,
//     and in every fourth case the cost ranges and the activity ranges of
//     the binding rows against glpsol's sensitivity report to its printed
//     precision (6 significant digits);
//   - COIN-OR CLP in the coin build (coinEngines): status, objective and,
//     where nondegenerate, duals, to 1e-7 relative;
//   - the primal and the dual method forced, and a warm re-solve after an
//     edit against a cold solve of the edited problem: same status and
//     objective to 1e-9 relative.
func TestReferenceSuite(t *testing.T) {
	count := referenceCases(t)
	haveGLPK := lptest.HaveGlpsol()
	if !haveGLPK {
		t.Log("glpsol (glpk-utils) is not on PATH: skipping the GLPK comparisons; .ci/run installs it")
	}
	dir := t.TempDir()
	coins := coinEngines()
	defer func() {
		for _, e := range coins {
			e.Close()
		}
	}()
	tally := map[string]int{}
	for c := 0; c < count; c++ {
		kind := lptest.Kinds[c%len(lptest.Kinds)]
		r := rand.New(rand.NewPCG(20261202, uint64(c))) // each case on its own
		p := lptest.Random(r, kind)
		name := fmt.Sprintf("case %d (%v, %dx%d)", c, kind, p.Rows, p.Cols)
		ours := solveWith(t, lp.New(), p)
		if !assert.Equal(t, expected(kind), ours.Status, name) {
			continue
		}
		tally[kind.String()]++
		switch ours.Status {
		case lp.Optimal:
			assert.NoError(t, lptest.Optimality(p, ours, 1e-7), name)
		case lp.Infeasible:
			if assert.NotNil(t, ours.Farkas, name) {
				assert.Greater(t, lp.FarkasGap(p, ours.Farkas), 1e-9, name)
			}
		case lp.Unbounded:
			assert.NoError(t, lptest.Ray(p, ours.Ray, 1e-7), name)
		}
		nondeg := ours.Status == lp.Optimal && lptest.Nondegenerate(p, ours, 1e-7)
		if nondeg {
			tally["nondegenerate"]++
		}

		if lptest.AllLowerFinite(p) {
			ge := lp.NewGonum()
			require.NoError(t, ge.Load(p))
			g, err := ge.Solve()
			if err != nil {
				// gonum's dense simplex gives up on some nearly singular
				// standard forms; that is gonum's limit, not a verdict.
				t.Logf("%s: gonum: %v", name, err)
				tally["gonum gave up"]++
				g = &lp.Solution{Status: ours.Status, Obj: ours.Obj}
			} else {
				tally["gonum"]++
			}
			if g.Status == lp.Infeasible && ours.Status == lp.Optimal && lptest.Optimality(p, ours, 1e-7) == nil {
				// Our point meets every bound and row (checked on the
				// problem as given), which refutes gonum's verdict: its
				// phase 1 fails on some redundant equality rows.
				t.Logf("%s: gonum says infeasible, but the optimum found meets every row and bound", name)
				tally["gonum refuted"]++
				g = ours
			}
			if assert.Equal(t, ours.Status, g.Status, name+": gonum") && g.Status == lp.Optimal {
				assert.True(t, lptest.RelClose(g.Obj, ours.Obj, 1e-7), "%s: objective %v, gonum %v", name, ours.Obj, g.Obj)
			}
		}
		for _, e := range coins {
			s := solveWith(t, e, p)
			tally[e.Name()]++
			if !assert.Equal(t, ours.Status, s.Status, name+": "+e.Name()) || s.Status != lp.Optimal {
				continue
			}
			assert.True(t, lptest.RelClose(s.Obj, ours.Obj, 1e-7), "%s: objective %v, %s %v", name, ours.Obj, e.Name(), s.Obj)
			if nondeg {
				for i := range s.Y {
					assert.True(t, lptest.RelClose(s.Y[i], ours.Y[i], 1e-7), "%s row %d: dual %v, %s %v", name, i, ours.Y[i], e.Name(), s.Y[i])
				}
				for j := range s.D {
					assert.True(t, lptest.RelClose(s.D[j], ours.D[j], 1e-7), "%s column %d: reduced cost %v, %s %v", name, j, ours.D[j], e.Name(), s.D[j])
				}
			}
		}
		if haveGLPK {
			ranges := nondeg && c%4 == 0
			path := filepath.Join(dir, fmt.Sprintf("case%04d.mps", c))
			require.NoError(t, os.WriteFile(path, lp.MPS(p, "case", nil, nil, nil), 0o644))
			g := lptest.Glpsol(t, path, ranges)
			tally["glpsol"]++
			if assert.Equal(t, ours.Status.String(), g.Status, name+": glpsol") && g.Status == "optimal" {
				assert.True(t, lptest.RelClose(g.Obj, ours.Obj, 1e-7), "%s: objective %v, glpsol %v", name, ours.Obj, g.Obj)
				if nondeg {
					tally["duals vs glpsol"]++
					for gi, i := range lptest.KeptRows(p) {
						assert.True(t, lptest.RelClose(g.RowDual[gi], ours.Y[i], 1e-7), "%s row %d: dual %v, glpsol %v", name, i, ours.Y[i], g.RowDual[gi])
					}
					for j := range g.ColDual {
						assert.True(t, lptest.RelClose(g.ColDual[j], ours.D[j], 1e-7), "%s column %d: reduced cost %v, glpsol %v", name, j, ours.D[j], g.ColDual[j])
					}
				}
				if ranges {
					tally["ranged vs glpsol"]++
					checkRanges(t, name, p, ours, g)
				}
			}
		}

		// Both methods forced, and a warm re-solve after an edit.
		for _, m := range []lp.Method{lp.Primal, lp.Dual} {
			s := solveWith(t, lp.NewWith(lp.Options{Method: m}), p)
			if assert.Equal(t, ours.Status, s.Status, "%s: method %d", name, m) && s.Status == lp.Optimal {
				assert.True(t, lptest.RelClose(ours.Obj, s.Obj, 1e-9), "%s: method %d objective %v, default %v", name, m, s.Obj, ours.Obj)
				assert.NoError(t, lptest.Optimality(p, s, 1e-7), "%s: method %d", name, m)
			}
		}
		warmEqualsCold(t, r, name, p)
	}
	t.Logf("%d cases: %v", count, tally)
}

// warmEqualsCold edits one cost, one row range or one column bound of p,
// re-solves in the engine that solved p (warm) and in a fresh one (cold),
// and requires the same status and objective.
func warmEqualsCold(t *testing.T, r *rand.Rand, name string, p *lp.Problem) {
	t.Helper()
	e := lp.New()
	solveWith(t, e, p)
	q := p.Clone()
	switch r.IntN(3) {
	case 0:
		j := r.IntN(q.Cols)
		q.Obj[j] *= 0.5 + r.Float64()
		e.SetObj(j, q.Obj[j])
	case 1:
		i := r.IntN(q.Rows)
		lo, up := q.RowLo[i], q.RowUp[i]
		size := 1.0
		for _, b := range []float64{lo, up} {
			if !math.IsInf(b, 0) {
				size += math.Abs(b)
			}
		}
		d := 0.05 * size * (r.Float64() - 0.5)
		if !math.IsInf(lo, 0) {
			lo += d
		}
		if !math.IsInf(up, 0) {
			up += d
		}
		q.RowLo[i], q.RowUp[i] = lo, up
		e.SetRowBounds(i, lo, up)
	default:
		j := r.IntN(q.Cols)
		if !math.IsInf(q.ColUp[j], 1) {
			q.ColUp[j] = max(q.ColLo[j], q.ColUp[j]*(0.5+r.Float64()))
		} else {
			q.ColUp[j] = max(q.ColLo[j], 50*r.Float64())
		}
		e.SetColBounds(j, q.ColLo[j], q.ColUp[j])
	}
	warm, err := e.Solve()
	require.NoError(t, err, name)
	cold := solveWith(t, lp.New(), q)
	if assert.Equal(t, cold.Status, warm.Status, name+": warm after an edit") && cold.Status == lp.Optimal {
		assert.True(t, lptest.RelClose(cold.Obj, warm.Obj, 1e-9), "%s: warm objective %v, cold %v", name, warm.Obj, cold.Obj)
		assert.NoError(t, lptest.Optimality(q, warm, 1e-7), name+": warm")
	}
}

// checkRanges compares cost ranges and binding rows' bound ranges with
// glpsol's sensitivity report, to its printed precision (6 significant
// digits: 2e-5 relative of the larger of the value and the coefficient).
func checkRanges(t *testing.T, name string, p *lp.Problem, s *lp.Solution, g lptest.GLPK) {
	t.Helper()
	rg, err := lp.NewRanging(p, s)
	require.NoError(t, err, name)
	close := func(want, got, scale float64) bool {
		if math.IsInf(want, 0) || math.IsInf(got, 0) {
			return want == got || math.Abs(want) > 1e12 || math.Abs(got) > 1e12
		}
		return math.Abs(want-got) <= 2e-5*max(1, math.Abs(want), scale)
	}
	for j := 0; j < p.Cols; j++ {
		if p.ColLo[j] == p.ColUp[j] {
			continue // glpsol does not range fixed columns
		}
		c := "c" + strconv.Itoa(j+1)
		lo, hi := rg.CostRange(j)
		lo, hi = p.Obj[j]+lo, p.Obj[j]+hi
		assert.True(t, close(g.CostLo[c], lo, math.Abs(p.Obj[j])), "%s %s: cost low %v, glpsol %v", name, c, lo, g.CostLo[c])
		assert.True(t, close(g.CostHi[c], hi, math.Abs(p.Obj[j])), "%s %s: cost high %v, glpsol %v", name, c, hi, g.CostHi[c])
	}
	for i := 0; i < p.Rows; i++ {
		rn := "r" + strconv.Itoa(i+1)
		st := s.Basis[p.Cols+i]
		if st != lp.AtLower && st != lp.AtUpper && st != lp.Fixed {
			continue
		}
		wantLo, ok := g.RowRngLo[rn]
		if !ok {
			continue
		}
		lo, hi := rg.RowBoundRange(i, st == lp.AtUpper)
		wantHi := g.RowRngHi[rn]
		// RowBoundRange also stops at the row's other bound (beyond it the
		// row's range is empty); glpsol's activity range does not.
		if st == lp.AtUpper && lo == p.RowLo[i] {
			wantLo = max(wantLo, lo)
		}
		if st == lp.AtLower && hi == p.RowUp[i] {
			wantHi = min(wantHi, hi)
		}
		assert.True(t, close(wantLo, lo, math.Abs(s.RowAct[i])), "%s %s: bound range low %v, glpsol %v", name, rn, lo, wantLo)
		assert.True(t, close(wantHi, hi, math.Abs(s.RowAct[i])), "%s %s: bound range high %v, glpsol %v", name, rn, hi, wantHi)
	}
}

func writeFile(path string, b []byte) error { return os.WriteFile(path, b, 0o644) }
