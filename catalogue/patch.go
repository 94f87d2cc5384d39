package catalogue

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// Writing values back into the file they came from, in place (README, "The
// workspace": W keeps the user's comments). The file is compared with the
// new values one value at a time; only the values that differ are edited,
// at their place in the text: a changed value is replaced on its line (a
// trailing comment stays, and stays in its column where the spaces allow);
// a new value goes into the table it belongs to (an inline table, a line
// under its header, or a new [header] table at the end of its parent when
// there is none); a value no longer there is taken out (its line's comment
// stays as a comment line). Everything else, comments, blank lines, key
// order, quoting and spacing, is left byte for byte. The syntax edited is
// TOML v1.0.0 (toml.io); BurntSushi/toml is the reference parser the file
// is read with first. The edited text must read back, through ParseStocks
// or ParseSpec, to exactly the new values; where it would not, or where a
// value cannot be edited safely in place (it spans several lines, the list
// of stocks changed, a construct the edit does not follow), the file is
// written afresh (WriteStocks, WriteSpec) and Patch.Reason says why.

// Patch is the new text of a stocks or spec file.
type Patch struct {
	Data    []byte
	InPlace bool     // only the changed values were edited; the rest is byte for byte
	Reason  string   // when not InPlace: why the file is written afresh
	Changes []Change // the values that differ from the file's (nil when it could not be read)
}

// Unchanged reports whether the file already holds the new values.
func (p Patch) Unchanged() bool { return p.InPlace && len(p.Changes) == 0 }

// Change is one value that differs between a file and the new values.
type Change struct {
	Table string // "stock", "limits", "limits.sfc", "use", "rules", "process"; "" at the top
	Item  string // the stock id, limit name, temperature, use stock, rule or top-level key
	Field string // "price", "available", "min", "max", "fatty_acids C16:0", ...; "" when Item is the value
	Old   string // as written in TOML; "" when the file has none
	New   string // "" when the value is taken out
}

// String describes the change, e.g. `stock "palm" price 1000 → 1100`.
func (c Change) String() string {
	return fmt.Sprintf("%s %s → %s", c.Label(), orNone(c.Old), orNone(c.New))
}

// Label names the value changed, e.g. `stock "palm" price`.
func (c Change) Label() string {
	var b strings.Builder
	switch c.Table {
	case "":
		b.WriteString(c.Item)
	case "stock", "use":
		fmt.Fprintf(&b, "%s %q", c.Table, c.Item)
	case "limits":
		fmt.Fprintf(&b, "limit %s", c.Item)
	case "limits.sfc":
		fmt.Fprintf(&b, "SFC limit %s °C", c.Item)
	default:
		fmt.Fprintf(&b, "%s %s", c.Table, c.Item)
	}
	if c.Field != "" {
		b.WriteString(" " + c.Field)
	}
	return b.String()
}

// PatchStocks returns the stock catalogue file orig (named name in
// messages) edited to hold cat. An error means cat cannot be written at all
// (a value that is not a finite number).
func PatchStocks(name string, orig []byte, cat *Catalogue) (Patch, error) {
	var full bytes.Buffer
	if err := WriteStocks(&full, cat); err != nil {
		return Patch{}, err
	}
	job := patchJob{
		schema: stocksSchema,
		orig:   orig,
		full:   full.Bytes(),
		want:   stockLeaves(cat),
		what:   "a stock catalogue",
		read: func(data []byte) ([]leaf, toml.MetaData, error) {
			c, ps, md := parseStocks(name, data)
			if c == nil {
				return nil, md, ps.Err()
			}
			return stockLeaves(c), md, nil
		},
		reread: func(data []byte) ([]leaf, error) {
			c, ps := ParseStocks(name, data)
			if c == nil {
				return nil, ps.Err()
			}
			return stockLeaves(c), nil
		},
	}
	job.same = func(old []leaf) string { return sameStockList(old, job.want) }
	return job.run(), nil
}

// PatchSpec returns the spec file orig (named name in messages) edited to
// hold spec; cat, when not nil, is the catalogue its [use] and [process]
// stocks must be in. An error means spec cannot be written at all.
func PatchSpec(name string, orig []byte, spec *Spec, cat *Catalogue) (Patch, error) {
	var full bytes.Buffer
	if err := WriteSpec(&full, spec); err != nil {
		return Patch{}, err
	}
	job := patchJob{
		schema: specSchema,
		orig:   orig,
		full:   full.Bytes(),
		want:   specLeaves(spec),
		what:   "a spec",
		read: func(data []byte) ([]leaf, toml.MetaData, error) {
			s, ps, md := parseSpec(name, data, nil)
			if s == nil {
				return nil, md, ps.Err()
			}
			return specLeaves(s), md, nil
		},
		reread: func(data []byte) ([]leaf, error) {
			s, ps := ParseSpec(name, data, cat)
			if s == nil {
				return nil, ps.Err()
			}
			return specLeaves(s), nil
		},
	}
	return job.run(), nil
}

// leaf is one value of a catalogue or spec at its path in the file: a
// float64, an int64 (max_stocks), a string or a []string.
type leaf struct {
	path []string
	val  any
	what Change // Table, Item and Field
}

func (l leaf) key() string { return pathKey(l.path) }

