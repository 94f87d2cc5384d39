package optimise

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"lipoplan/blend"
	"lipoplan/catalogue"
)

// rowInfo describes one model row for reports and relaxation.
type rowInfo struct {
	key   string // model row name: "sum", "iv", "C18:2", "sfc.20", ...
	label string // trade words: "IV", "SFC at 20 °C", ...
	unit  string // unit of the limited quantity, "" for IV
	bound catalogue.Bound
	// scale is the typical magnitude of the limited quantity among the
	// stocks on offer (see elastic.go); deficits are divided by it.
	scale float64
}

// colInfo describes one stock column.
type colInfo struct {
	stock    *catalogue.Stock
	use      catalogue.Bound // [use] bound in % of batch; Free() when absent
	availPct float64         // availability as % of batch; +Inf when unlimited
	// frozen: excluded by use max = 0 while lacking SFC data the spec
	// needs, so it may never enter, not even in a relaxation.
	frozen bool
	// noCurve: lacks a measured SFC value the spec's temperatures need,
	// which a predicted-SFC model does without (buildPredicted).
	noCurve bool
}

// layout maps the user's stocks and spec onto the model.
type layout struct {
	cat   *catalogue.Catalogue
	spec  *catalogue.Spec
	cols  []colInfo // stock columns 0..n-1
	rows  []rowInfo // one per base-model row
	rules catalogue.Rules
	// prof[j] is blend.Profile of stock j when build computed it (nil
	// otherwise), share[j] its fatty acids by catalogue.Rank when taken
	// from a profileCache (nil otherwise); both serve the report's blend
	// properties (mix) and stay valid until the cache's next build.
	prof  []*blend.Properties
	share [][]float64
	buf   *scratch // buffers for the report; nil: allocate
	// filled by withRules:
	used     []int // binary column of each stock, -1 when none
	milpRows []rowInfo
}

func (l *layout) n() int { return len(l.cols) }

// propertyLabel is the trade name of a limit's quantity and its unit.
func propertyLabel(name string) (label, unit string) {
	switch name {
	case "iv":
		return "IV", ""
	case "sv":
		return "SV", " mg KOH/g"
	case "safa":
		return "SAFA", " %"
	case "mufa":
		return "MUFA", " %"
	case "pufa":
		return "PUFA", " %"
	case "trans":
		return "trans fat", " %"
	case "cox":
		return "Cox value", ""
	case "omega3":
		return "omega-3", " %"
	}
	return name, " %"
}

// sfcKey is the model row name of an SFC limit, e.g. "sfc.20".
func sfcKey(t float64) string { return "sfc." + catalogue.TempKey(t) }

// where names the spec for messages.
func specWhere(spec *catalogue.Spec) string {
	switch {
	case spec.File != "":
		return fmt.Sprintf("spec %q", spec.File)
	case spec.Name != "":
		return fmt.Sprintf("spec %q", spec.Name)
	}
	return "spec"
}

