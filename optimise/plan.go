package optimise

import (
	"fmt"
	"math"
	"sort"

	"lipoplan/catalogue"
)

// PlanProduct is one order of a plan with its blend.
type PlanProduct struct {
	Spec         string // spec id (file base name) or name
	Tonnes       float64
	CostPerTonne float64 // at the average price paid for each stock (own and bought)
	Blend        []Line
}

// PlanStock is one stock's use across a plan.
type PlanStock struct {
	Stock       string
	Used        float64 // tonnes over all products
	Available   float64 // tonnes on hand; +Inf when unlimited
	Buy         float64 // tonnes bought beyond Available at the [purchase] price
	ShadowPrice float64 // currency saved per extra tonne on hand (0 when some is left)
}

// PlanResult is the cheapest way to make every order of an orders file from
// one shared stock of oils and fats.
type PlanResult struct {
	Status     Status
	Engine     string
	Currency   string
	TotalCost  float64
	Products   []PlanProduct
	Stocks     []PlanStock
	Relaxation []Relax  // when Infeasible: "<spec>:<limit>" for a product impossible on its own, or "avail.<id>" (tonnes)
	Notes      []string // what the plan leaves out, e.g. a spec's [process] step
}

// planLayout maps the joint programme.
type planLayout struct {
	n        int       // stocks
	prodCol  []int     // first column of each product
	own, buy []int     // per stock: column of tonnes taken from stock / bought; -1 when none
	balance  []int     // per stock: its balance row; -1 when unlimited
	specs    []string  // product names
	tonnes   []float64 // per product
}

func specLabel(s *catalogue.Spec) string {
	switch {
	case s.ID != "":
		return s.ID
	case s.Name != "":
		return s.Name
	}
	return s.File
}

// Plan makes every order from the shared stocks at least total cost: one
// block of columns per product (shares in % of that product, its [limits],
// [limits.sfc] and [use] rows as in Solve), and per limited stock a balance
// row Σ_p tonnes_p·x_pj/100 = own_j + buy_j with own_j <= available_j at the
// stock price and buy_j at the [purchase] price when one is given. The
// objective is the total cost in currency. Integer rules are not taken in
// plans (a BadInput says so). An impossible plan is diagnosed: products that
// cannot be met on their own get their own smallest relaxation (names
// "<spec>:<limit>"); otherwise the shortfall of shared stock is found by an
// LP that minimises the extra tonnes needed ("avail.<id>").
func Plan(cat *catalogue.Catalogue, orders *catalogue.Orders) (*PlanResult, error) {
	s := NewSolver()
	defer s.Close()
	return s.Plan(cat, orders)
}

func planWith(eng *engine, cat *catalogue.Catalogue, orders *catalogue.Orders) (*PlanResult, error) {
	return planIn(eng, &profileCache{}, cat, orders)
}