// stockLeaves lists every value of cat as ParseStocks reads it: a name
// left out reads as the id, an availability left out as unlimited.
func stockLeaves(cat *Catalogue) []leaf {
	cur := cat.Currency
	if cur == "" {
		cur = "EUR"
	}
	out := []leaf{{path: []string{"currency"}, val: cur, what: Change{Item: "currency"}}}
	for i, s := range cat.Stocks {
		at := []string{"stock", "#" + strconv.Itoa(i)}
		add := func(v any, field string, rest ...string) {
			out = append(out, leaf{path: join(at, rest), val: v, what: Change{Table: "stock", Item: s.ID, Field: field}})
		}
		add(s.ID, "id", "id")
		name := s.Name
		if name == "" {
			name = s.ID
		}
		add(name, "name", "name")
		add(s.Price, "price", "price")
		if s.Limited() {
			add(s.Available, "available", "available")
		}
		for _, t := range []struct {
			table string
			m     map[string]float64
		}{{"fatty_acids", s.FattyAcids}, {"sn2", s.SN2}} {
			for _, k := range SortedKeys(t.m) {
				add(t.m[k], t.table+" "+k, t.table, k)
			}
		}
		for _, p := range s.SFC {
			k := TempKey(p.Temp)
			add(p.Solid, "sfc "+k, "sfc", k)
		}
		for _, k := range sortedKeys(s.TAGs) {
			add(s.TAGs[k], "tags "+k, "tags", k)
		}
	}
	return out
}

// specLeaves lists every value of s as ParseSpec reads it (a [process]
// without sfc reads as "predicted"; a rule of 0 is no rule; the reactor's
// feed ratio by stock).
func specLeaves(s *Spec) []leaf {
	out := []leaf{
		{path: []string{"name"}, val: s.Name, what: Change{Item: "name"}},
		{path: []string{"batch"}, val: s.Batch, what: Change{Item: "batch"}},
	}
	bound := func(b Bound, what Change, path ...string) {
		if b.HasMin() {
			w := what
			w.Field = "min"
			out = append(out, leaf{path: join(path, []string{"min"}), val: b.Min, what: w})
		}
		if b.HasMax() {
			w := what
			w.Field = "max"
			out = append(out, leaf{path: join(path, []string{"max"}), val: b.Max, what: w})
		}
	}
	for _, l := range s.Limits {
		bound(l.Bound, Change{Table: "limits", Item: l.Name}, "limits", l.Name)
	}
	for _, l := range s.SFC {
		k := TempKey(l.Temp)
		bound(l.Bound, Change{Table: "limits.sfc", Item: k}, "limits", "sfc", k)
	}
	for _, u := range s.Use {
		bound(u.Bound, Change{Table: "use", Item: u.Stock}, "use", u.Stock)
	}
	if s.Rules.MaxStocks > 0 {
		out = append(out, leaf{path: []string{"rules", "max_stocks"}, val: int64(s.Rules.MaxStocks), what: Change{Table: "rules", Item: "max_stocks"}})
	}
	if s.Rules.SmallestShare > 0 {
		out = append(out, leaf{path: []string{"rules", "smallest_share"}, val: s.Rules.SmallestShare, what: Change{Table: "rules", Item: "smallest_share"}})
	}
	if p := s.Process; p != nil {
		proc := func(k string, v any) {
			out = append(out, leaf{path: []string{"process", k}, val: v, what: Change{Table: "process", Item: k}})
		}
		proc("interesterify", append([]string{}, p.Interesterify...))
		if p.Method != "" {
			proc("method", p.Method)
		}
		proc("cost", p.Cost)
		sfc := p.SFC
		if sfc == "" {
			sfc = "predicted"
		}
		proc("sfc", sfc)
		if p.Through != nil {
			bound(*p.Through, Change{Table: "process", Item: "through"}, "process", "through")
		}
		for _, f := range p.FeedRatio {
			out = append(out, leaf{path: []string{"process", "feed_ratio", f.Stock}, val: f.Parts, what: Change{Table: "process", Item: "feed_ratio", Field: f.Stock}})
		}
	}
	return out
}

// sameStockList reports (as a reason) when the stocks are not the file's,
// one for one in the same order: they are not edited in place then.
func sameStockList(old, want []leaf) string {
	ids := func(ls []leaf) []string {
		var out []string
		for _, l := range ls {
			if len(l.path) == 3 && l.path[0] == "stock" && l.path[2] == "id" {
				out = append(out, l.val.(string))
			}
		}
		return out
	}
	a, b := ids(old), ids(want)
	if len(a) != len(b) {
		return fmt.Sprintf("the file has %d stocks and the workspace %d", len(a), len(b))
	}
	for i := range a {
		if a[i] != b[i] {
			return fmt.Sprintf("stock #%d is %q in the file and %q in the workspace", i+1, a[i], b[i])
		}
	}
	return ""
}

func sameValue(a, b any) bool {
	switch x := a.(type) {
	case []string:
		y, ok := b.([]string)
		return ok && slices.Equal(x, y)
	}
	return a == b
}

// showValue writes a value for a Change.
func showValue(v any) string {
	switch x := v.(type) {
	case float64:
		return strconv.FormatFloat(x, 'g', -1, 64)
	case int64:
		return strconv.FormatInt(x, 10)
	case string:
		return tomlString(x)
	case []string:
		q := make([]string, len(x))
		for i, s := range x {
			q[i] = tomlString(s)
		}
		return "[" + strings.Join(q, ", ") + "]"
	}
	return fmt.Sprint(v)
}

