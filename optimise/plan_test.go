package optimise

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os/exec"
	"path/filepath"
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
	b.Run("glpsol", func(b *testing.B) {
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
	})
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
