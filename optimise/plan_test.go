package optimise

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os/exec"
	"path/filepath"
	"runtime"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

func minSpec(id, fa string, min float64) *catalogue.Spec {
	return &catalogue.Spec{ID: id, Name: id, Batch: 1, Limits: []catalogue.Limit{{Name: fa, Bound: bound(min, inf())}}}
}

// TestPlanSharedStockOnPaper is worked by hand. Stocks: hard (C16:0 100 %,
// 1000 EUR/t, 10 t on hand) and soft (C18:1 100 %, 1500 EUR/t, unlimited).
// Orders: A 20 t with C18:1 >= 30 %, B 10 t with C18:1 >= 50 %. Unlimited
// hard would give A 14 t and B 5 t of it: 19 t, more than the 10 on hand.
// Either product swaps one tonne of hard for soft at +500 EUR, so the plan
// uses all 10 t of hard and 20 t of soft: 10 000 + 30 000 = 40 000 EUR, and
// each extra tonne of hard on hand saves 500 EUR.
// With hard also purchasable at 1200 EUR/t, the 9 t short are bought:
// A 14 + 6, B 5 + 5: 10·1000 + 9·1200 + 11·1500 = 37 300 EUR, and an extra
// tonne on hand replaces a bought one: 200 EUR.
func TestPlanSharedStockOnPaper(t *testing.T) {
	cat := twoStocks()
	cat.Stocks[0].Available = 10
	orders := &catalogue.Orders{Orders: []catalogue.Order{
		{Spec: minSpec("a", "C18:1", 30), Tonnes: 20},
		{Spec: minSpec("b", "C18:1", 50), Tonnes: 10},
	}}
	for _, eng := range engines() {
		t.Run(eng.name(), func(t *testing.T) {
			r, err := planWith(eng, cat, orders)
			require.NoError(t, err)
			require.Equal(t, Optimal, r.Status)
			assert.InDelta(t, 40000, r.TotalCost, 1e-6)
			require.Len(t, r.Stocks, 2)
			assert.Equal(t, "hard", r.Stocks[0].Stock)
			assert.InDelta(t, 10, r.Stocks[0].Used, 1e-9)
			assert.InDelta(t, 500, r.Stocks[0].ShadowPrice, 1e-6)
			assert.InDelta(t, 20, r.Stocks[1].Used, 1e-9)
			var sum float64
			for _, p := range r.Products {
				sum += p.CostPerTonne * p.Tonnes
			}
			assert.InDelta(t, r.TotalCost, sum, 1e-6)

			buying := &catalogue.Orders{Orders: orders.Orders, Purchase: map[string]float64{"hard": 1200}}
			r, err = planWith(eng, cat, buying)
			require.NoError(t, err)
			assert.InDelta(t, 37300, r.TotalCost, 1e-6)
			assert.InDelta(t, 9, r.Stocks[0].Buy, 1e-9)
			assert.InDelta(t, 19, r.Stocks[0].Used, 1e-9)
			assert.InDelta(t, 200, r.Stocks[0].ShadowPrice, 1e-6)
		})
	}
}

// TestPlanInfeasibleOnPaper: A needs C16:0 >= 50 % of 20 t (10 t of hard)
// and B C16:0 >= 80 % of 10 t (8 t): 18 t against 10 on hand, so 8 t are
// short. A product impossible on its own (C4:0 >= 1 %, which no stock has)
// is named with its own relaxation instead (worked by hand: lower it by 1).
func TestPlanInfeasibleOnPaper(t *testing.T) {
	cat := twoStocks()
	cat.Stocks[0].Available = 10
	orders := &catalogue.Orders{Orders: []catalogue.Order{
		{Spec: minSpec("a", "C16:0", 50), Tonnes: 20},
		{Spec: minSpec("b", "C16:0", 80), Tonnes: 10},
	}}
	for _, eng := range engines() {
		r, err := planWith(eng, cat, orders)
		require.NoError(t, err)
		require.Equal(t, Infeasible, r.Status)
		require.Equal(t, []Relax{{Name: "avail.hard", By: r.Relaxation[0].By}}, r.Relaxation)
		assert.InDelta(t, 8, r.Relaxation[0].By, 1e-7)

		bad := &catalogue.Orders{Orders: append([]catalogue.Order{{Spec: minSpec("c", "C4:0", 1), Tonnes: 5}}, orders.Orders...)}
		r, err = planWith(eng, cat, bad)
		require.NoError(t, err)
		require.Equal(t, Infeasible, r.Status)
		require.Len(t, r.Relaxation, 1)
		assert.Equal(t, "c:C4:0.min", r.Relaxation[0].Name)
		assert.InDelta(t, 1, r.Relaxation[0].By, 1e-9)
	}
}