// renderValue writes v as a TOML value; old, when not nil, is the value it
// replaces, whose style it keeps where it can: an integer stays an integer
// while the new value is whole, a '...' string stays literal while the new
// text needs no escape, an array keeps the spaces inside its brackets.
func renderValue(v any, old *tomlValue, src []byte) string {
	oldText := ""
	if old != nil {
		oldText = string(src[old.start:old.end])
	}
	switch x := v.(type) {
	case float64:
		if old != nil && old.kind == valScalar && integerLiteral(oldText) && x == math.Trunc(x) && math.Abs(x) < 1<<53 {
			return strconv.FormatInt(int64(x), 10)
		}
		return tomlFloat(x)
	case int64:
		return strconv.FormatInt(x, 10)
	case string:
		if old != nil && old.kind == valString && old.literal && !old.multiline && literalFits(x) {
			return "'" + x + "'"
		}
		return tomlString(x)
	case []string:
		q := make([]string, len(x))
		for i, s := range x {
			q[i] = tomlString(s)
		}
		pad := ""
		if old != nil && old.kind == valArray && len(oldText) > 2 && oldText[1] == ' ' {
			pad = " "
		}
		if len(q) == 0 {
			return "[]"
		}
		return "[" + pad + strings.Join(q, ", ") + pad + "]"
	}
	return fmt.Sprint(v)
}

// integerLiteral reports a decimal TOML integer such as 1150, +5 or 1_000.
func integerLiteral(s string) bool {
	s = strings.TrimLeft(s, "+-")
	if s == "" {
		return false
	}
	for _, r := range s {
		if !(r >= '0' && r <= '9' || r == '_') {
			return false
		}
	}
	return true
}

// literalFits reports whether s can be a one-line literal string: no ' and
// no control character (TOML v1.0.0, String).
func literalFits(s string) bool {
	for _, r := range s {
		if r == '\'' || r < 0x20 && r != '\t' || r == 0x7f {
			return false
		}
	}
	return true
}

// docSchema is what the edit needs to know of a file's layout beyond TOML.
type docSchema int

const (
	stocksSchema docSchema = iota
	specSchema
)

// norm writes a path as the values' paths do: temperatures as TempKey
// writes them ("20.0" is "20"), and the old name of smallest_share.
func (sc docSchema) norm(path []string) []string {
	temp := -1
	switch {
	case sc == stocksSchema && len(path) >= 4 && path[0] == "stock" && path[2] == "sfc":
		temp = 3
	case sc == specSchema && len(path) >= 3 && path[0] == "limits" && path[1] == "sfc":
		temp = 2
	case sc == specSchema && len(path) == 2 && path[0] == "rules" && path[1] == "min_if_used":
		return []string{"rules", "smallest_share"}
	}
	if temp < 0 {
		return path
	}
	t, err := ParseTemp(path[temp])
	if err != nil || math.IsInf(t, 0) || math.IsNaN(t) {
		return path
	}
	out := append([]string(nil), path...)
	out[temp] = TempKey(t)
	return out
}

// headerTable reports the tables written under a [header] of their own
// when they are new, as WriteStocks and WriteSpec write them.
func (sc docSchema) headerTable(path []string) bool {
	if sc == stocksSchema {
		return len(path) == 3 && path[0] == "stock" && (path[2] == "fatty_acids" || path[2] == "sn2" || path[2] == "sfc" || path[2] == "tags")
	}
	switch len(path) {
	case 1:
		return path[0] == "limits" || path[0] == "use" || path[0] == "rules" || path[0] == "process"
	case 2:
		return path[0] == "limits" && path[1] == "sfc"
	}
	return false
}

// dropEmpty reports a table whose header goes when its last key does: an
// empty [process] would be a reactor step with nothing in it. Other tables
// keep their header (and its comment) when emptied; they read as empty.
func (sc docSchema) dropEmpty(path []string) bool {
	if sc == specSchema {
		return !(len(path) == 1 && (path[0] == "limits" || path[0] == "use" || path[0] == "rules") ||
			len(path) == 2 && path[0] == "limits" && path[1] == "sfc")
	}
	return !sc.headerTable(path) && !(len(path) == 2 && path[0] == "stock")
}

// less orders the keys of the table at parent: the keys of a fixed table
// in the order WriteStocks and WriteSpec write them (id, name, price,
// available; min, max; ...), temperatures by value, other keys (fatty
// acids, limit names, stock ids) as strings.
func (sc docSchema) less(parent []string, a, b string) bool {
	if known := sc.fixedKeys(parent); known != nil {
		ia, ib := slices.Index(known, a), slices.Index(known, b)
		if ia >= 0 && ib >= 0 {
			return ia < ib
		}
	}
	if sc.isTempTable(parent) {
		ta, ea := ParseTemp(a)
		tb, eb := ParseTemp(b)
		if ea == nil && eb == nil {
			return ta < tb
		}
	}
	return a < b
}

