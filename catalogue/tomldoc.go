package catalogue

import (
	"bytes"
	"fmt"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
)

// A TOML document as written, with the byte span of every table header,
// key and value, so that values can be edited in place (patch.go). The
// syntax is TOML v1.0.0 (toml.io/en/v1.0.0: comments, key/value pairs,
// bare, quoted and dotted keys, strings in their four forms, arrays,
// inline tables, [table] and [[array]] headers), with what TOML 1.1 adds
// and BurntSushi/toml reads (newlines, comments and a trailing comma in
// an inline table). Values other than strings, arrays and inline tables
// (numbers, booleans, dates) are spans only: the reference parser reads
// them, this scanner only finds where they end. The scanner is used only
// on text the reference parser has accepted, and its keys are compared
// with the parser's (tomlDoc.sameKeys) before any edit is trusted.

// tomlDoc is a scanned document.
type tomlDoc struct {
	src      []byte
	nl       string         // the line ending the file uses: "\n" or "\r\n"
	root     *tomlSection   // the keys before the first header
	sections []*tomlSection // root first, then one per header in file order
	entries  []*tomlEntry   // every key/value, at any depth, in file order
	keys     []toml.Key     // the keys as the reference parser lists them
}

// tomlSection is the root or one [table] / [[array]] header and the
// key/value lines under it.
type tomlSection struct {
	path       []string // resolved path: [[array]] elements as "#n"
	raw        []string // the header's key as written (decoded), no "#n"
	start, end int      // the header line, newline included (root: 0, 0)
	comment    int      // start of the header line's comment, or -1
	lines      []*tomlEntry
	last       int // end of its last line (header or entry)
}

// tomlEntry is one key = value, on its own line(s) or inside an inline table.
type tomlEntry struct {
	path      []string // resolved full path of the key
	keyStart  int      // the key as written
	keyEnd    int
	val       *tomlValue
	line      bool         // on its own line (else inside an inline table)
	sec       *tomlSection // the section of a line entry
	owner     *tomlValue   // the inline table of an inline entry
	lineStart int          // a line entry: start of its first line
	lineEnd   int          // ... end of its last line, newline included
	comment   int          // ... start of the trailing comment, or -1
	indentEnd int          // ... end of the indentation before the key
	parts     int          // how many parts the key has as written (dotted: more than 1)
}

// valueKind is what a value is.
type valueKind int

const (
	valScalar valueKind = iota // number, boolean, date: a bare token
	valString
	valArray
	valTable // inline table
)

// tomlValue is one value and, for arrays and inline tables, what is inside.
type tomlValue struct {
	kind       valueKind
	start, end int
	literal    bool // a '...' or '''...''' string
	multiline  bool // spans more than one line
	comments   bool // an array or inline table with a comment inside
	path       []string
	entries    []*tomlEntry // inline table
	elems      []*tomlValue // array
	holder     *tomlEntry   // the key it is the value of (nil in an array)
	parent     *tomlValue   // the array it is in
}

// scanError is a construct the scanner does not follow; the caller falls
// back to writing the file afresh.
type scanError struct {
	line int
	msg  string
}

func (e *scanError) Error() string {
	if e.line <= 0 {
		return e.msg
	}
	return fmt.Sprintf("line %d: %s", e.line, e.msg)
}

type tomlScanner struct {
	doc    *tomlDoc
	src    []byte
	pos    int
	arrays map[string]int // resolved path of an array of tables -> elements so far
}

// scanTOML scans src, which the reference parser has read as md.
func scanTOML(src []byte, md toml.MetaData) (*tomlDoc, error) {
	doc := &tomlDoc{src: src, nl: "\n"}
	if bytes.Contains(src, []byte("\r\n")) {
		doc.nl = "\r\n"
	}
	s := &tomlScanner{doc: doc, src: src, arrays: map[string]int{}}
	doc.root = &tomlSection{comment: -1}
	doc.sections = []*tomlSection{doc.root}
	if err := s.document(); err != nil {
		return nil, err
	}
	if err := doc.sameKeys(md.Keys()); err != nil {
		return nil, err
	}
	if err := doc.definedOnce(); err != nil {
		return nil, err
	}
	return doc, nil
}

