package catalogue

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
	"github.com/stretchr/testify/require"
)

// The fast reader is held to the reference parser, BurntSushi/toml: on a
// document it reads, the tree must be the one the reference parser
// decodes, and the stock catalogue and its problems must be the ones the
// reference path gives (parseStocks).

// sameAsReference checks data both ways; it reports whether the fast
// reader read the document.
func sameAsReference(t *testing.T, data []byte) bool {
	t.Helper()
	tree, ok := fastTOML(data)
	// and read in two halves whatever the size (fastStockTree with from
	// 0): the joined tree must be the reference parser's as well
	split, sok := fastStockTree(data, 0)
	if ok || sok {
		var want map[string]any
		_, err := toml.Decode(string(data), &want)
		require.NoError(t, err, "the fast reader read (whole %v, in two halves %v) a document the reference parser refuses:\n%s", ok, sok, data)
		if ok {
			require.Equal(t, want, tree, "the fast reader's tree differs from the reference parser's:\n%s", data)
		}
		if sok {
			require.Equal(t, want, split, "the fast reader's tree read in two halves differs from the reference parser's:\n%s", data)
		}
	}
	raw, fast := fastStocks(data)
	if !fast {
		return ok
	}
	var want rawStocks
	md, err := toml.Decode(string(data), &want)
	require.NoError(t, err)
	require.Empty(t, md.Undecoded(), "fastStocks read a document with keys the reference parser does not place:\n%s", data)
	require.Equal(t, want, untypedStocks(raw))
	cat, ps := ParseStocks("f.toml", data)
	refCat, refPs, _ := parseStocks("f.toml", data)
	require.Equal(t, refCat, cat, "catalogue read by the fast reader differs:\n%s", data)
	require.Equal(t, refPs, ps, "problems found through the fast reader differ:\n%s", data)
	return ok
}

// untypedStocks is raw with the tables the direct reader read as numbers
// (leafMap.f) as the reference parser gives them (leafMap.m).
func untypedStocks(raw rawStocks) rawStocks {
	out := rawStocks{Currency: raw.Currency, Stock: make([]rawStock, len(raw.Stock))}
	if raw.Stock == nil {
		out.Stock = nil
	}
	for i, s := range raw.Stock {
		s.FattyAcids, s.SN2, s.SFC, s.TAGs = s.FattyAcids.untyped(), s.SN2.untyped(), s.SFC.untyped(), s.TAGs.untyped()
		out.Stock[i] = s
	}
	return out
}

// fastCorpus is the demo files, the bad-input corpus, the TOML v1.0.0
// samples and a generated 300-stock catalogue.
func fastCorpus(tb testing.TB) [][]byte {
	var out [][]byte
	for _, data := range DemoFiles() {
		out = append(out, data)
	}
	for _, b := range readBadCorpus(tb) {
		out = append(out, b.data)
	}
	for _, s := range tomlSamples {
		out = append(out, []byte(s))
	}
	return append(out, stocksN(tb, 300))
}

// stocksN writes a catalogue of n stocks: the demo stocks and seeded
// variants of them (synthetic data for timing and comparison only).
func stocksN(tb testing.TB, n int) []byte {
	demo := DemoStocks()
	cat := demo.Clone()
	r := rand.New(rand.NewPCG(uint64(n), 1))
	for k := 0; len(cat.Stocks) < n; k++ {
		s := demo.Stocks[k%len(demo.Stocks)]
		s.ID = fmt.Sprintf("%s-v%03d", s.ID, k)
		s.Price *= 0.9 + 0.2*r.Float64()
		cat.Stocks = append(cat.Stocks, s)
	}
	var b bytes.Buffer
	if err := WriteStocks(&b, cat); err != nil {
		tb.Fatal(err)
	}
	return b.Bytes()
}

func TestFastStocksSame(t *testing.T) {
	read := 0
	for _, data := range fastCorpus(t) {
		if sameAsReference(t, data) {
			read++
		}
	}
	require.Greater(t, read, 10, "the fast reader read almost none of the corpus")
	_, ok := fastStocks(DemoFiles()["stocks.toml"])
	require.True(t, ok, "the demo catalogue is of clean shape and must take the fast path")
}

