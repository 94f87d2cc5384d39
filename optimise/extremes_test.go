package optimise

import (
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp/lptest"
)

// The magnitudes these tests reach are the ends of the ranges the loaders
// accept (catalogue.Quantity.Range, README "Accepted magnitudes"): prices
// of 0.001 and 1e9 per tonne, batches and orders of 0.001 and 1e6 t, 0.001
// and 1e6 t on hand. Their reference is GLPK's exact simplex (glpsol
// --exact, rational arithmetic): at these magnitudes GLPK's own
// floating-point simplex stops up to 3e-5 (relative) above the optimum on
// some of them (measured while writing these tests), so it is no reference
// there.

// exactGLPK solves an MPS file with glpsol --exact.
func exactGLPK(t *testing.T, path string) lptest.GLPK {
	t.Helper()
	return lptest.GlpsolWith(t, path, lptest.GlpsolOptions{Exact: true})
}

// logUniform is 10^u with u uniform in [lo, hi].
func logUniform(r *rand.Rand, lo, hi float64) float64 {
	return math.Pow(10, lo+(hi-lo)*r.Float64())
}

// extremePrice is a price the loaders accept: one of the ends of the range,
// a log-uniform one over it, or the ordinary one given.
func extremePrice(r *rand.Rand, ordinary float64) float64 {
	switch r.IntN(5) {
	case 0:
		return 1e9
	case 1:
		return 0.001
	case 2:
		return logUniform(r, -3, 9)
	}
	return ordinary
}

// clampTo returns v moved into the accepted range of q (above zero).
func clampTo(q catalogue.Quantity, v float64) float64 {
	rg := q.Range()
	return math.Min(rg.Max, math.Max(rg.Least, v))
}

// toExtremes moves a random blend (genStocks, genSpec) to a batch of
// batch t, its stock on hand in proportion (so the hidden feasible blend
// stays feasible, within the accepted range), and its prices to the ends
// of the accepted range (extremePrice).
func toExtremes(r *rand.Rand, cat *catalogue.Catalogue, spec *catalogue.Spec, batch float64) {
	f := batch / spec.Batch
	spec.Batch = batch
	for j := range cat.Stocks {
		s := &cat.Stocks[j]
		if s.Limited() {
			s.Available = clampTo(catalogue.QtyOnHand, s.Available*f)
		}
		s.Price = extremePrice(r, s.Price)
	}
}

// requireAccepted fails unless every price, tonnage and availability of
// cat and spec is one the loaders accept.
func requireAccepted(t *testing.T, cat *catalogue.Catalogue, batches ...float64) {
	t.Helper()
	for _, s := range cat.Stocks {
		require.NoError(t, catalogue.QtyPrice.Check("price", s.Price))
		if s.Limited() {
			require.NoError(t, catalogue.QtyOnHand.Check("available", s.Available))
		}
	}
	for _, b := range batches {
		require.NoError(t, catalogue.QtyTonnes.Check("batch", b))
	}
}

