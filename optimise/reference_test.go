package optimise

import (
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp/lptest"
)

// needGlpsol skips a test without GLPK's glpsol.
func needGlpsol(t *testing.T) { lptest.NeedGlpsol(t) }

// runGlpsol solves an MPS file with GLPK (lptest.Glpsol).
func runGlpsol(t *testing.T, mps string, ranges bool) lptest.GLPK {
	return lptest.Glpsol(t, mps, ranges)
}

type suiteCase struct {
	cat  *catalogue.Catalogue
	spec *catalogue.Spec
	mps  string
}

func randomSuite(t *testing.T, count int, dir string) []suiteCase {
	r := rand.New(rand.NewPCG(20260301, 3)) // fixed seed: the suite is the same on every run
	var cases []suiteCase
	for k := 0; k < count; k++ {
		cat := genStocks(r, 3+r.IntN(28))
		spec := genSpec(r, cat, 3+r.IntN(18))
		c := suiteCase{cat: cat, spec: spec}
		if dir != "" {
			c.mps = filepath.Join(dir, fmt.Sprintf("case%03d.mps", k))
			require.NoError(t, WriteMPS(c.mps, cat, spec))
		}
		cases = append(cases, c)
	}
	return cases
}

// TestRandomBlendsAgainstGLPKAndGonum solves 220 seeded random blend
// problems (3..30 stocks, 3..20 limits) with every engine of the build
// (lipoplan's simplex; CLP through our binding in the coin build), with
// gonum's lp.Simplex, and with GLPK's glpsol reading the MPS file we write.
// The optima must agree to 1e-6 relative, and every engine's shadow prices
// and cost ranges with the default engine's. Where the optimal vertex is
// nondegenerate (duals and cost ranges are then unique) the shadow prices
// and reduced costs must also agree with GLPK's to 1e-6, and cost ranges
// with GLPK's sensitivity report to its printed precision (5 decimals of the
// per-% coefficient).
func TestRandomBlendsAgainstGLPKAndGonum(t *testing.T) {
	needGlpsol(t)
	dir := t.TempDir()
	cases := randomSuite(t, 220, dir)
	var nondeg, ranged int
	for k, c := range cases {
		g := runGlpsol(t, c.mps, k < 60)
		require.Equal(t, "optimal", g.Status, "case %d: GLPK finds no optimum", k)
		m, lay, err := build(c.cat, c.spec)
		require.NoError(t, err)
		var sols []*solution
		for _, eng := range engines() {
			s, err := eng.solveLP(m)
			require.NoError(t, err, "case %d %s", k, eng.name())
			require.Equal(t, solOptimal, s.status, "case %d %s", k, eng.name())
			assert.True(t, relClose(g.Obj, s.obj, 1e-6), "case %d %s: objective %v, GLPK %v", k, eng.name(), s.obj, g.Obj)
			sols = append(sols, s)
		}
		res := map[string]*Result{}
		for _, eng := range engines() {
			r, err := solveWith(eng, c.cat, c.spec, Options{})
			require.NoError(t, err)
			assert.True(t, relClose(g.Obj, r.CostPerTonne, 1e-6), "case %d %s: cost %v, GLPK %v", k, eng.name(), r.CostPerTonne, g.Obj)
			res[eng.name()] = r
		}
		if !nondegenerate(m, sols[0]) {
			continue
		}
		nondeg++
		for _, s := range sols {
			for i := range g.RowDual {
				assert.True(t, relClose(g.RowDual[i], s.y[i], 1e-6), "case %d row %s: dual %v, GLPK %v", k, m.rowName[i], s.y[i], g.RowDual[i])
			}
			for j := range g.ColDual {
				assert.True(t, relClose(g.ColDual[j], s.d[j], 1e-6), "case %d column %s: reduced cost %v, GLPK %v", k, m.colName[j], s.d[j], g.ColDual[j])
			}
		}
		a := res[defaultEngine().name()]
		for _, b := range res {
			require.Len(t, b.Limits, len(a.Limits))
			for i := range a.Limits {
				assert.True(t, relClose(a.Limits[i].ShadowPrice, b.Limits[i].ShadowPrice, 1e-6), "case %d %s: shadow %v vs %v", k, a.Limits[i].Name, a.Limits[i].ShadowPrice, b.Limits[i].ShadowPrice)
				assert.Equal(t, a.Limits[i].Binding, b.Limits[i].Binding, "case %d %s", k, a.Limits[i].Name)
			}
			for i := range a.Ranging {
				assert.True(t, relClose(a.Ranging[i].PriceLow, b.Ranging[i].PriceLow, 1e-6), "case %d %s: price low %v vs %v", k, a.Ranging[i].Stock, a.Ranging[i].PriceLow, b.Ranging[i].PriceLow)
				assert.True(t, relClose(a.Ranging[i].PriceHigh, b.Ranging[i].PriceHigh, 1e-6), "case %d %s: price high %v vs %v", k, a.Ranging[i].Stock, a.Ranging[i].PriceHigh, b.Ranging[i].PriceHigh)
			}
		}
		if g.CostLo != nil {
			ranged++
			for _, r := range res {
				for _, rg := range r.Ranging {
					lo, hi := g.CostLo[rg.Stock], g.CostHi[rg.Stock]
					j := lay.index(rg.Stock)
					if m.colLo[j] == m.colUp[j] {
						continue // GLPK does not range fixed columns
					}
					assertNear(t, lo*100, rg.PriceLow, 2e-3, "case %d %s %s: price low", k, r.Engine, rg.Stock)
					assertNear(t, hi*100, rg.PriceHigh, 2e-3, "case %d %s %s: price high", k, r.Engine, rg.Stock)
				}
			}
		}
	}
	t.Logf("%d cases, %d nondegenerate (duals compared), %d ranged against glpsol --ranges", len(cases), nondeg, ranged)
	assert.Greater(t, nondeg, len(cases)/2, "too few nondegenerate cases to compare duals")
}