func TestPlanRejectsRules(t *testing.T) {
	s := minSpec("a", "C18:1", 30)
	s.Rules.MaxStocks = 1
	_, err := Plan(twoStocks(), &catalogue.Orders{Orders: []catalogue.Order{{Spec: s, Tonnes: 1}}})
	require.Error(t, err)
	assert.True(t, catalogue.IsBadInput(err))
	assert.Contains(t, err.Error(), "[rules]")
}

// randomPlan makes the given number of random products over that many
// shared synthetic stocks, some limited and purchasable at 20 % over their
// price (so the plan is always feasible).
func randomPlan(r *rand.Rand, products, stocks int) (*catalogue.Catalogue, *catalogue.Orders) {
	cat := genStocks(r, stocks)
	orders := &catalogue.Orders{Purchase: map[string]float64{}}
	for p := 0; p < products; p++ {
		spec := genSpec(r, cat, 4+r.IntN(12))
		spec.ID = fmt.Sprintf("p%02d", p)
		orders.Orders = append(orders.Orders, catalogue.Order{Spec: spec, Tonnes: 5 + 50*r.Float64()})
	}
	for j := range cat.Stocks {
		s := &cat.Stocks[j]
		s.Available = math.Inf(1)
		if r.Float64() < 0.4 {
			s.Available = 40 * r.Float64()
			orders.Purchase[s.ID] = s.Price * 1.2
		}
	}
	return cat, orders
}

// TestRandomPlansAgainstGLPK compares the plan optimum of seeded random
// 20-product x 50-stock plans with GLPK's glpsol on the MPS file we write.
func TestRandomPlansAgainstGLPK(t *testing.T) {
	needGlpsol(t)
	r := rand.New(rand.NewPCG(2020, 50))
	dir := t.TempDir()
	products, stocks := 20, 50
	for k := 0; k < 3; k++ {
		cat, orders := randomPlan(r, products, stocks)
		res, err := Plan(cat, orders)
		require.NoError(t, err)
		require.Equal(t, Optimal, res.Status)
		path := filepath.Join(dir, fmt.Sprintf("plan%d.mps", k))
		require.NoError(t, WritePlanMPS(path, cat, orders))
		g := runGlpsol(t, path, false)
		require.Equal(t, "optimal", g.Status)
		assert.True(t, relClose(g.Obj, res.TotalCost, 1e-6), "plan %d: %v, GLPK %v", k, res.TotalCost, g.Obj)
	}
}

// TestRepeatedOrdersAgainstGLPK: orders of one spec share a block of the
// model; a plan of seeded random specs, each ordered three times in other
// tonnages, reaches the optimum GLPK's glpsol finds for the same orders
// kept apart (each order's spec given its own limit that cannot bind, SAFA
// at most 100 + k %, so that no two share a block: the model of separate
// blocks), and so does Plan on that model (1e-7 relative). Each order of
// one spec gets the same blend.
func TestRepeatedOrdersAgainstGLPK(t *testing.T) {
	needGlpsol(t)
	dir := t.TempDir()
	r := rand.New(rand.NewPCG(3, 3))
	for k := 0; k < 3; k++ {
		cat, base := randomPlan(r, 4, 12)
		shared := &catalogue.Orders{Purchase: base.Purchase}
		apart := &catalogue.Orders{Purchase: base.Purchase}
		for _, o := range base.Orders {
			for rep := 0; rep < 3; rep++ {
				o.Tonnes = 1 + 30*r.Float64()
				shared.Orders = append(shared.Orders, o)
				s := o.Spec.Clone()
				s.Limits = append(s.Limits, catalogue.Limit{Name: "safa", Bound: bound(math.Inf(-1), 100+float64(len(apart.Orders)))})
				s.SortLimits()
				apart.Orders = append(apart.Orders, catalogue.Order{Spec: s, Tonnes: o.Tonnes})
			}
		}
		_, pl, err := buildPlan(cat, shared, &profileCache{})
		require.NoError(t, err)
		require.Len(t, pl.prodCol, 4, "plan %d: a block per spec", k)
		_, pl, err = buildPlan(cat, apart, &profileCache{})
		require.NoError(t, err)
		require.Len(t, pl.prodCol, 12, "plan %d: a block per order", k)
		path := filepath.Join(dir, fmt.Sprintf("apart%d.mps", k))
		require.NoError(t, WritePlanMPS(path, cat, apart))
		g := runGlpsol(t, path, false)
		require.Equal(t, "optimal", g.Status)
		a, err := Plan(cat, shared)
		require.NoError(t, err)
		require.Equal(t, Optimal, a.Status)
		b, err := Plan(cat, apart)
		require.NoError(t, err)
		assert.True(t, relClose(g.Obj, a.TotalCost, 1e-7), "plan %d: shared blocks %v, GLPK on separate blocks %v", k, a.TotalCost, g.Obj)
		assert.True(t, relClose(g.Obj, b.TotalCost, 1e-7), "plan %d: separate blocks %v, GLPK %v", k, b.TotalCost, g.Obj)
		for p := range a.Products {
			first := a.Products[p-p%3]
			require.Equal(t, len(first.Blend), len(a.Products[p].Blend))
			for i, l := range a.Products[p].Blend {
				assert.Equal(t, first.Blend[i].Pct, l.Pct)
			}
		}
	}
}

