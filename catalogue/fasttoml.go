package catalogue

import (
	"bytes"
	"runtime"
	"strconv"
	"sync"
	"unicode/utf8"
)

// A fast reader for well-formed stock catalogues. BurntSushi/toml, the
// reference parser, reads about 3 MB/s here (its lexer hands each token
// through a channel), so a 300-stock catalogue of 155 kB took most of a
// command's run. fastTOML reads a strict subset of TOML v1.0.0
// (toml.io/en/v1.0.0) about twenty times faster and builds the same tree
// the reference parser builds (int64, float64, string, bool, tables as
// map[string]any, arrays of tables as []map[string]any). The subset:
//
//   - comments, blank lines, LF or CRLF line ends;
//   - key = value with a bare key or a one-line quoted key (no dotted keys);
//   - [table] and [[array]] headers, dotted and quoted parts allowed;
//   - values: one-line basic strings with the TOML 1.0 escapes, one-line
//     literal strings, decimal integers and floats (underscores between
//     digits), true and false, and one-line inline tables of those.
//
// Anything outside the subset, and anything the specification forbids
// (a key or table defined twice, a control character, a number with a
// leading zero, ...), makes fastTOML decline (ok false) without a message:
// the caller then runs the reference parser, which reads the rest of TOML
// and words every error. So a document is either read here exactly as the
// reference parser reads it, or by the reference parser itself; the
// differential fuzz test (FuzzFastTOML) holds fastTOML to that.

// fastTable is a table being built: its values (m), the subtables and
// arrays of tables that headers opened inside it, and whether a header
// defined it (explicit) rather than a deeper header implying it.
type fastTable struct {
	m        map[string]any
	kids     map[string]*fastTable
	arrays   map[string][]*fastTable
	explicit bool
}

func newFastTable(explicit bool) *fastTable {
	return &fastTable{m: map[string]any{}, explicit: explicit}
}

// newFastTableAt is newFastTable for a table whose header ends at p.pos: its
// map is made for as many entries as there are '=' before the next line
// that opens with '[' (a header in the subset, which has no multi-line
// values), so that a fatty-acid table of a dozen acids is not grown and
// copied on the way. An '=' in a string or a comment makes the hint larger,
// never wrong.
func (p *fastParser) newFastTableAt() *fastTable {
	return &fastTable{m: make(map[string]any, p.entriesHint()), explicit: true}
}

// entriesHint is the number of '=' from p.pos to the next line that opens
// with '[' (newFastTableAt).
func (p *fastParser) entriesHint() int {
	rest := p.src[p.pos:]
	if i := bytes.Index(rest, []byte("\n[")); i >= 0 {
		rest = rest[:i]
	}
	return bytes.Count(rest, []byte("="))
}

// fastParser reads one document; ok is cleared at the first thing it does
// not read, and every step returns at once after that.
type fastParser struct {
	src  []byte
	pos  int
	root *fastTable
	cur  *fastTable
	// arrays of tables are kept as []*fastTable while parsing and written
	// into their parent's map as []map[string]any when the document ends.
	owners []*fastTable
	// keys holds one copy of each bare key read, so that the same key in
	// every stock ("C16:0", "price") is one string, not one each.
	keys map[string]string
}

// maxFastDepth bounds the nesting the fast reader follows (header parts,
// nested inline tables); deeper documents go to the reference parser and
// its depth check (CheckTOMLDepth).
const maxFastDepth = 8

// fastInput reports a document the fast readers take on: valid UTF-8
// without a byte-order mark (the reference parser reads or words the rest).
func fastInput(src []byte) bool {
	return utf8.Valid(src) && !bytes.HasPrefix(src, []byte("\xef\xbb\xbf"))
}

// fastTOML reads src in the subset above and returns its tree, or ok false.
func fastTOML(src []byte) (map[string]any, bool) {
	if !fastInput(src) {
		return nil, false
	}
	p := &fastParser{src: src, root: newFastTable(true), keys: map[string]string{}}
	p.cur = p.root
	for {
		p.ws()
		if p.pos >= len(p.src) {
			break
		}
		switch p.src[p.pos] {
		case '\n', '\r', '#':
			if !p.endOfLine() {
				return nil, false
			}
			continue
		case '[':
			if !p.header() {
				return nil, false
			}
		default:
			if !p.keyValue(p.cur) {
				return nil, false
			}
		}
		if !p.endOfLine() {
			return nil, false
		}
	}
	for _, t := range p.owners {
		for name, elems := range t.arrays {
			list := make([]map[string]any, len(elems))
			for i, e := range elems {
				list[i] = e.m
			}
			t.m[name] = list
		}
	}
	return p.root.m, true
}

