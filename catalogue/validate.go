package catalogue

import (
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"github.com/BurntSushi/toml"
)

// Tolerances of the composition checks (DESIGN section 3).
const (
	sumTolerance = 1.0 // a profile summing outside 100 +- 1 is an error
	sumWarn      = 0.3 // beyond 100 +- 0.3 it is a warning
	// sn13Floor is how far below zero the sn-1,3 share implied by an sn-2
	// analysis, x13 = (3x - x2)/2 (1,3-random-2-random), may fall before we
	// warn, in mol%; it allows for analytical scatter (common practice).
	sn13Floor = -1.0
	minTemp   = -40.0
	maxTemp   = 100.0
)

// validID reports whether id matches [a-z0-9-]+.
func validID(id string) bool {
	if id == "" {
		return false
	}
	for _, r := range id {
		if !(r >= 'a' && r <= 'z' || r >= '0' && r <= '9' || r == '-') {
			return false
		}
	}
	return true
}

// describe names the TOML type of a wrongly typed value for a message.
func describe(v any) string {
	switch x := v.(type) {
	case string:
		if len(x) > 40 {
			x = x[:40] + "..."
		}
		return fmt.Sprintf("a string (%q)", x)
	case bool:
		return fmt.Sprintf("a boolean (%v)", x)
	case int64:
		return fmt.Sprintf("an integer (%d)", x)
	case float64:
		return fmt.Sprintf("a number (%v)", x)
	case []any, []map[string]any:
		return "an array"
	case map[string]any:
		return "a table"
	case time.Time:
		return "a date or time"
	case nil:
		return "nothing"
	}
	return fmt.Sprintf("a %T", v)
}

// num reads a finite number. It returns ok false when the value is absent or
// wrong (the latter reported under where, naming label).
func (c *collector) num(where, label string, x val) (float64, bool) {
	if !x.set {
		return 0, false
	}
	var f float64
	switch v := x.v.(type) {
	case int64:
		f = float64(v)
	case float64:
		f = v
	default:
		c.errf(where, "%s must be a number, not %s; write a plain number without quotes", label, describe(x.v))
		return 0, false
	}
	if math.IsNaN(f) || math.IsInf(f, 0) {
		c.errf(where, "%s = %v is not a finite number; give a plain number", label, f)
		return 0, false
	}
	return f, true
}

// magnitude reports v under where when it is outside the accepted range of
// q (Quantity.Check), with an optional hint; it returns whether v is good.
func (c *collector) magnitude(where string, q Quantity, label string, v float64, hint string) bool {
	err := q.Check(label, v)
	if err == nil {
		return true
	}
	if hint != "" {
		c.errf(where, "%v; %s", err, hint)
	} else {
		c.errf(where, "%v", err)
	}
	return false
}

// str reads a string value; ok false when absent or not a string (reported).
func (c *collector) str(where, label string, x val) (string, bool) {
	if !x.set {
		return "", false
	}
	s, ok := x.v.(string)
	if !ok {
		c.errf(where, "%s must be a string in double quotes, not %s", label, describe(x.v))
		return "", false
	}
	return s, true
}

func stockLabel(i int, id val) string {
	if s, ok := id.v.(string); ok && s != "" {
		return fmt.Sprintf("stock %q", s)
	}
	return fmt.Sprintf("stock #%d", i+1)
}

func sortedKeys(m map[string]any) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// stocks converts and checks a decoded catalogue.
func (c *collector) stocks(raw rawStocks) *Catalogue {
	cat := &Catalogue{Currency: "EUR"}
	if raw.Currency.set {
		s, ok := c.str(`key "currency"`, "currency", raw.Currency)
		if ok && strings.TrimSpace(s) == "" {
			c.errf(`key "currency"`, `currency is empty; write e.g. currency = "EUR" or leave it out`)
		} else if ok {
			cat.Currency = s
		}
	}
	if len(raw.Stock) == 0 {
		c.errf("", "no stocks: add at least one [[stock]] table with id, price and [stock.fatty_acids]")
	}
	seen := map[string]int{}
	for i, rs := range raw.Stock {
		s := c.stock(i, rs)
		if s.ID != "" {
			if j, dup := seen[s.ID]; dup {
				c.errf(fmt.Sprintf("stock #%d", i+1), "id %q is already used by stock #%d; give each stock its own id", s.ID, j+1)
			} else {
				seen[s.ID] = i
			}
		}
		cat.Stocks = append(cat.Stocks, s)
	}
	return cat
}

