package catalogue

import (
	"cmp"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	"sync"

	"github.com/BurntSushi/toml"
)

// The stock catalogue (stocks.toml; README, "File formats"): its types,
// decoding and checks.

// Point is one measured SFC value: percent solid at a temperature in deg C.
type Point struct {
	Temp  float64
	Solid float64
}

// Curve is a measured SFC curve sorted by temperature.
type Curve []Point

// sortByTemp orders the points by temperature (without sort.Slice's
// reflection: the loader sorts every stock's curve).
func (c Curve) sortByTemp() {
	slices.SortFunc(c, func(a, b Point) int { return cmp.Compare(a.Temp, b.Temp) })
}

// At interpolates the curve linearly at temperature t. It reports false when t
// lies outside the measured range (no extrapolation) or the curve is empty.
func (c Curve) At(t float64) (float64, bool) {
	if len(c) == 0 {
		return 0, false
	}
	const eps = 1e-9
	if t < c[0].Temp-eps || t > c[len(c)-1].Temp+eps {
		return 0, false
	}
	for i, p := range c {
		if math.Abs(p.Temp-t) <= eps {
			return p.Solid, true
		}
		if i > 0 && t < p.Temp {
			q := c[i-1]
			f := (t - q.Temp) / (p.Temp - q.Temp)
			return q.Solid + f*(p.Solid-q.Solid), true
		}
	}
	return 0, false
}

// Stock is one oil or fat the plant holds or can buy.
type Stock struct {
	ID         string
	Name       string
	Price      float64            // currency per tonne
	Available  float64            // tonnes on hand; +Inf when unlimited
	FattyAcids map[string]float64 // wt% as FAME, keys are shorthand
	SN2        map[string]float64 // mol% of each FA found at sn-2; nil when unknown
	SFC        Curve              // measured SFC; nil when unknown
	TAGs       map[string]float64 // measured TAG profile, mol% by letter code; nil when unknown
}

// Limited reports whether the stock has a finite availability.
func (s Stock) Limited() bool { return !math.IsInf(s.Available, 1) }

// Catalogue is a loaded stock catalogue.
type Catalogue struct {
	File     string // where it came from, for messages
	Currency string
	Stocks   []Stock
}

// Find returns the stock with the given id.
func (cat *Catalogue) Find(id string) (*Stock, bool) {
	for i := range cat.Stocks {
		if cat.Stocks[i].ID == id {
			return &cat.Stocks[i], true
		}
	}
	return nil, false
}

// Clone returns a deep copy, so that what-if edits never touch the original.
func (cat *Catalogue) Clone() *Catalogue {
	out := &Catalogue{File: cat.File, Currency: cat.Currency, Stocks: make([]Stock, len(cat.Stocks))}
	for i, s := range cat.Stocks {
		s.FattyAcids = cloneMap(s.FattyAcids)
		s.SN2 = cloneMap(s.SN2)
		s.TAGs = cloneMap(s.TAGs)
		s.SFC = append(Curve(nil), s.SFC...)
		out.Stocks[i] = s
	}
	return out
}

func cloneMap(m map[string]float64) map[string]float64 {
	if m == nil {
		return nil
	}
	out := make(map[string]float64, len(m))
	for k, v := range m {
		out[k] = v
	}
	return out
}

type rawStock struct {
	ID         val     `toml:"id"`
	Name       val     `toml:"name"`
	Price      val     `toml:"price"`
	Available  val     `toml:"available"`
	FattyAcids leafMap `toml:"fatty_acids"`
	SN2        leafMap `toml:"sn2"`
	SFC        leafMap `toml:"sfc"`
	TAGs       leafMap `toml:"tags"`
}

type rawStocks struct {
	Currency val        `toml:"currency"`
	Stock    []rawStock `toml:"stock"`
}

