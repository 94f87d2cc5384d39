package catalogue

import (
	"bytes"
	"runtime"
	"strconv"
	"sync"
)

// The direct reader: a stock catalogue in the layout lipoplan writes
// (WriteStocks) is read straight into rawStocks, without the tree of
// map[string]any that fastTOML builds and fastStocks then takes apart. Its
// composition and SFC tables come as numbers (leafMap.f), so each value is
// read once into the map the stock keeps, instead of being boxed into the
// tree, looked up and copied into a second map. On a 300-stock catalogue
// that is most of the loader's work and of its allocations
// (BenchmarkLoadStocks300).
//
// The layout it reads is a subset of fastTOML's: comment and blank lines;
// currency = "..." before the first stock; each stock a [[stock]] header
// (exactly so) with its id, name, price and available as bare or quoted keys
// of scalar values; then any of [stock.fatty_acids], [stock.sn2],
// [stock.sfc] and [stock.tags] (exactly so, each at most once per stock)
// with key = float lines. Anything else (another key or header, an integer,
// string or inline table where a float belongs, a key twice) makes it
// decline (ok false), and the catalogue is then read through fastTOML's tree,
// or by the reference parser: the same document gets the same rawStocks and
// the same catalogue and problems either way (sameAsReference,
// FuzzFastTOML).

// directStocks reads src as above, in two halves at once from from bytes
// on a machine with two processors or more (cut at a "[[stock]]" line past
// the middle, stockCut, as fastStockTree does). The second half opens with
// a stock header, so all of it belongs to stocks and it joins the first by
// appending its stocks.
func directStocks(src []byte, from int) (rawStocks, bool) {
	if !fastInput(src) {
		return rawStocks{}, false
	}
	cut := -1
	if len(src) >= from && runtime.GOMAXPROCS(0) > 1 {
		cut = stockCut(src)
	}
	// room for every stock up front (each opens with a "[[stock]]" line;
	// a count off by a comment or a string only costs a copy), the head's
	// for the tail's stocks too, which then join it in place
	if cut < 0 {
		return directRead(src, bytes.Count(src, []byte(stockHeader)))
	}
	nTail := bytes.Count(src[cut:], []byte(stockHeader))
	var tail rawStocks
	var tailOK bool
	var wg sync.WaitGroup
	wg.Go(func() { tail, tailOK = directRead(src[cut:], nTail) })
	head, ok := directRead(src[:cut], bytes.Count(src[:cut], []byte(stockHeader))+nTail)
	wg.Wait()
	if !ok || !tailOK || tail.Currency.set {
		return rawStocks{}, false
	}
	head.Stock = append(head.Stock, tail.Stock...)
	return head, true
}

// stockHeader opens each stock of a catalogue in the direct reader's layout.
const stockHeader = "[[stock]]"

// directRead reads one document or half of one (directStocks), with room
// for stocks stocks.
func directRead(src []byte, stocks int) (rawStocks, bool) {
	var raw rawStocks
	if stocks > 0 {
		raw.Stock = make([]rawStock, 0, stocks)
	}
	p := &fastParser{src: src, keys: map[string]string{}}
	cur := -1         // the stock being read, -1 before the first
	var leaf *leafMap // its table being read, nil for its own keys
	for {
		p.ws()
		if p.pos >= len(p.src) {
			if len(raw.Stock) == 0 {
				raw.Stock = nil // as the reference parser gives a catalogue without stocks
			}
			return raw, true
		}
		ok := true
		switch p.src[p.pos] {
		case '\n', '\r', '#':
		case '[':
			if bytes.HasPrefix(p.src[p.pos:], []byte(stockHeader)) {
				p.pos += len(stockHeader)
				raw.Stock = append(raw.Stock, rawStock{})
				cur, leaf = len(raw.Stock)-1, nil
				break
			}
			leaf = nil
			if cur >= 0 {
				leaf = p.stockTable(&raw.Stock[cur])
			}
			ok = leaf != nil
		default:
			if leaf != nil {
				ok = p.leafFloat(leaf.f)
			} else {
				ok = p.scalar(&raw, cur)
			}
		}
		if !ok || !p.endOfLine() {
			return raw, false
		}
	}
}

// stockTable reads one of the headers [stock.fatty_acids], [stock.sn2],
// [stock.sfc] and [stock.tags] and returns the table of s it opens, or nil
// for any other header or one s already has.
func (p *fastParser) stockTable(s *rawStock) *leafMap {
	rest := p.src[p.pos:]
	if !bytes.HasPrefix(rest, []byte("[stock.")) {
		return nil
	}
	end := bytes.IndexByte(rest, ']')
	if end < 0 {
		return nil
	}
	lm := stockTableOf(s, string(rest[len("[stock."):end]))
	if lm == nil || lm.set {
		return nil
	}
	p.pos += end + 1
	*lm = leafMap{f: make(map[string]float64, p.entriesHint()), set: true}
	return lm
}

// scalar reads key = value of the top level (cur < 0: currency only) or of
// stock cur (id, name, price, available), each at most once, the value a
// string, number or boolean.
func (p *fastParser) scalar(raw *rawStocks, cur int) bool {
	k, ok := p.key()
	if !ok || !p.equals() {
		return false
	}
	v, ok := p.value(0)
	if !ok || !fastScalar(v) {
		return false
	}
	x := &raw.Currency
	switch {
	case cur >= 0:
		x = stockScalar(&raw.Stock[cur], k)
	case k != "currency":
		x = nil
	}
	if x == nil || x.set {
		return false
	}
	*x = val{v: v, set: true}
	return true
}

// stockScalar is the field of s for the scalar key k, nil for any other
// (both fast readers place a stock's keys by it and by stockTableOf).
func stockScalar(s *rawStock, k string) *val {
	switch k {
	case "id":
		return &s.ID
	case "name":
		return &s.Name
	case "price":
		return &s.Price
	case "available":
		return &s.Available
	}
	return nil
}

// stockTableOf is the field of s for the table key k, nil for any other.
func stockTableOf(s *rawStock, k string) *leafMap {
	switch k {
	case "fatty_acids":
		return &s.FattyAcids
	case "sn2":
		return &s.SN2
	case "sfc":
		return &s.SFC
	case "tags":
		return &s.TAGs
	}
	return nil
}

// leafFloat reads key = float into m, refusing a key already in it.
func (p *fastParser) leafFloat(m map[string]float64) bool {
	k, ok := p.key()
	if !ok || !p.equals() {
		return false
	}
	f, ok := p.float()
	if !ok {
		return false
	}
	n := len(m)
	m[k] = f
	return len(m) > n
}

// equals reads the '=' of key = value and the blanks around it.
func (p *fastParser) equals() bool {
	p.ws()
	if p.pos >= len(p.src) || p.src[p.pos] != '=' {
		return false // a dotted key, or no '='
	}
	p.pos++
	p.ws()
	return true
}

// float reads a TOML float (number, with a fraction or an exponent) as a
// float64 without boxing it; an integer, or anything else, is refused.
func (p *fastParser) float() (float64, bool) {
	if p.pos >= len(p.src) {
		return 0, false
	}
	text, isFloat, ok := p.numberText() // declines what does not open a number
	if !ok || !isFloat {
		return 0, false
	}
	if f, ok := exactDecimal(text); ok {
		return f, true
	}
	f, err := strconv.ParseFloat(string(text), 64)
	return f, err == nil
}