// extremeBlends are the cases of the hardening issue, on the demo stocks
// (unlimited unless said) and the demo laminating spec, plus seeded random
// blends with their magnitudes pushed to the ends of the accepted ranges.
func extremeBlends(t *testing.T) []suiteCase {
	demo := func(batch float64, edit func(c *catalogue.Catalogue, s *catalogue.Spec)) suiteCase {
		cat := catalogue.DemoStocks()
		for j := range cat.Stocks {
			cat.Stocks[j].Available = math.Inf(1)
		}
		spec, ok := catalogue.DemoSpec("laminating")
		require.True(t, ok)
		spec = spec.Clone()
		spec.Batch = batch
		edit(cat, spec)
		return suiteCase{cat: cat, spec: spec}
	}
	// dear is a copy of the demo palm at 1e9 per tonne.
	dear := func(c *catalogue.Catalogue) string {
		for _, s := range c.Stocks {
			if s.ID == "palm" {
				s.ID, s.Name, s.Price = "dear-palm", "palm at 1e9", 1e9
				c.Stocks = append(c.Stocks, s)
				return s.ID
			}
		}
		t.Fatal("the demo catalogue has no palm")
		return ""
	}
	cases := []suiteCase{
		demo(1e6, func(c *catalogue.Catalogue, s *catalogue.Spec) { // a 1e9 stock on offer, 1 kg of another on hand
			dear(c)
			c.Stocks[1].Available = 0.001
		}),
		demo(1e6, func(c *catalogue.Catalogue, s *catalogue.Spec) { // ... and forced in at 0.001 %
			s.Use = append(s.Use, catalogue.Use{Stock: dear(c), Bound: bound(0.001, inf())})
			c.Stocks[2].Available = 0.001
		}),
		demo(0.001, func(c *catalogue.Catalogue, s *catalogue.Spec) { // 1 kg batch, 1e6 t on hand, prices at both ends
			c.Stocks[4].Price, c.Stocks[4].Available = 1e9, 1e6
			c.Stocks[5].Price = 0.001
		}),
		demo(0.001, func(c *catalogue.Catalogue, s *catalogue.Spec) { // every price 0.001
			for j := range c.Stocks {
				c.Stocks[j].Price = 0.001 * float64(1+j)
			}
		}),
		demo(1e6, func(c *catalogue.Catalogue, s *catalogue.Spec) { // every price near 1e9, some stock short
			for j := range c.Stocks {
				c.Stocks[j].Price = 1e9 / float64(1+j%4)
			}
			c.Stocks[0].Available = 1e6
			c.Stocks[3].Available = 0.001
		}),
		{cat: catalogue.DemoStocks(), spec: func() *catalogue.Spec { // the demo as it is, 1e6 t: not enough stock
			s, _ := catalogue.DemoSpec("laminating")
			s = s.Clone()
			s.Batch = 1e6
			return s
		}()},
	}
	r := rand.New(rand.NewPCG(1_000_000_000, 1e6))
	for k := 0; k < 60; k++ {
		cat := genStocks(r, 3+r.IntN(18))
		spec := genSpec(r, cat, 3+r.IntN(12))
		toExtremes(r, cat, spec, []float64{0.001, 1e6, logUniform(r, -3, 6)}[r.IntN(3)])
		cases = append(cases, suiteCase{cat: cat, spec: spec})
	}
	dir := t.TempDir()
	for k := range cases {
		requireAccepted(t, cases[k].cat, cases[k].spec.Batch)
		cases[k].mps = filepath.Join(dir, fmt.Sprintf("extreme%02d.mps", k))
		require.NoError(t, WriteMPS(cases[k].mps, cases[k].cat, cases[k].spec))
	}
	return cases
}

// noPanic runs f and turns a panic into a test failure with its value.
func noPanic(t *testing.T, what string, f func()) {
	t.Helper()
	defer func() {
		if v := recover(); v != nil {
			t.Fatalf("%s: panic: %v", what, v)
		}
	}()
	f()
}

// TestExtremeBlendsAgainstExactGLPK: at the ends of the accepted ranges
// every engine of the build (lipoplan's simplex; CLP in the coin build) and
// gonum's simplex solve every case without an error or a panic, agree with
// GLPK's exact simplex on feasibility, and reach its optimum to 1e-7
// relative. An impossible case gets its relaxation without an error too.
func TestExtremeBlendsAgainstExactGLPK(t *testing.T) {
	needGlpsol(t)
	for k, c := range extremeBlends(t) {
		g := exactGLPK(t, c.mps)
		require.Contains(t, []string{"optimal", "infeasible"}, g.Status, "case %d: exact GLPK", k)
		for _, eng := range engines() {
			var r *Result
			var err error
			noPanic(t, fmt.Sprintf("case %d %s", k, eng.name()), func() { r, err = solveWith(eng, c.cat, c.spec, Options{}) })
			require.NoError(t, err, "case %d %s", k, eng.name())
			if g.Status == "infeasible" {
				assert.Equal(t, Infeasible, r.Status, "case %d %s", k, eng.name())
				assert.NotEmpty(t, r.Relaxation, "case %d %s: no relaxation", k, eng.name())
				continue
			}
			require.Equal(t, Optimal, r.Status, "case %d %s", k, eng.name())
			assert.True(t, relClose(g.Obj, r.CostPerTonne, 1e-7), "case %d %s: %.12g per tonne, exact GLPK %.12g", k, eng.name(), r.CostPerTonne, g.Obj)
		}
	}
}