func (p *fastParser) ws() {
	for p.pos < len(p.src) && (p.src[p.pos] == ' ' || p.src[p.pos] == '\t') {
		p.pos++
	}
}

// endOfLine reads optional blanks and a comment, then a line end or the
// end of the document.
func (p *fastParser) endOfLine() bool {
	p.ws()
	if p.pos < len(p.src) && p.src[p.pos] == '#' {
		for p.pos++; p.pos < len(p.src) && p.src[p.pos] != '\n'; p.pos++ {
			if b := p.src[p.pos]; (b < 0x20 && b != '\t' && b != '\r') || b == 0x7f {
				return false
			}
			if p.src[p.pos] == '\r' {
				break
			}
		}
	}
	switch {
	case p.pos >= len(p.src):
		return true
	case p.src[p.pos] == '\n':
		p.pos++
		return true
	case p.src[p.pos] == '\r' && p.pos+1 < len(p.src) && p.src[p.pos+1] == '\n':
		p.pos += 2
		return true
	}
	return false
}

// header reads [a.b] or [[a.b]] and makes the table it names current.
func (p *fastParser) header() bool {
	p.pos++ // '['
	array := p.pos < len(p.src) && p.src[p.pos] == '['
	if array {
		p.pos++
	}
	var parts []string
	for {
		p.ws()
		k, ok := p.key()
		if !ok || len(parts) == maxFastDepth {
			return false
		}
		parts = append(parts, k)
		p.ws()
		if p.pos < len(p.src) && p.src[p.pos] == '.' {
			p.pos++
			continue
		}
		break
	}
	closer := "]"
	if array {
		closer = "]]"
	}
	if !bytes.HasPrefix(p.src[p.pos:], []byte(closer)) {
		return false
	}
	p.pos += len(closer)

	t := p.root
	for _, k := range parts[:len(parts)-1] {
		switch {
		case t.kids[k] != nil:
			t = t.kids[k]
		case t.arrays[k] != nil:
			elems := t.arrays[k]
			t = elems[len(elems)-1]
		default:
			if _, taken := t.m[k]; taken {
				return false // a value (or inline table) of that name
			}
			kid := newFastTable(false)
			t.addKid(k, kid)
			t = kid
		}
	}
	last := parts[len(parts)-1]
	if array {
		if t.kids[last] != nil {
			return false
		}
		if t.arrays[last] == nil {
			if _, taken := t.m[last]; taken {
				return false
			}
			if t.arrays == nil {
				t.arrays = map[string][]*fastTable{}
				p.owners = append(p.owners, t)
			}
		}
		elem := p.newFastTableAt()
		t.arrays[last] = append(t.arrays[last], elem)
		p.cur = elem
		return true
	}
	if _, taken := t.m[last]; taken || t.arrays[last] != nil {
		// Defined before: as a value, a table, an array of tables, or
		// implied by a deeper header (legal in TOML, left to the
		// reference parser).
		return false
	}
	kid := p.newFastTableAt()
	t.addKid(last, kid)
	p.cur = kid
	return true
}

func (t *fastTable) addKid(k string, kid *fastTable) {
	if t.kids == nil {
		t.kids = map[string]*fastTable{}
	}
	t.kids[k] = kid
	t.m[k] = kid.m
}

// keyValue reads key = value into t.
func (p *fastParser) keyValue(t *fastTable) bool {
	return p.keyValueDepth(t.m, t.arrays, 0)
}

// keyValueDepth reads key = value into m, refusing a key already in m or
// in arrays (the arrays of tables of m's table; nil in an inline table).
func (p *fastParser) keyValueDepth(m map[string]any, arrays map[string][]*fastTable, depth int) bool {
	k, ok := p.key()
	if !ok {
		return false
	}
	if arrays[k] != nil {
		return false
	}
	p.ws()
	if p.pos >= len(p.src) || p.src[p.pos] != '=' {
		return false // a dotted key, or no '='
	}
	p.pos++
	p.ws()
	v, ok := p.value(depth)
	if !ok {
		return false
	}
	// a key already in m leaves its length as it was: defined twice, which
	// TOML forbids (the whole parse is declined, so the overwritten value
	// does not matter); one hash of the key instead of a look-up and a store
	n := len(m)
	m[k] = v
	return len(m) > n
}