// TestDirectStocks: what WriteStocks writes, the demo catalogue and a
// 300-stock one, whole and in two halves, is read by the direct reader and
// held to the reference parser (sameAsReference); the shapes it leaves to
// the tree reader are read there the same way.
func TestDirectStocks(t *testing.T) {
	for _, data := range [][]byte{DemoFiles()["stocks.toml"], stocksN(t, 300)} {
		whole, ok := directStocks(data, len(data)+1)
		require.True(t, ok, "a catalogue as WriteStocks writes it is read directly")
		require.NotNil(t, whole.Stock[0].FattyAcids.f, "tables are read as numbers")
		halves, ok := directStocks(data, 0)
		require.True(t, ok, "and read directly in two halves")
		require.Equal(t, whole, halves, "two halves read as the whole")
		sameAsReference(t, data)
	}
	stock := "[[stock]]\nid = \"a\"\nprice = 1.0\n[stock.fatty_acids]\n\"C16:0\" = 100.0\n"
	for _, doc := range []string{
		stock + "[stock.sfc]\n10 = 5\n",                    // an integer
		stock + "[stock.sfc]\n10 = \"5\"\n",                // a string
		stock + "[stock.fatty_acids]\n\"C18:0\" = 1.0\n",   // a table twice
		stock + "\"C16:0\" = 1.0\n",                        // a key twice
		stock + "[stock.other]\nx = 1.0\n",                 // another table
		stock + "[ stock.sfc ]\n10 = 5.0\n",                // blanks in a header
		"[stock.sfc]\n10 = 5.0\n" + stock,                  // a table before any stock
		stock + "name = \"late\"\n",                        // a stock key after its table
		"[[stock]]\nid = \"a\"\nid = \"b\"\n",              // a key twice
		"[[stock]]\nsfc = {10 = 5.0}\n",                    // an inline table
		"[[stock]]\nPrice = 1.0\n",                         // a key in another case
		"currency = \"EUR\"\ncurrency = \"USD\"\n" + stock, // a key twice
		"colour = \"red\"\n" + stock,                       // an unknown top-level key
	} {
		_, ok := directStocks([]byte(doc), 0)
		require.False(t, ok, "%q is left to the tree reader", doc)
		sameAsReference(t, []byte(doc))
	}
	for _, doc := range []string{
		"currency = \"EUR\"\r\n# note\r\n" + strings.ReplaceAll(stock, "\n", "\r\n"),
		stock + "[stock.sfc] # measured\n\"10\" = 5.0 # pulsed NMR\n15 = 1_0.5\n",
		stock + "[stock.tags]\nPOP = 1e1\n\"POO\" = -0.0\n",
		"'currency' = \"EUR\"\n\n[[stock]]\n\"id\" = \"a\"\n'price' = 2\n",
		stock + "[stock.sn2]\n",
	} {
		_, ok := directStocks([]byte(doc), 0)
		require.True(t, ok, "%q is read directly", doc)
		sameAsReference(t, []byte(doc))
	}
}

