package catalogue

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"regexp"
	"sort"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
)

// Decoding, shared by the documents (stocks.go, spec.go, orders.go,
// calibration.go): each file is decoded into private raw structs whose
// fields capture any TOML value, so that a wrong type becomes a message of
// ours; unknown keys are reported by name with the nearest known one; every
// problem found goes to one collector, so a run reports them all. A value is
// returned only when there is no error (warnings may come with it).

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
// the document's checks (stocks.go, spec.go, orders.go), not by the decoder.
type leafMap struct {
	m   map[string]any
	f   map[string]float64 // the table, read as numbers by the direct reader (faststocks.go), instead of m
	raw any                // the value when it is not a table
	set bool
}

// numbersClean reports a table read as numbers (f) whose keys all pass
// keyOK and whose values are all finite and >= 0: the common case, which
// the checks take as it is.
func (x leafMap) numbersClean(keyOK func(string) bool) bool {
	return x.f != nil && leavesClean(x.f, asNumber, keyOK, nil)
}

// untyped is x with a table read as numbers (f) as the reference parser
// gives it (m), for the checks that word each problem.
func (x leafMap) untyped() leafMap {
	if x.f == nil {
		return x
	}
	m := make(map[string]any, len(x.f))
	for k, v := range x.f {
		m[k] = v
	}
	return leafMap{m: m, set: x.set}
}

// asNumber is number for a value that is one already.
func asNumber(f float64) (float64, bool) { return f, true }

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

// maxProblems is how many problems one file reports; the rest are counted
// in a last line. It keeps a file of a million bad keys from costing a
// million messages and suggestions.
const maxProblems = 100

// collector gathers the problems of one file.
type collector struct {
	file     string
	ps       Problems
	errors   int  // errors found, reported or not
	warnings int  // warnings found while quiet
	dropped  int  // problems beyond maxProblems
	quiet    bool // only count: no message, no label (see checked)
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
	switch {
	case c.quiet:
		c.errors++
	case c.full():
		c.add(Problem{})
	default:
		c.add(Problem{File: c.file, Where: where, Msg: fmt.Sprintf(format, args...)})
	}
}

func (c *collector) warnf(where, format string, args ...any) {
	switch {
	case c.quiet:
		c.warnings++
	case c.full():
		c.add(Problem{Warning: true})
	default:
		c.add(Problem{File: c.file, Where: where, Msg: fmt.Sprintf(format, args...), Warning: true})
	}
}

// checked runs check (the checks of a value built in code) once quietly
// and, only when that finds something, again to write the problems down
// under file: a sound value, the common case of a re-check, costs no
// message, no label and no sort.
func checked(file string, check func(c *collector)) Problems {
	quiet := collector{quiet: true}
	check(&quiet)
	if quiet.errors == 0 && quiet.warnings == 0 {
		return nil
	}
	c := collector{file: file}
	check(&c)
	return c.problems()
}

// label is fmt.Sprintf(format, name) for a message's where, or "" while
// the collector is quiet.
func (c *collector) label(format, name string) string {
	if c.quiet {
		return ""
	}
	return fmt.Sprintf(format, name)
}

// full reports whether no more problems are reported one by one; costly
// hints (suggestions) are skipped then.
func (c *collector) full() bool { return c.quiet || len(c.ps) >= maxProblems }

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
		line, unfinished := syntaxLine(data, pe.Position.Start, pe.Position.Line, strings.Contains(pe.Message, "terminator"))
		msg := pe.Message
		if pe.LastKey != "" {
			msg = fmt.Sprintf("%s (after key %q)", msg, pe.LastKey)
		}
		if unfinished {
			msg += fmt.Sprintf("; the decoder stopped at the start of line %d, so this line is left unfinished", line+1)
		}
		c.errf(fmt.Sprintf("line %d", line), "TOML syntax error: %s; %s", msg, syntaxHint(pe.Message))
		return md, false
	}
	c.structureError(err)
	return md, false
}