func (c *collector) stock(i int, rs rawStock) Stock {
	where := stockLabel(i, rs.ID)
	s := Stock{Available: math.Inf(1)}
	if !rs.ID.set {
		c.errf(where, `id is missing; add id = "..." (lower-case letters, digits and -)`)
	} else if id, ok := c.str(where, "id", rs.ID); ok {
		if validID(id) {
			s.ID = id
		} else {
			c.errf(where, "id %q may use only lower-case letters a-z, digits 0-9 and '-' (e.g. \"pko-r\"); rename it", id)
		}
	}
	if name, ok := c.str(where, "name", rs.Name); ok {
		s.Name = name
	}
	if !rs.Price.set {
		c.errf(where, "price is missing; add price = <currency per tonne>, e.g. price = 1150.0")
	} else if p, ok := c.num(where, "price", rs.Price); ok {
		if c.magnitude(where, QtyPrice, "price", p, "give the price in currency per tonne") {
			s.Price = p
		}
	}
	if a, ok := c.num(where, "available", rs.Available); ok {
		if c.magnitude(where, QtyOnHand, "available", a, "give tonnes on hand, or leave it out for unlimited purchase") {
			s.Available = a
		}
	}
	if !rs.FattyAcids.set {
		c.errf(where, "fatty_acids is missing; add a [stock.fatty_acids] table of wt%% as FAME, e.g. \"C16:0\" = 44.0")
	} else if fa, ok := c.faMap(where, "fatty_acids", rs.FattyAcids); ok {
		s.FattyAcids = fa
		if len(fa) == 0 {
			c.errf(where, "fatty_acids is empty; list the wt%% of each fatty acid as FAME")
		} else {
			c.checkSum(where, "fatty_acids", "wt%", fa, true)
		}
	}
	if rs.SN2.set {
		if sn2, ok := c.faMap(where, "sn2", rs.SN2); ok && len(sn2) > 0 {
			s.SN2 = sn2
			c.checkSum(where, "sn2", "mol%", sn2, false)
			if s.FattyAcids != nil {
				c.checkSN2(where, s.FattyAcids, sn2)
			}
		}
	}
	if rs.SFC.set {
		s.SFC = c.curve(where, rs.SFC)
	}
	if rs.TAGs.set {
		s.TAGs = c.tags(where, rs.TAGs)
	}
	if s.Name == "" {
		s.Name = s.ID
	}
	return s
}

// faMap reads a table keyed by fatty-acid shorthand with non-negative values.
func (c *collector) faMap(where, table string, lm leafMap) (map[string]float64, bool) {
	if lm.m == nil {
		c.errf(where, "%s must be a table, not %s; write [stock.%s] and then lines such as \"C16:0\" = 44.0", table, describe(lm.raw), table)
		return nil, false
	}
	out := map[string]float64{}
	good := true
	for _, k := range sortedKeys(lm.m) {
		if _, ok := Lookup(k); !ok {
			msg := fmt.Sprintf("%s: unknown fatty-acid key %q;", table, k)
			if s, ok := c.suggest(k, Keys()); ok {
				msg += fmt.Sprintf(" did you mean %q?", s)
			}
			c.errf(where, "%s known keys are %s", msg, strings.Join(Keys(), ", "))
			good = false
			continue
		}
		label := fmt.Sprintf("%s %q", table, k)
		f, ok := c.num(where, label, val{v: lm.m[k], set: true})
		if !ok {
			good = false
			continue
		}
		if f < 0 {
			c.errf(where, "%s = %g is negative; use 0 or remove the entry", label, f)
			good = false
			continue
		}
		out[k] = f
	}
	return out, good
}