// fixedKeys lists the keys of a table of the schema's own, in order, or
// nil for a table keyed by the user's names.
func (sc docSchema) fixedKeys(parent []string) []string {
	if sc == stocksSchema {
		switch {
		case len(parent) == 0:
			return keysStocksTop
		case len(parent) == 2 && parent[0] == "stock":
			return keysStock
		}
		return nil
	}
	return specKeys(parent)
}

func (sc docSchema) isTempTable(parent []string) bool {
	return sc == stocksSchema && len(parent) == 3 && parent[0] == "stock" && parent[2] == "sfc" ||
		sc == specSchema && len(parent) == 2 && parent[0] == "limits" && parent[1] == "sfc"
}

// patchJob is one file to patch.
type patchJob struct {
	schema docSchema
	orig   []byte
	full   []byte // the file written afresh
	want   []leaf
	what   string // "a stock catalogue"
	read   func([]byte) ([]leaf, toml.MetaData, error)
	reread func([]byte) ([]leaf, error) // the check of the result, as the file will be loaded
	same   func(old []leaf) string      // a reason not to edit in place, or ""
}

// run patches the file or falls back to writing it afresh.
func (j patchJob) run() Patch {
	afresh := func(changes []Change, reason string) Patch {
		return Patch{Data: j.full, Reason: reason, Changes: changes}
	}
	if len(bytes.TrimSpace(j.orig)) == 0 {
		return afresh(nil, "the file is empty or missing")
	}
	old, md, err := j.read(j.orig)
	if err != nil {
		return afresh(nil, fmt.Sprintf("the file no longer reads as %s (%s)", j.what, firstLine(err)))
	}
	ops, changes := diffLeaves(old, j.want)
	if len(ops) == 0 {
		return Patch{Data: j.orig, InPlace: true}
	}
	if j.same != nil {
		if reason := j.same(old); reason != "" {
			return afresh(changes, reason)
		}
	}
	data, err := j.edit(ops, md)
	if err != nil {
		return afresh(changes, err.Error())
	}
	back, err := j.reread(data)
	if err != nil {
		return afresh(changes, fmt.Sprintf("the edited file would not read (%s)", firstLine(err)))
	}
	if d := leafDifference(back, j.want); d != "" {
		return afresh(changes, "the edited file would not read back the same ("+d+")")
	}
	return Patch{Data: data, InPlace: true, Changes: changes}
}

func firstLine(err error) string {
	s, _, _ := strings.Cut(err.Error(), "\n")
	return s
}

// op is one value to set (val not nil) or take out.
type op struct {
	path []string
	val  any
}

// diffLeaves lists what turns old into want, and the changes to report,
// in the order of want (values taken out after).
func diffLeaves(old, want []leaf) ([]op, []Change) {
	had := make(map[string]leaf, len(old))
	for _, l := range old {
		had[l.key()] = l
	}
	keep := make(map[string]bool, len(want))
	var ops []op
	var changes []Change
	for _, l := range want {
		k := l.key()
		keep[k] = true
		o, ok := had[k]
		if ok && sameValue(o.val, l.val) {
			continue
		}
		c := l.what
		if ok {
			c.Old = showValue(o.val)
		}
		c.New = showValue(l.val)
		ops = append(ops, op{path: l.path, val: l.val})
		changes = append(changes, c)
	}
	for _, l := range old {
		if keep[l.key()] {
			continue
		}
		c := l.what
		c.Old = showValue(l.val)
		ops = append(ops, op{path: l.path})
		changes = append(changes, c)
	}
	return ops, changes
}

// leafDifference names the first value that differs between got and want.
func leafDifference(got, want []leaf) string {
	ops, changes := diffLeaves(got, want)
	if len(ops) == 0 {
		return ""
	}
	c := changes[0]
	return fmt.Sprintf("%s reads as %s, not %s", c.Label(), orNone(c.Old), orNone(c.New))
}

func orNone(s string) string {
	if s == "" {
		return "none"
	}
	return s
}

// edit applies ops to the original text, which the reference parser read
// as md.
func (j patchJob) edit(ops []op, md toml.MetaData) ([]byte, error) {
	doc, err := scanTOML(j.orig, md)
	if err != nil {
		var se *scanError
		if errors.As(err, &se) {
			return nil, fmt.Errorf("the edit does not follow the file's layout (%w)", err)
		}
		return nil, err
	}
	p := newPlanner(doc, j.schema)
	for _, o := range ops {
		if err := p.op(o); err != nil {
			return nil, err
		}
	}
	return p.apply()
}

// planner collects the edits of one document.
type planner struct {
	doc      *tomlDoc
	sc       docSchema
	entries  map[string]*tomlEntry   // by normalised path
	sections map[string]*tomlSection // by normalised path
	set      map[*tomlEntry]any      // values to replace
	removed  map[*tomlEntry]bool     // entries to take out
	touched  map[*tomlValue]bool     // inline tables to write again
	adds     []*container            // in the order first met
	addsAt   map[string]*container
}

// container is where new keys go: an inline table, a section, or the keys
// of a dotted group (iv.min, iv.max) in a section.
type container struct {
	path   []string // normalised path of the table
	table  *tomlValue
	sec    *tomlSection
	dotted []*tomlEntry // the group's lines, for a dotted group
	kids   *addTree
}

// addTree is the new keys under one container, in the order they came.
type addTree struct {
	keys []string
	kids map[string]*addTree
	val  any // a leaf's value
	leaf bool
}