// BenchmarkPlan20x50 is the README's benchmark plan, 20 products x 50 stocks:
// Plan, and GLPK's glpsol on the same MPS file side by side (a process per
// solve, so its time includes start-up and reading the file).
func BenchmarkPlan20x50(b *testing.B) {
	cat, orders := randomPlan(rand.New(rand.NewPCG(2020, 50)), 20, 50)
	b.Run("Plan", func(b *testing.B) {
		for b.Loop() {
			r, err := Plan(cat, orders)
			if err != nil || r.Status != Optimal {
				b.Fatal(err)
			}
		}
	})
	b.Run("glpsol", func(b *testing.B) { benchGlpsolPlan(b, cat, orders) })
}

// benchGlpsolPlan times GLPK's glpsol on the plan's MPS file, a process
// per solve (its time includes start-up and reading the file).
func benchGlpsolPlan(b *testing.B, cat *catalogue.Catalogue, orders *catalogue.Orders) {
	if _, err := exec.LookPath("glpsol"); err != nil {
		b.Skip("glpsol (glpk-utils) is not on PATH")
	}
	path := filepath.Join(b.TempDir(), "plan.mps")
	if err := WritePlanMPS(path, cat, orders); err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if out, err := exec.Command("glpsol", "--freemps", path, "-o", path+".out").CombinedOutput(); err != nil {
			b.Fatal(err, string(out))
		}
	}
}

// TestSmallPlansEnginesAgree: the default engine and gonum's simplex reach
// the same plan optimum on seeded random 3-product x 8-stock plans.
func TestSmallPlansEnginesAgree(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 8))
	for k := 0; k < 10; k++ {
		cat, orders := randomPlan(r, 3, 8)
		a, err := Plan(cat, orders)
		require.NoError(t, err)
		b, err := planWith(gonumEngine(), cat, orders)
		require.NoError(t, err)
		require.Equal(t, a.Status, b.Status)
		assert.True(t, relClose(a.TotalCost, b.TotalCost, 1e-6), "plan %d: default engine %v, gonum %v", k, a.TotalCost, b.TotalCost)
	}
}

// demoOrders is n orders of 20 t of the demo laminating spec over the demo
// stocks, each limited stock purchasable at 10 % over its price (so that
// the plan is feasible). With distinct, order k's SAFA maximum is lowered
// by k·1e-4 %, so that no two orders share a block of the model.
func demoOrders(tb testing.TB, n int, distinct bool) (*catalogue.Catalogue, *catalogue.Orders) {
	tb.Helper()
	cat := catalogue.DemoStocks()
	spec, ok := catalogue.DemoSpec("laminating")
	require.True(tb, ok)
	orders := &catalogue.Orders{Purchase: map[string]float64{}}
	for k := 0; k < n; k++ {
		s := spec
		if distinct {
			s = spec.Clone()
			for i := range s.Limits {
				if s.Limits[i].Name == "safa" {
					s.Limits[i].Max -= float64(k) * 1e-4
				}
			}
		}
		orders.Orders = append(orders.Orders, catalogue.Order{Spec: s, Tonnes: 20})
	}
	for _, s := range cat.Stocks {
		if s.Limited() {
			orders.Purchase[s.ID] = 1.1 * s.Price
		}
	}
	return cat, orders
}