// TestExtremeRangingAgainstExactGLPK checks the cost ranges of the
// extreme cases with a 1e9 stock beside ordinary ones from outside: within
// a stock's range, 1e-4 of the way short of either end, GLPK's exact
// optimum is the reported blend at the moved price (the blend stays
// optimal).
func TestExtremeRangingAgainstExactGLPK(t *testing.T) {
	needGlpsol(t)
	dir := t.TempDir()
	checked := 0
	for k, c := range extremeBlends(t)[:3] {
		r, err := Solve(c.cat, c.spec, Options{})
		require.NoError(t, err)
		require.Equal(t, Optimal, r.Status, "case %d", k)
		pct := map[string]float64{}
		for _, l := range r.Blend {
			pct[l.Stock] = l.Pct
		}
		for _, rg := range r.Ranging {
			for _, end := range []float64{rg.PriceLow, rg.PriceHigh} {
				if math.IsInf(end, 0) || end < 0 {
					continue
				}
				price := rg.Price + (1-1e-4)*(end-rg.Price)
				cat := c.cat.Clone()
				want := r.CostPerTonne + (price-rg.Price)*pct[rg.Stock]/100
				for j := range cat.Stocks {
					if cat.Stocks[j].ID == rg.Stock {
						cat.Stocks[j].Price = price
					}
				}
				path := filepath.Join(dir, fmt.Sprintf("rg%d-%s-%g.mps", k, rg.Stock, end))
				require.NoError(t, WriteMPS(path, cat, c.spec))
				g := exactGLPK(t, path)
				require.Equal(t, "optimal", g.Status)
				assert.True(t, relClose(g.Obj, want, 1e-7), "case %d %s at %.10g (range %.10g..%.10g): exact GLPK %.12g, the blend %.12g",
					k, rg.Stock, price, rg.PriceLow, rg.PriceHigh, g.Obj, want)
				checked++
			}
		}
	}
	assert.Greater(t, checked, 10)
}

// TestExtremePlansAgainstExactGLPK: seeded random plans whose orders,
// stock on hand and prices reach both ends of the accepted ranges, and a
// plan in which everything is tiny (orders of 1 kg, prices of 0.001 per
// tonne: costs of 1e-8 in the model, where unscaled engines stopped 1 % to
// 18 % above the optimum), solve without an error or a panic to GLPK's
// exact optimum (1e-7 relative).
func TestExtremePlansAgainstExactGLPK(t *testing.T) {
	needGlpsol(t)
	dir := t.TempDir()
	cases := extremePlans()
	for k, c := range cases {
		var tonnes []float64
		for _, o := range c.orders.Orders {
			tonnes = append(tonnes, o.Tonnes)
		}
		requireAccepted(t, c.cat, tonnes...)
		for _, p := range c.orders.Purchase {
			require.NoError(t, catalogue.QtyPrice.Check("purchase", p))
		}
		path := filepath.Join(dir, fmt.Sprintf("plan%02d.mps", k))
		require.NoError(t, WritePlanMPS(path, c.cat, c.orders))
		g := exactGLPK(t, path)
		require.Equal(t, "optimal", g.Status, "plan %d: exact GLPK", k)
		for _, eng := range engines() {
			var res *PlanResult
			var err error
			noPanic(t, fmt.Sprintf("plan %d %s", k, eng.name()), func() { res, err = planWith(eng, c.cat, c.orders) })
			require.NoError(t, err, "plan %d %s", k, eng.name())
			require.Equal(t, Optimal, res.Status, "plan %d %s", k, eng.name())
			assert.True(t, relClose(g.Obj, res.TotalCost, 1e-7), "plan %d %s: %.12g, exact GLPK %.12g", k, eng.name(), res.TotalCost, g.Obj)
		}
	}
}

