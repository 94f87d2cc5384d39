package tui

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// Scenario is everything a what-if session can change: the stock catalogue
// (prices, availability), the product spec (limits, batch) and the stocks the
// user has left out. A Scenario handed to Evaluate is never changed again:
// every edit makes a new one (copy on write), which is what undo keeps.
type Scenario struct {
	Catalogue *catalogue.Catalogue
	Spec      *catalogue.Spec
	Excluded  map[string]bool // stock id -> left out of the blend
	// Model is the TAG model's options for predicted SFC (a calibration);
	// the zero value is the uncalibrated default. It is a session setting,
	// not saved in scenario files.
	Model sle.Options
	// Note is the user's own words about this scenario, saved with it.
	Note string
	// Saved is the result the scenario file held when it was read (nil
	// when it held none). Every edit but the note drops it: it no longer
	// describes the scenario.
	Saved *Solved
}

// NewScenario wraps deep copies of cat and spec, so edits never reach the
// caller's values.
func NewScenario(cat *catalogue.Catalogue, spec *catalogue.Spec) *Scenario {
	return &Scenario{Catalogue: cat.Clone(), Spec: spec.Clone(), Excluded: map[string]bool{}}
}

// Clone returns a deep copy for an edit: everything but the saved result.
func (s *Scenario) Clone() *Scenario {
	ex := make(map[string]bool, len(s.Excluded))
	for k, v := range s.Excluded {
		if v {
			ex[k] = true
		}
	}
	return &Scenario{Catalogue: s.Catalogue.Clone(), Spec: s.Spec.Clone(), Excluded: ex, Model: s.Model, Note: s.Note}
}

// WithNote returns a new scenario with the note set to text (surrounding
// spaces trimmed); the saved result stays, as a note changes no number.
func (s *Scenario) WithNote(text string) *Scenario {
	out := s.Clone()
	out.Note = strings.TrimSpace(text)
	out.Saved = s.Saved
	return out
}

// ExcludedIDs lists the left-out stocks in id order.
func (s *Scenario) ExcludedIDs() []string {
	var out []string
	for id, v := range s.Excluded {
		if v {
			out = append(out, id)
		}
	}
	sort.Strings(out)
	return out
}

// Effective returns the catalogue and spec the optimiser sees: a left-out
// stock gets an inclusion bound of exactly zero (its other bounds give way),
// and limit rows with neither side set are dropped.
func (s *Scenario) Effective() (*catalogue.Catalogue, *catalogue.Spec) {
	spec := s.Spec.Clone()
	keepL := spec.Limits[:0]
	for _, l := range spec.Limits {
		if l.HasMin() || l.HasMax() {
			keepL = append(keepL, l)
		}
	}
	spec.Limits = keepL
	keepS := spec.SFC[:0]
	for _, l := range spec.SFC {
		if l.HasMin() || l.HasMax() {
			keepS = append(keepS, l)
		}
	}
	spec.SFC = keepS
	keepU := spec.Use[:0]
	seen := map[string]bool{}
	for _, u := range spec.Use {
		if s.Excluded[u.Stock] {
			u.Bound = catalogue.Bound{Min: math.Inf(-1), Max: 0}
			seen[u.Stock] = true
		}
		if u.HasMin() || u.HasMax() {
			keepU = append(keepU, u)
		}
	}
	spec.Use = keepU
	for _, id := range s.ExcludedIDs() {
		if !seen[id] {
			spec.Use = append(spec.Use, catalogue.Use{Stock: id, Bound: catalogue.Bound{Min: math.Inf(-1), Max: 0}})
		}
	}
	spec.SortLimits()
	return s.Catalogue, spec
}

// RowKind tells what a row of the limits panel edits.
type RowKind int

// Kinds of editable spec rows.
const (
	RowBatch         RowKind = iota // the batch size, tonnes
	RowLimit                        // a property or fatty-acid limit
	RowSFC                          // solid fat content at one temperature
	RowUse                          // inclusion of one stock, % of batch
	RowMaxStocks                    // integer rule: at most this many stocks
	RowSmallestShare                // integer rule: a used stock is used at no less than this %
	RowThrough                      // [process] through: share of the batch through the reactor, %
)

// Row is one editable line of the spec. Key is the stem of the optimiser's
// limit names: "iv" for "iv.min"/"iv.max", "sfc.20", "use.pko-r".
type Row struct {
	Kind  RowKind
	Key   string
	Label string
	Unit  string
	Bound catalogue.Bound // for single-value rows, Max holds the value
	index int             // position in the spec slice it came from
	temp  float64
	stock string
}

// Single reports whether the row holds one value rather than a min/max pair.
func (r Row) Single() bool {
	return r.Kind == RowBatch || r.Kind == RowMaxStocks || r.Kind == RowSmallestShare
}

