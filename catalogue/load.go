package catalogue

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
)

// This file decodes the three TOML files of DESIGN section 3 (stocks, spec,
// orders) into private raw structs, reports unknown keys by name, and hands
// the raw values to validate.go, which converts them and checks every rule.
// Every problem found is reported in one run; a value is returned only when
// there is no error (warnings may come with it).

// val captures one TOML value of any type so that a wrong type (price =
// "cheap") becomes a message of ours instead of stopping the decoder.
type val struct {
	v   any
	set bool
}

// UnmarshalTOML implements toml.Unmarshaler; it never fails.
func (x *val) UnmarshalTOML(data any) error {
	x.v = data
	x.set = true
	return nil
}

// leafMap captures a table of leaves keyed by user-chosen names (fatty-acid
// keys, temperatures, TAG codes, stock ids). The keys are checked by
// validate.go, not by the decoder.
type leafMap struct {
	m   map[string]any
	raw any // the value when it is not a table
	set bool
}

// UnmarshalTOML implements toml.Unmarshaler; it never fails.
func (x *leafMap) UnmarshalTOML(data any) error {
	x.set = true
	if m, ok := data.(map[string]any); ok {
		x.m = m
		return nil
	}
	x.raw = data
	return nil
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

type rawBound struct {
	Min val `toml:"min"`
	Max val `toml:"max"`
}

type rawRules struct {
	MaxStocks val `toml:"max_stocks"`
	MinIfUsed val `toml:"min_if_used"`
}

type rawProcess struct {
	Interesterify val `toml:"interesterify"`
	Method        val `toml:"method"`
	Cost          val `toml:"cost"`
	SFC           val `toml:"sfc"`
}

type rawSpec struct {
	Name    val                       `toml:"name"`
	Batch   val                       `toml:"batch"`
	Limits  map[string]toml.Primitive `toml:"limits"`
	Use     map[string]toml.Primitive `toml:"use"`
	Rules   *rawRules                 `toml:"rules"`
	Process *rawProcess               `toml:"process"`
}

type rawOrder struct {
	Spec   val `toml:"spec"`
	Tonnes val `toml:"tonnes"`
}

type rawOrders struct {
	Order    []rawOrder `toml:"order"`
	Purchase leafMap    `toml:"purchase"`
}

// Known keys of each fixed table, in the order the messages list them.
var (
	keysStocksTop = []string{"currency", "stock"}
	keysStock     = []string{"id", "name", "price", "available", "fatty_acids", "sn2", "sfc", "tags"}
	keysSpecTop   = []string{"name", "batch", "limits", "use", "rules", "process"}
	keysBound     = []string{"min", "max"}
	keysRules     = []string{"max_stocks", "min_if_used"}
	keysProcess   = []string{"interesterify", "method", "cost", "sfc"}
	keysOrdersTop = []string{"order", "purchase"}
	keysOrder     = []string{"spec", "tonnes"}
)

// maxProblems is how many problems one file reports; the rest are counted
// in a last line. It keeps a file of a million bad keys from costing a
// million messages and suggestions.
const maxProblems = 100

// collector gathers the problems of one file.
type collector struct {
	file    string
	ps      Problems
	errors  int // errors found, reported or not
	dropped int // problems beyond maxProblems
}

func (c *collector) add(p Problem) {
	if !p.Warning {
		c.errors++
	}
	if c.full() {
		c.dropped++
		return
	}
	c.ps = append(c.ps, p)
}

func (c *collector) errf(where, format string, args ...any) {
	if c.full() {
		c.add(Problem{})
		return
	}
	c.add(Problem{File: c.file, Where: where, Msg: fmt.Sprintf(format, args...)})
}

func (c *collector) warnf(where, format string, args ...any) {
	if c.full() {
		c.add(Problem{Warning: true})
		return
	}
	c.add(Problem{File: c.file, Where: where, Msg: fmt.Sprintf(format, args...), Warning: true})
}

// full reports whether no more problems are reported one by one; costly
// hints (suggestions) are skipped then.
func (c *collector) full() bool { return len(c.ps) >= maxProblems }

func (c *collector) failed() bool { return c.errors > 0 }

// problems returns what was found, with a last line counting what was not
// reported one by one.
func (c *collector) problems() Problems {
	if c.dropped == 0 {
		return c.ps
	}
	return append(c.ps, Problem{File: c.file, Msg: fmt.Sprintf("and %d more problems not listed; fix those above and run check again", c.dropped), Warning: c.errors == len(c.ps.Errors())})
}

// decode runs the TOML decoder and turns a syntax or structure error into a
// problem with the line number.
func (c *collector) decode(data []byte, v any) (toml.MetaData, bool) {
	if !utf8.Valid(data) {
		line := 1
		for i := 0; i < len(data); {
			r, n := utf8.DecodeRune(data[i:])
			if r == utf8.RuneError && n <= 1 {
				break
			}
			if r == '\n' {
				line++
			}
			i += n
		}
		c.errf(fmt.Sprintf("line %d", line), "the file is not valid UTF-8 text; save it as UTF-8 (TOML requires it)")
		return toml.MetaData{}, false
	}
	if err := CheckTOMLDepth(data); err != nil {
		var de *DepthError
		if errors.As(err, &de) {
			c.errf(fmt.Sprintf("line %d", de.Line), "%s", de.Problem())
			return toml.MetaData{}, false
		}
	}
	md, err := toml.Decode(string(data), v)
	if err == nil {
		return md, true
	}
	var pe toml.ParseError
	if errors.As(err, &pe) {
		where := fmt.Sprintf("line %d", pe.Position.Line)
		msg := pe.Message
		if pe.LastKey != "" {
			msg = fmt.Sprintf("%s (after key %q)", msg, pe.LastKey)
		}
		c.errf(where, "TOML syntax error: %s; fix this line (strings need double quotes, keys with ':' or '.' must be quoted, e.g. \"C18:1\" = 20.0)", msg)
		return md, false
	}
	c.structureError(err)
	return md, false
}

// structureError reports a value of the wrong shape that the decoder could
// not place (e.g. stock = 5, or rules = 5), naming the key and its line.
func (c *collector) structureError(err error) {
	msg := strings.TrimPrefix(err.Error(), "toml: ")
	where, key := "", ""
	if m := lastKeyPattern.FindStringSubmatch(msg); m != nil {
		if m[1] != "" {
			where = "line " + m[1]
		}
		key = m[2]
	}
	switch key {
	case "stock", "order":
		c.errf(where, "%q must be written as [[%s]] tables (double brackets), one per %s", key, key, key)
	case "rules", "process", "limits", "use", "purchase":
		c.errf(where, "%q must be a table: write [%s] on its own line and its keys below it", key, key)
	default:
		c.errf(where, "wrong kind of value (%s); compare with the layout of the demo files", msg)
	}
}

// lastKeyPattern picks line and key out of the decoder's type errors.
var lastKeyPattern = regexp.MustCompile(`^(?:line (\d+) )?\(last key "([^"]*)"\)`)

// keyLabel writes a key path for messages.
func keyLabel(k toml.Key) string { return strings.Join(k, ".") }

// unknownKeys reports every key the schema does not know. knownAt returns the
// allowed names for a key's parent table (ok false where the keys are the
// user's own, e.g. fatty-acid keys, which validate.go checks), and where
// names the place for a message given the key's position in document order.
// Keys the decoder left undecoded are reported too; keys matched only by
// letter case (the decoder is case-insensitive) are reported as wrong case.
func (c *collector) unknownKeys(md toml.MetaData, knownAt func(parent toml.Key) ([]string, bool), where func(i int, k toml.Key) string) {
	undecoded := map[string]bool{}
	for _, k := range md.Undecoded() {
		undecoded[k.String()] = true
	}
	reported := map[string]bool{} // keys reported, joined by NUL
	for i, k := range md.Keys() {
		if hasReportedPrefix(reported, k) {
			continue
		}
		parent, last := k[:len(k)-1], k[len(k)-1]
		known, fixed := knownAt(parent)
		bad := undecoded[k.String()]
		if fixed && !contains(known, last) {
			bad = true
		}
		if !bad {
			continue
		}
		reported[strings.Join(k, "\x00")] = true
		w := where(i, k)
		if w == "" && len(parent) > 0 {
			w = "table [" + keyLabel(parent) + "]"
		}
		if !fixed {
			c.errf(w, "unexpected key %q; remove it", last)
			continue
		}
		msg := fmt.Sprintf("unknown key %q; known keys are %s", last, strings.Join(known, ", "))
		if s, ok := c.suggest(last, known); ok {
			msg += fmt.Sprintf("; did you mean %q?", s)
		}
		c.errf(w, "%s", msg)
	}
}

// hasReportedPrefix reports whether a table holding k (a proper prefix of
// it) was reported already; the key depth is bounded by MaxTOMLDepth.
func hasReportedPrefix(reported map[string]bool, k toml.Key) bool {
	if len(reported) == 0 {
		return false
	}
	for n := 1; n < len(k); n++ {
		if reported[strings.Join(k[:n], "\x00")] {
			return true
		}
	}
	return false
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// ParseStocks decodes and validates a stock catalogue (DESIGN section 3).
// name is the file name used in messages. The catalogue is nil when any
// problem is an error; warnings come back with a usable catalogue.
func ParseStocks(name string, data []byte) (*Catalogue, Problems) {
	c := &collector{file: name}
	var raw rawStocks
	md, ok := c.decode(data, &raw)
	if !ok {
		return nil, c.problems()
	}
	// Stock labels by document position: each [[stock]] header is one key "stock".
	labels := make([]string, len(raw.Stock))
	for i, s := range raw.Stock {
		labels[i] = stockLabel(i, s.ID)
	}
	var pos []int // index into md.Keys() of each [[stock]] header
	for i, k := range md.Keys() {
		if len(k) == 1 && k[0] == "stock" {
			pos = append(pos, i)
		}
	}
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
			n := -1
			for j, p := range pos {
				if p < i {
					n = j
				}
			}
			if n >= 0 && n < len(labels) && len(pos) == len(labels) {
				return labels[n]
			}
			return "stock"
		})
	cat := c.stocks(raw)
	if c.failed() {
		return nil, c.problems()
	}
	cat.File = name
	return cat, c.problems()
}