func (t *addTree) child(k string) *addTree {
	if t.kids == nil {
		t.kids = map[string]*addTree{}
	}
	c, ok := t.kids[k]
	if !ok {
		c = &addTree{}
		t.kids[k] = c
		t.keys = append(t.keys, k)
	}
	return c
}

func pathKey(p []string) string { return strings.Join(p, "\x00") }

func newPlanner(doc *tomlDoc, sc docSchema) *planner {
	p := &planner{doc: doc, sc: sc, entries: map[string]*tomlEntry{}, sections: map[string]*tomlSection{},
		set: map[*tomlEntry]any{}, removed: map[*tomlEntry]bool{}, touched: map[*tomlValue]bool{}, addsAt: map[string]*container{}}
	for _, e := range doc.entries {
		p.entries[pathKey(sc.norm(e.path))] = e
	}
	for _, s := range doc.sections {
		p.sections[pathKey(sc.norm(s.path))] = s
	}
	return p
}

// where names entry e for a reason: its key ([[array]] elements counted
// from 1, "stock #4.price") and line.
func (p *planner) where(e *tomlEntry) string {
	var b strings.Builder
	for i, part := range e.path {
		if n, ok := arrayIndex(part); ok {
			fmt.Fprintf(&b, " #%d", n+1)
			continue
		}
		if i > 0 {
			b.WriteByte('.')
		}
		b.WriteString(part)
	}
	return fmt.Sprintf("%s on line %d", b.String(), p.doc.lineOf(e.keyStart))
}

// arrayIndex reads the element number of a path part "#n".
func arrayIndex(part string) (int, bool) {
	if len(part) < 2 || part[0] != '#' {
		return 0, false
	}
	n, err := strconv.Atoi(part[1:])
	return n, err == nil && n >= 0
}

// op plans one value to set or take out.
func (p *planner) op(o op) error {
	e := p.entries[pathKey(o.path)]
	switch {
	case e != nil && e.val.kind == valTable:
		return fmt.Errorf("%s is a table where a value was expected", p.where(e))
	case e != nil && o.val == nil:
		return p.remove(e)
	case e != nil:
		if e.val.multiline {
			return fmt.Errorf("the value of %s spans several lines", p.where(e))
		}
		p.set[e] = o.val
		return nil
	case o.val == nil:
		return nil // not written in the file: it read as the default
	}
	return p.add(o.path, o.val)
}

// remove takes entry e out; an inline table left empty goes with it.
func (p *planner) remove(e *tomlEntry) error {
	if e.line {
		if e.val.multiline {
			return fmt.Errorf("the value of %s spans several lines", p.where(e))
		}
		p.removed[e] = true
		return nil
	}
	t := e.owner
	p.removed[e] = true
	p.touched[t] = true
	for _, x := range t.entries {
		if !p.removed[x] {
			return nil
		}
	}
	if c := p.addsAt["t"+pathKey(p.sc.norm(t.path))]; c != nil {
		return nil // new keys go in
	}
	if t.holder == nil {
		return fmt.Errorf("%s would leave an empty table in an array", p.where(e))
	}
	return p.remove(t.holder)
}

// add plans a new value at path: in the nearest table of the file that
// holds path, with the tables in between made new.
func (p *planner) add(path []string, val any) error {
	for k := len(path) - 1; k >= 0; k-- {
		q := path[:k]
		c, err := p.containerAt(q)
		if err != nil {
			return err
		}
		if c == nil {
			continue
		}
		t := c.kids
		for _, seg := range path[k:] {
			t = t.child(seg)
		}
		t.leaf, t.val = true, val
		return nil
	}
	return fmt.Errorf("no place for %s", strings.Join(path, "."))
}

// containerAt returns the table of the file at normalised path q, or nil.
func (p *planner) containerAt(q []string) (*container, error) {
	key := pathKey(q)
	if e := p.entries[key]; e != nil {
		if e.val.kind != valTable {
			return nil, fmt.Errorf("%s holds a value where a table was expected", p.where(e))
		}
		return p.container("t"+key, q, func(c *container) { c.table = e.val }), nil
	}
	if s := p.sections[key]; s != nil {
		return p.container("s"+key, q, func(c *container) { c.sec = s }), nil
	}
	if len(q) == 0 {
		return p.container("s", q, func(c *container) { c.sec = p.doc.root }), nil
	}
	// a dotted group: lines of one section whose keys run through q
	var group []*tomlEntry
	var sec *tomlSection
	for _, e := range p.doc.entries {
		n := p.sc.norm(e.path)
		if !e.line || len(n) <= len(q) || !slices.Equal(n[:len(q)], q) || len(e.sec.path) >= len(q) {
			continue
		}
		if sec != nil && sec != e.sec {
			return nil, fmt.Errorf("the keys of %s are spread over several tables", strings.Join(q, "."))
		}
		sec = e.sec
		group = append(group, e)
	}
	if sec == nil {
		return nil, nil
	}
	return p.container("d"+key, q, func(c *container) { c.sec, c.dotted = sec, group }), nil
}