// Rows lists the spec as editable rows: batch, limits, SFC, stock use, rules.
func (s *Scenario) Rows() []Row {
	sp := s.Spec
	rows := []Row{{Kind: RowBatch, Key: "batch", Label: "batch", Unit: "t", Bound: catalogue.Bound{Min: math.Inf(-1), Max: sp.Batch}}}
	for i, l := range sp.Limits {
		rows = append(rows, Row{Kind: RowLimit, Key: l.Name, Label: limitLabel(l.Name), Unit: limitUnit(l.Name), Bound: l.Bound, index: i})
	}
	for i, l := range sp.SFC {
		k := catalogue.TempKey(l.Temp)
		rows = append(rows, Row{Kind: RowSFC, Key: "sfc." + k, Label: "SFC " + k + " °C", Unit: "% solid", Bound: l.Bound, index: i, temp: l.Temp})
	}
	for i, u := range sp.Use {
		rows = append(rows, Row{Kind: RowUse, Key: "use." + u.Stock, Label: "use " + u.Stock, Unit: "% batch", Bound: u.Bound, index: i, stock: u.Stock})
	}
	rows = append(rows,
		Row{Kind: RowMaxStocks, Key: "rules.max_stocks", Label: "max stocks", Unit: "stocks", Bound: catalogue.Bound{Min: math.Inf(-1), Max: float64(sp.Rules.MaxStocks)}},
		Row{Kind: RowSmallestShare, Key: "rules.smallest_share", Label: "smallest share if used", Unit: "% batch", Bound: catalogue.Bound{Min: math.Inf(-1), Max: sp.Rules.SmallestShare}},
	)
	if sp.Process != nil {
		// Key is the stem of the report's "process.through.min" and ".max".
		rows = append(rows, Row{Kind: RowThrough, Key: "process.through", Label: "reactor share", Unit: "% batch", Bound: throughBound(sp.Process)})
	}
	return rows
}

// throughBound is the reactor share a [process] step asks for, with no
// bound on either side when it asks for none.
func throughBound(p *catalogue.Process) catalogue.Bound {
	if p.Through != nil {
		return *p.Through
	}
	return catalogue.Free()
}

func limitLabel(name string) string {
	switch name {
	case "iv", "sv", "safa", "mufa", "pufa", "cox":
		return strings.ToUpper(name)
	case "omega3":
		return "omega-3"
	}
	return name
}

func limitUnit(name string) string {
	switch name {
	case "iv":
		return "g I2/100 g"
	case "sv":
		return "mg KOH/g"
	case "cox":
		return "Cox value"
	}
	return "wt %"
}

// Side picks the lower or upper bound of a row.
type Side int

// Bound sides.
const (
	Min Side = iota
	Max
)

func (sd Side) String() string {
	if sd == Min {
		return "minimum"
	}
	return "maximum"
}

// WithBound returns a new scenario with one side of row r set to v
// (NaN or ±Inf clears that side). Single-value rows ignore side. The edited
// spec is checked as the loader checks a file (catalogue.Spec.Check), so a
// value outside its quantity's accepted range or a minimum above its
// maximum is refused in the loader's words.
func (s *Scenario) WithBound(r Row, side Side, v float64) (*Scenario, error) {
	out := s.Clone()
	sp := out.Spec
	clear := math.IsNaN(v) || math.IsInf(v, 0)
	set := func(b *catalogue.Bound) {
		switch {
		case side == Min && clear:
			b.Min = math.Inf(-1)
		case side == Min:
			b.Min = v
		case clear:
			b.Max = math.Inf(1)
		default:
			b.Max = v
		}
	}
	switch r.Kind {
	case RowBatch:
		if clear {
			return nil, fmt.Errorf("batch must be a number of tonnes above zero")
		}
		sp.Batch = v
	case RowMaxStocks:
		if clear {
			v = 0
		}
		if v < 0 || v != math.Trunc(v) || v > maxStocksRule {
			return nil, fmt.Errorf("max stocks must be a whole number from 0 (no rule) to %g", float64(maxStocksRule))
		}
		sp.Rules.MaxStocks = int(v)
	case RowSmallestShare:
		if clear {
			v = 0
		}
		sp.Rules.SmallestShare = v
	case RowLimit:
		if r.index >= len(sp.Limits) {
			return nil, fmt.Errorf("limit %s is gone", r.Key)
		}
		set(&sp.Limits[r.index].Bound)
	case RowSFC:
		if r.index >= len(sp.SFC) {
			return nil, fmt.Errorf("limit %s is gone", r.Key)
		}
		set(&sp.SFC[r.index].Bound)
	case RowUse:
		if r.index >= len(sp.Use) {
			return nil, fmt.Errorf("limit %s is gone", r.Key)
		}
		set(&sp.Use[r.index].Bound)
	case RowThrough:
		if sp.Process == nil {
			return nil, fmt.Errorf("the spec has no [process] step any more")
		}
		b := throughBound(sp.Process)
		set(&b)
		sp.Process.Through = &b
		if !b.HasMin() && !b.HasMax() {
			sp.Process.Through = nil // no demand left: as a spec without through
		}
	}
	if err := sp.Check(out.Catalogue).Err(); err != nil {
		return nil, err
	}
	return out, nil
}