// key reads one bare or quoted key part.
func (p *fastParser) key() (string, bool) {
	if p.pos >= len(p.src) {
		return "", false
	}
	start := p.pos
	switch p.src[p.pos] {
	case '"':
		if end := p.plainQuoted(); end > 0 {
			return p.intern(p.src[start+1 : end-1]), end-start > 2
		}
		s, ok := p.basicString()
		return s, ok && s != ""
	case '\'':
		s, ok := p.literalString()
		return s, ok && s != ""
	}
	for p.pos < len(p.src) && bareKeyByte(p.src[p.pos]) {
		p.pos++
	}
	return p.intern(p.src[start:p.pos]), p.pos > start
}

// plainQuoted reads a "..." key with no escape and no control character
// (most quoted keys: "C16:0", "20") and returns the end of it, closing
// quote included; 0 (nothing read) for any other.
func (p *fastParser) plainQuoted() int {
	for i := p.pos + 1; i < len(p.src); i++ {
		switch b := p.src[i]; {
		case b == '"':
			p.pos = i + 1
			return p.pos
		case b == '\\' || control(b):
			return 0
		}
	}
	return 0
}

// intern returns the key b as a string, one copy per distinct key.
func (p *fastParser) intern(b []byte) string {
	if s, ok := p.keys[string(b)]; ok {
		return s
	}
	s := string(b)
	p.keys[s] = s
	return s
}

// value reads one value; depth counts the inline tables around it.
func (p *fastParser) value(depth int) (any, bool) {
	if p.pos >= len(p.src) {
		return nil, false
	}
	switch b := p.src[p.pos]; {
	case b == '"':
		return p.basicString()
	case b == '\'':
		return p.literalString()
	case b == '{':
		return p.inlineTable(depth + 1)
	case b == 't' || b == 'f':
		return p.boolean()
	case b == '+' || b == '-' || (b >= '0' && b <= '9'):
		return p.number()
	}
	return nil, false
}

// delimited reports whether the token that ended at p.pos is followed by
// something that may end a value.
func (p *fastParser) delimited() bool {
	if p.pos >= len(p.src) {
		return true
	}
	switch p.src[p.pos] {
	case ' ', '\t', '\n', '\r', '#', ',', '}':
		return true
	}
	return false
}

func (p *fastParser) boolean() (any, bool) {
	for _, w := range [...]string{"true", "false"} {
		if bytes.HasPrefix(p.src[p.pos:], []byte(w)) {
			p.pos += len(w)
			return w == "true", p.delimited()
		}
	}
	return nil, false
}

// number reads a decimal integer or float (TOML v1.0.0, "Integer" and
// "Float"): an optional sign, an integer part without leading zeros, then
// an optional fraction and exponent; underscores only between digits.
// Special floats (inf, nan), other bases, dates and times are declined.
func (p *fastParser) number() (any, bool) {
	text, float, ok := p.numberText()
	if !ok {
		return nil, false
	}
	if float {
		f, err := strconv.ParseFloat(string(text), 64)
		return f, err == nil
	}
	n, err := strconv.ParseInt(string(text), 10, 64)
	return n, err == nil
}

// numberText reads the token of number and returns it without its
// underscores, and whether it is a float (a fraction or an exponent).
func (p *fastParser) numberText() (text []byte, float, ok bool) {
	start := p.pos
	if b := p.src[p.pos]; b == '+' || b == '-' {
		p.pos++
	}
	intStart := p.pos
	if !p.digits() {
		return nil, false, false
	}
	if p.src[intStart] == '0' && p.pos-intStart > 1 {
		return nil, false, false // leading zero
	}
	if p.pos < len(p.src) && p.src[p.pos] == '.' {
		p.pos++
		if !p.digits() {
			return nil, false, false
		}
		float = true
	}
	if p.pos < len(p.src) && (p.src[p.pos] == 'e' || p.src[p.pos] == 'E') {
		p.pos++
		if p.pos < len(p.src) && (p.src[p.pos] == '+' || p.src[p.pos] == '-') {
			p.pos++
		}
		if !p.digits() {
			return nil, false, false
		}
		float = true
	}
	if !p.delimited() {
		return nil, false, false
	}
	text = p.src[start:p.pos]
	if bytes.IndexByte(text, '_') >= 0 {
		text = bytes.ReplaceAll(text, []byte("_"), nil)
	}
	return text, float, true
}