// syntaxLine is the line a TOML syntax error belongs to. The decoder counts a
// line when it has read the line's newline, so an error found at a newline
// (a table name left open) is reported by it one line late; the line here
// is counted from the error's byte offset instead, a newline belonging to
// the line it ends. When open is true (the decoder wanted an array's or
// inline table's closing bracket) and the error is found at the first thing
// written on a line, the bracket was left open on the line before: the line
// to fix is the previous one with text, and unfinished is true.
func syntaxLine(data []byte, start, reported int, open bool) (line int, unfinished bool) {
	if start < 0 || start > len(data) {
		return reported, false
	}
	before := data[:start]
	line = 1 + bytes.Count(before, []byte("\n"))
	lineStart := bytes.LastIndexByte(before, '\n') + 1
	if !open || start >= len(data) || data[start] == '\n' || len(bytes.TrimSpace(data[lineStart:start])) > 0 {
		return line, false
	}
	// The error is at the first character of its line: walk back to the
	// line before with text that is not a comment (end is the newline that
	// ends line n).
	for n, end := line-1, lineStart-1; end >= 0; n-- {
		from := bytes.LastIndexByte(data[:end], '\n') + 1
		if t := bytes.TrimSpace(data[from:end]); len(t) > 0 && t[0] != '#' {
			return n, true
		}
		end = from - 1
	}
	return line, false
}

// syntaxHint is what to do about one of the decoder's syntax messages,
// matched on the decoder's wording (BurntSushi/toml); a message not
// matched gets a hint naming the TOML format only, so that no unrelated
// advice is given.
func syntaxHint(msg string) string {
	switch {
	case strings.Contains(msg, "got ':'") && strings.Contains(msg, "expected '.' or '='"):
		return `a key with ':' in it must be quoted, e.g. "C18:1" = 20.0`
	case strings.Contains(msg, "expected '.' or '='"):
		return "write key = value; a key with spaces or other signs in it must be quoted"
	case strings.Contains(msg, "key name appears blank"):
		return "write the key before the ="
	case strings.Contains(msg, "expected value but found '\\n'"):
		return "the value after = is missing"
	case strings.Contains(msg, "expected value but found"):
		return `text needs double quotes, e.g. name = "Palm olein"; numbers, true and false are written without them`
	case strings.Contains(msg, "strings cannot contain newlines"):
		return `close the text with " on the same line`
	case strings.Contains(msg, "unexpected EOF"):
		return "the file ends inside a value; close the string, array or table that is still open"
	case strings.Contains(msg, "table name"), strings.Contains(msg, "table array name"):
		return "close the table name with ] (or ]] for [[stock]] and [[order]])"
	case strings.Contains(msg, "array terminator"):
		return "close the array with ] after its last item"
	case strings.Contains(msg, "inline table"):
		return "an inline table { ... } must be closed with } on the same line"
	case strings.Contains(msg, "to end with a newline"):
		return `write one key = value per line; a number has no letters after it, and text needs double quotes`
	case strings.Contains(msg, "Invalid float"), strings.Contains(msg, "Invalid integer"):
		return "write numbers like 20, 20.5 or 1e3"
	case strings.Contains(msg, "already been defined"):
		return "each key and table may be given once; remove one of the two (each stock is its own [[stock]])"
	}
	return "fix this line (the file is TOML, see toml.io)"
}