// maxStocksRule is the largest max_stocks the loader accepts.
const maxStocksRule = 1_000_000

// WithoutRow returns a new scenario without limit row r (batch and rules
// rows are reset to no rule instead; the batch cannot be removed).
func (s *Scenario) WithoutRow(r Row) (*Scenario, error) {
	out := s.Clone()
	sp := out.Spec
	switch r.Kind {
	case RowBatch:
		return nil, fmt.Errorf("the batch cannot be removed; edit it instead")
	case RowMaxStocks:
		sp.Rules.MaxStocks = 0
	case RowSmallestShare:
		sp.Rules.SmallestShare = 0
	case RowThrough:
		if sp.Process != nil {
			sp.Process.Through = nil
		}
	case RowLimit:
		sp.Limits = append(sp.Limits[:r.index:r.index], sp.Limits[r.index+1:]...)
	case RowSFC:
		sp.SFC = append(sp.SFC[:r.index:r.index], sp.SFC[r.index+1:]...)
	case RowUse:
		sp.Use = append(sp.Use[:r.index:r.index], sp.Use[r.index+1:]...)
	}
	return out, nil
}

// WithNewRow adds an empty limit named by what the user typed: a property
// ("iv", "trans"), a fatty-acid key ("C18:2"), "sfc 30" or "use <stock id>".
// It returns the new scenario and the key of the added row.
func (s *Scenario) WithNewRow(text string) (*Scenario, string, error) {
	f := strings.Fields(strings.ReplaceAll(strings.TrimSpace(text), ".", " "))
	if len(f) == 0 {
		return nil, "", fmt.Errorf("name a limit: a property (%s), a fatty acid such as C18:2, \"sfc 30\" or \"use <stock>\"", strings.Join(catalogue.Properties, ", "))
	}
	out := s.Clone()
	sp := out.Spec
	switch strings.ToLower(f[0]) {
	case "sfc":
		if len(f) < 2 || len(f) > 3 {
			return nil, "", fmt.Errorf("write an SFC limit as \"sfc 30\" (temperature in °C)")
		}
		t, err := catalogue.ParseTemp(strings.Join(f[1:], "."))
		if err != nil {
			return nil, "", err
		}
		if t < catalogue.MinTemp || t > catalogue.MaxTemp {
			return nil, "", fmt.Errorf("SFC temperature %g °C is outside %g..%g °C, the range the spec files take", t, catalogue.MinTemp, catalogue.MaxTemp)
		}
		for _, l := range sp.SFC {
			if l.Temp == t {
				return nil, "", fmt.Errorf("there is already an SFC limit at %s °C", catalogue.TempKey(t))
			}
		}
		sp.SFC = append(sp.SFC, catalogue.SFCLimit{Temp: t, Bound: catalogue.Free()})
		sp.SortLimits()
		return out, "sfc." + catalogue.TempKey(t), nil
	case "use":
		if len(f) != 2 {
			return nil, "", fmt.Errorf("write a stock limit as \"use <stock id>\"")
		}
		if _, ok := useIndex(sp, f[1]); ok {
			return nil, "", fmt.Errorf("stock %q already has a use limit", f[1])
		}
		sp.Use = append(sp.Use, catalogue.Use{Stock: f[1], Bound: catalogue.Free()})
		sp.SortLimits()
		if err := sp.Check(out.Catalogue).Err(); err != nil { // the stock is in the catalogue
			return nil, "", err
		}
		return out, "use." + f[1], nil
	}
	name := strings.Join(f, "")
	if l := strings.ToLower(name); catalogue.IsProperty(l) {
		name = l
	} else if _, ok := catalogue.Lookup(strings.ToUpper(name[:1]) + name[1:]); ok {
		name = strings.ToUpper(name[:1]) + name[1:]
	} else {
		return nil, "", fmt.Errorf("%q is not a limit: use a property (%s), a fatty acid such as C18:2, \"sfc 30\" or \"use <stock>\"", text, strings.Join(catalogue.Properties, ", "))
	}
	for _, l := range sp.Limits {
		if l.Name == name {
			return nil, "", fmt.Errorf("there is already a %s limit", name)
		}
	}
	sp.Limits = append(sp.Limits, catalogue.Limit{Name: name, Bound: catalogue.Free()})
	sp.SortLimits()
	return out, name, nil
}