// digits reads digit ('_'? digit)* and reports whether there was one.
func (p *fastParser) digits() bool {
	if p.pos >= len(p.src) || p.src[p.pos] < '0' || p.src[p.pos] > '9' {
		return false
	}
	for p.pos++; p.pos < len(p.src); p.pos++ {
		b := p.src[p.pos]
		if b == '_' {
			if p.pos+1 >= len(p.src) || p.src[p.pos+1] < '0' || p.src[p.pos+1] > '9' {
				return false
			}
			continue
		}
		if b < '0' || b > '9' {
			break
		}
	}
	return true
}

// control reports a character TOML does not allow in a one-line string.
func control(b byte) bool { return (b < 0x20 && b != '\t') || b == 0x7f }

// basicString reads a one-line "..." string with the TOML v1.0.0 escapes.
func (p *fastParser) basicString() (string, bool) {
	if bytes.HasPrefix(p.src[p.pos:], []byte(`"""`)) {
		return "", false
	}
	p.pos++
	start := p.pos
	for p.pos < len(p.src) {
		switch b := p.src[p.pos]; {
		case b == '"':
			s := string(p.src[start:p.pos])
			p.pos++
			return s, true
		case b == '\\':
			return p.escaped(start)
		case control(b):
			return "", false
		}
		p.pos++
	}
	return "", false
}

// escaped finishes a basic string that has an escape, from start.
func (p *fastParser) escaped(start int) (string, bool) {
	buf := append([]byte(nil), p.src[start:p.pos]...)
	for p.pos < len(p.src) {
		b := p.src[p.pos]
		switch {
		case b == '"':
			p.pos++
			return string(buf), true
		case control(b):
			return "", false
		case b != '\\':
			buf = append(buf, b)
			p.pos++
			continue
		}
		p.pos++
		if p.pos >= len(p.src) {
			return "", false
		}
		e := p.src[p.pos]
		p.pos++
		switch e {
		case 'b':
			buf = append(buf, '\b')
		case 't':
			buf = append(buf, '\t')
		case 'n':
			buf = append(buf, '\n')
		case 'f':
			buf = append(buf, '\f')
		case 'r':
			buf = append(buf, '\r')
		case '"':
			buf = append(buf, '"')
		case '\\':
			buf = append(buf, '\\')
		case 'u', 'U':
			n := 4
			if e == 'U' {
				n = 8
			}
			if p.pos+n > len(p.src) {
				return "", false
			}
			hex := p.src[p.pos : p.pos+n]
			for _, h := range hex {
				if !(h >= '0' && h <= '9' || h >= 'a' && h <= 'f' || h >= 'A' && h <= 'F') {
					return "", false
				}
			}
			r, err := strconv.ParseUint(string(hex), 16, 32)
			if err != nil || r > utf8.MaxRune || (r >= 0xd800 && r <= 0xdfff) {
				return "", false
			}
			buf = utf8.AppendRune(buf, rune(r))
			p.pos += n
		default:
			return "", false
		}
	}
	return "", false
}

// literalString reads a one-line '...' string.
func (p *fastParser) literalString() (string, bool) {
	if bytes.HasPrefix(p.src[p.pos:], []byte(`'''`)) {
		return "", false
	}
	p.pos++
	start := p.pos
	for ; p.pos < len(p.src); p.pos++ {
		b := p.src[p.pos]
		if b == '\'' {
			s := string(p.src[start:p.pos])
			p.pos++
			return s, true
		}
		if control(b) {
			return "", false
		}
	}
	return "", false
}

// inlineTable reads a one-line { k = v, ... } (TOML v1.0.0: no newline, no
// trailing comma).
func (p *fastParser) inlineTable(depth int) (any, bool) {
	if depth > maxFastDepth {
		return nil, false
	}
	p.pos++ // '{'
	m := map[string]any{}
	p.ws()
	if p.pos < len(p.src) && p.src[p.pos] == '}' {
		p.pos++
		return m, true
	}
	for {
		p.ws()
		if !p.keyValueDepth(m, nil, depth) {
			return nil, false
		}
		p.ws()
		if p.pos >= len(p.src) {
			return nil, false
		}
		switch p.src[p.pos] {
		case ',':
			p.pos++
			continue
		case '}':
			p.pos++
			return m, true
		}
		return nil, false
	}
}