func (p *planner) container(key string, q []string, fill func(*container)) *container {
	if c := p.addsAt[key]; c != nil {
		return c
	}
	c := &container{path: append([]string(nil), q...), kids: &addTree{}}
	fill(c)
	p.addsAt[key] = c
	p.adds = append(p.adds, c)
	if c.table != nil {
		p.touched[c.table] = true
	}
	return c
}

// edit is one replacement of src[start:end]. Of insertions at one place,
// new lines (rank 1) go before new tables (rank 2), so that a line added
// at the end of a table stays in it.
type edit struct {
	start, end int
	text       string
	rank       int
}

// apply turns the plan into the new text.
func (p *planner) apply() ([]byte, error) {
	var edits []edit
	src := p.doc.src
	grown := map[*tomlEntry]int{} // how much longer each line entry's value gets
	// values replaced where they stand, unless their inline table is written again
	for e, v := range p.set {
		if p.inTouched(e) || p.removed[e] {
			continue
		}
		text := renderValue(v, e.val, src)
		edits = append(edits, edit{start: e.val.start, end: e.val.end, text: text})
		grown[lineOfValue(e.val)] += len(text) - (e.val.end - e.val.start)
	}
	// inline tables written again (the outermost of those touched)
	for t := range p.touched {
		if h := enclosing(t); h != nil && (p.inTouched(h) || p.gone(h)) {
			continue
		}
		text, err := p.renderTable(t)
		if err != nil {
			return nil, err
		}
		edits = append(edits, edit{start: t.start, end: t.end, text: text})
		grown[lineOfValue(t)] += len(text) - (t.end - t.start)
	}
	// lines taken out; a comment on them stays as a line of its own
	for e := range p.removed {
		if !e.line {
			continue
		}
		edits = append(edits, edit{start: e.lineStart, end: e.lineEnd, text: p.commentLine(e.lineStart, e.indentEnd, e.comment, e.lineEnd)})
	}
	edits = append(edits, p.emptiedHeaders()...)
	// new keys
	for _, c := range p.adds {
		if c.table != nil {
			continue // written with its table
		}
		more, err := p.addLines(c)
		if err != nil {
			return nil, err
		}
		edits = append(edits, more...)
	}
	edits = append(edits, p.commentColumns(grown)...)
	sort.SliceStable(edits, func(a, b int) bool {
		x, y := edits[a], edits[b]
		if x.start != y.start {
			return x.start < y.start
		}
		if (x.end == x.start) != (y.end == y.start) {
			return x.end == x.start // insertions before a replacement at the same place
		}
		return x.rank < y.rank
	})
	var out bytes.Buffer
	at := 0
	open := len(src) > 0 && src[len(src)-1] != '\n' // the last line has no line ending yet
	for _, e := range edits {
		if e.start < at {
			return nil, fmt.Errorf("two edits meet on line %d", p.doc.lineOf(e.start))
		}
		out.Write(src[at:e.start])
		if open && e.start == len(src) && e.end == e.start {
			out.WriteString(p.doc.nl) // end the last line before what follows it
			open = false
		}
		out.WriteString(e.text)
		at = e.end
	}
	out.Write(src[at:])
	return out.Bytes(), nil
}

// lineOfValue is the line entry a value stands on (nil inside an array
// that is not on a line entry's own).
func lineOfValue(v *tomlValue) *tomlEntry {
	for v != nil {
		if v.parent != nil {
			v = v.parent
			continue
		}
		e := v.holder
		if e == nil || e.line {
			return e
		}
		v = e.owner
	}
	return nil
}

// enclosing is the entry whose value holds v, through any arrays.
func enclosing(v *tomlValue) *tomlEntry {
	for v.parent != nil {
		v = v.parent
	}
	return v.holder
}

// inTouched reports whether entry e lies inside an inline table that is
// written again or inside an entry taken out.
func (p *planner) inTouched(e *tomlEntry) bool {
	for x := e; x != nil && !x.line; {
		t := x.owner
		if p.touched[t] {
			return true
		}
		x = enclosing(t)
		if x != nil && p.removed[x] {
			return true
		}
	}
	return false
}

// gone reports whether e or an entry holding it is taken out.
func (p *planner) gone(e *tomlEntry) bool {
	for x := e; x != nil; {
		if p.removed[x] {
			return true
		}
		if x.line {
			return false
		}
		x = enclosing(x.owner)
	}
	return false
}

// commentLine is what is left of a line taken out: its comment, indented
// as the line was, or nothing.
func (p *planner) commentLine(lineStart, indentEnd, comment, lineEnd int) string {
	if comment < 0 {
		return ""
	}
	src := p.doc.src
	text := string(src[lineStart:indentEnd]) + string(src[comment:lineEnd])
	if !strings.HasSuffix(text, "\n") {
		text += p.doc.nl
	}
	return text
}

// emptiedHeaders takes out the header of a table all of whose keys are
// taken out, where an empty table would mean something (docSchema.dropEmpty).
func (p *planner) emptiedHeaders() []edit {
	var out []edit
	for _, s := range p.doc.sections[1:] {
		all := len(s.lines) > 0
		for _, e := range s.lines {
			all = all && p.removed[e]
		}
		n := p.sc.norm(s.path)
		if !all || !p.sc.dropEmpty(n) || p.addsAt["s"+pathKey(n)] != nil {
			continue
		}
		sub := false
		for _, o := range p.doc.sections {
			sub = sub || o != s && len(o.path) > len(s.path) && slices.Equal(o.path[:len(s.path)], s.path)
		}
		if !sub {
			out = append(out, edit{start: s.start, end: s.end, text: p.commentLine(s.start, s.start, s.comment, s.end)})
		}
	}
	return out
}