// Known keys of the catalogue's fixed tables, in the order the messages list them.
var (
	keysStocksTop = []string{"currency", "stock"}
	keysStock     = []string{"id", "name", "price", "available", "fatty_acids", "sn2", "sfc", "tags"}
)

// Tolerances of the composition checks, stated with the file format
// (README, "File formats": fatty acids sum to 100 +- 1.0, a warning beyond
// 0.3).
const (
	sumTolerance = 1.0 // a profile summing outside 100 +- 1 is an error
	sumWarn      = 0.3 // beyond 100 +- 0.3 it is a warning
	// sn13Floor is how far below zero the sn-1,3 share implied by an sn-2
	// analysis, x13 = (3x - x2)/2 (1,3-random-2-random), may fall before we
	// warn, in mol%; it allows for analytical scatter (common practice).
	sn13Floor = -1.0
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

func stockLabel(i int, id val) string {
	if s, ok := id.v.(string); ok && s != "" {
		return fmt.Sprintf("stock %q", s)
	}
	return fmt.Sprintf("stock #%d", i+1)
}

// Check reports every problem of a catalogue built or edited in code, by
// the rules and in the words of ParseStocks (README, "File formats" and
// "Accepted magnitudes"): at least one stock, each id used once, and each
// stock's values as Stock.Check finds them. Problems name cat.File when set.
// What only a file can get wrong (a missing key, a value of the wrong type,
// two keys for one temperature) is the loader's alone.
func (cat *Catalogue) Check() Problems { return cat.check(true) }

// CheckModel reports what keeps the stocks from being columns of a model,
// in the words of Check: at least one stock; ids present, [a-z0-9-]+ and
// used once; price and amount on hand within the accepted magnitudes;
// fatty-acid amounts finite and >= 0; measured SFC points within -40..100 C
// and 0..100 % solid. The rest of Check (keys outside the reference table,
// which every property leaves out as blend.Profile does; the sums; the
// sn-2 analysis; the TAG profile) is for what a person writes, and the TAG
// model checks the profiles it uses (Stock.CheckProfiles). The optimiser
// checks with it.
func (cat *Catalogue) CheckModel() Problems { return cat.check(false) }

// check is Check, or with typed unset CheckModel.
func (cat *Catalogue) check(typed bool) Problems {
	if cat == nil || len(cat.Stocks) == 0 {
		var c collector
		c.noStocks()
		return c.problems()
	}
	return checked(cat.File, func(c *collector) {
		for i := range cat.Stocks {
			s := &cat.Stocks[i]
			where := c.stockWhere(s)
			if s.ID == "" && !c.quiet {
				where = fmt.Sprintf("stock #%d", i+1)
			}
			c.stockValues(where, s, typed)
		}
		c.uniqueIDs(cat.Stocks)
	})
}

// uniqueIDs reports each stock whose id an earlier stock has. A sound
// catalogue of a few dozen stocks is checked pairwise, without a map.
func (c *collector) uniqueIDs(stocks []Stock) {
	if len(stocks) <= 64 {
		dup := false
		for i := range stocks {
			for j := range i {
				dup = dup || stocks[i].ID != "" && stocks[i].ID == stocks[j].ID
			}
		}
		if !dup {
			return
		}
	}
	seen := make(map[string]int, len(stocks))
	for i := range stocks {
		c.uniqueID(i, stocks[i].ID, seen)
	}
}

// Check reports every problem of one stock's values, by the rules and in
// the words of ParseStocks: its id, price and amount on hand within the
// accepted magnitudes, its fatty-acid, sn-2 and TAG profiles (known keys,
// amounts that are finite and >= 0, sums of 100 +- 1, an sn-2 analysis
// that fits the whole fat) and its measured SFC curve (temperatures within
// -40..100 C, 0..100 % solid, falling with temperature). A stock with no
// fatty-acid profile is no problem here (a stock known by its TAGs alone
// serves the TAG model): who needs the profile says so.
func (s *Stock) Check() Problems {
	return checked("", func(c *collector) { c.stockValues(c.stockWhere(s), s, true) })
}

// CheckProfiles reports what makes the stock's fatty-acid, sn-2 and TAG
// profiles unusable by a model, in the words of ParseStocks: a key not in
// the reference table or a TAG code that does not parse, and an amount that
// is not a finite number >= 0. Unlike Check it leaves the sums alone: the
// TAG model normalises its inputs and notes what it rescaled.
func (s *Stock) CheckProfiles() Problems {
	return checked("", func(c *collector) {
		where := c.stockWhere(s)
		c.profileEntries(where, "fatty_acids", s.FattyAcids)
		c.profileEntries(where, "sn2", s.SN2)
		c.tagEntries(where, s.TAGs)
	})
}

// stockWhere names stock s in a message.
func (c *collector) stockWhere(s *Stock) string {
	if s.ID == "" {
		return "stock"
	}
	return c.label("stock %q", s.ID)
}

// stockValues checks what Stock.Check checks, under where; with typed
// unset, what Catalogue.CheckModel checks of a stock.
func (c *collector) stockValues(where string, s *Stock, typed bool) {
	c.stockID(where, s.ID)
	c.price(where, s.Price)
	if s.Limited() {
		c.available(where, s.Available)
	}
	if typed {
		fa := len(s.FattyAcids) > 0 && c.profileEntries(where, "fatty_acids", s.FattyAcids)
		if fa {
			c.checkSum(where, "fatty_acids", "wt%", s.FattyAcids, true)
		}
		if len(s.SN2) > 0 && c.profileEntries(where, "sn2", s.SN2) {
			c.checkSum(where, "sn2", "mol%", s.SN2, false)
			if fa {
				c.checkSN2(where, s.FattyAcids, s.SN2)
			}
		}
	} else {
		c.profileAmounts(where, "fatty_acids", s.FattyAcids)
	}
	for _, p := range s.SFC {
		if c.tempRange(where, "sfc", "", p.Temp) {
			c.solid(where, "", p)
		}
	}
	if typed {
		c.curveFalls(where, s.SFC)
		if len(s.TAGs) > 0 && c.tagEntries(where, s.TAGs) {
			c.checkSum(where, "tags", "mol%", s.TAGs, false)
		}
	}
}

// noStocks reports a catalogue without stocks.
func (c *collector) noStocks() {
	c.errf("", "no stocks: add at least one [[stock]] table with id, price and [stock.fatty_acids]")
}

// uniqueID reports the id of stock i when an earlier stock has it; seen
// maps the ids met so far to their stock's position.
func (c *collector) uniqueID(i int, id string, seen map[string]int) {
	if id == "" {
		return
	}
	if j, dup := seen[id]; dup {
		c.errf(fmt.Sprintf("stock #%d", i+1), "id %q is already used by stock #%d; give each stock its own id", id, j+1)
		return
	}
	seen[id] = i
}

// stockID reports an id that is missing ("") or not [a-z0-9-]+.
func (c *collector) stockID(where, id string) bool {
	switch {
	case id == "":
		c.errf(where, `id is missing; add id = "..." (lower-case letters, digits and -)`)
	case !validID(id):
		c.errf(where, "id %q may use only lower-case letters a-z, digits 0-9 and '-' (e.g. \"pko-r\"); rename it", id)
	default:
		return true
	}
	return false
}

// price reports a stock's price outside the accepted magnitudes.
func (c *collector) price(where string, p float64) bool {
	return c.magnitude(where, QtyPrice, "price", p, "give the price in currency per tonne")
}

// available reports an amount on hand outside the accepted magnitudes.
func (c *collector) available(where string, a float64) bool {
	return c.magnitude(where, QtyOnHand, "available", a, "give tonnes on hand, or leave it out for unlimited purchase")
}

// acidKey reports a profile key that is not in the reference table.
func (c *collector) acidKey(where, table, key string) bool {
	if Rank(key) >= 0 {
		return true
	}
	msg := fmt.Sprintf("%s: unknown fatty-acid key %q;", table, key)
	if s, ok := c.suggest(key, Keys()); ok {
		msg += fmt.Sprintf(" did you mean %q?", s)
	}
	c.errf(where, "%s known keys are %s", msg, strings.Join(Keys(), ", "))
	return false
}

// amount reports an entry of a composition table (wt% or mol%) that is not
// a finite number >= 0; label names the entry, e.g. `fatty_acids "C16:0"`.
func (c *collector) amount(where, label string, v float64) bool {
	if !c.finite(where, label, v) {
		return false
	}
	if v < 0 {
		c.errf(where, "%s = %g is negative; use 0 or remove the entry", label, v)
		return false
	}
	return true
}

// profileEntries checks every entry of a table keyed by fatty acid (the
// fatty-acid or sn-2 profile), in key order; it reports whether all are good.
func (c *collector) profileEntries(where, table string, m map[string]float64) bool {
	return c.keyedAmounts(where, table, m, acidKnown, func(k string) bool { return c.acidKey(where, table, k) })
}

// profileAmounts checks the amounts of a profile, whatever its keys.
func (c *collector) profileAmounts(where, table string, m map[string]float64) bool {
	anyKey := func(string) bool { return true }
	return c.keyedAmounts(where, table, m, anyKey, anyKey)
}

// keyedAmounts checks every entry of a composition table: its key passes
// known (checkKey reports one that does not) and its amount is a finite
// number >= 0; it reports whether all are good. A table that is not all
// good is checked again key by key in key order, for the messages.
func (c *collector) keyedAmounts(where, table string, m map[string]float64, known, checkKey func(string) bool) bool {
	if leavesClean(m, asNumber, known, nil) { // the common case, without a sort or a message
		return true
	}
	clean := true
	for _, k := range sortedKeys(m) {
		if !checkKey(k) || !c.amount(where, fmt.Sprintf("%s %q", table, k), m[k]) {
			clean = false
		}
	}
	return clean
}

// acidKnown reports a key of the reference table, without a message.
func acidKnown(k string) bool { return Rank(k) >= 0 }

// tagKnown reports a TAG letter code that parses, without a message.
func tagKnown(k string) bool {
	_, err := ParseTAGCode(k)
	return err == nil
}

// tagCode reports a TAG letter code that does not parse.
func (c *collector) tagCode(where, code string) bool {
	if _, err := ParseTAGCode(code); err != nil {
		c.errf(where, "tags: %v; write three letter codes in sn-1, sn-2, sn-3 order, e.g. \"POP\"", err)
		return false
	}
	return true
}

// tagEntries checks every entry of a measured TAG profile, in key order.
func (c *collector) tagEntries(where string, m map[string]float64) bool {
	return c.keyedAmounts(where, "tags", m, tagKnown, func(k string) bool { return c.tagCode(where, k) })
}

// solid reports a point of a measured SFC curve outside 0..100 % solid;
// key is the temperature as the file wrote it ("" writes p.Temp).
func (c *collector) solid(where, key string, p Point) bool {
	if p.Solid >= 0 && p.Solid <= 100 {
		return true
	}
	if key == "" {
		key = TempKey(p.Temp)
	}
	c.errf(where, "sfc %q = %g is outside 0..100 %% solid; check the value", key, p.Solid)
	return false
}

// curveFalls warns where a measured curve (sorted by temperature) rises.
func (c *collector) curveFalls(where string, curve Curve) {
	for i := 1; i < len(curve); i++ {
		if curve[i].Solid > curve[i-1].Solid {
			c.warnf(where, "sfc rises from %g %% at %s C to %g %% at %s C; solid fat should not increase with temperature, check the measurement",
				curve[i-1].Solid, TempKey(curve[i-1].Temp), curve[i].Solid, TempKey(curve[i].Temp))
		}
	}
}

// ParseStocks decodes and validates a stock catalogue (README, "File formats").
// name is the file name used in messages. The catalogue is nil when any
// problem is an error; warnings come back with a usable catalogue.
//
// A document of clean shape is read by the fast reader (fastStocks), any
// other by the reference parser (parseStocks); both give the same
// catalogue and the same problems (TestFastStocksSame, FuzzFastTOML).
func ParseStocks(name string, data []byte) (*Catalogue, Problems) {
	if len(data) <= MaxInputBytes {
		if raw, ok := fastStocks(data); ok {
			c := &collector{file: name}
			cat := c.stocks(raw)
			if c.failed() {
				return nil, c.problems()
			}
			cat.File = name
			return cat, c.problems()
		}
	}
	cat, ps, _ := parseStocks(name, data)
	return cat, ps
}

// parseStocks is ParseStocks, with the reference parser's metadata of
// the file (for the in-place edit, patch.go).
func parseStocks(name string, data []byte) (*Catalogue, Problems, toml.MetaData) {
	c := &collector{file: name}
	var raw rawStocks
	md, ok := c.decode(data, &raw)
	if !ok {
		return nil, c.problems(), md
	}
	// Stock labels by document position: each [[stock]] header is one key "stock".
	labels := make([]string, len(raw.Stock))
	for i, s := range raw.Stock {
		labels[i] = stockLabel(i, s.ID)
	}
	tableOf, tables := arrayTables(md, "stock")
	c.unknownKeys(md,
		func(parent toml.Key) ([]string, bool) {
			switch {
			case len(parent) == 0:
				return keysStocksTop, true
			case len(parent) == 1 && parent[0] == "stock":
				return keysStock, true
			}
			return nil, false
		},
		func(i int, k toml.Key) string {
			if k[0] != "stock" || len(k) == 1 {
				return ""
			}
			if n := tableOf(i); n >= 0 && n < len(labels) && tables == len(labels) {
				return labels[n]
			}
			return "stock"
		})
	cat := c.stocks(raw)
	if c.failed() {
		return nil, c.problems(), md
	}
	cat.File = name
	return cat, c.problems(), md
}

// LoadStocks reads and parses a stock catalogue file.
func LoadStocks(path string) (*Catalogue, Problems) {
	data, err := ReadInput(path)
	if err != nil {
		return nil, readProblem(path, err, "stock catalogue")
	}
	return ParseStocks(path, data)
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
		c.noStocks()
	}
	cat.Stocks = c.eachStock(raw.Stock, splitStocksFrom)
	return cat
}