// planIn is planWith taking stock profiles from pc, shared by the orders.
func planIn(eng *engine, pc *profileCache, cat *catalogue.Catalogue, orders *catalogue.Orders) (*PlanResult, error) {
	if orders == nil || len(orders.Orders) == 0 {
		return nil, catalogue.Badf("the orders file has no [[order]]; add one with spec and tonnes")
	}
	m, pl, err := buildPlan(cat, orders, pc)
	if err != nil {
		return nil, err
	}
	res := &PlanResult{Engine: eng.name(), Currency: cat.Currency}
	for p, o := range orders.Orders {
		if o.Spec.Process != nil {
			res.Notes = append(res.Notes, fmt.Sprintf("order %s: the spec's [process] step (interesterification) is not modelled by plan; "+
				"its blend is of the stocks as they are, with SFC linear in their measured curves (use solve for the reactor)", pl.specs[p]))
		}
	}
	sol, err := eng.solveLP(m)
	if err != nil {
		return nil, fmt.Errorf("optimise plan: %w", err)
	}
	if sol.status != solOptimal {
		res.Status = Infeasible
		res.Relaxation, err = planDiagnosis(eng, pc, cat, orders, m, pl)
		return res, err
	}
	res.Status = Optimal
	n := pl.n
	used := make([]float64, n)
	for p, o := range orders.Orders {
		for j := 0; j < n; j++ {
			used[j] += math.Max(sol.x[pl.prodCol[p]+j], 0) * o.Tonnes / 100
		}
	}
	// Average price paid per stock: own tonnes at the stock price, bought
	// tonnes at the purchase price.
	avg := make([]float64, n)
	for j, s := range cat.Stocks {
		avg[j] = s.Price
		if pl.buy[j] >= 0 && used[j] > 1e-12 {
			b := math.Max(sol.x[pl.buy[j]], 0)
			avg[j] = (s.Price*(used[j]-b) + orders.Purchase[s.ID]*b) / used[j]
		}
	}
	for p, o := range orders.Orders {
		pp := PlanProduct{Spec: pl.specs[p], Tonnes: o.Tonnes}
		for j, s := range cat.Stocks {
			x := math.Max(sol.x[pl.prodCol[p]+j], 0)
			if x > usedTol {
				pp.Blend = append(pp.Blend, Line{Stock: s.ID, Name: s.Name, Pct: x, Tonnes: x * o.Tonnes / 100})
				pp.CostPerTonne += avg[j] * x / 100
			}
		}
		sort.SliceStable(pp.Blend, func(a, b int) bool { return pp.Blend[a].Pct > pp.Blend[b].Pct })
		res.TotalCost += pp.CostPerTonne * o.Tonnes
		res.Products = append(res.Products, pp)
	}
	for j, s := range cat.Stocks {
		if used[j] <= 1e-9 && !s.Limited() {
			continue
		}
		ps := PlanStock{Stock: s.ID, Used: used[j], Available: s.Available}
		if pl.buy[j] >= 0 {
			ps.Buy = math.Max(sol.x[pl.buy[j]], 0)
		}
		if k := pl.own[j]; k >= 0 && sol.basis != nil && sol.basis[k] == stUpper {
			ps.ShadowPrice = math.Max(-sol.d[k], 0)
		}
		res.Stocks = append(res.Stocks, ps)
	}
	return res, nil
}

// buildPlan assembles the joint programme from one base model per order,
// taking stock profiles from pc.
func buildPlan(cat *catalogue.Catalogue, orders *catalogue.Orders, pc *profileCache) (*model, *planLayout, error) {
	if cat == nil || len(cat.Stocks) == 0 {
		return nil, nil, catalogue.Badf("the stock catalogue has no stocks; add [[stock]] entries")
	}
	n := len(cat.Stocks)
	P := len(orders.Orders)
	pl := &planLayout{n: n, prodCol: make([]int, P), own: make([]int, n), buy: make([]int, n)}
	bases := make([]*model, P)
	lays := make([]*layout, P)
	for p, o := range orders.Orders {
		if o.Spec == nil {
			return nil, nil, catalogue.Badf("order #%d has no spec", p+1)
		}
		if !finiteNum(o.Tonnes) || o.Tonnes <= 0 {
			return nil, nil, catalogue.Badf("order #%d (%s): tonnes = %v must be above 0", p+1, specLabel(o.Spec), o.Tonnes)
		}
		if o.Spec.Rules.Active() {
			return nil, nil, catalogue.Badf("order #%d: %s sets [rules]; integer rules are not taken in plans, remove them or solve that spec alone", p+1, specWhere(o.Spec))
		}
		spec := o.Spec.Clone()
		spec.Batch = o.Tonnes
		m, lay, err := buildWith(cat, spec, pc) // every order's model stays alive: no scratch
		if err != nil {
			return nil, nil, fmt.Errorf("order #%d: %w", p+1, err)
		}
		bases[p], lays[p] = m, lay
		pl.specs = append(pl.specs, specLabel(o.Spec))
		pl.tonnes = append(pl.tonnes, o.Tonnes)
	}
	cols := P * n
	for j, s := range cat.Stocks {
		pl.own[j], pl.buy[j] = -1, -1
		if s.Limited() {
			pl.own[j] = cols
			cols++
			if _, ok := orders.Purchase[s.ID]; ok {
				pl.buy[j] = cols
				cols++
			}
		}
	}
	m := newModel(cols)
	for p, base := range bases {
		pl.prodCol[p] = p * n
		for j, s := range cat.Stocks {
			c := p*n + j
			m.colName[c] = pl.specs[p] + "." + s.ID
			m.colLo[c] = base.colLo[j]
			m.colUp[c] = math.Inf(1)
			if u := lays[p].cols[j].use; u.HasMax() {
				m.colUp[c] = u.Max
			}
			if !s.Limited() {
				m.obj[c] = s.Price * orders.Orders[p].Tonnes / 100
			}
		}
	}
	for j, s := range cat.Stocks {
		if k := pl.own[j]; k >= 0 {
			m.colName[k] = "own." + s.ID
			m.obj[k] = s.Price
			m.colUp[k] = s.Available
		}
		if k := pl.buy[j]; k >= 0 {
			m.colName[k] = "buy." + s.ID
			m.obj[k] = orders.Purchase[s.ID]
		}
	}
	rows := 0
	for _, b := range bases {
		rows += b.nRows
	}
	m.a = make([]float64, 0, (rows+n)*cols)
	coef := make([]float64, cols)
	for p, base := range bases {
		for i := 0; i < base.nRows; i++ {
			clear(coef)
			copy(coef[p*n:(p+1)*n], base.row(i))
			m.addRow(pl.specs[p]+":"+base.rowName[i], coef, base.rowLo[i], base.rowUp[i])
		}
	}
	pl.balance = make([]int, n)
	for j, s := range cat.Stocks {
		pl.balance[j] = -1
		if pl.own[j] < 0 {
			continue
		}
		clear(coef)
		for p, o := range orders.Orders {
			coef[p*n+j] = o.Tonnes / 100
		}
		coef[pl.own[j]] = -1
		if pl.buy[j] >= 0 {
			coef[pl.buy[j]] = -1
		}
		pl.balance[j] = m.addRow("stock."+s.ID, coef, 0, 0)
	}
	return m, pl, nil
}