// structureError reports a value of the wrong shape that the decoder could
// not place (e.g. stock = 5, or rules = 5), naming the key and its line.
func (c *collector) structureError(err error) {
	msg := strings.TrimPrefix(err.Error(), "toml: ")
	where, key := "", ""
	// the line and key in the decoder's type errors
	lastKeyPattern := regexp.MustCompile(`^(?:line (\d+) )?\(last key "([^"]*)"\)`)
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

// keyLabel writes a key path for messages.
func keyLabel(k toml.Key) string { return strings.Join(k, ".") }

// unknownKeys reports every key the schema does not know. knownAt returns the
// allowed names for a key's parent table (ok false where the keys are the
// user's own, e.g. fatty-acid keys, which the document's checks take), and where
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
		reported[pathKey(k)] = true
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

// arrayTables finds the [[name]] tables of a document: tableOf(i) is the
// table (0 for the first) that holds the key at position i of md.Keys(),
// -1 before the first, and count is how many there are.
func arrayTables(md toml.MetaData, name string) (tableOf func(i int) int, count int) {
	var pos []int // position in md.Keys() of each [[name]] header
	for i, k := range md.Keys() {
		if len(k) == 1 && k[0] == name {
			pos = append(pos, i)
		}
	}
	return func(i int) int {
		n := -1
		for j, p := range pos {
			if p < i {
				n = j
			}
		}
		return n
	}, len(pos)
}

// hasReportedPrefix reports whether a table holding k (a proper prefix of
// it) was reported already; the key depth is bounded by MaxTOMLDepth.
func hasReportedPrefix(reported map[string]bool, k toml.Key) bool {
	if len(reported) == 0 {
		return false
	}
	for n := 1; n < len(k); n++ {
		if reported[pathKey(k[:n])] {
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

func readProblem(path string, err error, what string) Problems {
	fix := "check the path and the file's permissions"
	var r *refusedInput
	if errors.As(err, &r) {
		fix = "give the path of a TOML file"
	}
	msg := fmt.Sprintf("cannot read the %s: %v; %s", what, UnwrapPath(err), fix)
	return Problems{{File: path, Msg: msg}}
}

// UnwrapPath drops the repeated path from an *os.PathError, for a message
// that names the file itself.
func UnwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
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
	f, ok := number(x.v)
	if !ok {
		c.errf(where, "%s must be a number, not %s; write a plain number without quotes", label, describe(x.v))
		return 0, false
	}
	if !c.finite(where, label, f) {
		return 0, false
	}
	return f, true
}

// number reads a TOML integer or float as a float64.
func number(v any) (float64, bool) {
	switch x := v.(type) {
	case int64:
		return float64(x), true
	case float64:
		return x, true
	}
	return 0, false
}

// finite reports a value that is NaN or infinite, naming label.
func (c *collector) finite(where, label string, f float64) bool {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		c.errf(where, "%s = %v is not a finite number; give a plain number", label, f)
		return false
	}
	return true
}

// magnitude reports v under where when it is not finite (as num does) or
// outside the accepted range of q (Quantity.Check), with an optional hint;
// it returns whether v is good.
func (c *collector) magnitude(where string, q Quantity, label string, v float64, hint string) bool {
	if !c.finite(where, label, v) {
		return false
	}
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

// sortedKeys returns the keys of m in string order, for messages in a fixed order.
func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// The temperatures an SFC value or limit may be given at, deg C.
const (
	MinTemp = -40.0
	MaxTemp = 100.0
)

// temp reads an SFC temperature key in deg C.
func (c *collector) temp(where, label, key string) (float64, bool) {
	t, err := ParseTemp(key)
	if err != nil || math.IsNaN(t) || math.IsInf(t, 0) {
		c.errf(where, "%s key %q is not a temperature; keys are degrees C in quotes, e.g. \"20\" or \"37.5\"", label, key)
		return 0, false
	}
	return t, c.tempRange(where, label, key, t)
}

// tempRange reports an SFC temperature outside MinTemp..MaxTemp; key is the
// temperature as the file wrote it ("" writes t).
func (c *collector) tempRange(where, label, key string, t float64) bool {
	if t >= MinTemp && t <= MaxTemp {
		return true
	}
	if key == "" {
		key = TempKey(t)
	}
	c.errf(where, "%s temperature %q is outside %g..%g C; check the key", label, key, MinTemp, MaxTemp)
	return false
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