// renderTable writes inline table t again: its keys as written, changed
// values, keys taken out left out, new keys in order.
func (p *planner) renderTable(t *tomlValue) (string, error) {
	src := p.doc.src
	if t.multiline || t.comments {
		return "", fmt.Errorf("the inline table of %s spans several lines", p.where(t.holder))
	}
	var parts []string
	var keys []string // normalised last key of each part, "" for a dotted one
	for _, e := range t.entries {
		if p.removed[e] {
			continue
		}
		head := string(src[e.keyStart:e.val.start]) // key, spaces and =
		if e.val.kind == valArray && p.editedInside(e.val) {
			return "", fmt.Errorf("%s is an array of tables inside an inline table", p.where(e))
		}
		switch v, ok := p.set[e]; {
		case e.val.kind == valTable && p.touched[e.val]:
			inner, err := p.renderTable(e.val)
			if err != nil {
				return "", err
			}
			parts = append(parts, head+inner)
		case ok:
			parts = append(parts, head+renderValue(v, e.val, src))
		default:
			parts = append(parts, string(src[e.keyStart:e.val.end]))
		}
		k := ""
		if e.parts == 1 {
			n := p.sc.norm(e.path)
			k = n[len(n)-1]
		}
		keys = append(keys, k)
	}
	if c := p.addsAt["t"+pathKey(p.sc.norm(t.path))]; c != nil {
		for _, k := range c.kids.keys {
			text := p.newKey(c.path, k) + " = " + p.inline(join(c.path, []string{k}), c.kids.kids[k])
			at := p.slot(c.path, keys, k)
			parts = append(parts[:at], append([]string{text}, parts[at:]...)...)
			keys = append(keys[:at], append([]string{k}, keys[at:]...)...)
		}
	}
	if len(parts) == 0 {
		return "{}", nil
	}
	pad := ""
	if t.end-t.start > 2 && src[t.start+1] == ' ' || len(t.entries) == 0 {
		pad = " "
	}
	return "{" + pad + strings.Join(parts, ", ") + pad + "}", nil
}

// editedInside reports an edit inside array or inline table v.
func (p *planner) editedInside(v *tomlValue) bool {
	if p.touched[v] {
		return true
	}
	for _, el := range v.elems {
		if p.editedInside(el) {
			return true
		}
	}
	for _, e := range v.entries {
		if _, ok := p.set[e]; ok || p.removed[e] || p.editedInside(e.val) {
			return true
		}
	}
	return false
}

// slot is where a new key k goes among keys (the table's keys in order,
// "" where dotted): after the last that sorts before it when they are in
// order, else at the end.
func (p *planner) slot(parent []string, keys []string, k string) int {
	sorted := true
	prev := ""
	for _, x := range keys {
		if x == "" {
			sorted = false
			break
		}
		if prev != "" && p.sc.less(parent, x, prev) {
			sorted = false
			break
		}
		prev = x
	}
	if !sorted {
		return len(keys)
	}
	at := 0
	for i, x := range keys {
		if p.sc.less(parent, x, k) {
			at = i + 1
		}
	}
	return at
}

// inline writes new keys t at path as a value: a leaf's value, or an
// inline table of them.
func (p *planner) inline(path []string, t *addTree) string {
	if t.leaf {
		return renderValue(t.val, nil, nil)
	}
	keys := p.ordered(path, t)
	parts := make([]string, len(keys))
	for i, k := range keys {
		parts[i] = p.newKey(path, k) + " = " + p.inline(join(path, []string{k}), t.kids[k])
	}
	return "{ " + strings.Join(parts, ", ") + " }"
}

// newKey writes key k of the table at parent: a temperature in quotes, as
// the README's files write them ("20"), other keys bare where TOML allows.
func (p *planner) newKey(parent []string, k string) string {
	if p.sc.isTempTable(parent) {
		return tomlString(k)
	}
	return tomlKey(k)
}

// ordered lists the keys of t in the table's order.
func (p *planner) ordered(path []string, t *addTree) []string {
	keys := append([]string(nil), t.keys...)
	sort.SliceStable(keys, func(a, b int) bool { return p.sc.less(path, keys[a], keys[b]) })
	return keys
}