// allocated is the memory f allocates in all (runtime.MemStats.TotalAlloc),
// an upper bound of the growth of the heap while it runs.
func allocated(f func()) uint64 {
	var a, b runtime.MemStats
	runtime.ReadMemStats(&a)
	f()
	runtime.ReadMemStats(&b)
	return b.TotalAlloc - a.TotalAlloc
}

// TestPlanMemory: 2,000 orders of the demo spec are planned allocating
// less than 300 MB in all (the dense model of 2,000 separate blocks held
// 3 GB), and the model of 2,000 orders that share no block is built in
// less than 100 MB. Worked on paper: the 2,000 orders are one block, so
// each gets the blend one order of 40,000 t gets.
func TestPlanMemory(t *testing.T) {
	cat, orders := demoOrders(t, 2000, false)
	var r *PlanResult
	var err error
	got := allocated(func() { r, err = Plan(cat, orders) })
	require.NoError(t, err)
	require.Equal(t, Optimal, r.Status)
	t.Logf("plan of 2,000 orders of one spec: %d MB allocated", got>>20)
	assert.Less(t, got, uint64(300<<20))
	one := &catalogue.Orders{Orders: []catalogue.Order{{Spec: orders.Orders[0].Spec, Tonnes: 2000 * 20}}, Purchase: orders.Purchase}
	ro, err := Plan(cat, one)
	require.NoError(t, err)
	assert.True(t, relClose(ro.TotalCost, r.TotalCost, 1e-9), "2,000 orders %v, one order of their tonnes %v", r.TotalCost, ro.TotalCost)
	for _, p := range r.Products {
		require.Equal(t, len(ro.Products[0].Blend), len(p.Blend))
		for k, l := range p.Blend {
			assert.InDelta(t, ro.Products[0].Blend[k].Pct, l.Pct, 1e-9)
		}
	}

	cat, orders = demoOrders(t, 2000, true)
	var m *planModel
	var pl *planLayout
	got = allocated(func() { m, pl, err = buildPlan(cat, orders, &profileCache{}) })
	require.NoError(t, err)
	t.Logf("model of 2,000 distinct orders (%d rows x %d columns): %d MB allocated", m.prob.Rows, m.prob.Cols, got>>20)
	assert.Len(t, pl.prodCol, 2000, "a block per order")
	assert.Less(t, got, uint64(100<<20))
}

// BenchmarkPlanOrders plans 1,000 and 2,000 orders of 20 t of the demo
// laminating spec over the demo stocks (demoOrders) — orders of one spec
// share a block — and as many orders that share no block, with GLPK's
// glpsol on the same MPS file beside each (a process per solve). The
// metric MB-alloc/op is the memory allocated in all per plan, an upper
// bound of its peak.
func BenchmarkPlanOrders(b *testing.B) {
	for _, c := range []struct {
		name     string
		n        int
		distinct bool
	}{{"Same1000", 1000, false}, {"Same2000", 2000, false}, {"Distinct1000", 1000, true}, {"Distinct2000", 2000, true}} {
		cat, orders := demoOrders(b, c.n, c.distinct)
		b.Run(c.name+"/Plan", func(b *testing.B) {
			var mb float64
			for b.Loop() {
				var r *PlanResult
				var err error
				mb += float64(allocated(func() { r, err = Plan(cat, orders) })) / (1 << 20)
				if err != nil || r.Status != Optimal {
					b.Fatal(err)
				}
			}
			b.ReportMetric(mb/float64(b.N), "MB-alloc/op")
		})
		b.Run(c.name+"/glpsol", func(b *testing.B) { benchGlpsolPlan(b, cat, orders) })
	}
}

// TestPlanLabelsUnique: a spec label naming several blocks gets "#2",
// "#3" ... on the later ones, never a label another block already has
// (worked by hand).
func TestPlanLabelsUnique(t *testing.T) {
	assert.Equal(t, []string{"a", "a#2", "b", "a#3", "a#4"}, planLabels([]string{"a", "a#2", "b", "a", "a"}))
	assert.Equal(t, []string{"x", "x#2", "x#3"}, planLabels([]string{"x", "x", "x"}))
}
