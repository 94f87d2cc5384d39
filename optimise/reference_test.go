package optimise

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// glpk is GLPK's answer to one MPS file, read from glpsol's plain-text
// solution (-w) and sensitivity report (--ranges).
type glpk struct {
	status   string // "f" feasible (optimal) in the primal status field
	obj      float64
	rowDual  []float64
	colDual  []float64
	colValue []float64
	costLo   map[string]float64 // column -> objective coefficient range
	costHi   map[string]float64
}

func needGlpsol(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("glpsol"); err != nil {
		t.Skip("glpsol (Debian package glpk-utils) is not on PATH; .ci/run installs it. Skipping the GLPK reference comparison.")
	}
}

// runGlpsol solves an MPS file with GLPK (glpsol --freemps) and reads its
// plain-text solution: "s bas rows cols pst dst obj", then "i row st prim
// dual" and "j col st prim dual" lines (GLPK's plain-text solution format,
// as glpsol 5.0 writes it here). With ranges it also parses the sensitivity
// report.
func runGlpsol(t *testing.T, mps string, ranges bool) glpk {
	t.Helper()
	sol := mps + ".sol"
	args := []string{"--freemps", mps, "-w", sol}
	if ranges {
		args = append(args, "--ranges", mps+".rng")
	}
	out, err := exec.Command("glpsol", args...).CombinedOutput()
	require.NoError(t, err, string(out))
	f, err := os.Open(sol)
	require.NoError(t, err)
	defer f.Close()
	var g glpk
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) == 0 {
			continue
		}
		num := func(s string) float64 {
			v, err := strconv.ParseFloat(s, 64)
			require.NoError(t, err, sc.Text())
			return v
		}
		switch fs[0] {
		case "s":
			if fs[1] == "bas" {
				g.status, g.obj = fs[4], num(fs[6])
			} else { // "s mip rows cols sst obj"
				g.status, g.obj = fs[4], num(fs[5])
				if g.status == "o" {
					g.status = "f"
				}
			}
		case "i":
			if len(fs) == 5 {
				g.rowDual = append(g.rowDual, num(fs[4]))
			}
		case "j":
			if len(fs) == 5 {
				g.colValue = append(g.colValue, num(fs[3]))
				g.colDual = append(g.colDual, num(fs[4]))
			} else {
				g.colValue = append(g.colValue, num(fs[2]))
			}
		}
	}
	if ranges && g.status == "f" {
		g.costLo, g.costHi = parseRanges(t, mps+".rng")
	}
	return g
}

// parseRanges reads the column part of glpsol's sensitivity report: each
// column takes two lines; the 8th field of the first is the low end of the
// objective coefficient range, the 4th field of the second its high end
// ("." is zero).
func parseRanges(t *testing.T, path string) (lo, hi map[string]float64) {
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	lo, hi = map[string]float64{}, map[string]float64{}
	lines := strings.Split(string(b), "\n")
	inCols := false
	val := func(s string) float64 {
		switch s {
		case ".":
			return 0
		case "+Inf":
			return math.Inf(1)
		case "-Inf":
			return math.Inf(-1)
		}
		v, err := strconv.ParseFloat(s, 64)
		require.NoError(t, err, s)
		return v
	}
	for i := 0; i < len(lines); i++ {
		l := lines[i]
		if strings.Contains(l, "Column name") {
			inCols = true
			continue
		}
		if strings.Contains(l, "Row name") {
			inCols = false
		}
		fs := strings.Fields(l)
		if !inCols || len(fs) < 8 {
			continue
		}
		if _, err := strconv.Atoi(fs[0]); err != nil || i+1 >= len(lines) {
			continue
		}
		next := strings.Fields(lines[i+1])
		if len(next) < 4 {
			continue
		}
		lo[fs[1]], hi[fs[1]] = val(fs[7]), val(next[3])
		i++
	}
	return lo, hi
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
// problems (3..30 stocks, 3..20 limits) three ways: CLP through our binding,
// gonum's lp.Simplex, and GLPK's glpsol reading the MPS file we write. The
// optima must agree to 1e-6 relative. Where the optimal vertex is
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
		require.Equal(t, "f", g.status, "case %d: GLPK finds no optimum", k)
		m, lay, err := build(c.cat, c.spec)
		require.NoError(t, err)
		var sols []*solution
		for _, eng := range engines() {
			s, err := eng.solveLP(m)
			require.NoError(t, err, "case %d %s", k, eng.name())
			require.Equal(t, solOptimal, s.status, "case %d %s", k, eng.name())
			assert.True(t, relClose(g.obj, s.obj, 1e-6), "case %d %s: objective %v, GLPK %v", k, eng.name(), s.obj, g.obj)
			sols = append(sols, s)
		}
		res := map[string]*Result{}
		for _, eng := range engines() {
			r, err := solveWith(eng, c.cat, c.spec, Options{})
			require.NoError(t, err)
			assert.True(t, relClose(g.obj, r.CostPerTonne, 1e-6), "case %d %s: cost %v, GLPK %v", k, eng.name(), r.CostPerTonne, g.obj)
			res[eng.name()] = r
		}
		if !nondegenerate(m, sols[0]) {
			continue
		}
		nondeg++
		for _, s := range sols {
			for i := range g.rowDual {
				assert.True(t, relClose(g.rowDual[i], s.y[i], 1e-6), "case %d row %s: dual %v, GLPK %v", k, m.rowName[i], s.y[i], g.rowDual[i])
			}
			for j := range g.colDual {
				assert.True(t, relClose(g.colDual[j], s.d[j], 1e-6), "case %d column %s: reduced cost %v, GLPK %v", k, m.colName[j], s.d[j], g.colDual[j])
			}
		}
		if len(res) == 2 {
			a, b := res["clp"], res["gonum"]
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
		if g.costLo != nil {
			ranged++
			for _, r := range res {
				for _, rg := range r.Ranging {
					lo, hi := g.costLo[rg.Stock], g.costHi[rg.Stock]
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