// definedOnce refuses a document that defines a key twice, or a key both
// as a value and as a table ("t.a = 1" then "t = 2"): TOML v1.0.0 does not
// allow it ("Defining a key multiple times is invalid"), but the reference
// parser lets some such documents through, and an edit of one of the two
// definitions would not be the value it reads.
func (d *tomlDoc) definedOnce() error {
	seen := make(map[string]*tomlEntry, len(d.entries))
	for _, e := range d.entries {
		seen[pathKey(e.path)] = e
	}
	if len(seen) < len(d.entries) {
		return &scanError{line: 0, msg: "a key is defined twice"}
	}
	for _, e := range d.entries {
		for n := 1; n < len(e.path); n++ {
			if p, ok := seen[pathKey(e.path[:n])]; ok && p.val != nil && (p.val.kind == valScalar || p.val.kind == valString) {
				return &scanError{line: d.lineOf(e.keyStart), msg: fmt.Sprintf("key %q is defined as a value and as a table", strings.Join(e.path[:n], "."))}
			}
		}
	}
	// An inline table or array is complete as written (TOML v1.0.0,
	// "Inline Table"): a header or a dotted key on a line of its own may
	// not add to it, though the reference parser lets "s = {a = 1}" then
	// "[s.b]" through, and the span of s would not be the value it reads.
	given := func(path []string, n int) bool {
		p, ok := seen[pathKey(path[:n])]
		return ok && p.val != nil && (p.val.kind == valTable || p.val.kind == valArray)
	}
	for _, e := range d.entries {
		for n := 1; e.line && n < len(e.path); n++ {
			if given(e.path, n) {
				return &scanError{line: d.lineOf(e.keyStart), msg: fmt.Sprintf("key %q is given inline and added to later", strings.Join(e.path[:n], "."))}
			}
		}
	}
	for _, sec := range d.sections[1:] {
		for n := 1; n <= len(sec.path); n++ {
			if given(sec.path, n) {
				return &scanError{line: d.lineOf(sec.start), msg: fmt.Sprintf("table %q is given inline and added to later", strings.Join(sec.raw, "."))}
			}
		}
	}
	return nil
}

func (s *tomlScanner) fail(format string, args ...any) error {
	return &scanError{line: s.doc.lineOf(s.pos), msg: fmt.Sprintf(format, args...)}
}

func (s *tomlScanner) eof() bool { return s.pos >= len(s.src) }

func (s *tomlScanner) peek() byte {
	if s.eof() {
		return 0
	}
	return s.src[s.pos]
}

func (s *tomlScanner) ws() {
	for !s.eof() && (s.src[s.pos] == ' ' || s.src[s.pos] == '\t') {
		s.pos++
	}
}

// newline consumes one line ending and reports whether there was one.
func (s *tomlScanner) newline() bool {
	switch {
	case s.peek() == '\n':
		s.pos++
		return true
	case s.peek() == '\r' && s.pos+1 < len(s.src) && s.src[s.pos+1] == '\n':
		s.pos += 2
		return true
	}
	return false
}

// comment consumes a comment to the end of the line and returns where it
// started, or -1 when there is none.
func (s *tomlScanner) comment() int {
	if s.peek() != '#' {
		return -1
	}
	at := s.pos
	for !s.eof() && s.src[s.pos] != '\n' && !(s.src[s.pos] == '\r' && s.pos+1 < len(s.src) && s.src[s.pos+1] == '\n') {
		s.pos++
	}
	return at
}

// endOfLine consumes spaces, a comment and the line ending (or the end of
// the file) after a header or a key/value; it returns the comment's start.
func (s *tomlScanner) endOfLine() (int, error) {
	s.ws()
	c := s.comment()
	if !s.newline() && !s.eof() {
		return -1, s.fail("expected the end of the line")
	}
	return c, nil
}

// gap skips spaces, newlines and comments inside an array or (TOML 1.1)
// an inline table, reporting whether it met a comment.
func (s *tomlScanner) gap() bool {
	met := false
	for {
		s.ws()
		if s.comment() >= 0 {
			met = true
		}
		if !s.newline() {
			return met
		}
	}
}