// TestExtremeRulesAgainstBruteForce: integer rules at the ends of the
// accepted ranges (a 1e9 stock, a batch of 1e6 t with 1 kg of one stock on
// hand; a 1 kg batch with prices of 0.001) reach the optimum found by
// enumerating the allowed sets of stocks with gonum's simplex (bruteForce)
// with every MIP engine of the build, to 1e-7 relative.
func TestExtremeRulesAgainstBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(31, 41))
	checked := 0
	for k := 0; k < 12; k++ {
		cat := genStocks(r, 5+r.IntN(4))
		spec := genSpec(r, cat, 4+r.IntN(6))
		batch := []float64{0.001, 1e6}[k%2]
		toExtremes(r, cat, spec, batch)
		spec.Rules = catalogue.Rules{MaxStocks: 2 + r.IntN(3), SmallestShare: []float64{0, 0.5, 5}[r.IntN(3)]}
		requireAccepted(t, cat, batch)
		want := bruteForce(t, cat, spec)
		for _, eng := range engines() {
			if eng.mip == nil {
				continue
			}
			var res *Result
			var err error
			noPanic(t, fmt.Sprintf("case %d %s", k, eng.milpName()), func() { res, err = solveWith(eng, cat, spec, Options{}) })
			require.NoError(t, err, "case %d %s", k, eng.milpName())
			if math.IsInf(want, 1) {
				assert.Equal(t, Infeasible, res.Status, "case %d %s", k, eng.milpName())
				continue
			}
			require.Equal(t, Optimal, res.Status, "case %d %s", k, eng.milpName())
			assert.True(t, relClose(want, res.CostPerTonne, 1e-7), "case %d %s: %.12g, brute force %.12g", k, eng.milpName(), res.CostPerTonne, want)
			checked++
		}
	}
	assert.Greater(t, checked, 6)
}

// planCase is a catalogue with its orders.
type planCase struct {
	cat    *catalogue.Catalogue
	orders *catalogue.Orders
}

// extremePlans are seeded random plans whose orders, stock on hand and
// prices reach both ends of the accepted ranges, and one plan in which
// everything is tiny.
func extremePlans() []planCase {
	r := rand.New(rand.NewPCG(1e6, 1e9))
	var cases []planCase
	for k := 0; k < 16; k++ {
		cat, orders := randomPlan(r, 2+r.IntN(3), 6+r.IntN(8))
		for p := range orders.Orders {
			orders.Orders[p].Tonnes = []float64{0.001, 1e6, logUniform(r, -3, 6)}[r.IntN(3)]
		}
		for j := range cat.Stocks {
			s := &cat.Stocks[j]
			if s.Limited() {
				s.Available = clampTo(catalogue.QtyOnHand, s.Available/40*logUniform(r, -3, 6))
			}
			s.Price = extremePrice(r, s.Price)
			if _, ok := orders.Purchase[s.ID]; ok {
				orders.Purchase[s.ID] = clampTo(catalogue.QtyPrice, 1.2*s.Price)
			}
		}
		cases = append(cases, planCase{cat, orders})
	}
	cat, orders := randomPlan(rand.New(rand.NewPCG(9, 9)), 8, 10)
	for p := range orders.Orders {
		orders.Orders[p].Tonnes = 0.001
	}
	for j := range cat.Stocks {
		s := &cat.Stocks[j]
		s.Available = 0.001 * float64(1+j%5)
		s.Price = 0.001 * (1 + float64(j)/10)
		orders.Purchase[s.ID] = 1.2 * s.Price
	}
	cases = append(cases, planCase{cat, orders})
	return cases
}