// addLines writes the new keys of section or dotted-group container c:
// each as a line in place among its neighbours, or, for a table written
// under a header of its own, as a new table at the end of its parent.
func (p *planner) addLines(c *container) ([]edit, error) {
	var out []edit
	src := p.doc.src
	nl := p.doc.nl
	for _, k := range p.ordered(c.path, c.kids) {
		t := c.kids.kids[k]
		full := join(c.path, []string{k})
		if c.dotted == nil && !t.leaf && p.sc.headerTable(full) {
			at := p.areaEnd(c.path)
			out = append(out, edit{start: at, end: at, text: nl + p.newTable(c.sec, full, t), rank: 2})
			continue
		}
		rel := []string{}
		anchor := (*tomlEntry)(nil)
		if c.dotted != nil {
			last := c.dotted[len(c.dotted)-1]
			for _, part := range last.path[len(c.sec.path):len(c.path)] {
				rel = append(rel, tomlKey(part))
			}
			anchor = last
		}
		value := p.inline(full, t)
		at, anchor := p.linePlace(c, k, anchor)
		last := p.newKey(c.path, k)
		if anchor != nil && src[anchor.keyStart] == '"' && c.dotted == nil {
			last = tomlString(k) // the table's keys are written in quotes
		}
		key := strings.Join(append(rel, last), ".")
		indent, gap := "", " "
		if anchor != nil {
			indent = string(src[anchor.lineStart:anchor.indentEnd])
			eq := bytes.IndexByte(src[anchor.keyEnd:anchor.val.start], '=')
			col := anchor.keyEnd + eq - anchor.indentEnd // where = stands
			if n := col - len(key); n > 1 && eq > 1 {
				gap = strings.Repeat(" ", n)
			}
		}
		line := indent + key + gap + "= " + value + nl
		if c.sec == p.doc.root && len(p.doc.root.lines) == 0 && at < len(src) {
			line += nl // keep a blank line before the first table
		}
		out = append(out, edit{start: at, end: at, text: line, rank: 1})
	}
	return out, nil
}

// linePlace is where a new line for key k goes in container c, and the
// line it follows (whose indentation and = column it takes).
func (p *planner) linePlace(c *container, k string, anchor *tomlEntry) (int, *tomlEntry) {
	if c.dotted != nil {
		return anchor.lineEnd, anchor
	}
	s := c.sec
	var lines []*tomlEntry
	var keys []string
	for _, e := range s.lines {
		if e.parts != 1 {
			lines, keys = nil, nil
			break
		}
		n := p.sc.norm(e.path)
		lines = append(lines, e)
		keys = append(keys, n[len(n)-1])
	}
	if len(s.lines) > 0 && len(lines) == 0 {
		last := s.lines[len(s.lines)-1]
		return last.lineEnd, last
	}
	if len(lines) == 0 {
		if s != p.doc.root {
			return s.end, nil
		}
		return p.rootTop(), nil
	}
	at := p.slot(c.path, keys, k)
	if at == 0 {
		if s == p.doc.root {
			return lines[0].lineStart, lines[0]
		}
		return s.end, lines[0]
	}
	return lines[at-1].lineEnd, lines[at-1]
}

// rootTop is where a first top-level key goes in a file that has none:
// before the first table header and the comment lines right above it, or
// at the end.
func (p *planner) rootTop() int {
	if len(p.doc.sections) < 2 {
		return len(p.doc.src)
	}
	at := p.doc.sections[1].start
	src := p.doc.src
	for at > 0 {
		prev := bytes.LastIndexByte(src[:at-1], '\n') + 1
		if !bytes.HasPrefix(bytes.TrimLeft(src[prev:at], " \t"), []byte("#")) {
			break
		}
		at = prev
	}
	return at
}

// areaEnd is the end of the last line that belongs to the table at path
// or to a table below it; the end of the file for the top.
func (p *planner) areaEnd(path []string) int {
	if len(path) == 0 {
		return len(p.doc.src)
	}
	end := -1
	for _, s := range p.doc.sections[1:] {
		n := p.sc.norm(s.path)
		if len(n) >= len(path) && slices.Equal(n[:len(path)], path) {
			end = max(end, s.last)
		}
	}
	if end < 0 {
		return len(p.doc.src)
	}
	return end
}

// newTable writes a new [header] table at normalised path full (below
// section parent) holding t, and the header tables below it.
func (p *planner) newTable(parent *tomlSection, full []string, t *addTree) string {
	nl := p.doc.nl
	var head []string
	for _, part := range parent.raw {
		head = append(head, tomlKey(part))
	}
	return p.tableText(head, full, t, nl)
}

func (p *planner) tableText(head, full []string, t *addTree, nl string) string {
	head = append(head, p.newKey(full[:len(full)-1], full[len(full)-1]))
	var b, later strings.Builder
	b.WriteString("[" + strings.Join(head, ".") + "]" + nl)
	for _, k := range p.ordered(full, t) {
		kid := t.kids[k]
		path := join(full, []string{k})
		if !kid.leaf && p.sc.headerTable(path) {
			later.WriteString(nl + p.tableText(append([]string(nil), head...), path, kid, nl))
			continue
		}
		b.WriteString(p.newKey(full, k) + " = " + p.inline(path, kid) + nl)
	}
	return b.String() + later.String()
}

// commentColumns keeps trailing comments in their column: where an edit
// on a line before its comment makes the line longer or shorter, the
// spaces before the comment take up the difference (at least one stays).
func (p *planner) commentColumns(grown map[*tomlEntry]int) []edit {
	src := p.doc.src
	var out []edit
	for e, delta := range grown {
		if e == nil || e.comment < 0 || p.removed[e] || e.val.multiline || delta == 0 {
			continue
		}
		ws := e.comment
		for ws > e.val.end && src[ws-1] == ' ' {
			ws--
		}
		if ws != e.val.end || e.comment-ws < 1 {
			continue // something other than spaces stands before the comment
		}
		n := max(1, e.comment-ws-delta)
		out = append(out, edit{start: ws, end: e.comment, text: strings.Repeat(" ", n)})
	}
	return out
}