func (s *tomlScanner) document() error {
	sec := s.doc.root
	for !s.eof() {
		lineStart := s.pos
		s.ws()
		switch {
		case s.newline():
			continue
		case s.eof():
			return nil
		case s.peek() == '#':
			s.comment()
			if !s.newline() && !s.eof() {
				return s.fail("expected the end of the line")
			}
			continue
		case s.peek() == '[':
			next, err := s.header(lineStart)
			if err != nil {
				return err
			}
			sec = next
			continue
		}
		e, err := s.lineEntry(sec, lineStart)
		if err != nil {
			return err
		}
		sec.lines = append(sec.lines, e)
		sec.last = e.lineEnd
	}
	return nil
}

// header reads a [table] or [[array]] line.
func (s *tomlScanner) header(lineStart int) (*tomlSection, error) {
	array := bytes.HasPrefix(s.src[s.pos:], []byte("[["))
	if array {
		s.pos += 2
	} else {
		s.pos++
	}
	s.ws()
	parts, _, _, err := s.key()
	if err != nil {
		return nil, err
	}
	s.ws()
	closer := "]"
	if array {
		closer = "]]"
	}
	if !bytes.HasPrefix(s.src[s.pos:], []byte(closer)) {
		return nil, s.fail("expected %s to close the table name", closer)
	}
	s.pos += len(closer)
	c, err := s.endOfLine()
	if err != nil {
		return nil, err
	}
	sec := &tomlSection{raw: parts, start: lineStart, end: s.pos, comment: c, last: s.pos}
	sec.path = s.resolve(parts, array)
	s.doc.sections = append(s.doc.sections, sec)
	s.doc.keys = append(s.doc.keys, toml.Key(parts))
	return sec, nil
}

// resolve turns a header's key into a path that names array elements: a
// part that is an array of tables stands for its latest element ("#n"),
// and a new [[array]] header adds one.
func (s *tomlScanner) resolve(parts []string, array bool) []string {
	var path []string
	for i, p := range parts {
		path = append(path, p)
		key := pathKey(path)
		if i == len(parts)-1 && array {
			s.arrays[key]++
			path = append(path, "#"+strconv.Itoa(s.arrays[key]-1))
			break
		}
		if n, ok := s.arrays[key]; ok {
			path = append(path, "#"+strconv.Itoa(n-1))
		}
	}
	return path
}

// lineEntry reads a key = value line in section sec.
func (s *tomlScanner) lineEntry(sec *tomlSection, lineStart int) (*tomlEntry, error) {
	indentEnd := s.pos
	e, err := s.entry(sec.path, sec.raw)
	if err != nil {
		return nil, err
	}
	e.line, e.sec, e.lineStart, e.indentEnd = true, sec, lineStart, indentEnd
	if e.comment, err = s.endOfLine(); err != nil {
		return nil, err
	}
	e.lineEnd = s.pos
	return e, nil
}

// entry reads key = value under the table at path (raw: its key as the
// reference parser lists it).
func (s *tomlScanner) entry(path, raw []string) (*tomlEntry, error) {
	parts, ks, ke, err := s.key()
	if err != nil {
		return nil, err
	}
	e := &tomlEntry{path: join(path, parts), keyStart: ks, keyEnd: ke, parts: len(parts), comment: -1}
	rawKey := join(raw, parts)
	s.doc.keys = append(s.doc.keys, toml.Key(rawKey))
	s.doc.entries = append(s.doc.entries, e)
	s.ws()
	if s.peek() != '=' {
		return nil, s.fail("expected = after the key")
	}
	s.pos++
	s.ws()
	if e.val, err = s.value(e.path, rawKey); err != nil {
		return nil, err
	}
	e.val.holder = e
	return e, nil
}

func join(a, b []string) []string {
	return append(append(make([]string, 0, len(a)+len(b)), a...), b...)
}

// key reads a bare, quoted or dotted key and returns its decoded parts and
// its span.
func (s *tomlScanner) key() ([]string, int, int, error) {
	start := s.pos
	var parts []string
	for {
		p, err := s.simpleKey()
		if err != nil {
			return nil, 0, 0, err
		}
		parts = append(parts, p)
		end := s.pos
		s.ws()
		if s.peek() != '.' {
			s.pos = end
			return parts, start, end, nil
		}
		s.pos++
		s.ws()
	}
}

