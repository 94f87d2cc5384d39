package optimise

import (
	"encoding/binary"
	"fmt"
	"hash/fnv"
	"math"
	"slices"
	"sort"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp"
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

// planLayout maps the joint programme. Orders whose specs give the same
// block (planBlocks) share one: block b stands for their tonnes together.
type planLayout struct {
	n        int       // stocks
	group    []int     // block of each order
	prodCol  []int     // first column of each block
	own, buy []int     // per stock: column of tonnes taken from stock / bought; -1 when none
	balance  []int     // per stock: its balance row; -1 when unlimited
	specs    []string  // per order: product name
	tonnes   []float64 // per order
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
// objective is the total cost in currency. Orders of one spec (the same
// block: limits, SFC rows and [use]) share a block for their tonnes
// together and get its blend: exact, as a spec's rows are in % of the
// product, so any mix of their blends (x_1 T_1 + x_2 T_2)/(T_1 + T_2)
// meets the spec, uses the same stock and costs the same; 2,000 orders of
// one spec are one block. Integer rules are not taken in
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
	sol, err := eng.solveProblem(m.structure(), &m.prob)
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
			used[j] += math.Max(sol.x[pl.prodCol[pl.group[p]]+j], 0) * o.Tonnes / 100
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
			x := math.Max(sol.x[pl.prodCol[pl.group[p]]+j], 0)
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

// planModel is the joint programme of a plan, held sparse: each block
// touches its own rows and the balance rows only, so 2,000 blocks of a
// 7-row spec over 14 stocks (28,000 columns by 14,000 rows) take a few MB,
// where the dense matrix took 3 GB.
type planModel struct {
	prob             lp.Problem // by columns, in the engine layer's form
	colName, rowName []string
}

// structure identifies the model's structure for warm starts (see
// structure).
func (m *planModel) structure() uint64 {
	return structureOf(m.prob.Rows, m.prob.Cols, m.colName, m.rowName)
}

// addCol appends a column with its nonzeros (rows ascending).
func (m *planModel) addCol(name string, obj, lo, up float64, rows []int, vals []float64) int {
	p := &m.prob
	if len(p.Start) == 0 {
		p.Start = append(p.Start, 0)
	}
	p.Index = append(p.Index, rows...)
	p.Value = append(p.Value, vals...)
	p.Start = append(p.Start, len(p.Index))
	p.Obj, p.ColLo, p.ColUp = append(p.Obj, obj), append(p.ColLo, lo), append(p.ColUp, up)
	m.colName = append(m.colName, name)
	p.Cols++
	return p.Cols - 1
}

// addRow appends a row (its coefficients come with the columns).
func (m *planModel) addRow(name string, lo, up float64) int {
	p := &m.prob
	p.RowLo, p.RowUp = append(p.RowLo, lo), append(p.RowUp, up)
	m.rowName = append(m.rowName, name)
	p.Rows++
	return p.Rows - 1
}

// clone is a deep copy.
func (m *planModel) clone() *planModel {
	return &planModel{prob: *m.prob.Clone(), colName: slices.Clone(m.colName), rowName: slices.Clone(m.rowName)}
}

// mps renders the model in MPS layout f (lp.WriteMPS, as model.mps).
func (m *planModel) mps(name string, f MPSFormat) []byte {
	return lp.WriteMPS(&m.prob, name, m.colName, m.rowName, nil, f)
}

// planLabels are the blocks' names in the model: the spec label, with
// "#2", "#3" ... on its second and later blocks, so that every column and
// row name is unique (glpsol refuses an MPS file that names a column twice).
func planLabels(specs []string) []string {
	used := map[string]bool{}
	for _, s := range specs {
		used[s] = true
	}
	seen := map[string]bool{}
	next := map[string]int{} // the suffix to try next, per label
	out := make([]string, len(specs))
	for p, s := range specs {
		out[p] = s
		for seen[out[p]] {
			k := max(next[s], 2)
			next[s] = k + 1
			if t := fmt.Sprintf("%s#%d", s, k); !used[t] {
				out[p] = t
			}
		}
		seen[out[p]], used[out[p]] = true, true
	}
	return out
}

// sameBlock reports whether two orders' base models give the same block
// of the plan: the same rows (names, bounds, coefficients) and the same
// column bounds (the [use] minimum and maximum).
func sameBlock(a, b *model, la, lb *layout) bool {
	if a.nRows != b.nRows || a.nCols != b.nCols || !slices.Equal(a.rowName, b.rowName) ||
		!slices.Equal(a.rowLo, b.rowLo) || !slices.Equal(a.rowUp, b.rowUp) ||
		!slices.Equal(a.a[:a.nRows*a.nCols], b.a[:b.nRows*b.nCols]) || !slices.Equal(a.colLo, b.colLo) {
		return false
	}
	for j := range la.cols {
		if la.cols[j].use != lb.cols[j].use {
			return false
		}
	}
	return true
}

// blockKey is a hash of what sameBlock compares (FNV-1a), to find an
// order's block among many.
func blockKey(m *model, lay *layout) uint64 {
	h := fnv.New64a()
	var b [8]byte
	put := func(v float64) {
		binary.LittleEndian.PutUint64(b[:], math.Float64bits(v))
		h.Write(b[:])
	}
	for _, s := range m.rowName {
		h.Write([]byte(s))
		h.Write([]byte{0})
	}
	for _, v := range m.rowLo {
		put(v)
	}
	for _, v := range m.rowUp {
		put(v)
	}
	for _, v := range m.a[:m.nRows*m.nCols] {
		put(v)
	}
	for j, v := range m.colLo {
		put(v)
		put(lay.cols[j].use.Min)
		put(lay.cols[j].use.Max)
	}
	return h.Sum64()
}

// buildPlan assembles the joint programme from one base model per order,
// taking stock profiles from pc; orders of one block (sameBlock) share it.
// Rows: each block's base rows in order, then one balance row per limited
// stock; columns: each block's stocks, then per limited stock its own and
// buy columns; the matrix is built by columns, never dense.
func buildPlan(cat *catalogue.Catalogue, orders *catalogue.Orders, pc *profileCache) (*planModel, *planLayout, error) {
	if cat == nil || len(cat.Stocks) == 0 {
		return nil, nil, catalogue.Badf("the stock catalogue has no stocks; add [[stock]] entries")
	}
	n := len(cat.Stocks)
	P := len(orders.Orders)
	pl := &planLayout{n: n, group: make([]int, P), own: make([]int, n), buy: make([]int, n), balance: make([]int, n)}
	var bases []*model // per block: the base model of its first order
	var lays []*layout
	var tonnes []float64 // per block
	var first []int      // per block: its first order
	byKey := map[uint64][]int{}
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
		pl.specs = append(pl.specs, specLabel(o.Spec))
		pl.tonnes = append(pl.tonnes, o.Tonnes)
		spec := o.Spec.Clone()
		spec.Batch = o.Tonnes
		m, lay, err := buildWith(cat, spec, pc) // every block's model stays alive: no scratch
		if err != nil {
			return nil, nil, fmt.Errorf("order #%d: %w", p+1, err)
		}
		k := blockKey(m, lay)
		g := slices.IndexFunc(byKey[k], func(g int) bool { return sameBlock(bases[g], m, lays[g], lay) })
		if g >= 0 {
			g = byKey[k][g]
			pl.group[p] = g
			tonnes[g] += o.Tonnes
			continue
		}
		g = len(bases)
		byKey[k] = append(byKey[k], g)
		pl.group[p] = g
		bases, lays, tonnes, first = append(bases, m), append(lays, lay), append(tonnes, o.Tonnes), append(first, p)
	}
	labels := make([]string, len(bases))
	for g, p := range first {
		labels[g] = pl.specs[p]
	}
	labels = planLabels(labels)
	m := &planModel{}
	for g, base := range bases {
		for i := 0; i < base.nRows; i++ {
			m.addRow(labels[g]+":"+base.rowName[i], base.rowLo[i], base.rowUp[i])
		}
	}
	for j, s := range cat.Stocks {
		pl.balance[j] = -1
		if s.Limited() {
			pl.balance[j] = m.addRow("stock."+s.ID, 0, 0)
		}
	}
	var rows []int
	var vals []float64
	row0 := 0 // first row of block g
	pl.prodCol = make([]int, len(bases))
	for g, base := range bases {
		pl.prodCol[g] = g * n
		T := tonnes[g]
		for j, s := range cat.Stocks {
			rows, vals = rows[:0], vals[:0]
			for i := 0; i < base.nRows; i++ {
				if v := base.at(i, j); v != 0 {
					rows, vals = append(rows, row0+i), append(vals, v)
				}
			}
			obj, up := 0.0, math.Inf(1)
			if b := pl.balance[j]; b >= 0 {
				rows, vals = append(rows, b), append(vals, T/100)
			} else {
				obj = s.Price * T / 100
			}
			if u := lays[g].cols[j].use; u.HasMax() {
				up = u.Max
			}
			m.addCol(labels[g]+"."+s.ID, obj, base.colLo[j], up, rows, vals)
		}
		row0 += base.nRows
	}
	for j, s := range cat.Stocks {
		pl.own[j], pl.buy[j] = -1, -1
		if b := pl.balance[j]; b >= 0 {
			pl.own[j] = m.addCol("own."+s.ID, s.Price, 0, s.Available, []int{b}, []float64{-1})
			if price, ok := orders.Purchase[s.ID]; ok {
				pl.buy[j] = m.addCol("buy."+s.ID, price, 0, math.Inf(1), []int{b}, []float64{-1})
			}
		}
	}
	return m, pl, nil
}

// planDiagnosis explains an impossible plan.
func planDiagnosis(eng *engine, pc *profileCache, cat *catalogue.Catalogue, orders *catalogue.Orders, m *planModel, pl *planLayout) ([]Relax, error) {
	var out []Relax
	alone := true
	big := cat.Clone()
	for j := range big.Stocks {
		big.Stocks[j].Available = math.Inf(1)
	}
	solo := map[int]*Result{} // by block: the same for each of its orders
	for p, o := range orders.Orders {
		r, ok := solo[pl.group[p]]
		if !ok {
			spec := o.Spec.Clone()
			spec.Batch = o.Tonnes
			var err error
			if r, err = solveIn(eng, pc, nil, big, spec, Options{}); err != nil {
				return nil, err
			}
			solo[pl.group[p]] = r
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
	clear(e.prob.Obj)
	extra := make([]int, pl.n)
	for j := range cat.Stocks {
		extra[j] = -1
		if pl.own[j] < 0 {
			continue
		}
		extra[j] = e.addCol("extra."+cat.Stocks[j].ID, 1, 0, math.Inf(1), []int{pl.balance[j]}, []float64{-1})
	}
	s, err := eng.solveProblem(e.structure(), &e.prob)
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

// PlanMPS writes the joint programme of Plan in free MPS (see MPS):
// columns "<spec>.<stock>", "own.<stock>", "buy.<stock>"; rows
// "<spec>:<row>" and the balance rows "stock.<id>". Orders of one spec
// share a block (Plan); a spec label that names two blocks is
// "<spec>#2", "<spec>#3" ... on the second and later.
func PlanMPS(cat *catalogue.Catalogue, orders *catalogue.Orders) ([]byte, error) {
	return PlanMPSIn(FreeMPS, cat, orders)
}

// PlanMPSIn is PlanMPS in layout f.
func PlanMPSIn(f MPSFormat, cat *catalogue.Catalogue, orders *catalogue.Orders) ([]byte, error) {
	if orders == nil || len(orders.Orders) == 0 {
		return nil, catalogue.Badf("the orders file has no [[order]]; add one with spec and tonnes")
	}
	m, _, err := buildPlan(cat, orders, &profileCache{})
	if err != nil {
		return nil, err
	}
	return m.mps("lipoplan-plan", f), nil
}

// WritePlanMPS writes PlanMPS to path atomically.
func WritePlanMPS(path string, cat *catalogue.Catalogue, orders *catalogue.Orders) error {
	b, err := PlanMPS(cat, orders)
	if err != nil {
		return err
	}
	return writeAtomic(path, b)
}