// planDiagnosis explains an impossible plan.
func planDiagnosis(eng *engine, pc *profileCache, cat *catalogue.Catalogue, orders *catalogue.Orders, m *model, pl *planLayout) ([]Relax, error) {
	var out []Relax
	alone := true
	for p, o := range orders.Orders {
		spec := o.Spec.Clone()
		spec.Batch = o.Tonnes
		big := cat.Clone()
		for j := range big.Stocks {
			big.Stocks[j].Available = math.Inf(1)
		}
		r, err := solveIn(eng, pc, nil, big, spec, Options{})
		if err != nil {
			return nil, err
		}
		if r.Status == Infeasible {
			for _, x := range r.Relaxation {
				out = append(out, Relax{Name: pl.specs[p] + ":" + x.Name, By: x.By})
			}
			alone = false
		}
	}
	if !alone {
		return out, nil
	}
	// Every product can be made on its own from unlimited stock, so the
	// shared stock is short: find the fewest extra tonnes on hand.
	e := m.clone()
	for j := range e.obj {
		e.obj[j] = 0
	}
	extra := make([]int, pl.n)
	for j := range cat.Stocks {
		extra[j] = -1
		if pl.own[j] < 0 {
			continue
		}
		extra[j] = e.addCol("extra."+cat.Stocks[j].ID, 1, 0, math.Inf(1))
		e.set(pl.balance[j], extra[j], -1)
	}
	s, err := eng.solveLP(e)
	if err != nil {
		return nil, fmt.Errorf("optimise plan: shortfall programme: %w", err)
	}
	if s.status != solOptimal {
		return nil, catalogue.Badf("the orders cannot be met even with unlimited stock; check each spec with lipoplan solve")
	}
	for j, k := range extra {
		if k >= 0 && s.x[k] > 1e-9 {
			out = append(out, Relax{Name: "avail." + cat.Stocks[j].ID, By: s.x[k]})
		}
	}
	return out, nil
}

// PlanMPS writes the joint programme of Plan in free MPS (see MPS): columns
// "<spec>.<stock>", "own.<stock>", "buy.<stock>"; rows "<spec>:<row>" and
// the balance rows "stock.<id>".
func PlanMPS(cat *catalogue.Catalogue, orders *catalogue.Orders) ([]byte, error) {
	if orders == nil || len(orders.Orders) == 0 {
		return nil, catalogue.Badf("the orders file has no [[order]]; add one with spec and tonnes")
	}
	m, _, err := buildPlan(cat, orders, &profileCache{})
	if err != nil {
		return nil, err
	}
	return m.mps("lipoplan-plan"), nil
}

// WritePlanMPS writes PlanMPS to path atomically.
func WritePlanMPS(path string, cat *catalogue.Catalogue, orders *catalogue.Orders) error {
	b, err := PlanMPS(cat, orders)
	if err != nil {
		return err
	}
	return writeAtomic(path, b)
}