// checkSum reports a profile that does not sum to 100: an error outside
// +-1, a warning outside +-0.3 when warn is set.
func (c *collector) checkSum(where, table, unit string, m map[string]float64, warn bool) {
	var sum float64
	for _, v := range m {
		sum += v
	}
	d := math.Abs(sum - 100)
	switch {
	case d > sumTolerance:
		c.errf(where, "%s sum to %.2f %s, not 100 +- %.1f; correct the values or add the missing entries", table, sum, unit, sumTolerance)
	case warn && d > sumWarn:
		c.warnf(where, "%s sum to %.2f %s (more than %.1f away from 100); check the analysis", table, sum, unit, sumWarn)
	}
}

// checkSN2 compares an sn-2 analysis with the whole-fat profile: every acid
// at sn-2 must occur in the fat, and the sn-1,3 share implied by the
// 1,3-random-2-random relation x13 = (3x - x2)/2 (Vander Wal; Coleman), with
// x the acid's mol% in the whole fat, should not be negative.
func (c *collector) checkSN2(where string, fa, sn2 map[string]float64) {
	mol := MolPercent(fa)
	for _, k := range SortedKeys(sn2) {
		x2 := sn2[k]
		if x2 <= 0 {
			continue
		}
		if fa[k] <= 0 {
			c.errf(where, "sn2 %q = %g mol%% but fatty_acids has no %s; add it to fatty_acids or remove it from sn2", k, x2, k)
			continue
		}
		x := mol[k]
		if x13 := (3*x - x2) / 2; x13 < sn13Floor {
			c.warnf(where, "sn2 %q = %.1f mol%% is more than three times its share of the whole fat (%.1f mol%%), leaving %.1f mol%% at sn-1,3; check the sn-2 analysis", k, x2, x, x13)
		}
	}
}

// MolPercent converts a FAME profile in wt% into mol% of fatty acids using the
// methyl esters' molar masses (GC area% ~ wt% FAME, DESIGN section 5).
// Unknown keys are skipped.
func MolPercent(fa map[string]float64) map[string]float64 {
	out := map[string]float64{}
	var total float64
	for k, w := range fa {
		f, ok := Lookup(k)
		if !ok || w <= 0 {
			continue
		}
		n := w / f.EsterMolarMass()
		out[k] = n
		total += n
	}
	for k := range out {
		out[k] *= 100 / total
	}
	return out
}

// temp reads an SFC temperature key in deg C.
func (c *collector) temp(where, label, key string) (float64, bool) {
	t, err := ParseTemp(key)
	if err != nil || math.IsNaN(t) || math.IsInf(t, 0) {
		c.errf(where, "%s key %q is not a temperature; keys are degrees C in quotes, e.g. \"20\" or \"37.5\"", label, key)
		return 0, false
	}
	if t < minTemp || t > maxTemp {
		c.errf(where, "%s temperature %q is outside %g..%g C; check the key", label, key, minTemp, maxTemp)
		return 0, false
	}
	return t, true
}

// curve reads a measured SFC table.
func (c *collector) curve(where string, lm leafMap) Curve {
	if lm.m == nil {
		c.errf(where, "sfc must be a table, not %s; write [stock.sfc] and then lines such as \"20\" = 26.0", describe(lm.raw))
		return nil
	}
	var out Curve
	seen := map[float64]string{}
	for _, k := range sortedKeys(lm.m) {
		t, ok := c.temp(where, "sfc", k)
		if !ok {
			continue
		}
		label := fmt.Sprintf("sfc %q", k)
		v, ok := c.num(where, label, val{v: lm.m[k], set: true})
		if !ok {
			continue
		}
		if v < 0 || v > 100 {
			c.errf(where, "%s = %g is outside 0..100 %% solid; check the value", label, v)
			continue
		}
		if prev, dup := seen[t]; dup {
			c.errf(where, "sfc keys %q and %q are the same temperature; keep one", prev, k)
			continue
		}
		seen[t] = k
		out = append(out, Point{Temp: t, Solid: v})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Temp < out[j].Temp })
	for i := 1; i < len(out); i++ {
		if out[i].Solid > out[i-1].Solid {
			c.warnf(where, "sfc rises from %g %% at %s C to %g %% at %s C; solid fat should not increase with temperature, check the measurement",
				out[i-1].Solid, TempKey(out[i-1].Temp), out[i].Solid, TempKey(out[i].Temp))
		}
	}
	if len(out) == 0 {
		return nil
	}
	return out
}

