package optimise

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"lipoplan/catalogue"
)

// deficit is one elastic variable: how far one limit must move.
type deficit struct {
	col    int
	name   string  // LimitReport name of the limit it moves
	scale  float64 // typical magnitude (the objective weighs col/scale)
	toUnit float64 // model units -> the limit's own unit
}

// elastic builds the elastic programme of an impossible spec: the sum row
// stays hard, every limit side gets one deficit variable e >= 0 that lets it
// give way (a·x + e >= min, a·x - e <= max; [use] bounds and availability
// become rows x ± e), and the objective minimises Σ e / scale. scale is the
// typical magnitude of the limited quantity, the spread its values span over
// the stocks on offer (spread() in build.go), so an IV deficit and a SAFA
// deficit are compared as fractions of what the stocks can cover; [use] and
// availability deficits are in % of batch, scaled by 100. Integer rules stay
// hard (the programme is then solved as a MILP with used_j <= 1 capping at
// 100 %). Stocks that lack SFC data the spec needs and are excluded by use
// max = 0 stay out. This is the textbook elastic (goal programming)
// formulation, e.g. Chinneck, Feasibility and Infeasibility in Optimization
// (2008), on elastic programming (reference from memory).
func (l *layout) elastic(base *model) (*model, []deficit) {
	n := l.n()
	type side struct {
		row   int // base row, or -1 for a column bound
		stock int
		kind  string // "min", "max", "use.min", "use.max", "avail"
	}
	var sides []side
	for i := 1; i < base.nRows; i++ {
		if l.rows[i].bound.HasMin() {
			sides = append(sides, side{i, -1, "min"})
		}
		if l.rows[i].bound.HasMax() {
			sides = append(sides, side{i, -1, "max"})
		}
	}
	for j, c := range l.cols {
		if c.frozen && base.colUp[j] == 0 {
			continue
		}
		if c.use.HasMin() && c.use.Min > 0 {
			sides = append(sides, side{-1, j, "use.min"})
		}
		if c.use.HasMax() {
			sides = append(sides, side{-1, j, "use.max"})
		}
		if c.stock.Limited() {
			sides = append(sides, side{-1, j, "avail"})
		}
	}
	em := newModel(n + len(sides))
	for j, c := range l.cols {
		em.colName[j] = c.stock.ID
		em.colLo[j], em.colUp[j] = 0, math.Inf(1)
		if c.frozen && base.colUp[j] == 0 {
			em.colUp[j] = 0
		}
	}
	defs := make([]deficit, len(sides))
	for k, s := range sides {
		c := n + k
		d := deficit{col: c, toUnit: 1}
		switch {
		case s.row >= 0:
			ri := l.rows[s.row]
			d.name, d.scale = ri.key+"."+s.kind, ri.scale
		default:
			id := l.cols[s.stock].stock.ID
			d.scale = 100
			switch s.kind {
			case "avail":
				d.name, d.toUnit = "avail."+id, l.spec.Batch/100
			default:
				d.name = "use." + id + strings.TrimPrefix(s.kind, "use")
			}
		}
		em.colName[c] = "relax." + d.name
		em.obj[c] = 1 / d.scale
		defs[k] = d
	}
	coef := make([]float64, em.nCols)
	for i := 0; i < base.nRows; i++ {
		clear(coef)
		copy(coef, base.row(i))
		for k, s := range sides {
			if s.row == i {
				if s.kind == "min" {
					coef[n+k] = 1
				} else {
					coef[n+k] = -1
				}
			}
		}
		em.addRow(base.rowName[i], coef, base.rowLo[i], base.rowUp[i])
	}
	inf := math.Inf(1)
	for k, s := range sides {
		if s.row >= 0 {
			continue
		}
		c := l.cols[s.stock]
		clear(coef)
		coef[s.stock] = 1
		switch s.kind {
		case "use.min":
			coef[n+k] = 1
			em.addRow(defs[k].name, coef, c.use.Min, inf)
		case "use.max":
			coef[n+k] = -1
			em.addRow(defs[k].name, coef, math.Inf(-1), c.use.Max)
		case "avail":
			coef[n+k] = -1
			em.addRow(defs[k].name, coef, math.Inf(-1), c.availPct)
		}
	}
	return em, defs
}