func (s *tomlScanner) simpleKey() (string, error) {
	switch s.peek() {
	case '"':
		if bytes.HasPrefix(s.src[s.pos:], []byte(`"""`)) {
			return "", s.fail("a key cannot be a multi-line string")
		}
		start := s.pos
		if err := s.basicString(); err != nil {
			return "", err
		}
		return decodeBasic(string(s.src[start+1 : s.pos-1]))
	case '\'':
		if bytes.HasPrefix(s.src[s.pos:], []byte(`'''`)) {
			return "", s.fail("a key cannot be a multi-line string")
		}
		start := s.pos
		if err := s.literalString(); err != nil {
			return "", err
		}
		return string(s.src[start+1 : s.pos-1]), nil
	}
	start := s.pos
	for !s.eof() && bareKeyByte(s.src[s.pos]) {
		s.pos++
	}
	if s.pos == start {
		return "", s.fail("expected a key")
	}
	return string(s.src[start:s.pos]), nil
}

func bareKeyByte(b byte) bool {
	return b >= 'a' && b <= 'z' || b >= 'A' && b <= 'Z' || b >= '0' && b <= '9' || b == '_' || b == '-'
}

// value reads one value of the key at path (raw: as the parser lists it).
func (s *tomlScanner) value(path, raw []string) (*tomlValue, error) {
	v := &tomlValue{start: s.pos, path: path}
	var err error
	switch c := s.peek(); {
	case bytes.HasPrefix(s.src[s.pos:], []byte(`"""`)):
		v.kind = valString
		err = s.multiline(`"""`, true)
	case bytes.HasPrefix(s.src[s.pos:], []byte(`'''`)):
		v.kind, v.literal = valString, true
		err = s.multiline(`'''`, false)
	case c == '"':
		v.kind = valString
		err = s.basicString()
	case c == '\'':
		v.kind, v.literal = valString, true
		err = s.literalString()
	case c == '[':
		v.kind = valArray
		err = s.array(v, raw)
	case c == '{':
		v.kind = valTable
		err = s.inlineTable(v, raw)
	default:
		err = s.scalar()
	}
	if err != nil {
		return nil, err
	}
	v.end = s.pos
	v.multiline = bytes.IndexByte(s.src[v.start:v.end], '\n') >= 0
	return v, nil
}

// scalar reads a number, boolean or date as a bare token; a date and a
// time may be separated by one space (TOML v1.0.0, Offset Date-Time).
func (s *tomlScanner) scalar() error {
	start := s.pos
	for {
		for !s.eof() && !strings.ContainsRune(" \t\r\n,]}#", rune(s.src[s.pos])) {
			s.pos++
		}
		tok := string(s.src[start:s.pos])
		if len(tok) == 10 && tok[4] == '-' && tok[7] == '-' && s.pos+1 < len(s.src) && s.src[s.pos] == ' ' &&
			s.src[s.pos+1] >= '0' && s.src[s.pos+1] <= '9' {
			s.pos++
			continue
		}
		break
	}
	if s.pos == start {
		return s.fail("expected a value")
	}
	return nil
}

func (s *tomlScanner) basicString() error {
	s.pos++ // "
	for !s.eof() {
		switch s.src[s.pos] {
		case '\\':
			s.pos = min(s.pos+2, len(s.src))
		case '"':
			s.pos++
			return nil
		case '\n':
			return s.fail("a string is not closed on its line")
		default:
			s.pos++
		}
	}
	return s.fail("a string is not closed")
}

func (s *tomlScanner) literalString() error {
	s.pos++ // '
	for !s.eof() {
		switch s.src[s.pos] {
		case '\'':
			s.pos++
			return nil
		case '\n':
			return s.fail("a string is not closed on its line")
		}
		s.pos++
	}
	return s.fail("a string is not closed")
}

// multiline reads a """ or ”' string; up to two more quotes right before
// the closing three belong to the string (TOML v1.0.0, String).
func (s *tomlScanner) multiline(delim string, escapes bool) error {
	s.pos += 3
	for !s.eof() {
		if escapes && s.src[s.pos] == '\\' {
			s.pos = min(s.pos+2, len(s.src))
			continue
		}
		if bytes.HasPrefix(s.src[s.pos:], []byte(delim)) {
			s.pos += 3
			for extra := 0; extra < 2 && s.peek() == delim[0]; extra++ {
				s.pos++
			}
			return nil
		}
		s.pos++
	}
	return s.fail("a multi-line string is not closed")
}