// TestFastStockTreeHalves checks the reading in two halves on documents cut
// at a [[stock]] line: a large catalogue is read that way, and documents
// whose second half needs the first (a top-level table after the stocks, a
// [stock] table before them, a key defined in both halves) are either read
// as the reference parser (BurntSushi/toml) reads them or left to it.
func TestFastStockTreeHalves(t *testing.T) {
	big := stocksN(t, 300)
	require.Positive(t, stockCut(big))
	tree, ok := fastStockTree(big, 0)
	require.True(t, ok, "a clean 300-stock catalogue is read in two halves")
	whole, _ := fastTOML(big)
	require.Equal(t, whole, tree)
	require.Len(t, tree["stock"], 300)

	stock := "[[stock]]\nid = \"a\"\n[stock.sfc]\n10 = 1.0\n"
	pad := strings.Repeat("\n", 40)
	for _, doc := range []string{
		"currency = \"EUR\"\n" + stock + stock,
		stock + stock + stock + "[other]\nx = 1\n",
		stock + stock + stock + "currency = \"EUR\"\n",
		"[stock]\nid = \"a\"\n" + pad + stock,
		"stock = 1\n" + pad + stock,
		"stock = [{id = \"z\"}]\n" + pad + stock,
		"stock = []\n" + pad + stock,
		"[a]\nx = 1\n" + pad + pad + stock + "[a]\ny = 2\n",
		"[stock.sfc]\n10 = 1.0\n" + pad + stock,
		strings.ReplaceAll(stock+stock+stock, "\n", "\r\n"),
	} {
		require.Positive(t, stockCut([]byte(doc)), "%q has a cut", doc)
		sameAsReference(t, []byte(doc))
	}
	// no cut at a header that is not exactly "[[stock]]" on its line
	for _, doc := range []string{
		stock + pad + "[[stocks]]\nid = 1\n",
		stock + pad + "[[stock]] # a comment\nid = \"b\"\n",
		stock + pad + "[[ stock ]]\nid = \"b\"\n",
	} {
		require.Equal(t, -1, stockCut([]byte(doc)), "%q", doc)
		sameAsReference(t, []byte(doc))
	}
}

// TestFastTOMLForms checks forms of TOML v1.0.0 (toml.io/en/v1.0.0) one by
// one against the reference parser: those the fast reader must read, and
// those it must leave to the reference parser (declined), legal or not.
func TestFastTOMLForms(t *testing.T) {
	read := []string{
		"a = 1\n", "a = -0\n", "a = +17\n", "a = 1_000\n", "a = 3.1415\n", "a = -0.01\n",
		"a = 5e+22\n", "a = 1e06\n", "a = -2E-2\n", "a = 6.626e-34\n", "a = 224_617.445_991\n",
		"a = true\nb = false\n", `a = "tab\there \"q\" \\ \u00e9 \U0001F600"` + "\n",
		"a = 'C:\\Users\\x'\n", `"C18:1" = 20.0` + "\n", "'lit key' = 1\n",
		"a = { x = 1, y = \"z\", n = { m = 2.5 } }\n", "a = {}\n",
		"[t]\nx = 1\n[t.u]\ny = 2\n", "[ t . \"u v\" ]\nx = 1\n",
		"[[s]]\nid = 1\n[s.f]\nk = 2\n[[s]]\nid = 2\n",
		"# comment\r\na = 1 # trailing\r\n", "a = 1", "\n\n\t\n",
		"[x.y.z]\nw = 1\n[x.y.v]\nw = 2\n",
	}
	for _, s := range read {
		t.Run(s, func(t *testing.T) {
			_, ok := fastTOML([]byte(s))
			require.True(t, ok, "declined")
			sameAsReference(t, []byte(s))
		})
	}
	declined := []string{
		// legal TOML outside the subset
		"a.b = 1\n", "a = [1, 2]\n", "a = \"\"\"x\"\"\"\n", "a = '''x'''\n", "a = inf\n", "a = nan\n",
		"a = 0x1f\n", "a = 0o17\n", "a = 0b1\n", "a = 1979-05-27\n", "a = 07:32:00\n",
		"[x.y]\n[x]\n", "\xef\xbb\xbfa = 1\n",
		"a = { x = 1,\n y = 2 }\n", "a = { x = 1, }\n", `a = "\e"` + "\n", `a = "\x41"` + "\n",
		// not TOML
		"a = 1\na = 2\n", "[t]\n[t]\n", "[[t]]\n[t]\n", "[t]\n[[t]]\n", "a = 1\n[a]\n",
		"a = { x = 1 }\n[a]\n", "a = { x = 1 }\n[a.b]\n", "a = 01\n", "a = 1__0\n", "a = 1_\n",
		"a = 1.\n", "a = .5\n", "a = 1e\n", "a = 99999999999999999999\n", "a = 1e400\n",
		"a = \"x\ny\"\n", "a = \"\\uD800\"\n", "a = 1 b = 2\n", "[t] x = 1\n", "a = \n", "= 1\n",
		"\"\" = 1\n", "a = 1\rb = 2\n", "# bell \x07\n", "a = \"x\x7f\"\n", "a = tru\n", "a = truex\n",
		"[t\n", "[[t]\n", "a = {x = 1\n",
	}
	for _, s := range declined {
		t.Run(s, func(t *testing.T) {
			_, ok := fastTOML([]byte(s))
			require.False(t, ok, "read, but the fast reader should leave it to the reference parser")
		})
	}
}