func finiteNum(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// build turns stocks and a spec into the base LP: one column per stock (% of
// batch, cost price/100 so the objective is currency per tonne of product),
// the sum row, one row per [limits] entry and per [limits.sfc] temperature,
// and [use] bounds and availability (pct <= 100·available/batch, left out
// when above 100 %, where it cannot bind) as column bounds. Integer rules
// are added by withRules. Input faults are the catalogue's findings
// (Catalogue.CheckModel and Spec.CheckModel, a catalogue.Problems) or a
// catalogue.BadInput.
func build(cat *catalogue.Catalogue, spec *catalogue.Spec) (*model, *layout, error) {
	return buildIn(cat, spec, nil, nil, false)
}

// buildPredicted is build for a model whose SFC rows the TAG model will
// fill (a [process] step with sfc = "predicted"): a stock without a measured
// curve is no error, its coefficient in an SFC row is 0 until replaced.
func buildPredicted(cat *catalogue.Catalogue, spec *catalogue.Spec) (*model, *layout, error) {
	return buildIn(cat, spec, nil, nil, true)
}

// buildWith is build taking the stocks' profiles from pc (nil: computed).
func buildWith(cat *catalogue.Catalogue, spec *catalogue.Spec, pc *profileCache) (*model, *layout, error) {
	return buildIn(cat, spec, pc, nil, false)
}

// buildIn is buildWith taking its arrays from buf (nil: allocated); the
// model and layout it returns live in buf until buf's next build. With
// predicted set, SFC rows need no measured curves (buildPredicted).
func buildIn(cat *catalogue.Catalogue, spec *catalogue.Spec, pc *profileCache, buf *scratch, predicted bool) (*model, *layout, error) {
	if spec == nil {
		return nil, nil, catalogue.Badf("no spec given")
	}
	// The catalogue's checks of a model's values, in the loaders' words.
	if err := cat.CheckModel().Err(); err != nil {
		return nil, nil, err
	}
	if err := spec.CheckModel(cat).Err(); err != nil {
		return nil, nil, err
	}
	n := len(cat.Stocks)
	lay := buf.newLayout()
	*lay = layout{cat: cat, spec: spec, cols: buf.colInfos(n), rules: spec.Rules, buf: buf}
	index := buf.stockIndex(n)
	for j := range cat.Stocks {
		s := &cat.Stocks[j]
		index[s.ID] = j
		lay.cols[j] = colInfo{stock: s, use: catalogue.Free(), availPct: math.Inf(1)}
		if s.Limited() {
			lay.cols[j].availPct = 100 * s.Available / spec.Batch
		}
	}
	for _, u := range spec.Use {
		lay.cols[index[u.Stock]].use = u.Bound
	}

	// One block of floats and one of names hold every array of the model.
	rows := 1 + len(spec.Limits) + len(spec.SFC)
	fl := buf.floats(4*n + 2*rows + rows*n)
	str := buf.strings(n + rows)
	m := buf.newModel()
	*m = model{nCols: n, colName: str[:n:n], rowName: str[n : n : n+rows]}
	m.obj, m.colLo, m.colUp, fl = fl[:n:n], fl[n:2*n:2*n], fl[2*n:3*n:3*n], fl[3*n:]
	m.rowLo, m.rowUp, fl = fl[:0:rows], fl[rows:rows:2*rows], fl[2*rows:]
	coef, fl := fl[:n:n], fl[n:]
	m.a = fl[: 0 : rows*n]
	for j := range m.colUp {
		m.colUp[j] = math.Inf(1)
	}
	lay.rows = buf.rowInfos(rows)
	for j, c := range lay.cols {
		m.colName[j] = c.stock.ID
		m.obj[j] = c.stock.Price / 100
		if c.use.HasMin() {
			m.colLo[j] = c.use.Min
		}
		if c.use.HasMax() {
			m.colUp[j] = c.use.Max
		}
		// Availability above the whole batch cannot bind (the shares sum
		// to 100 %), so it is no bound: 1e6 t on hand for a batch of 1 kg
		// would reach the engines as a bound of 1e11 %.
		if c.availPct <= 100 && c.availPct < m.colUp[j] {
			m.colUp[j] = c.availPct
		}
	}

	for j := range coef {
		coef[j] = 1
	}
	m.addRow("sum", coef, 100, 100)
	lay.rows = append(lay.rows, rowInfo{key: "sum", label: "sum of shares", unit: " %", bound: catalogue.Bound{Min: 100, Max: 100}, scale: 1})

	// Every [limits] row is filled stock by stock: one blend.Profile per
	// stock (only when a property limit needs it) gives that stock's value
	// of every limited quantity at once; fatty-acid limits read the profile
	// directly. The rows are written straight into the flat matrix.
	active := buf.limits(len(spec.Limits))
	rank := buf.intSlice(len(spec.Limits))[:0] // reference-table rank of a fatty-acid limit, -1 for a property
	needProfile := false
	for _, l := range spec.Limits {
		if !l.HasMin() && !l.HasMax() {
			continue // an empty limit constrains nothing
		}
		_, fa := catalogue.Lookup(l.Name)
		active = append(active, l)
		if fa {
			rank = append(rank, catalogue.Rank(l.Name))
		} else {
			rank = append(rank, -1)
		}
		needProfile = needProfile || !fa
	}
	first := m.nRows
	for _, l := range active {
		m.addRow(l.Name, coef[:0], l.Min, l.Max) // coefficients follow
	}
	m.a = m.a[:m.nRows*n]
	lay.prof, lay.share = buf.profiles(n)
	var own []blend.Properties // values computed without a cache (no FattyAcids: mix profiles the blend's stocks)
	if pc == nil && needProfile {
		own = make([]blend.Properties, n)
	}
	pc.reserve(n) // entries stay put while this layout uses them
	for j, c := range lay.cols {
		var p *blend.Properties
		var share []float64 // wt% by rank, from the cache
		switch {
		case pc != nil && len(active) > 0:
			e := pc.profile(j, c.stock)
			p, share = &e.props, e.share
			lay.prof[j], lay.share[j] = p, share // whole profiles, which mix takes as they are
		case needProfile:
			own[j] = blend.ProfileValues(c.stock.FattyAcids)
			p = &own[j] // lay.prof[j] stays nil: mix profiles the stock whole if the blend has it
		}
		for i, l := range active {
			var v float64
			switch {
			case rank[i] >= 0 && share != nil:
				v = share[rank[i]]
			case rank[i] >= 0:
				v = c.stock.FattyAcids[l.Name]
			default:
				// As blend.Coefficient: every property is linear in mass share.
				v, _ = p.Value(l.Name)
			}
			if !finiteNum(v) { // finite amounts can still overflow
				return nil, nil, catalogue.Badf("stock %q: its %s is %v; give finite fatty-acid values", c.stock.ID, l.Name, v)
			}
			m.a[(first+i)*n+j] = v
		}
	}
	for i, l := range active {
		row := m.row(first + i)
		label, unit := propertyLabel(l.Name)
		lay.rows = append(lay.rows, rowInfo{key: l.Name, label: label, unit: unit, bound: l.Bound, scale: spread(row, l.Bound)})
		perPct(row)
	}

	for _, l := range spec.SFC {
		if !l.HasMin() && !l.HasMax() {
			continue
		}
		var lacking []string
		for j, c := range lay.cols {
			v, ok := c.stock.SFC.At(l.Temp)
			if !ok && predicted {
				v, ok = 0, true
				lay.cols[j].noCurve = true
			}
			if !ok {
				if m.colUp[j] > 0 {
					lacking = append(lacking, fmt.Sprintf("%q", c.stock.ID))
				}
				lay.cols[j].frozen = true
				v = 0
			}
			coef[j] = v
		}
		if len(lacking) > 0 {
			sort.Strings(lacking)
			t := catalogue.TempKey(l.Temp)
			return nil, nil, catalogue.Badf("%s: limit sfc %q: stock %s has no measured SFC at %s °C; add \"%s\" under [stock.sfc] (within its measured range) or exclude it with [use] %s = { max = 0 }",
				specWhere(spec), t, strings.Join(lacking, ", "), t, t, lacking[0])
		}
		tk := catalogue.TempKey(l.Temp)
		key := "sfc." + tk // as sfcKey
		lay.rows = append(lay.rows, rowInfo{key: key, label: "SFC at " + tk + " °C", unit: " % solid", bound: l.Bound, scale: spread(coef, l.Bound)})
		m.addRow(key, perPct(coef), l.Min, l.Max)
	}
	return m, lay, nil
}

// perPct turns per-stock values into row coefficients of shares in %: the
// blend's value is Σ (x_j/100)·v_j. It rewrites coef in place.
func perPct(coef []float64) []float64 {
	for j := range coef {
		coef[j] /= 100
	}
	return coef
}

// spread is the typical magnitude of a limited quantity: the range its
// per-stock values span (max - min), so that one deficit unit means "the
// whole spread the stocks on offer can cover". When every stock has the same
// value it falls back to the size of the bound, and to 1.
func spread(coef []float64, b catalogue.Bound) float64 {
	lo, hi := coef[0], coef[0]
	for _, v := range coef[1:] {
		if v < lo {
			lo = v
		}
		if v > hi {
			hi = v
		}
	}
	if s := hi - lo; s > 1e-9 {
		return s
	}
	s := 0.0
	if b.HasMin() {
		s = math.Max(s, math.Abs(b.Min))
	}
	if b.HasMax() {
		s = math.Max(s, math.Abs(b.Max))
	}
	return math.Max(s, 1)
}

// withRules returns m extended by the integer rules of the spec (a copy;
// m is kept as the base LP): a binary used_j per stock that may enter, rows
// link_j: x_j - U_j·used_j <= 0 (U_j its upper bound, at most 100), with
// smallest_share m: share_j: x_j - m·used_j >= 0, with max_stocks N:
// count: Σ used_j <= N. linkCap replaces U_j (the elastic model uses 100).
func (l *layout) withRules(m *model, linkCap func(j int) float64) *model {
	r := l.rules
	n := l.n()
	var cand []int
	for j := 0; j < n; j++ {
		if linkCap(j) > 0 {
			cand = append(cand, j)
		}
	}
	out := newModel(m.nCols + len(cand))
	copy(out.colName, m.colName)
	copy(out.obj, m.obj)
	copy(out.colLo, m.colLo)
	copy(out.colUp, m.colUp)
	l.used = make([]int, n)
	for j := range l.used {
		l.used[j] = -1
	}
	for k, j := range cand {
		c := m.nCols + k
		l.used[j] = c
		out.colName[c] = "used." + m.colName[j]
		out.colLo[c], out.colUp[c] = 0, 1
		out.integer = append(out.integer, c)
	}
	// The rows' room at once: the dense matrix of thousands of stocks with
	// their link rows runs to hundreds of MB, and growing it row by row
	// copied it over and over.
	rows := m.nRows + len(cand) + 1
	if r.SmallestShare > 0 {
		rows += len(cand)
	}
	out.a = make([]float64, 0, rows*out.nCols)
	coef := make([]float64, out.nCols)
	for i := 0; i < m.nRows; i++ {
		copy(coef, m.row(i))
		out.addRow(m.rowName[i], coef, m.rowLo[i], m.rowUp[i])
	}
	inf := math.Inf(1)
	for _, j := range cand {
		clear(coef)
		coef[j], coef[l.used[j]] = 1, -linkCap(j)
		out.addRow("link."+m.colName[j], coef, math.Inf(-1), 0)
		if r.SmallestShare > 0 {
			coef[l.used[j]] = -r.SmallestShare
			out.addRow("share."+m.colName[j], coef, 0, inf)
		}
	}
	if r.MaxStocks > 0 {
		clear(coef)
		for _, j := range cand {
			coef[l.used[j]] = 1
		}
		out.addRow("count", coef, math.Inf(-1), float64(r.MaxStocks))
	}
	return out
}

// index is the column of stock id, or -1.
func (l *layout) index(id string) int {
	for j, c := range l.cols {
		if c.stock.ID == id {
			return j
		}
	}
	return -1
}