// relaxation finds the smallest relaxation that makes the spec feasible.
func (l *layout) relaxation(eng *engine, base *model) ([]Relax, error) {
	r, _, err := l.relaxationNoted(eng, base)
	return r, err
}

// relaxationNoted is relaxation with a note, set when integer rules make
// the elastic programme a MILP and its branch and bound stopped at a limit:
// the relaxation then makes the spec feasible but is not proven the
// smallest.
func (l *layout) relaxationNoted(eng *engine, base *model) ([]Relax, string, error) {
	em, defs := l.elastic(base)
	var s *solution
	var err error
	if l.rules.Active() {
		mm := l.withRules(em, func(j int) float64 { return math.Min(em.colUp[j], 100) })
		s, err = eng.solveMILP(mm)
	} else {
		s, err = eng.solveLP(em)
	}
	if err != nil {
		return nil, "", fmt.Errorf("optimise %s: elastic programme: %w", specWhere(l.spec), err)
	}
	note := ""
	switch s.status {
	case solOptimal:
	case solNotProven:
		note = fmt.Sprintf("the relaxation shown makes the spec feasible but is not proven the smallest: branch and bound for the [rules] stopped at its limit after %d LPs", s.nodes)
	case solNoSolution:
		return nil, "", fmt.Errorf("optimise %s: elastic programme: branch and bound for the [rules] stopped at its limit after %d LPs without finding a relaxation", specWhere(l.spec), s.nodes)
	default:
		return nil, "", catalogue.Badf("%s: no relaxation of the limits can be met: every stock is excluded or lacks the data the spec needs, or the [rules] cannot hold; allow at least one stock", specWhere(l.spec))
	}
	var out []Relax
	for _, d := range defs {
		if v := s.x[d.col]; v > 1e-9 {
			out = append(out, Relax{Name: d.name, By: v * d.toUnit})
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].Name < out[b].Name })
	return out, note, nil
}

// Relaxed returns copies of cat and spec with the relaxation applied: each
// named limit moved outwards by its amount ("iv.max" up, "sfc.20.min" down,
// "use.x.max" up, "avail.x" adds tonnes on hand).
func Relaxed(cat *catalogue.Catalogue, spec *catalogue.Spec, relax []Relax) (*catalogue.Catalogue, *catalogue.Spec, error) {
	c, s := cat.Clone(), spec.Clone()
	for _, r := range relax {
		if err := applyRelax(c, s, r); err != nil {
			return nil, nil, err
		}
	}
	return c, s, nil
}

func applyRelax(cat *catalogue.Catalogue, spec *catalogue.Spec, r Relax) error {
	move := func(b *catalogue.Bound, side string) error {
		switch side {
		case "min":
			b.Min -= r.By
		case "max":
			b.Max += r.By
		default:
			return catalogue.Badf("relaxation %q: unknown side %q", r.Name, side)
		}
		return nil
	}
	if id, ok := strings.CutPrefix(r.Name, "avail."); ok {
		st, found := cat.Find(id)
		if !found {
			return catalogue.Badf("relaxation %q: no stock %q", r.Name, id)
		}
		st.Available += r.By
		return nil
	}
	dot := strings.LastIndexByte(r.Name, '.')
	if dot < 0 {
		return catalogue.Badf("relaxation %q: expected <limit>.min or <limit>.max", r.Name)
	}
	key, side := r.Name[:dot], r.Name[dot+1:]
	if id, ok := strings.CutPrefix(key, "use."); ok {
		for i := range spec.Use {
			if spec.Use[i].Stock == id {
				return move(&spec.Use[i].Bound, side)
			}
		}
		return catalogue.Badf("relaxation %q: spec has no [use] entry for %q", r.Name, id)
	}
	if t, ok := strings.CutPrefix(key, "sfc."); ok {
		for i := range spec.SFC {
			if catalogue.TempKey(spec.SFC[i].Temp) == t {
				return move(&spec.SFC[i].Bound, side)
			}
		}
		return catalogue.Badf("relaxation %q: spec has no SFC limit at %s °C", r.Name, t)
	}
	for i := range spec.Limits {
		if spec.Limits[i].Name == key {
			return move(&spec.Limits[i].Bound, side)
		}
	}
	return catalogue.Badf("relaxation %q: spec has no limit %q", r.Name, key)
}