// TestFastTOMLStructure holds the fast reader to the reference parser
// (sameAsReference) on documents generated from the forms where the
// reading of structure can go wrong (toml.io/en/v1.0.0, "Table", "Inline
// Table", "Array of Tables", "Keys"): headers and arrays of tables with
// one to three parts, re-opened, implied and nested; the same key bare
// and quoted; dotted names inside quotes; inline tables beside headers
// that name them; comments and CRLF line ends. Byte-level fuzzing seldom
// makes such a document.
func TestFastTOMLStructure(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 9))
	keys := []string{"a", "b", `"a"`, "'b'", `"a.b"`, "stock", "id", "fatty_acids", `"C16:0"`, "sfc", `"20"`, "c"}
	vals := []string{"1", "-0", "1.5", "1e3", `"x"`, "'y'", "true", "{}", "{ a = 1 }", "{ b = { c = 2 }, a = 'z' }",
		"0.0", "+7", `"\u00e9"`, "1_0", "2 # note"}
	ends := []string{"\n", "\r\n", " # c\n"}
	name := func() string {
		parts := make([]string, 1+r.IntN(3))
		for i := range parts {
			parts[i] = keys[r.IntN(len(keys))]
		}
		return strings.Join(parts, ".")
	}
	read := 0
	for range 20000 {
		var b strings.Builder
		for range 1 + r.IntN(8) {
			switch r.IntN(4) {
			case 0:
				b.WriteString("[" + name() + "]")
			case 1:
				b.WriteString("[[" + name() + "]]")
			default:
				b.WriteString(keys[r.IntN(len(keys))] + " = " + vals[r.IntN(len(vals))])
			}
			b.WriteString(ends[r.IntN(len(ends))])
		}
		if sameAsReference(t, []byte(b.String())) {
			read++
		}
	}
	require.Greater(t, read, 5000, "the fast reader read almost none of the generated documents")
}

// FuzzFastTOML holds the fast reader to the reference parser on arbitrary
// text (sameAsReference). Seeds: fastCorpus. Run: go test ./catalogue -run
// '^$' -fuzz FuzzFastTOML -fuzztime 100000x
func FuzzFastTOML(f *testing.F) {
	for _, data := range fastCorpus(f) {
		f.Add(data)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if !utf8.Valid(data) {
			return
		}
		sameAsReference(t, data)
	})
}

// BenchmarkLoadStocks300 reads a 300-stock catalogue by the fast reader
// (Fast, what ParseStocks does) and by the reference path (Reference:
// BurntSushi/toml and its metadata), and the two in turn with their ratio
// as the metric fast/reference.
func BenchmarkLoadStocks300(b *testing.B) {
	data := stocksN(b, 300)
	fast := func() {
		if _, ps := ParseStocks("s.toml", data); len(ps.Errors()) > 0 {
			b.Fatal(ps)
		}
	}
	ref := func() {
		if _, ps, _ := parseStocks("s.toml", data); len(ps.Errors()) > 0 {
			b.Fatal(ps)
		}
	}
	b.Run("Fast", func(b *testing.B) {
		for b.Loop() {
			fast()
		}
	})
	b.Run("Reference", func(b *testing.B) {
		for b.Loop() {
			ref()
		}
	})
	b.Run("Interleaved", func(b *testing.B) {
		var tf, tr time.Duration
		for b.Loop() {
			t0 := time.Now()
			fast()
			t1 := time.Now()
			ref()
			tf, tr = tf+t1.Sub(t0), tr+time.Since(t1)
		}
		b.ReportMetric(float64(tf)/float64(tr), "fast/reference")
	})
}