func (s *tomlScanner) array(v *tomlValue, raw []string) error {
	return s.items(v, ']', "an array", func() error {
		path := append(append([]string(nil), v.path...), "#"+strconv.Itoa(len(v.elems)))
		el, err := s.value(path, raw)
		if err != nil {
			return err
		}
		el.parent = v
		v.elems = append(v.elems, el)
		return nil
	})
}

func (s *tomlScanner) inlineTable(v *tomlValue, raw []string) error {
	return s.items(v, '}', "an inline table", func() error {
		e, err := s.entry(v.path, raw)
		if err != nil {
			return err
		}
		e.owner = v
		v.entries = append(v.entries, e)
		return nil
	})
}

// items reads the items of an array or inline table after its opening
// bracket up to closer: items separated by commas, a trailing comma
// allowed, newlines and comments between them (TOML v1.0.0, Array; TOML
// 1.1 for an inline table).
func (s *tomlScanner) items(v *tomlValue, closer byte, what string, item func() error) error {
	s.pos++ // the opening bracket
	for {
		if s.gap() {
			v.comments = true
		}
		if s.peek() == closer {
			s.pos++
			return nil
		}
		if s.eof() {
			return s.fail("%s is not closed", what)
		}
		if err := item(); err != nil {
			return err
		}
		if s.gap() {
			v.comments = true
		}
		switch s.peek() {
		case ',':
			s.pos++
		case closer:
			s.pos++
			return nil
		default:
			return s.fail("expected , or %c in %s", closer, what)
		}
	}
}

// decodeBasic decodes the escapes of a TOML basic string (TOML v1.0.0,
// String; \e and \xHH are TOML 1.1's).
func decodeBasic(s string) (string, error) {
	if !strings.ContainsRune(s, '\\') {
		return s, nil
	}
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		if s[i] != '\\' {
			b.WriteByte(s[i])
			continue
		}
		i++
		if i >= len(s) {
			return "", fmt.Errorf("a key ends in a backslash")
		}
		hex := 0
		switch s[i] {
		case 'b':
			b.WriteByte('\b')
		case 't':
			b.WriteByte('\t')
		case 'n':
			b.WriteByte('\n')
		case 'f':
			b.WriteByte('\f')
		case 'r':
			b.WriteByte('\r')
		case 'e':
			b.WriteByte(0x1b)
		case '"':
			b.WriteByte('"')
		case '\\':
			b.WriteByte('\\')
		case 'x':
			hex = 2
		case 'u':
			hex = 4
		case 'U':
			hex = 8
		default:
			return "", fmt.Errorf("unknown escape \\%c in a key", s[i])
		}
		if hex > 0 {
			if i+1+hex > len(s) {
				return "", fmt.Errorf("a short \\%c escape in a key", s[i])
			}
			r, err := strconv.ParseUint(s[i+1:i+1+hex], 16, 32)
			if err != nil || !utf8.ValidRune(rune(r)) {
				return "", fmt.Errorf("a bad \\%c escape in a key", s[i])
			}
			b.WriteRune(rune(r))
			i += hex
		}
	}
	return b.String(), nil
}

// sameKeys reports the first difference between the keys the scan found
// and those the reference parser lists (MetaData.Keys: every key in
// document order, a header's as written, an inline table's below its key,
// an array's inline tables' below the array's key).
func (d *tomlDoc) sameKeys(want []toml.Key) error {
	got := d.keys
	for i := 0; i < len(got) || i < len(want); i++ {
		switch {
		case i >= len(got):
			return &scanError{line: 0, msg: fmt.Sprintf("the scan missed key %q", want[i].String())}
		case i >= len(want):
			return &scanError{line: 0, msg: fmt.Sprintf("the scan found key %q that the parser does not list", got[i].String())}
		case !slices.Equal(got[i], want[i]):
			return &scanError{line: 0, msg: fmt.Sprintf("the scan found key %q where the parser lists %q", got[i].String(), want[i].String())}
		}
	}
	return nil
}

// lineOf is the 1-based line of byte offset at.
func (d *tomlDoc) lineOf(at int) int {
	return 1 + bytes.Count(d.src[:min(at, len(d.src))], []byte("\n"))
}
