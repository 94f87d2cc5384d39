package catalogue

import (
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// The product spec (spec.toml; README, "File formats"): its types, decoding
// and checks.

// Bound is a closed interval; an absent side is -Inf or +Inf.
type Bound struct {
	Min float64
	Max float64
}

// Free is a bound with neither side set.
func Free() Bound { return Bound{Min: math.Inf(-1), Max: math.Inf(1)} }

// HasMin reports whether the lower side is set.
func (b Bound) HasMin() bool { return !math.IsInf(b.Min, -1) }

// HasMax reports whether the upper side is set.
func (b Bound) HasMax() bool { return !math.IsInf(b.Max, 1) }

// Property names a spec limit may use besides fatty-acid keys.
var Properties = []string{"iv", "sv", "safa", "mufa", "pufa", "trans", "cox", "omega3"}

// IsProperty reports whether name is one of Properties.
func IsProperty(name string) bool {
	for _, p := range Properties {
		if p == name {
			return true
		}
	}
	return false
}

// Limit is a bound on a property ("iv", "safa", ...) or a fatty acid ("C18:2").
type Limit struct {
	Name string
	Bound
}

// SFCLimit bounds the solid fat content at one temperature.
type SFCLimit struct {
	Temp float64
	Bound
}

// Use bounds the inclusion of one stock, % of batch.
type Use struct {
	Stock string
	Bound
}

// Rules are the integer rules that need the MILP engine. Zero means unset.
type Rules struct {
	MaxStocks     int     // at most this many stocks in the blend
	SmallestShare float64 // a stock used at all is used at no less than this % of batch
}

// Active reports whether any integer rule is set.
func (r Rules) Active() bool { return r.MaxStocks > 0 || r.SmallestShare > 0 }

// Process is the optional interesterification before final blending.
type Process struct {
	Interesterify []string // stocks that pass through the reactor together
	Method        string   // "chemical" or "enzymatic"
	Cost          float64  // currency per tonne processed
	SFC           string   // "measured" or "predicted"
	// Through bounds the share of the batch that passes through the
	// reactor, % of batch ("through = { min = 30 }"); nil leaves it to the
	// optimiser, which uses the reactor only where it pays.
	Through *Bound
	// FeedRatio fixes the make-up of the reactor's feed: the parts of each
	// stock of Interesterify, in its order ("feed_ratio = { "ps-h" = 3,
	// "pko-r" = 2 }"); nil lets the optimiser choose the feed.
	FeedRatio []FeedPart
}

// FeedPart is one stock's parts in a fixed reactor feed (Process.FeedRatio).
type FeedPart struct {
	Stock string
	Parts float64 // > 0; the feed is each stock's parts over the sum
}

// Required reports whether the spec makes the reactor take part: a
// minimum share through it.
func (p *Process) Required() bool { return p.Through != nil && p.Through.HasMin() && p.Through.Min > 0 }

// FeedShares are the fixed feed's fractions (summing to 1) by stock of
// Interesterify, nil when the feed is free.
func (p *Process) FeedShares() map[string]float64 {
	if len(p.FeedRatio) == 0 {
		return nil
	}
	var sum float64
	for _, f := range p.FeedRatio {
		sum += f.Parts
	}
	out := make(map[string]float64, len(p.FeedRatio))
	for _, f := range p.FeedRatio {
		out[f.Stock] = f.Parts / sum
	}
	return out
}

// Clone returns a deep copy of the process step.
func (p *Process) Clone() *Process {
	out := *p
	out.Interesterify = append([]string(nil), p.Interesterify...)
	out.FeedRatio = append([]FeedPart(nil), p.FeedRatio...)
	if len(p.FeedRatio) == 0 {
		out.FeedRatio = nil
	}
	if p.Through != nil {
		b := *p.Through
		out.Through = &b
	}
	return &out
}

// Spec is a product specification.
type Spec struct {
	File    string
	ID      string // short id: the file's base name without extension ("laminating")
	Name    string
	Batch   float64    // tonnes
	Limits  []Limit    // sorted by name
	SFC     []SFCLimit // sorted by temperature
	Use     []Use      // sorted by stock id
	Rules   Rules
	Process *Process // nil when the spec has no process step
}

// Clone returns a deep copy of the spec.
func (s *Spec) Clone() *Spec {
	out := *s
	out.Limits = append([]Limit(nil), s.Limits...)
	out.SFC = append([]SFCLimit(nil), s.SFC...)
	out.Use = append([]Use(nil), s.Use...)
	if s.Process != nil {
		out.Process = s.Process.Clone()
	}
	return &out
}

// SortLimits puts limits, SFC limits and use bounds in their canonical order.
func (s *Spec) SortLimits() {
	sort.SliceStable(s.Limits, func(i, j int) bool { return s.Limits[i].Name < s.Limits[j].Name })
	sort.SliceStable(s.SFC, func(i, j int) bool { return s.SFC[i].Temp < s.SFC[j].Temp })
	sort.SliceStable(s.Use, func(i, j int) bool { return s.Use[i].Stock < s.Use[j].Stock })
}

// DefaultTemps are the SFC temperatures reported when none are asked for.
var DefaultTemps = []float64{10, 15, 20, 25, 30, 35, 40, 45}

type rawBound struct {
	Min val `toml:"min"`
	Max val `toml:"max"`
}

type rawRules struct {
	MaxStocks     val `toml:"max_stocks"`
	SmallestShare val `toml:"smallest_share"`
	OldName       val `toml:"min_if_used"` // smallest_share's old name, read this release with a warning
}

type rawProcess struct {
	Interesterify val            `toml:"interesterify"`
	Method        val            `toml:"method"`
	Cost          val            `toml:"cost"`
	SFC           val            `toml:"sfc"`
	Through       toml.Primitive `toml:"through"`
	FeedRatio     leafMap        `toml:"feed_ratio"`
}

type rawSpec struct {
	Name    val                       `toml:"name"`
	Batch   val                       `toml:"batch"`
	Limits  map[string]toml.Primitive `toml:"limits"`
	Use     map[string]toml.Primitive `toml:"use"`
	Rules   *rawRules                 `toml:"rules"`
	Process *rawProcess               `toml:"process"`
}

// Known keys of the spec's fixed tables, in the order the messages list them.
var (
	keysSpecTop = []string{"name", "batch", "limits", "use", "rules", "process"}
	keysBound   = []string{"min", "max"}
	keysRules   = []string{"max_stocks", "smallest_share", "min_if_used"}
	keysProcess = []string{"interesterify", "method", "cost", "sfc", "through", "feed_ratio"}
)

// specKeys lists the known keys of the spec's fixed table at parent, in
// order, or nil for a table keyed by the user's names (limit names,
// temperatures, stock ids, feed_ratio).
func specKeys(parent []string) []string {
	switch {
	case len(parent) == 0:
		return keysSpecTop
	case len(parent) == 1 && parent[0] == "rules":
		return keysRules
	case len(parent) == 1 && parent[0] == "process":
		return keysProcess
	case len(parent) == 2 && parent[0] == "limits" && parent[1] != "sfc",
		len(parent) == 3 && parent[0] == "limits" && parent[1] == "sfc",
		len(parent) == 2 && parent[0] == "use",
		len(parent) == 2 && parent[0] == "process" && parent[1] == "through":
		return keysBound
	}
	return nil
}

// ParseSpec decodes and validates a product spec (README, "File formats"). When cat
// is non-nil every stock id named in [use] and [process] must exist in it.
// The spec's ID is the file's base name without extension.
func ParseSpec(name string, data []byte, cat *Catalogue) (*Spec, Problems) {
	s, ps, _ := parseSpec(name, data, cat)
	return s, ps
}

// parseSpec is ParseSpec, with the reference parser's metadata of the
// file (for the in-place edit, patch.go).
func parseSpec(name string, data []byte, cat *Catalogue) (*Spec, Problems, toml.MetaData) {
	c := &collector{file: name}
	var raw rawSpec
	md, ok := c.decode(data, &raw)
	if !ok {
		return nil, c.problems(), md
	}
	spec := c.spec(md, raw, cat)
	c.unknownKeys(md,
		func(parent toml.Key) ([]string, bool) {
			known := specKeys(parent)
			return known, known != nil
		},
		func(_ int, k toml.Key) string {
			switch {
			case len(k) >= 4 && k[0] == "limits" && k[1] == "sfc":
				return fmt.Sprintf("limit \"sfc.%s\"", k[2])
			case len(k) >= 3 && k[0] == "limits" && k[1] != "sfc":
				return fmt.Sprintf("limit %q", k[1])
			case len(k) >= 3 && k[0] == "use":
				return fmt.Sprintf("use %q", k[1])
			case len(k) >= 2 && (k[0] == "rules" || k[0] == "process"):
				return "[" + k[0] + "]"
			}
			return ""
		})
	if c.failed() {
		return nil, c.problems(), md
	}
	spec.File = name
	spec.ID = SpecID(name)
	return spec, c.problems(), md
}

// SpecID is the short id of a spec file: its base name without extension.
func SpecID(name string) string {
	base := filepath.Base(name)
	return strings.TrimSuffix(base, filepath.Ext(base))
}

// LoadSpec reads and parses a product spec file.
func LoadSpec(path string, cat *Catalogue) (*Spec, Problems) {
	data, err := ReadInput(path)
	if err != nil {
		return nil, readProblem(path, err, "product spec")
	}
	return ParseSpec(path, data, cat)
}

// Check reports every problem of a spec built or edited in code, by the
// rules and in the words of ParseSpec (README, "File formats" and "Accepted
// magnitudes"): the batch; each limit's name and its sides (within the
// accepted magnitudes of its quantity, min not above max); each SFC limit's
// temperature and sides; each [use] bound, whose stock must be in cat (when
// cat is not nil), and the sum of the [use] minimums; the [rules]; and the
// [process] step (feed stocks in cat, each once; method, cost and SFC
// model). Problems name s.File when set. A limit with neither side set and
// a rule of 0 (no rule) are no problem here; what only a file can get wrong
// (a missing key, a value of the wrong type, two keys for one temperature)
// is the loader's alone.
func (s *Spec) Check(cat *Catalogue) Problems {
	return checked(s.File, func(c *collector) { c.specValues(s, cat, true) })
}

// CheckModel reports what keeps a spec from being a model at all, in the
// words of Check: Check without the accepted magnitudes of the [limits],
// [limits.sfc] and [use] sides (they must still be finite, min not above
// max, and a [use] min not negative) and without the sum of the [use]
// minimums. A limit is a row of the programme and a [use] bound a column
// bound, so any finite band is a model, if perhaps an impossible one; a
// band derived in code (a minimum relaxed to a hair below zero, a generated
// test band) may lie outside what a person may type, and an impossible spec
// is answered with a relaxation, not refused. The optimiser checks with it.
func (s *Spec) CheckModel(cat *Catalogue) Problems {
	return checked(s.File, func(c *collector) { c.specValues(s, cat, false) })
}

// specValues checks what Spec.Check checks; without typed set, what
// Spec.CheckModel checks.
func (c *collector) specValues(s *Spec, cat *Catalogue, typed bool) {
	c.batch(s.Batch)
	for _, l := range s.Limits {
		where := c.label("limit %q", l.Name)
		if c.limitName(where, l.Name) {
			c.limitSides(where, l.Bound, LimitQuantity(l.Name), typed)
		}
	}
	for _, l := range s.SFC {
		where := ""
		if !c.quiet {
			where = "limit \"sfc." + TempKey(l.Temp) + "\""
		}
		c.tempRange(where, "limits.sfc", "", l.Temp)
		c.limitSides(where, l.Bound, QtyPercent, typed)
	}
	for _, u := range s.Use {
		where := c.label("use %q", u.Stock)
		c.useStock(where, u.Stock, cat)
		c.useSides(where, u.Bound, typed)
	}
	if typed {
		c.useMinimums(s.Use)
	}
	const where = "[rules]"
	if s.Rules.MaxStocks != 0 {
		c.maxStocks(where, float64(s.Rules.MaxStocks))
	}
	if s.Rules.SmallestShare != 0 {
		c.smallestShare(where, s.Rules.SmallestShare)
	}
	if p := s.Process; p != nil {
		const where = "[process]"
		if len(p.Interesterify) == 0 {
			c.feedEmpty(where)
		}
		seen := make(map[string]bool, len(p.Interesterify))
		for _, id := range p.Interesterify {
			c.feedStock(where, id, seen, cat)
		}
		c.processMethod(where, p.Method)
		c.processCost(where, p.Cost)
		if p.SFC != "" {
			c.processSFC(where, p.SFC)
		}
		if p.Through != nil {
			// A model may send nothing through (through max 0: the blend
			// without the reactor, as a comparison of routes solves it);
			// a person would remove [process] instead.
			if c.limitSides(where+" through", *p.Through, QtyPercent, typed) && typed {
				c.processThrough(where, *p.Through)
			}
		}
		if len(p.FeedRatio) > 0 {
			c.processFeedRatio(where, p)
		}
	}
}

// batch reports a batch size outside the accepted magnitudes.
func (c *collector) batch(b float64) bool {
	return c.magnitude(`key "batch"`, QtyTonnes, "batch", b, "give the tonnes of one batch")
}

// limitName reports a [limits] name that is neither a property nor a
// fatty-acid key.
func (c *collector) limitName(where, name string) bool {
	if IsProperty(name) || Rank(name) >= 0 {
		return true
	}
	msg := fmt.Sprintf("unknown limit %q; limits are %s, sfc, or a fatty-acid key such as \"C18:2\"", name, strings.Join(Properties, ", "))
	if sug, ok := c.suggest(name, limitNames()); ok {
		msg += fmt.Sprintf("; did you mean %q?", sug)
	}
	c.errf(where, "%s", msg)
	return false
}

// boundSides reports a side of b that is set and outside the accepted
// magnitudes of q, and a min above the max.
func (c *collector) boundSides(where string, b Bound, q Quantity) bool {
	good := true
	if b.HasMin() && !c.magnitude(where, q, "min", b.Min, "") {
		good = false
	}
	if b.HasMax() && !c.magnitude(where, q, "max", b.Max, "") {
		good = false
	}
	return c.boundOrder(where, b) && good
}

// limitSides is boundSides for a limit, or with typed unset (CheckModel)
// only the finiteness of its sides and their order.
func (c *collector) limitSides(where string, b Bound, q Quantity, typed bool) bool {
	if typed {
		return c.boundSides(where, b, q)
	}
	return c.finiteSides(where, b) && c.boundOrder(where, b)
}

// useSides is boundSides for a [use] bound, or with typed unset
// (CheckModel) its sides finite, the min not negative (a share below zero
// is no blend) and in order; a max above 100 % only never binds.
func (c *collector) useSides(where string, b Bound, typed bool) bool {
	if typed {
		return c.boundSides(where, b, QtyPercent)
	}
	if !c.finiteSides(where, b) || b.HasMin() && b.Min < 0 && !c.magnitude(where, QtyPercent, "min", b.Min, "") {
		return false
	}
	return c.boundOrder(where, b)
}

// finiteSides reports a side of b that is set and not finite.
func (c *collector) finiteSides(where string, b Bound) bool {
	return (!b.HasMin() || c.finite(where, "min", b.Min)) && (!b.HasMax() || c.finite(where, "max", b.Max))
}

// boundOrder reports a min above the max.
func (c *collector) boundOrder(where string, b Bound) bool {
	if b.HasMin() && b.HasMax() && b.Min > b.Max {
		c.errf(where, "min = %g is above max = %g; swap or correct them", b.Min, b.Max)
		return false
	}
	return true
}

// useStock reports a [use] stock that is not in cat (nil: not checked).
func (c *collector) useStock(where, id string, cat *Catalogue) bool {
	if cat == nil {
		return true
	}
	if _, found := cat.Find(id); !found {
		c.errf(where, "no stock %q in %s; %s", id, catName(cat), c.stockHint(id, cat))
		return false
	}
	return true
}

// useMinimums reports [use] minimums that add up to more than the batch.
func (c *collector) useMinimums(uses []Use) {
	var minSum float64
	for _, u := range uses {
		if u.HasMin() && u.Min > 0 {
			minSum += u.Min
		}
	}
	if !(minSum > 100+1e-9) {
		return
	}
	var mins []string
	for _, u := range uses {
		if u.HasMin() && u.Min > 0 {
			mins = append(mins, fmt.Sprintf("%s %g", u.Stock, u.Min))
		}
	}
	c.errf("[use]", "the minimum shares add up to %g %% of the batch (%s), more than 100 %%; lower some of them", minSum, strings.Join(mins, ", "))
}

// maxStocks reports a max_stocks rule that is not a whole number from 1 to
// a million.
func (c *collector) maxStocks(where string, v float64) bool {
	switch {
	case v != math.Trunc(v):
		c.errf(where, "max_stocks = %g must be a whole number of stocks", v)
	case v < 1:
		c.errf(where, "max_stocks = %g must be at least 1", v)
	case v > 1e6:
		c.errf(where, "max_stocks = %g is implausibly large; give the number of stocks allowed", v)
	default:
		return true
	}
	return false
}

// smallestShare reports a smallest_share rule (the smallest share a stock
// may have in the batch if it is used at all) that is 0 (written in a file:
// no rule is left out) or outside the accepted magnitudes of a percentage.
func (c *collector) smallestShare(where string, v float64) bool {
	if v == 0 {
		c.errf(where, "smallest_share = 0 must be above 0 and at most 100 (%% of batch); leave it out for no rule")
		return false
	}
	return c.magnitude(where, QtyPercent, "smallest_share", v, "give the smallest share, % of batch, a stock may have if it is used at all")
}

// feedEmpty reports a [process] step without feed stocks.
func (c *collector) feedEmpty(where string) {
	c.errf(where, "interesterify is empty; list at least one stock id, or remove [process]")
}

// feedStock reports a feed stock listed twice (seen holds those met) or not
// in cat (nil: not checked).
func (c *collector) feedStock(where, id string, seen map[string]bool, cat *Catalogue) bool {
	if seen[id] {
		c.errf(where, "interesterify lists %q twice; list each stock once", id)
		return false
	}
	seen[id] = true
	if cat != nil {
		if _, found := cat.Find(id); !found {
			c.errf(where, "interesterify names %q, which is not in %s; %s", id, catName(cat), c.stockHint(id, cat))
			return false
		}
	}
	return true
}

// processMethod reports a reactor method that is missing ("") or unknown.
func (c *collector) processMethod(where, m string) bool {
	switch m {
	case "chemical", "enzymatic":
		return true
	case "":
		c.errf(where, `method is missing; add method = "chemical" (random) or "enzymatic" (sn-1,3 lipase)`)
	default:
		c.errf(where, `method %q is not known; use "chemical" or "enzymatic"`, m)
	}
	return false
}

// processCost reports a processing cost outside the accepted magnitudes.
func (c *collector) processCost(where string, v float64) bool {
	return c.magnitude(where, QtyPrice, "cost", v, "give the processing cost per tonne")
}

// processSFC reports an SFC model of the [process] step that is not known.
func (c *collector) processSFC(where, m string) bool {
	if m != "measured" && m != "predicted" {
		c.errf(where, `sfc %q is not known; use "measured" (linear in the stocks' curves) or "predicted" (TAG model)`, m)
		return false
	}
	return true
}

// bound decodes and checks one { min = ..., max = ... } table whose sides
// are values of q.
func (c *collector) bound(md toml.MetaData, where string, p toml.Primitive, q Quantity, example string) (Bound, bool) {
	var rb rawBound
	if err := md.PrimitiveDecode(p, &rb); err != nil {
		var v any
		_ = md.PrimitiveDecode(p, &v)
		switch x := v.(type) {
		case int64, float64:
			c.errf(where, "must be a table with min and/or max, not a bare number; write e.g. %s = { max = %v } or { min = %v }", example, x, x)
		default:
			c.errf(where, "must be a table with min and/or max, not %s; write e.g. %s = { min = 38, max = 48 }", describe(v), example)
		}
		return Bound{}, false
	}
	b := Free()
	good := true
	if v, ok := c.num(where, "min", rb.Min); ok {
		b.Min = v
	} else if rb.Min.set {
		good = false
	}
	if v, ok := c.num(where, "max", rb.Max); ok {
		b.Max = v
	} else if rb.Max.set {
		good = false
	}
	if !good {
		return b, false
	}
	if !rb.Min.set && !rb.Max.set {
		c.errf(where, "has neither min nor max; give at least one, e.g. %s = { max = 48 }", example)
		return b, false
	}
	return b, c.boundSides(where, b, q)
}

// limitNames lists every name a [limits] key may take, for suggestions.
func limitNames() []string {
	return append(append(append([]string(nil), Properties...), "sfc"), Keys()...)
}

// spec converts and checks a decoded spec.
func (c *collector) spec(md toml.MetaData, raw rawSpec, cat *Catalogue) *Spec {
	s := &Spec{}
	if !raw.Name.set {
		c.errf(`key "name"`, `name is missing; add name = "..." describing the product`)
	} else if name, ok := c.str(`key "name"`, "name", raw.Name); ok {
		if strings.TrimSpace(name) == "" {
			c.errf(`key "name"`, `name is empty; describe the product, e.g. name = "Bakery shortening"`)
		}
		s.Name = name
	}
	if !raw.Batch.set {
		c.errf(`key "batch"`, "batch is missing; add batch = <tonnes>, e.g. batch = 25.0")
	} else if b, ok := c.num(`key "batch"`, "batch", raw.Batch); ok {
		c.batch(b)
		s.Batch = b
	}
	for _, key := range []string{"limits", "use"} {
		if t := md.Type(key); t != "" && t != "Hash" {
			c.errf(fmt.Sprintf("key %q", key), "%s must be a table; write [%s] and then one line per entry, e.g. %s", key, key,
				map[string]string{"limits": "iv = { min = 38, max = 48 }", "use": `"pko" = { max = 25 }`}[key])
		}
	}
	for _, name := range sortedKeys(raw.Limits) {
		p := raw.Limits[name]
		if name == "sfc" {
			c.sfcLimits(md, s, p)
			continue
		}
		where := fmt.Sprintf("limit %q", name)
		if !c.limitName(where, name) {
			var skip rawBound
			_ = md.PrimitiveDecode(p, &skip) // mark min/max as seen: the name is reported here
			continue
		}
		if b, ok := c.bound(md, where, p, LimitQuantity(name), tomlKey(name)); ok {
			s.Limits = append(s.Limits, Limit{Name: name, Bound: b})
		}
	}
	for _, id := range sortedKeys(raw.Use) {
		where := fmt.Sprintf("use %q", id)
		b, ok := c.bound(md, where, raw.Use[id], QtyPercent, tomlKey(id))
		if !c.useStock(where, id, cat) {
			ok = false
		}
		if ok {
			s.Use = append(s.Use, Use{Stock: id, Bound: b})
		}
	}
	c.useMinimums(s.Use)
	if raw.Rules != nil {
		s.Rules = c.rules(*raw.Rules)
	}
	if raw.Process != nil {
		s.Process = c.process(md, *raw.Process, cat)
	}
	s.SortLimits()
	return s
}

func (c *collector) sfcLimits(md toml.MetaData, s *Spec, p toml.Primitive) {
	var temps map[string]toml.Primitive
	if err := md.PrimitiveDecode(p, &temps); err != nil || (md.Type("limits", "sfc") != "" && md.Type("limits", "sfc") != "Hash") {
		c.errf(`limit "sfc"`, `limits.sfc must be a table of temperatures; write [limits.sfc] and then lines such as "20" = { min = 38, max = 48 }`)
		return
	}
	seen := map[float64]string{}
	for _, k := range sortedKeys(temps) {
		where := fmt.Sprintf("limit \"sfc.%s\"", k)
		t, ok := c.temp(where, "limits.sfc", k)
		b, bok := c.bound(md, where, temps[k], QtyPercent, tomlKey(k))
		if !ok || !bok {
			continue
		}
		if prev, dup := seen[t]; dup {
			c.errf(where, "limits.sfc keys %q and %q are the same temperature; keep one", prev, k)
			continue
		}
		seen[t] = k
		s.SFC = append(s.SFC, SFCLimit{Temp: t, Bound: b})
	}
}

func (c *collector) rules(r rawRules) Rules {
	var out Rules
	const where = "[rules]"
	if v, ok := c.num(where, "max_stocks", r.MaxStocks); ok && c.maxStocks(where, v) {
		out.MaxStocks = int(v)
	}
	share := r.SmallestShare
	if r.OldName.set {
		if r.SmallestShare.set {
			c.errf(where, "both smallest_share and min_if_used are given; min_if_used is the old name of smallest_share: keep only smallest_share")
			return out
		}
		c.warnf(where, "min_if_used is the old name of smallest_share (the smallest share a stock may have if it is used at all); it is read in this release only: rename it to smallest_share")
		share = r.OldName
	}
	if v, ok := c.num(where, "smallest_share", share); ok && c.smallestShare(where, v) {
		out.SmallestShare = v
	}
	return out
}

func (c *collector) process(md toml.MetaData, r rawProcess, cat *Catalogue) *Process {
	const where = "[process]"
	p := &Process{SFC: "predicted"}
	if !r.Interesterify.set {
		c.errf(where, `interesterify is missing; list the stocks that go through the reactor, e.g. interesterify = ["ps-h", "pko-r"]`)
	} else if arr, ok := r.Interesterify.v.([]any); !ok {
		c.errf(where, `interesterify must be an array of stock ids, e.g. ["ps-h", "pko-r"], not %s`, describe(r.Interesterify.v))
	} else {
		if len(arr) == 0 {
			c.feedEmpty(where)
		}
		seen := map[string]bool{}
		for _, a := range arr {
			id, ok := a.(string)
			if !ok {
				c.errf(where, "interesterify entries must be stock ids in quotes, not %s", describe(a))
				continue
			}
			if c.feedStock(where, id, seen, cat) {
				p.Interesterify = append(p.Interesterify, id)
			}
		}
	}
	if !r.Method.set {
		c.processMethod(where, "")
	} else if m, ok := c.str(where, "method", r.Method); ok {
		c.processMethod(where, m)
		p.Method = m
	}
	if v, ok := c.num(where, "cost", r.Cost); ok {
		c.processCost(where, v)
		p.Cost = v
	}
	if m, ok := c.str(where, "sfc", r.SFC); ok {
		c.processSFC(where, m)
		p.SFC = m
	}
	if md.IsDefined("process", "through") {
		if b, ok := c.bound(md, where+" through", r.Through, QtyPercent, "through"); ok {
			p.Through = &b
			c.processThrough(where, b)
		}
	}
	if r.FeedRatio.set {
		if r.FeedRatio.m == nil {
			c.errf(where, `feed_ratio must be a table of stock = parts, e.g. feed_ratio = { "ps-h" = 3, "pko-r" = 2 }, not %s`, describe(r.FeedRatio.raw))
		} else {
			ids := sortedKeys(r.FeedRatio.m)
			byID := make(map[string]float64, len(ids))
			good := true
			for _, id := range ids {
				f, ok := c.num(where+" feed_ratio", strconv.Quote(id), val{v: r.FeedRatio.m[id], set: true})
				if !ok {
					good = false
					continue
				}
				byID[id] = f
			}
			if good {
				// in the order of interesterify; names not in it are
				// reported by processFeedRatio, in sorted order
				for _, id := range p.Interesterify {
					if f, ok := byID[id]; ok {
						p.FeedRatio = append(p.FeedRatio, FeedPart{Stock: id, Parts: f})
						delete(byID, id)
					}
				}
				for _, id := range ids {
					if f, ok := byID[id]; ok {
						p.FeedRatio = append(p.FeedRatio, FeedPart{Stock: id, Parts: f})
					}
				}
				c.processFeedRatio(where, p)
			}
		}
	}
	return p
}

// processThrough reports a share through the reactor that no blend can
// take: a minimum of 0 or a maximum of 0 says nothing a practitioner means
// (no [process] table, or the optimiser's own choice, does that).
func (c *collector) processThrough(where string, b Bound) bool {
	if b.HasMax() && b.Max <= 0 {
		c.errf(where, "through max = %g lets nothing through the reactor; remove the [process] table instead", b.Max)
		return false
	}
	if b.HasMin() && b.Min <= 0 && !b.HasMax() {
		c.errf(where, "through min = %g asks for nothing; give a share above 0 %% of the batch, e.g. through = { min = 30 }, or remove through", b.Min)
		return false
	}
	return true
}

// processFeedRatio reports a fixed feed that does not name exactly the
// stocks of interesterify, or a part that is not a positive number.
func (c *collector) processFeedRatio(where string, p *Process) bool {
	good := true
	listed := make(map[string]bool, len(p.Interesterify))
	for _, id := range p.Interesterify {
		listed[id] = true
	}
	given := make(map[string]bool, len(p.FeedRatio))
	for _, f := range p.FeedRatio {
		given[f.Stock] = true
		switch {
		case !listed[f.Stock]:
			c.errf(where, "feed_ratio gives parts for %q, which is not in interesterify; add it there or remove it from feed_ratio", f.Stock)
			good = false
		case !c.finite(where+" feed_ratio", f.Stock, f.Parts):
			good = false
		case f.Parts <= 0:
			c.errf(where, "feed_ratio %q = %g: parts must be above 0; to feed none of it, remove it from interesterify and feed_ratio", f.Stock, f.Parts)
			good = false
		case f.Parts > 1e6:
			c.errf(where, "feed_ratio %q = %g is outside the accepted range (above 0, at most 1e6 parts); give the parts as small numbers, e.g. 3 and 2", f.Stock, f.Parts)
			good = false
		}
	}
	for _, id := range p.Interesterify {
		if len(p.FeedRatio) > 0 && !given[id] {
			c.errf(where, "feed_ratio gives no parts for %q of interesterify; give every feed stock its parts, or remove feed_ratio to let the blend decide the feed", id)
			good = false
		}
	}
	return good
}