// tags reads a measured TAG profile keyed by letter code (sn-1, sn-2, sn-3).
func (c *collector) tags(where string, lm leafMap) map[string]float64 {
	if lm.m == nil {
		c.errf(where, "tags must be a table, not %s; write [stock.tags] and then lines such as \"POP\" = 23.1", describe(lm.raw))
		return nil
	}
	out := map[string]float64{}
	good := true
	for _, k := range sortedKeys(lm.m) {
		if _, err := ParseTAGCode(k); err != nil {
			c.errf(where, "tags: %v; write three letter codes in sn-1, sn-2, sn-3 order, e.g. \"POP\"", err)
			good = false
			continue
		}
		label := fmt.Sprintf("tags %q", k)
		v, ok := c.num(where, label, val{v: lm.m[k], set: true})
		if !ok {
			good = false
			continue
		}
		if v < 0 {
			c.errf(where, "%s = %g is negative; use 0 or remove the entry", label, v)
			good = false
			continue
		}
		out[k] = v
	}
	if !good || len(out) == 0 {
		return nil
	}
	c.checkSum(where, "tags", "mol%", out, false)
	return out
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
	for _, side := range []struct {
		name string
		v    float64
		set  bool
	}{{"min", b.Min, rb.Min.set}, {"max", b.Max, rb.Max.set}} {
		if side.set && !c.magnitude(where, q, side.name, side.v, "") {
			good = false
		}
	}
	if b.HasMin() && b.HasMax() && b.Min > b.Max {
		c.errf(where, "min = %g is above max = %g; swap or correct them", b.Min, b.Max)
		good = false
	}
	return b, good
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
		c.magnitude(`key "batch"`, QtyTonnes, "batch", b, "give the tonnes of one batch")
		s.Batch = b
	}
	for _, key := range []string{"limits", "use"} {
		if t := md.Type(key); t != "" && t != "Hash" {
			c.errf(fmt.Sprintf("key %q", key), "%s must be a table; write [%s] and then one line per entry, e.g. %s", key, key,
				map[string]string{"limits": "iv = { min = 38, max = 48 }", "use": `"pko" = { max = 25 }`}[key])
		}
	}
	for _, name := range sortedPrims(raw.Limits) {
		p := raw.Limits[name]
		if name == "sfc" {
			c.sfcLimits(md, s, p)
			continue
		}
		where := fmt.Sprintf("limit %q", name)
		if !IsProperty(name) {
			if _, ok := Lookup(name); !ok {
				msg := fmt.Sprintf("unknown limit %q; limits are %s, sfc, or a fatty-acid key such as \"C18:2\"", name, strings.Join(Properties, ", "))
				if sug, ok := c.suggest(name, limitNames()); ok {
					msg += fmt.Sprintf("; did you mean %q?", sug)
				}
				c.errf(where, "%s", msg)
				var skip rawBound
				_ = md.PrimitiveDecode(p, &skip) // mark min/max as seen: the name is reported here
				continue
			}
		}
		if b, ok := c.bound(md, where, p, LimitQuantity(name), tomlKey(name)); ok {
			s.Limits = append(s.Limits, Limit{Name: name, Bound: b})
		}
	}
	for _, id := range sortedPrims(raw.Use) {
		where := fmt.Sprintf("use %q", id)
		b, ok := c.bound(md, where, raw.Use[id], QtyPercent, tomlKey(id))
		if cat != nil {
			if _, found := cat.Find(id); !found {
				c.errf(where, "no stock %q in %s; %s", id, catName(cat), c.stockHint(id, cat))
				ok = false
			}
		}
		if ok {
			s.Use = append(s.Use, Use{Stock: id, Bound: b})
		}
	}
	var minSum float64
	var mins []string
	for _, u := range s.Use {
		if u.HasMin() && u.Min > 0 {
			minSum += u.Min
			mins = append(mins, fmt.Sprintf("%s %g", u.Stock, u.Min))
		}
	}
	if minSum > 100+1e-9 {
		c.errf("[use]", "the minimum shares add up to %g %% of the batch (%s), more than 100 %%; lower some of them", minSum, strings.Join(mins, ", "))
	}
	if raw.Rules != nil {
		s.Rules = c.rules(*raw.Rules)
	}
	if raw.Process != nil {
		s.Process = c.process(*raw.Process, cat)
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
	for _, k := range sortedPrims(temps) {
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
	if v, ok := c.num(where, "max_stocks", r.MaxStocks); ok {
		switch {
		case v != math.Trunc(v):
			c.errf(where, "max_stocks = %g must be a whole number of stocks", v)
		case v < 1:
			c.errf(where, "max_stocks = %g must be at least 1", v)
		case v > 1e6:
			c.errf(where, "max_stocks = %g is implausibly large; give the number of stocks allowed", v)
		default:
			out.MaxStocks = int(v)
		}
	}
	if v, ok := c.num(where, "min_if_used", r.MinIfUsed); ok {
		if v <= 0 || v > 100 {
			c.errf(where, "min_if_used = %g must be above 0 and at most 100 (%% of batch)", v)
		} else {
			out.MinIfUsed = v
		}
	}
	return out
}

func (c *collector) process(r rawProcess, cat *Catalogue) *Process {
	const where = "[process]"
	p := &Process{SFC: "predicted"}
	if !r.Interesterify.set {
		c.errf(where, `interesterify is missing; list the stocks that go through the reactor, e.g. interesterify = ["ps-h", "pko-r"]`)
	} else if arr, ok := r.Interesterify.v.([]any); !ok {
		c.errf(where, `interesterify must be an array of stock ids, e.g. ["ps-h", "pko-r"], not %s`, describe(r.Interesterify.v))
	} else {
		if len(arr) == 0 {
			c.errf(where, "interesterify is empty; list at least one stock id, or remove [process]")
		}
		seen := map[string]bool{}
		for _, a := range arr {
			id, ok := a.(string)
			if !ok {
				c.errf(where, "interesterify entries must be stock ids in quotes, not %s", describe(a))
				continue
			}
			if seen[id] {
				c.errf(where, "interesterify lists %q twice; list each stock once", id)
				continue
			}
			seen[id] = true
			if cat != nil {
				if _, found := cat.Find(id); !found {
					c.errf(where, "interesterify names %q, which is not in %s; %s", id, catName(cat), c.stockHint(id, cat))
					continue
				}
			}
			p.Interesterify = append(p.Interesterify, id)
		}
	}
	if !r.Method.set {
		c.errf(where, `method is missing; add method = "chemical" (random) or "enzymatic" (sn-1,3 lipase)`)
	} else if m, ok := c.str(where, "method", r.Method); ok {
		if m != "chemical" && m != "enzymatic" {
			c.errf(where, `method %q is not known; use "chemical" or "enzymatic"`, m)
		}
		p.Method = m
	}
	if v, ok := c.num(where, "cost", r.Cost); ok {
		c.magnitude(where, QtyPrice, "cost", v, "give the processing cost per tonne")
		p.Cost = v
	}
	if m, ok := c.str(where, "sfc", r.SFC); ok {
		if m != "measured" && m != "predicted" {
			c.errf(where, `sfc %q is not known; use "measured" (linear in the stocks' curves) or "predicted" (TAG model)`, m)
		}
		p.SFC = m
	}
	return p
}

// orders converts and checks a decoded orders file, loading each spec.
func (c *collector) orders(raw rawOrders, dir string, cat *Catalogue) *Orders {
	out := &Orders{}
	if len(raw.Order) == 0 {
		c.errf("", "no orders: add at least one [[order]] table with spec = \"file.toml\" and tonnes")
	}
	specs := map[string]*Spec{} // by path
	for i, ro := range raw.Order {
		where := fmt.Sprintf("order #%d", i+1)
		var o Order
		good := true
		if !ro.Tonnes.set {
			c.errf(where, "tonnes is missing; add tonnes = <amount to make>")
			good = false
		} else if t, ok := c.num(where, "tonnes", ro.Tonnes); !ok {
			good = false
		} else if !c.magnitude(where, QtyTonnes, "tonnes", t, "give the tonnes to make") {
			good = false
		} else {
			o.Tonnes = t
		}
		if !ro.Spec.set {
			c.errf(where, `spec is missing; add spec = "path/to/spec.toml" (relative to this file)`)
			continue
		}
		p, ok := c.str(where, "spec", ro.Spec)
		if !ok {
			continue
		}
		if strings.TrimSpace(p) == "" {
			c.errf(where, "spec is empty; give the path of a spec file")
			continue
		}
		if !filepath.IsAbs(p) {
			p = filepath.Join(dir, p)
		}
		// each spec file is read once, however many orders name it, and its
		// problems are reported under the first of them
		spec, seen := specs[p]
		if !seen {
			var ps Problems
			spec, ps = LoadSpec(p, cat)
			specs[p] = spec
			for _, sp := range ps {
				// say which line of the orders file led to the spec file
				sp.Msg += fmt.Sprintf(" (spec of %s in %s)", where, c.file)
				c.add(sp)
			}
		}
		if spec == nil || !good {
			continue
		}
		if seen {
			spec = spec.Clone()
		}
		o.Spec, o.Path = spec, p
		out.Orders = append(out.Orders, o)
	}
	if raw.Purchase.set {
		if raw.Purchase.m == nil {
			c.errf("[purchase]", "purchase must be a table of prices by stock id, e.g. [purchase] then \"pko-r\" = 1350.0")
		} else {
			out.Purchase = map[string]float64{}
			for _, id := range sortedKeys(raw.Purchase.m) {
				where := fmt.Sprintf("purchase %q", id)
				v, ok := c.num(where, "price", val{v: raw.Purchase.m[id], set: true})
				if !ok {
					continue
				}
				if !c.magnitude(where, QtyPrice, "price", v, "") {
					continue
				}
				if cat != nil {
					if _, found := cat.Find(id); !found {
						c.errf(where, "no stock %q in %s; %s", id, catName(cat), c.stockHint(id, cat))
						continue
					}
				}
				out.Purchase[id] = v
			}
		}
	}
	return out
}

func sortedPrims(m map[string]toml.Primitive) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

func catName(cat *Catalogue) string {
	if cat.File != "" {
		return cat.File
	}
	return "the stock catalogue"
}

// stockHint suggests the nearest stock id, or lists the ids.
func (c *collector) stockHint(id string, cat *Catalogue) string {
	ids := make([]string, len(cat.Stocks))
	for i, s := range cat.Stocks {
		ids[i] = s.ID
	}
	if s, ok := c.suggest(id, ids); ok {
		return fmt.Sprintf("did you mean %q?", s)
	}
	if len(ids) > 20 {
		ids = append(ids[:20:20], "...")
	}
	return "stock ids are " + strings.Join(ids, ", ")
}

// suggest is the package's suggest while the file's problems are still
// listed one by one.
func (c *collector) suggest(s string, cands []string) (string, bool) {
	if c.full() {
		return "", false
	}
	return suggest(s, cands)
}

// suggest returns the candidate nearest to s (ignoring case and spaces) when
// it is close and unambiguous, by optimal-string-alignment edit distance.
func suggest(s string, cands []string) (string, bool) {
	norm := func(x string) string { return strings.ToLower(strings.Join(strings.Fields(x), "")) }
	ns := []rune(norm(s))
	if len(ns) > 64 {
		return "", false
	}
	best, bestD, tie := "", math.MaxInt, false
	for _, cand := range cands {
		d := editDistance(ns, []rune(norm(cand)))
		switch {
		case d < bestD:
			best, bestD, tie = cand, d, false
		case d == bestD:
			tie = true
		}
	}
	limit := 2
	if len(ns) <= 3 {
		limit = 1
	}
	if best == "" || tie || bestD > limit {
		return "", false
	}
	return best, true
}

// editDistance is the optimal string alignment distance (Levenshtein with
// adjacent transpositions).
func editDistance(a, b []rune) int {
	d := make([][]int, len(a)+1)
	for i := range d {
		d[i] = make([]int, len(b)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(a); i++ {
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			d[i][j] = min(d[i-1][j]+1, d[i][j-1]+1, d[i-1][j-1]+cost)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
				d[i][j] = min(d[i][j], d[i-2][j-2]+1)
			}
		}
	}
	return d[len(a)][len(b)]
}