func useIndex(sp *catalogue.Spec, id string) (int, bool) {
	for i, u := range sp.Use {
		if u.Stock == id {
			return i, true
		}
	}
	return 0, false
}

// StockField picks an editable column of the stocks panel.
type StockField int

// Editable stock fields.
const (
	FieldPrice StockField = iota
	FieldAvailable
)

// WithStock returns a new scenario with the price or availability of stock id
// set to v. For availability, +Inf or NaN means unlimited purchase. The
// edited stock is checked as the loader checks a file (catalogue.Stock.Check),
// so a value outside the accepted magnitudes is refused in its words.
func (s *Scenario) WithStock(id string, f StockField, v float64) (*Scenario, error) {
	out := s.Clone()
	st, ok := out.Catalogue.Find(id)
	if !ok {
		return nil, fmt.Errorf("no stock %q in the catalogue", id)
	}
	switch f {
	case FieldPrice:
		st.Price = v
	case FieldAvailable:
		if math.IsNaN(v) || math.IsInf(v, 1) {
			v = math.Inf(1)
		}
		st.Available = v
	}
	if err := st.Check().Err(); err != nil {
		if f == FieldAvailable {
			return nil, fmt.Errorf("%w (empty = unlimited)", err)
		}
		return nil, err
	}
	return out, nil
}

// WithAllowed returns a new scenario with stock id allowed in (true) or left
// out of (false) the blend.
func (s *Scenario) WithAllowed(id string, allowed bool) (*Scenario, error) {
	if _, ok := s.Catalogue.Find(id); !ok {
		return nil, fmt.Errorf("no stock %q in the catalogue", id)
	}
	out := s.Clone()
	if allowed {
		delete(out.Excluded, id)
	} else {
		out.Excluded[id] = true
	}
	return out, nil
}

// WithMatch is the scenario set to replace stock id: its measured curve ±
// tol (% solid) becomes the SFC limits, trans is held at most 1 %, and the
// stock is left out (optimise.ReplacementSpec, as lipoplan replace solves).
// The spec's other limits and [use] bounds stay.
func (s *Scenario) WithMatch(id string, tol float64) (*Scenario, error) {
	spec, err := optimise.ReplacementSpec(s.Catalogue, optimise.Replacement{Incumbent: id, Tolerance: tol, TransMax: 1, Base: s.Spec})
	if err != nil {
		return nil, err
	}
	out := s.Clone()
	spec.Name = s.Spec.Name
	spec.Batch = s.Spec.Batch
	spec.Process = nil
	if s.Spec.Process != nil {
		spec.Process = s.Spec.Process.Clone()
	}
	out.Spec = spec
	return out, nil
}

// WithRelaxation returns a new scenario with every suggested relaxation
// applied: a minimum is lowered and a maximum raised by Relax.By, and
// "avail.<stock>" raises what is on hand. Names it cannot place (for example
// a rule) are returned in skipped for the user to change by hand.
func (s *Scenario) WithRelaxation(rs []optimise.Relax) (out *Scenario, skipped []string, err error) {
	out = s
	for _, r := range rs {
		if id, ok := strings.CutPrefix(r.Name, "avail."); ok {
			st, found := out.Catalogue.Find(id)
			if !found || !st.Limited() {
				skipped = append(skipped, r.Name)
				continue
			}
			if out, err = out.WithStock(id, FieldAvailable, st.Available+r.By); err != nil {
				return nil, nil, fmt.Errorf("relax %s: %w", r.Name, err)
			}
			continue
		}
		i := strings.LastIndex(r.Name, ".")
		if i < 0 {
			skipped = append(skipped, r.Name)
			continue
		}
		stem, sideName := r.Name[:i], r.Name[i+1:]
		var row Row
		found := false
		for _, x := range out.Rows() {
			if x.Key == stem {
				row, found = x, true
			}
		}
		if !found || (sideName != "min" && sideName != "max") {
			skipped = append(skipped, r.Name)
			continue
		}
		side, v := Max, row.Bound.Max+r.By
		if sideName == "min" {
			side, v = Min, row.Bound.Min-r.By
			if row.Kind == RowSFC || row.Kind == RowUse || row.Kind == RowThrough {
				v = math.Max(v, 0)
			}
		}
		if math.IsInf(v, 0) {
			skipped = append(skipped, r.Name)
			continue
		}
		if out, err = out.WithBound(row, side, v); err != nil {
			return nil, nil, fmt.Errorf("relax %s: %w", r.Name, err)
		}
	}
	if out == s {
		out = s.Clone()
	}
	return out, skipped, nil
}