// splitStocksFrom is the number of stocks from which eachStock checks a
// catalogue's second half on a goroutine of its own: a stock takes some
// 10 µs, so a few dozen outweigh starting one.
const splitStocksFrom = 64

// eachStock converts and checks every stock in document order, each
// followed by the check of its id against those before it. From from
// stocks on, on a machine with two processors or more, the second half is
// checked at the same time on a collector of its own that marks where each
// stock's problems end; its problems then join c's one by one in document
// order, each stock's before its id check, by c.add, which keeps or drops
// each as it would have kept or dropped it in one pass (a problem's text
// does not depend on how many came before it; only whether it is kept
// does). The result is the one pass's, problem for problem
// (TestEachStockHalves).
func (c *collector) eachStock(raw []rawStock, from int) []Stock {
	if len(raw) == 0 {
		return nil
	}
	stocks := make([]Stock, len(raw))
	seen := make(map[string]int, len(raw))
	half := len(raw)
	if len(raw) >= from && runtime.GOMAXPROCS(0) > 1 {
		half = len(raw) / 2
	}
	tail := &collector{file: c.file, quiet: c.quiet}
	ends := make([]int, len(raw)-half) // len(tail.ps) after each stock of the tail
	var wg sync.WaitGroup
	if half < len(raw) {
		wg.Go(func() {
			for k, rs := range raw[half:] {
				stocks[half+k] = tail.stock(half+k, rs)
				ends[k] = len(tail.ps)
			}
		})
	}
	for i, rs := range raw[:half] {
		stocks[i] = c.stock(i, rs)
		c.uniqueID(i, stocks[i].ID, seen)
	}
	wg.Wait()
	start := 0
	reported := 0 // errors of the tail among its problems kept
	for k, end := range ends {
		for _, p := range tail.ps[start:end] {
			if !p.Warning {
				reported++
			}
			c.add(p)
		}
		start = end
		c.uniqueID(half+k, stocks[half+k].ID, seen)
	}
	// what the tail only counted (quiet, or beyond its own maxProblems,
	// when c is full as well) is counted the same way here
	c.errors += tail.errors - reported
	c.warnings += tail.warnings
	c.dropped += tail.dropped
	return stocks
}