func assertNear(t *testing.T, want, got, tol float64, msg string, args ...any) {
	t.Helper()
	if math.IsInf(want, 0) || math.IsInf(got, 0) {
		assert.Equal(t, want, got, append([]any{msg}, args...)...)
		return
	}
	assert.InDelta(t, want, got, tol, append([]any{msg}, args...)...)
}

// TestShadowPricesByFiniteDifferences re-solves each nondegenerate random
// case with every binding limit moved by a small step and checks the
// shadow price against the change in cost (the definition of the dual as a
// derivative of the optimal value; Chvátal 1983, sensitivity analysis).
func TestShadowPricesByFiniteDifferences(t *testing.T) {
	cases := randomSuite(t, 60, "")
	checked := 0
	for k, c := range cases {
		m, _, err := build(c.cat, c.spec)
		require.NoError(t, err)
		s, err := defaultEngine().solveLP(m)
		require.NoError(t, err)
		if !nondegenerate(m, s) {
			continue
		}
		base, err := Solve(c.cat, c.spec, Options{})
		require.NoError(t, err)
		for _, l := range base.Limits {
			if !l.Binding {
				continue
			}
			const eps = 1e-4
			c2, s2, err := Relaxed(c.cat, c.spec, []Relax{{Name: l.Name, By: eps}})
			require.NoError(t, err)
			r2, err := Solve(c2, s2, Options{})
			require.NoError(t, err)
			require.Equal(t, Optimal, r2.Status)
			saving := (base.CostPerTonne - r2.CostPerTonne) / eps
			// Relaxed moves a minimum down; the shadow price is per unit
			// of raising, so a lower minimum saves -shadow.
			want := l.ShadowPrice
			if strings.HasSuffix(l.Name, ".min") {
				want = -want
			}
			assert.InDelta(t, want, saving, 1e-4*(1+math.Abs(want)), "case %d %s", k, l.Name)
			checked++
		}
	}
	t.Logf("%d binding limits checked by finite differences", checked)
	assert.Greater(t, checked, 50)
}