// LoadStocks reads and parses a stock catalogue file.
func LoadStocks(path string) (*Catalogue, Problems) {
	data, err := ReadInput(path)
	if err != nil {
		return nil, readProblem(path, err, "stock catalogue")
	}
	return ParseStocks(path, data)
}

func readProblem(path string, err error, what string) Problems {
	fix := "check the path and the file's permissions"
	var r *refusedInput
	if errors.As(err, &r) {
		fix = "give the path of a TOML file"
	}
	msg := fmt.Sprintf("cannot read the %s: %v; %s", what, unwrapPath(err), fix)
	return Problems{{File: path, Msg: msg}}
}

// unwrapPath drops the repeated path from an *os.PathError.
func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// ParseSpec decodes and validates a product spec (DESIGN section 3). When cat
// is non-nil every stock id named in [use] and [process] must exist in it.
// The spec's ID is the file's base name without extension.
func ParseSpec(name string, data []byte, cat *Catalogue) (*Spec, Problems) {
	c := &collector{file: name}
	var raw rawSpec
	md, ok := c.decode(data, &raw)
	if !ok {
		return nil, c.problems()
	}
	spec := c.spec(md, raw, cat)
	c.unknownKeys(md,
		func(parent toml.Key) ([]string, bool) {
			switch {
			case len(parent) == 0:
				return keysSpecTop, true
			case len(parent) == 1 && parent[0] == "rules":
				return keysRules, true
			case len(parent) == 1 && parent[0] == "process":
				return keysProcess, true
			case len(parent) == 2 && parent[0] == "limits" && parent[1] != "sfc",
				len(parent) == 3 && parent[0] == "limits" && parent[1] == "sfc",
				len(parent) == 2 && parent[0] == "use":
				return keysBound, true
			}
			return nil, false
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
		return nil, c.problems()
	}
	spec.File = name
	spec.ID = SpecID(name)
	return spec, c.problems()
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

// LoadOrders reads an orders file for a multi-product plan: [[order]] tables
// with spec (a path, relative to the orders file unless absolute) and tonnes,
// and an optional [purchase] table of prices for buying beyond `available`.
// Each spec is loaded and checked against cat; its problems are reported
// under its own file name.
func LoadOrders(path string, cat *Catalogue) (*Orders, Problems) {
	data, err := ReadInput(path)
	if err != nil {
		return nil, readProblem(path, err, "orders file")
	}
	return ParseOrders(path, data, filepath.Dir(path), cat)
}

// ParseOrders is LoadOrders on bytes already read; spec paths are resolved
// against dir.
func ParseOrders(name string, data []byte, dir string, cat *Catalogue) (*Orders, Problems) {
	c := &collector{file: name}
	var raw rawOrders
	md, ok := c.decode(data, &raw)
	if !ok {
		return nil, c.problems()
	}
	var pos []int
	for i, k := range md.Keys() {
		if len(k) == 1 && k[0] == "order" {
			pos = append(pos, i)
		}
	}
	c.unknownKeys(md,
		func(parent toml.Key) ([]string, bool) {
			switch {
			case len(parent) == 0:
				return keysOrdersTop, true
			case len(parent) == 1 && parent[0] == "order":
				return keysOrder, true
			}
			return nil, false
		},
		func(i int, k toml.Key) string {
			if k[0] != "order" || len(k) == 1 {
				return ""
			}
			n := 0
			for j, p := range pos {
				if p < i {
					n = j
				}
			}
			return fmt.Sprintf("order #%d", n+1)
		})
	out := c.orders(raw, dir, cat)
	if c.failed() {
		return nil, c.problems()
	}
	out.File = name
	return out, c.problems()
}