func (c *collector) stock(i int, rs rawStock) Stock {
	where := stockLabel(i, rs.ID)
	s := Stock{Available: math.Inf(1)}
	if !rs.ID.set {
		c.stockID(where, "")
	} else if id, ok := c.str(where, "id", rs.ID); ok && c.stockID(where, id) {
		s.ID = id
	}
	if name, ok := c.str(where, "name", rs.Name); ok {
		s.Name = name
	}
	if !rs.Price.set {
		c.errf(where, "price is missing; add price = <currency per tonne>, e.g. price = 1150.0")
	} else if p, ok := c.num(where, "price", rs.Price); ok && c.price(where, p) {
		s.Price = p
	}
	if a, ok := c.num(where, "available", rs.Available); ok && c.available(where, a) {
		s.Available = a
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
	if lm.numbersClean(acidKnown) {
		return lm.f, true
	}
	lm = lm.untyped()
	if lm.m == nil {
		c.errf(where, "%s must be a table, not %s; write [stock.%s] and then lines such as \"C16:0\" = 44.0", table, describe(lm.raw), table)
		return nil, false
	}
	return c.leafAmounts(where, table, lm.m, acidKnown, func(k string) bool { return c.acidKey(where, table, k) })
}

// leafAmounts reads a decoded composition table whose keys pass known
// (checkKey reports one that does not) and whose values are finite
// numbers >= 0; it reports whether all are good (out then holds them all).
// A table that is not all good is read again key by key in key order, for
// the messages, and out holds the good entries.
func (c *collector) leafAmounts(where, table string, m map[string]any, known, checkKey func(string) bool) (map[string]float64, bool) {
	out := make(map[string]float64, len(m))
	if leavesClean(m, number, known, out) {
		return out, true // the common case, without a sort or a label
	}
	clear(out)
	good := true
	for _, k := range sortedKeys(m) {
		if !checkKey(k) {
			good = false
			continue
		}
		label := fmt.Sprintf("%s %q", table, k)
		f, ok := c.num(where, label, val{v: m[k], set: true})
		if !ok || !c.amount(where, label, f) {
			good = false
			continue
		}
		out[k] = f
	}
	return out, good
}

// leavesClean reads a table of leaves into out (unless out is nil) when
// every key passes keyOK and every value is a finite number >= 0 by num,
// the common case; it reports whether they all did (out is then
// complete). The callers then read a table that is not clean again, key by
// key in order, for the messages.
func leavesClean[V any](m map[string]V, num func(V) (float64, bool), keyOK func(string) bool, out map[string]float64) bool {
	for k, v := range m {
		f, ok := num(v)
		if !ok || !(f >= 0) || math.IsInf(f, 1) || !keyOK(k) {
			return false
		}
		if out != nil {
			out[k] = f
		}
	}
	return true
}

// curveClean reads a measured SFC table whose keys are all temperatures
// in range, distinct, with values (by num) in 0..100 % solid, the common
// case; ok false sends the caller to the reading key by key for the
// messages.
func curveClean[V any](m map[string]V, num func(V) (float64, bool)) (Curve, bool) {
	out := make(Curve, 0, len(m))
	for k, v := range m {
		t, err := ParseTemp(k)
		if err != nil || !(t >= MinTemp && t <= MaxTemp) {
			return nil, false
		}
		f, ok := num(v)
		if !ok || !(f >= 0 && f <= 100) {
			return nil, false
		}
		out = append(out, Point{Temp: t, Solid: f})
	}
	out.sortByTemp()
	for i := 1; i < len(out); i++ {
		if out[i].Temp == out[i-1].Temp {
			return nil, false
		}
	}
	if len(out) == 0 {
		return nil, true
	}
	return out, true
}

// checkSum reports a profile that does not sum to 100: an error outside
// +-1, a warning outside +-0.3 when warn is set.
func (c *collector) checkSum(where, table, unit string, m map[string]float64, warn bool) {
	sum := SumValues(m) // in a fixed order: the same file gets the same verdict every run
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
	var x [len(reference)]float64
	if molByRank(fa, &x) != nil {
		clear(x[:]) // a bad profile has its own messages; every acid counts as absent here
	}
	clean := true
	for k, x2 := range sn2 {
		if x2 <= 0 {
			continue
		}
		mol := 0.0 // mol% of k in the whole fat, as MolPercent gives it
		if r := Rank(k); r >= 0 {
			mol = 100 * x[r]
		}
		if fa[k] <= 0 || (3*mol-x2)/2 < sn13Floor {
			clean = false
			break
		}
	}
	if clean { // the common case, without a sort or a map
		return
	}
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

// curve reads a measured SFC table.
func (c *collector) curve(where string, lm leafMap) Curve {
	var out Curve
	var ok bool
	switch {
	case lm.f != nil:
		out, ok = curveClean(lm.f, asNumber)
	case lm.m != nil:
		out, ok = curveClean(lm.m, number)
	default:
		c.errf(where, "sfc must be a table, not %s; write [stock.sfc] and then lines such as \"20\" = 26.0", describe(lm.raw))
		return nil
	}
	if ok {
		c.curveFalls(where, out)
		return out
	}
	lm, out = lm.untyped(), nil
	seen := map[float64]string{}
	for _, k := range sortedKeys(lm.m) {
		t, ok := c.temp(where, "sfc", k)
		if !ok {
			continue
		}
		v, ok := c.num(where, fmt.Sprintf("sfc %q", k), val{v: lm.m[k], set: true})
		if !ok || !c.solid(where, k, Point{Temp: t, Solid: v}) {
			continue
		}
		if prev, dup := seen[t]; dup {
			c.errf(where, "sfc keys %q and %q are the same temperature; keep one", prev, k)
			continue
		}
		seen[t] = k
		out = append(out, Point{Temp: t, Solid: v})
	}
	out.sortByTemp()
	c.curveFalls(where, out)
	if len(out) == 0 {
		return nil
	}
	return out
}

// tags reads a measured TAG profile keyed by letter code (sn-1, sn-2, sn-3).
func (c *collector) tags(where string, lm leafMap) map[string]float64 {
	out, good := lm.f, lm.numbersClean(tagKnown)
	if !good {
		lm = lm.untyped()
		if lm.m == nil {
			c.errf(where, "tags must be a table, not %s; write [stock.tags] and then lines such as \"POP\" = 23.1", describe(lm.raw))
			return nil
		}
		out, good = c.leafAmounts(where, "tags", lm.m, tagKnown, func(k string) bool { return c.tagCode(where, k) })
	}
	if !good || len(out) == 0 {
		return nil
	}
	c.checkSum(where, "tags", "mol%", out, false)
	return out
}