// splitFrom is the size from which fastStockTree reads a catalogue in two
// halves at once: about 1.5 ms of reading on a slow machine, well above the
// cost of starting a goroutine.
const splitFrom = 32 << 10

// fastStockTree is fastTOML for a stock catalogue of at least from bytes,
// read in two halves at once when the machine has two processors or more.
// The cut is made at a line "[[stock]]" in the second half (stockCut), so the
// second half opens a new stock, as it does in the whole document, and every
// later header in it resolves within that half; the trees are joined by
// appending the second half's stocks to the first's. The join is refused
// (ok false, the caller then reads the whole document the usual way) unless
// the second half holds nothing but stocks and the first holds stocks or
// nothing under that key, so anything that would need the other half to be
// read as TOML reads it (a key or table of the top level in the second half,
// a [stock] table or value in the first) is not read here. sameAsReference
// holds the joined tree to the reference parser.
func fastStockTree(src []byte, from int) (map[string]any, bool) {
	cut := -1
	if len(src) >= from && runtime.GOMAXPROCS(0) > 1 {
		cut = stockCut(src)
	}
	if cut < 0 {
		return fastTOML(src)
	}
	var tail map[string]any
	var tailOK bool
	var wg sync.WaitGroup
	wg.Go(func() { tail, tailOK = fastTOML(src[cut:]) })
	head, ok := fastTOML(src[:cut])
	wg.Wait()
	if !ok || !tailOK || len(tail) != 1 {
		return nil, false
	}
	more, ok := tail["stock"].([]map[string]any)
	if !ok {
		return nil, false
	}
	switch first := head["stock"].(type) {
	case nil: // no stock in the first half (a nil value is not TOML)
		head["stock"] = more
	case []map[string]any:
		head["stock"] = append(first, more...)
	default:
		return nil, false
	}
	return head, true
}

// stockCut is where the first line that is exactly "[[stock]]" at or after
// the middle of src begins, or -1.
func stockCut(src []byte) int {
	const header = "\n[[stock]]"
	for at := len(src) / 2; at < len(src); {
		i := bytes.Index(src[at:], []byte(header))
		if i < 0 {
			return -1
		}
		end := at + i + len(header)
		if end == len(src) || src[end] == '\n' || (src[end] == '\r' && end+1 < len(src) && src[end+1] == '\n') {
			return at + i + 1
		}
		at = end
	}
	return -1
}

// fastStocks reads a stock catalogue into the raw form the reference
// parser fills: by the direct reader when the catalogue is in the layout
// lipoplan writes (directStocks, faststocks.go), else through fastTOML,
// for a document that is clean in shape:
// only the keys the format knows at the top and in each [[stock]] (in
// their exact case), stocks as an array of tables, scalar values where a
// scalar belongs and tables of scalars under fatty_acids, sn2, sfc and
// tags. Any other document (ok false) is read by the reference parser,
// whose metadata words the problems of shape (parseStocks).
func fastStocks(src []byte) (rawStocks, bool) {
	if raw, ok := directStocks(src, splitFrom); ok {
		return raw, true
	}
	var raw rawStocks
	tree, ok := fastStockTree(src, splitFrom)
	if !ok {
		return raw, false
	}
	for k, v := range tree {
		switch k {
		case "currency":
			if !fastScalar(v) {
				return raw, false
			}
			raw.Currency = val{v: v, set: true}
		case "stock":
			list, ok := v.([]map[string]any)
			if !ok {
				return raw, false
			}
			raw.Stock = make([]rawStock, len(list))
			for i, m := range list {
				if !fastStock(m, &raw.Stock[i]) {
					return raw, false
				}
			}
		default:
			return raw, false
		}
	}
	return raw, true
}

// fastStock fills one raw stock from its table; ok false when its shape is
// not clean (fastStocks).
func fastStock(m map[string]any, rs *rawStock) bool {
	for k, v := range m {
		if x := stockScalar(rs, k); x != nil {
			if !fastScalar(v) {
				return false
			}
			*x = val{v: v, set: true}
			continue
		}
		lm := stockTableOf(rs, k)
		t, ok := v.(map[string]any)
		if lm == nil || !ok {
			return false
		}
		for _, e := range t {
			if !fastScalar(e) {
				return false
			}
		}
		*lm = leafMap{m: t, set: true}
	}
	return true
}

// fastScalar reports a string, number or boolean.
func fastScalar(v any) bool {
	switch v.(type) {
	case string, int64, float64, bool:
		return true
	}
	return false
}
