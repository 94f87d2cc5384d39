package catalogue

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The in-place edit of stocks and spec files (patch.go). Each case edits
// the values read from a file and states the lines the edit must take out
// and put in; every other line must come back byte for byte (a line diff
// by longest common subsequence), every comment must survive, and the
// edited text must read back through ParseStocks / ParseSpec to exactly
// the edited values. The syntax is TOML v1.0.0 (toml.io/en/v1.0.0); the
// files are read by BurntSushi/toml, the reference parser.

// lineDiff returns the lines of a not in the longest common subsequence of
// a and b (taken out) and those of b not in it (put in), each in order, and
// for each line put in, the line before it in b.
func lineDiff(a, b []string) (out, in, before []string) {
	n, m := len(a), len(b)
	lcs := make([][]int, n+1)
	for i := range lcs {
		lcs[i] = make([]int, m+1)
	}
	for i := n - 1; i >= 0; i-- {
		for j := m - 1; j >= 0; j-- {
			switch {
			case a[i] == b[j]:
				lcs[i][j] = lcs[i+1][j+1] + 1
			case lcs[i+1][j] >= lcs[i][j+1]:
				lcs[i][j] = lcs[i+1][j]
			default:
				lcs[i][j] = lcs[i][j+1]
			}
		}
	}
	i, j := 0, 0
	for i < n || j < m {
		switch {
		case i < n && j < m && a[i] == b[j]:
			i++
			j++
		case j < m && (i == n || lcs[i][j+1] >= lcs[i+1][j]):
			in = append(in, b[j])
			prev := ""
			if j > 0 {
				prev = b[j-1]
			}
			before = append(before, prev)
			j++
		default:
			out = append(out, a[i])
			i++
		}
	}
	return out, in, before
}

func lines(data []byte) []string { return strings.Split(string(data), "\n") }

// comments lists the comments of a file, from # to the end of the line
// (the files here have no # inside a string).
func comments(data []byte) []string {
	var out []string
	for _, l := range lines(data) {
		if i := strings.IndexByte(l, '#'); i >= 0 {
			out = append(out, strings.TrimRight(l[i:], "\r"))
		}
	}
	return out
}

// checkLayout checks that the edit took out exactly out and put in exactly
// in (each after the line named in after, where that is given), and that
// every comment of orig is still there.
func checkLayout(t *testing.T, orig, edited []byte, out, in, after []string) {
	t.Helper()
	gotOut, gotIn, before := lineDiff(lines(orig), lines(edited))
	assert.Equal(t, out, gotOut, "lines taken out")
	assert.Equal(t, in, gotIn, "lines put in")
	for i, a := range after {
		if a != "" && i < len(before) {
			assert.Equal(t, a, before[i], "the line before %q", gotIn[i])
		}
	}
	have := strings.Join(comments(edited), "\n")
	for _, c := range comments(orig) {
		assert.Contains(t, have, c, "a comment is lost")
	}
}

type stocksCase struct {
	name         string
	edit         func(c *Catalogue)
	out, in, aft []string
}

func stockByID(t *testing.T, c *Catalogue, id string) *Stock {
	t.Helper()
	s, ok := c.Find(id)
	require.True(t, ok, id)
	return s
}

func TestPatchStocksDemo(t *testing.T) {
	orig := DemoFiles()["stocks.toml"]
	base, ps := ParseStocks("stocks.toml", orig)
	require.Empty(t, ps.Errors())
	for _, tc := range []stocksCase{
		{name: "a price", edit: func(c *Catalogue) { stockByID(t, c, "rapeseed").Price = 1100 },
			out: []string{"price = 1150.0"}, in: []string{"price = 1100.0"}},
		{name: "several prices", edit: func(c *Catalogue) {
			stockByID(t, c, "palm").Price = 1010
			stockByID(t, c, "palm-olein").Price = 1060.5
			stockByID(t, c, "coconut").Price = 1590
		}, out: []string{"price = 1000.0", "price = 1050.0", "price = 1600.0"}, in: []string{"price = 1010.0", "price = 1060.5", "price = 1590.0"}},
		{name: "an amount on hand where there was none goes after the price", edit: func(c *Catalogue) { stockByID(t, c, "sunflower").Available = 40 },
			in: []string{"available = 40.0"}, aft: []string{"price = 1200.0"}},
		{name: "an amount on hand changed", edit: func(c *Catalogue) { stockByID(t, c, "palm-st-soft").Available = 12.5 },
			out: []string{"available = 8.0"}, in: []string{"available = 12.5"}},
		{name: "unlimited purchase takes the amount out", edit: func(c *Catalogue) { stockByID(t, c, "hosun").Available = math.Inf(1) },
			out: []string{"available = 60.0"}},
		{name: "an SFC point goes in temperature order", edit: func(c *Catalogue) {
			s := stockByID(t, c, "palm")
			s.SFC = append(s.SFC, Point{Temp: 12.5, Solid: s.SFC[0].Solid})
			sortCurve(s.SFC)
		}, in: []string{`"12.5" = 50.0`}, aft: []string{`"10" = 50.0`}},
		{name: "the currency", edit: func(c *Catalogue) { c.Currency = "GBP" },
			out: []string{`currency = "EUR"`}, in: []string{`currency = "GBP"`}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			want := base.Clone()
			tc.edit(want)
			p, err := PatchStocks("stocks.toml", orig, want)
			require.NoError(t, err)
			require.True(t, p.InPlace, p.Reason)
			require.NotEmpty(t, p.Changes)
			back, ps := ParseStocks("stocks.toml", p.Data)
			require.Empty(t, ps.Errors(), "%s", p.Data)
			assert.Equal(t, want, back, "the edited file reads back as the edited values")
			checkLayout(t, orig, p.Data, tc.out, tc.in, tc.aft)
		})
	}
}

func sortCurve(c Curve) {
	for i := 1; i < len(c); i++ {
		for j := i; j > 0 && c[j].Temp < c[j-1].Temp; j-- {
			c[j], c[j-1] = c[j-1], c[j]
		}
	}
}

type specCase struct {
	name         string
	file         string
	edit         func(s *Spec)
	out, in, aft []string
}

// find returns the item of items that match picks, named what in a failure.
func find[T any](t *testing.T, items []T, what string, match func(T) bool) *T {
	t.Helper()
	for i := range items {
		if match(items[i]) {
			return &items[i]
		}
	}
	t.Fatalf("no %s", what)
	return nil
}

func limitByName(t *testing.T, s *Spec, name string) *Limit {
	return find(t, s.Limits, "limit "+name, func(l Limit) bool { return l.Name == name })
}

func sfcAt(t *testing.T, s *Spec, temp float64) *SFCLimit {
	return find(t, s.SFC, fmt.Sprintf("SFC limit at %g", temp), func(l SFCLimit) bool { return l.Temp == temp })
}

func useOf(t *testing.T, s *Spec, id string) *Use {
	return find(t, s.Use, "use bound for "+id, func(u Use) bool { return u.Stock == id })
}

func upTo(v float64) Bound    { return Bound{Min: math.Inf(-1), Max: v} }
func atLeast(v float64) Bound { return Bound{Min: v, Max: math.Inf(1)} }

func readTestdata(t testing.TB, name string) []byte {
	t.Helper()
	data, err := os.ReadFile("../testdata/" + name)
	require.NoError(t, err)
	return data
}

func TestPatchSpecDemo(t *testing.T) {
	cat := DemoStocks()
	files := DemoFiles()
	files["process-margarine.toml"] = readTestdata(t, "process-margarine.toml")
	for _, tc := range []specCase{
		{name: "a maximum", file: "laminating.toml", edit: func(s *Spec) { limitByName(t, s, "safa").Max = 60 },
			out: []string{"safa  = { max = 62.0 }"}, in: []string{"safa  = { max = 60.0 }"}},
		{name: "a longer value keeps the trailing comment in its column", file: "laminating.toml", edit: func(s *Spec) { limitByName(t, s, "trans").Max = 1.25 },
			out: []string{"trans = { max = 1.0 }              # % of fat; rules out the incumbent hardened base"},
			in:  []string{"trans = { max = 1.25 }             # % of fat; rules out the incumbent hardened base"}},
		{name: "a minimum goes into the inline table before the maximum", file: "laminating.toml", edit: func(s *Spec) { sfcAt(t, s, 40).Min = 2 },
			out: []string{`"40" = { max = 8.0 }               # limits waxiness in the mouth`},
			in:  []string{`"40" = { min = 2.0, max = 8.0 }    # limits waxiness in the mouth`}},
		{name: "a side taken out", file: "laminating.toml", edit: func(s *Spec) { sfcAt(t, s, 20).Min = math.Inf(-1) },
			out: []string{`"20" = { min = 30.0, max = 45.0 }  # plastic enough to sheet`},
			in:  []string{`"20" = { max = 45.0 }              # plastic enough to sheet`}},
		{name: "a limit dropped keeps its comment", file: "laminating.toml", edit: func(s *Spec) { s.Limits = dropLimit(s.Limits, "trans") },
			out: []string{"trans = { max = 1.0 }              # % of fat; rules out the incumbent hardened base"},
			in:  []string{"# % of fat; rules out the incumbent hardened base"}},
		{name: "a new limit lines up with its neighbour", file: "laminating.toml", edit: func(s *Spec) {
			s.Limits = append(s.Limits, Limit{Name: "iv", Bound: Bound{Min: 30, Max: 48}})
			s.SortLimits()
		}, in: []string{"iv    = { min = 30.0, max = 48.0 }"}, aft: []string{"safa  = { max = 62.0 }"}},
		{name: "a new SFC temperature goes in order", file: "laminating.toml", edit: func(s *Spec) {
			s.SFC = append(s.SFC, SFCLimit{Temp: 10, Bound: atLeast(40)})
			s.SortLimits()
		}, in: []string{`"10" = { min = 40.0 }`}, aft: []string{"[limits.sfc]                       # % solid at deg C"}},
		{name: "a stock left out that had a bound", file: "laminating.toml", edit: func(s *Spec) { useOf(t, s, "pko").Bound = upTo(0) },
			out: []string{`"pko"     = { max = 10.0 }         # lauric oils with palm soften on storage (common practice)`},
			in:  []string{`"pko"     = { max = 0.0 }          # lauric oils with palm soften on storage (common practice)`}},
		{name: "a stock left out that had none, quoted as its neighbours", file: "laminating.toml", edit: func(s *Spec) {
			s.Use = append(s.Use, Use{Stock: "palm", Bound: upTo(0)})
			s.SortLimits()
		}, in: []string{`"palm"    = { max = 0.0 }`}, aft: []string{`"ph-soy"  = { max = 0.0 }          # no partially hardened fat in a trans-free recipe`}},
		{name: "integer rules as a new table at the end", file: "laminating.toml", edit: func(s *Spec) { s.Rules = Rules{MaxStocks: 4, SmallestShare: 5} },
			in: []string{"[rules]", "max_stocks = 4", "smallest_share = 5.0", ""}},
		{name: "the batch", file: "laminating.toml", edit: func(s *Spec) { s.Batch = 22.5 },
			out: []string{"batch = 20.0                       # tonnes"}, in: []string{"batch = 22.5                       # tonnes"}},
		{name: "a relaxation moves several bounds", file: "shortening.toml", edit: func(s *Spec) {
			sfcAt(t, s, 20).Min = 16.25
			sfcAt(t, s, 35).Max = 13
			limitByName(t, s, "safa").Max = 46.5
		}, out: []string{"safa  = { max = 45.0 }", `"20" = { min = 18.0, max = 30.0 }  # creams at room temperature`, `"35" = { min = 4.0,  max = 12.0 }`},
			in: []string{"safa  = { max = 46.5 }", `"20" = { min = 16.25, max = 30.0 } # creams at room temperature`, `"35" = { min = 4.0,  max = 13.0 }`}},
		{name: "a new limit sorts first in a sorted table", file: "shortening.toml", edit: func(s *Spec) {
			s.Limits = append(s.Limits, Limit{Name: "cox", Bound: upTo(5)})
			s.SortLimits()
		}, in: []string{"cox   = { max = 5.0 }"}, aft: []string{"[limits]"}},
		{name: "the reactor's cost", file: "process-margarine.toml", edit: func(s *Spec) { s.Process.Cost = 50 },
			out: []string{"cost = 45.0                        # EUR per tonne processed (invented)"},
			in:  []string{"cost = 50.0                        # EUR per tonne processed (invented)"}},
		{name: "the reactor's feed", file: "process-margarine.toml", edit: func(s *Spec) {
			s.Process.Interesterify = append(s.Process.Interesterify, "fh-rapeseed")
		}, out: []string{`interesterify = ["palm-st-hard", "pko"]`}, in: []string{`interesterify = ["palm-st-hard", "pko", "fh-rapeseed"]`}},
		{name: "the reactor made to take part", file: "process-margarine.toml", edit: func(s *Spec) {
			s.Process.Through = &Bound{Min: 20, Max: math.Inf(1)}
			s.Process.FeedRatio = []FeedPart{{Stock: "palm-st-hard", Parts: 3}, {Stock: "pko", Parts: 2}}
		}, in: []string{"through = { min = 20.0 }", `feed_ratio = { palm-st-hard = 3.0, pko = 2.0 }`}, aft: []string{`sfc = "predicted"`, "through = { min = 20.0 }"}},
		{name: "no reactor: the table goes, its comment stays", file: "process-margarine.toml", edit: func(s *Spec) { s.Process = nil },
			out: []string{"[process]", `interesterify = ["palm-st-hard", "pko"]`, `method = "chemical"`, "cost = 45.0                        # EUR per tonne processed (invented)", `sfc = "predicted"`},
			in:  []string{"# EUR per tonne processed (invented)"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			orig := files[tc.file]
			base, ps := ParseSpec(tc.file, orig, cat)
			require.Empty(t, ps.Errors())
			want := base.Clone()
			tc.edit(want)
			p, err := PatchSpec(tc.file, orig, want, cat)
			require.NoError(t, err)
			require.True(t, p.InPlace, p.Reason)
			require.NotEmpty(t, p.Changes)
			back, ps := ParseSpec(tc.file, p.Data, cat)
			require.Empty(t, ps.Errors(), "%s", p.Data)
			assert.Equal(t, want, back, "the edited file reads back as the edited values")
			checkLayout(t, orig, p.Data, tc.out, tc.in, tc.aft)
		})
	}
}

func dropLimit(ls []Limit, name string) []Limit {
	var out []Limit
	for _, l := range ls {
		if l.Name != name {
			out = append(out, l)
		}
	}
	return out
}

// Hand-written files in layouts the demo files do not use, each edit
// checked against the whole expected text.
func TestPatchHandWritten(t *testing.T) {
	cat := DemoStocks()
	for _, tc := range []struct {
		name       string
		orig, want string
		edit       func(s *Spec)
	}{{
		// TOML v1.0.0: dotted keys (Keys), a table per bound (Table),
		// integers (Integer), literal strings (String).
		name: "dotted keys, a bound as a table, integers, a literal string, the old rule name",
		orig: `# hand-written spec
name = 'Hand spec'   # a literal string
batch = 10           # whole tonnes

[limits]
iv.min = 38          # dotted keys
iv.max = 48

[limits.safa]        # a bound as a table of its own
max = 45

[limits.sfc]
"20.0" = { min = 30, max = 45 }   # temperature with a decimal

[rules]
min_if_used = 5      # the old name of smallest_share
`,
		edit: func(s *Spec) {
			s.Name = "Hand spec 2"
			s.Batch = 12
			limitByName(t, s, "iv").Bound = upTo(50)
			limitByName(t, s, "safa").Min = 10
			sfcAt(t, s, 20).Min = 31
			s.Rules.SmallestShare = 7.5
			s.Limits = append(s.Limits, Limit{Name: "trans", Bound: upTo(1)})
			s.SortLimits()
		},
		want: `# hand-written spec
name = 'Hand spec 2' # a literal string
batch = 12           # whole tonnes

[limits]
# dotted keys
iv.max = 50
trans = { max = 1.0 }

[limits.safa]        # a bound as a table of its own
min = 10.0
max = 45

[limits.sfc]
"20.0" = { min = 31, max = 45 }   # temperature with a decimal

[rules]
min_if_used = 7.5    # the old name of smallest_share
`,
	}, {
		// TOML v1.0.0, Newline: LF or CRLF; a file need not end in one.
		name: "new tables at the end of a CRLF file without a last line ending",
		orig: "name = \"Bare spec\"\r\nbatch = 5.0",
		edit: func(s *Spec) {
			s.Limits = []Limit{{Name: "iv", Bound: atLeast(30)}}
			s.SFC = []SFCLimit{{Temp: 20, Bound: upTo(40)}}
			s.Use = []Use{{Stock: "palm", Bound: upTo(0)}}
			s.Rules.MaxStocks = 3
		},
		want: "name = \"Bare spec\"\r\nbatch = 5.0\r\n\r\n[limits]\r\niv = { min = 30.0 }\r\n\r\n[limits.sfc]\r\n\"20\" = { max = 40.0 }\r\n" +
			"\r\n[use]\r\npalm = { max = 0.0 }\r\n\r\n[rules]\r\nmax_stocks = 3\r\n",
	}, {
		// TOML v1.0.0, Inline Table: tables inside inline tables; Keys:
		// dotted keys at the top level.
		name: "nested inline tables and dotted keys at the top",
		orig: `name = "Nested"
batch = 1.0
limits.iv = { min = 38 }
limits.sfc = { "20" = { min = 30 }, "30" = { max = 20 } }
use = { palm = { max = 50 } }
`,
		edit: func(s *Spec) {
			limitByName(t, s, "iv").Min = 40
			sfcAt(t, s, 20).Max = 45
			s.Limits = append(s.Limits, Limit{Name: "trans", Bound: upTo(1)})
			s.Use = []Use{{Stock: "pko", Bound: upTo(10)}}
			s.SortLimits()
		},
		want: `name = "Nested"
batch = 1.0
limits.iv = { min = 40 }
limits.sfc = { "20" = { min = 30, max = 45.0 }, "30" = { max = 20 } }
limits.trans = { max = 1.0 }
use = { pko = { max = 10.0 } }
`,
	}, {
		// TOML 1.1 (as BurntSushi/toml reads it): an inline table over
		// several lines, with a comment inside; a value in it is edited in place.
		name: "a value inside an inline table over several lines",
		orig: "name = \"Wide\"\nbatch = 2.0\n[limits]\ntrans = {\n  max = 1.0, # cap\n}\n",
		edit: func(s *Spec) { limitByName(t, s, "trans").Max = 0.75 },
		want: "name = \"Wide\"\nbatch = 2.0\n[limits]\ntrans = {\n  max = 0.75, # cap\n}\n",
	}} {
		t.Run(tc.name, func(t *testing.T) {
			base, ps := ParseSpec("hand.toml", []byte(tc.orig), cat)
			require.Empty(t, ps.Errors())
			want := base.Clone()
			tc.edit(want)
			p, err := PatchSpec("hand.toml", []byte(tc.orig), want, cat)
			require.NoError(t, err)
			require.True(t, p.InPlace, p.Reason)
			assert.Equal(t, tc.want, string(p.Data))
			back, ps := ParseSpec("hand.toml", p.Data, cat)
			require.Empty(t, ps.Errors())
			assert.Equal(t, want, back)
		})
	}
}

func TestPatchHandWrittenStocks(t *testing.T) {
	// TOML v1.0.0: [[array]] tables with sub-tables, indentation with tabs
	// (Whitespace), CRLF line endings, integers.
	orig := strings.ReplaceAll(`# hand stocks
currency = "EUR"

[[stock]]   # first
	id = "a"
	price = 1000   # integer
	[stock.fatty_acids]
	"C16:0" = 50
	"C18:1" = 50

[[stock]]
id = "b"
price = 900.0
[stock.fatty_acids]
"C18:1" = 100.0
`, "\n", "\r\n")
	want := strings.ReplaceAll(`# hand stocks
currency = "EUR"

[[stock]]   # first
	id = "a"
	price = 1010   # integer
	available = 25.0
	[stock.fatty_acids]
	"C16:0" = 49.5
	"C18:1" = 50.5

[[stock]]
id = "b"
name = "B oil"
price = 900.0
[stock.fatty_acids]
"C18:1" = 100.0

[stock.sfc]
"10" = 8.0
"20" = 5.0
`, "\n", "\r\n")
	base, ps := ParseStocks("hand.toml", []byte(orig))
	require.Empty(t, ps.Errors())
	c := base.Clone()
	a, b := &c.Stocks[0], &c.Stocks[1]
	a.Price, a.Available = 1010, 25
	a.FattyAcids["C16:0"], a.FattyAcids["C18:1"] = 49.5, 50.5
	b.Name = "B oil"
	b.SFC = Curve{{Temp: 10, Solid: 8}, {Temp: 20, Solid: 5}}
	p, err := PatchStocks("hand.toml", []byte(orig), c)
	require.NoError(t, err)
	require.True(t, p.InPlace, p.Reason)
	assert.Equal(t, want, string(p.Data))
	back, ps := ParseStocks("hand.toml", p.Data)
	require.Empty(t, ps.Errors())
	assert.Equal(t, c, back)
}

// What cannot be edited in place is written afresh, and the reason says why.
func TestPatchFallsBack(t *testing.T) {
	cat := DemoStocks()
	stocks := DemoFiles()["stocks.toml"]
	full := func(c *Catalogue) []byte {
		var b bytes.Buffer
		require.NoError(t, WriteStocks(&b, c))
		return b.Bytes()
	}

	fewer := cat.Clone()
	fewer.Stocks = fewer.Stocks[:len(fewer.Stocks)-1]
	p, err := PatchStocks("stocks.toml", stocks, fewer)
	require.NoError(t, err)
	assert.False(t, p.InPlace)
	assert.Contains(t, p.Reason, fmt.Sprintf("the file has %d stocks and the workspace %d", len(cat.Stocks), len(fewer.Stocks)))
	assert.Equal(t, full(fewer), p.Data)
	assert.NotEmpty(t, p.Changes, "what differs is still listed")

	p, err = PatchStocks("stocks.toml", []byte("currency = \n"), cat)
	require.NoError(t, err)
	assert.False(t, p.InPlace)
	assert.Contains(t, p.Reason, "no longer reads as a stock catalogue")
	assert.Nil(t, p.Changes)

	p, err = PatchStocks("stocks.toml", nil, cat)
	require.NoError(t, err)
	assert.Contains(t, p.Reason, "empty or missing")
	assert.Equal(t, full(cat), p.Data)

	p, err = PatchStocks("stocks.toml", stocks, cat)
	require.NoError(t, err)
	assert.True(t, p.Unchanged())
	assert.Equal(t, stocks, p.Data)

	// TOML v1.0.0, Array: arrays may span lines and hold comments; such a
	// value is not edited in place.
	spec := `name = "Reactor"
batch = 10.0
[process]
interesterify = [
  "palm-st-hard", # hard
  "pko",
]
method = "chemical"
cost = 40.0
`
	s, ps := ParseSpec("r.toml", []byte(spec), cat)
	require.Empty(t, ps.Errors())
	w := s.Clone()
	w.Process.Interesterify = []string{"palm-st-hard"}
	p, err = PatchSpec("r.toml", []byte(spec), w, cat)
	require.NoError(t, err)
	assert.False(t, p.InPlace)
	assert.Contains(t, p.Reason, "process.interesterify on line 4 spans several lines")
	back, ps := ParseSpec("r.toml", p.Data, cat)
	require.Empty(t, ps.Errors())
	assert.Equal(t, w, back)
	// a value elsewhere in the same file is still edited in place
	w = s.Clone()
	w.Process.Cost = 41
	p, err = PatchSpec("r.toml", []byte(spec), w, cat)
	require.NoError(t, err)
	assert.True(t, p.InPlace, p.Reason)
	assert.Equal(t, strings.Replace(spec, "cost = 40.0", "cost = 41.0", 1), string(p.Data))

	// TOML 1.1 inline table over lines: a new key in it cannot keep its layout
	wide := "name = \"Wide\"\nbatch = 2.0\n[limits]\ntrans = {\n  max = 1.0, # cap\n}\n"
	s, ps = ParseSpec("w.toml", []byte(wide), cat)
	require.Empty(t, ps.Errors())
	w = s.Clone()
	limitByName(t, w, "trans").Min = 0.1
	p, err = PatchSpec("w.toml", []byte(wide), w, cat)
	require.NoError(t, err)
	assert.False(t, p.InPlace)
	assert.Contains(t, p.Reason, "spans several lines")

	// a value that cannot be written at all is an error, as for WriteSpec
	w = s.Clone()
	w.Batch = math.NaN()
	_, err = PatchSpec("w.toml", []byte(wide), w, cat)
	assert.Error(t, err)
}

func TestChangeString(t *testing.T) {
	// the words of the workspace's confirmation (README, "The workspace")
	assert.Equal(t, `stock "palm" price 1000 → 1100`, Change{Table: "stock", Item: "palm", Field: "price", Old: "1000", New: "1100"}.String())
	assert.Equal(t, `SFC limit 20 °C min 30 → none`, Change{Table: "limits.sfc", Item: "20", Field: "min", Old: "30"}.String())
	assert.Equal(t, `limit iv max none → 48`, Change{Table: "limits", Item: "iv", Field: "max", New: "48"}.String())
	assert.Equal(t, `rules max_stocks none → 4`, Change{Table: "rules", Item: "max_stocks", New: "4"}.String())
	assert.Equal(t, `batch 20 → 25`, Change{Item: "batch", Old: "20", New: "25"}.String())
}

// tomlSamples are documents in the forms of the examples of TOML v1.0.0
// (toml.io/en/v1.0.0), written here from memory of the specification
// (not copied), with what BurntSushi/toml adds from TOML 1.1.
var tomlSamples = []string{
	"# comment\nkey = \"value\"  # trailing\nbare_key = 1\nbare-key = 2\n1234 = 3\n",
	"\"127.0.0.1\" = \"value\"\n\"character encoding\" = 'v'\n'key2' = \"v\"\n\"ʎǝʞ\" = 1\n'quoted \"value\"' = 2\n",
	"name = \"Orange\"\nphysical.color = \"orange\"\nphysical.shape = \"round\"\nsite.\"google.com\" = true\n3.14159 = \"pi\"\n",
	"fruit . color = \"yellow\"\nfruit.flavor = \"banana\"\n",
	"str = \"I'm a string. \\\"You can quote me\\\". Name\\tJos\\u00E9\\nLocation\\tSF.\"\n",
	"str1 = \"\"\"\nRoses are red\nViolets are blue\"\"\"\nstr2 = \"\"\"Here are fifteen quotation marks: \"\"\\\"\"\"\\\"\"\"\\\"\"\"\\\"\"\"\\\".\"\"\"\nstr3 = \"\"\"\"This,\" she said, \"is just a pointless statement.\"\"\"\"\n",
	"winpath = 'C:\\Users\\nodejs\\templates'\nregex = '<\\i\\c*\\s*>'\nlines = '''\nThe first newline is\ntrimmed in raw strings.\n'''\nquot15 = '''Here are fifteen quotation marks: \"\"\"\"\"\"\"\"\"\"\"\"\"\"\"'''\napos15 = \"Here are fifteen apostrophes: '''''''''''''''\"\nstr = ''''That,' she said, 'is still pointless.''''\n",
	"int1 = +99\nint2 = 42\nint3 = 0\nint4 = -17\nint5 = 1_000\nhex1 = 0xDEADBEEF\noct1 = 0o755\nbin1 = 0b11010110\n",
	"flt1 = +1.0\nflt2 = 3.1415\nflt3 = -0.01\nflt4 = 5e+22\nflt5 = 1e06\nflt6 = -2E-2\nflt7 = 6.626e-34\nflt8 = 224_617.445_991_228\nsf1 = inf\nsf2 = +inf\nsf3 = -inf\nsf4 = nan\n",
	"bool1 = true\nbool2 = false\nodt1 = 1979-05-27T07:32:00Z\nodt2 = 1979-05-27T00:32:00-07:00\nodt4 = 1979-05-27 07:32:00Z\nldt1 = 1979-05-27T07:32:00\nld1 = 1979-05-27\nlt1 = 07:32:00\n",
	"integers = [ 1, 2, 3 ]\ncolors = [ \"red\", \"yellow\", \"green\" ]\nnested_arrays_of_ints = [ [ 1, 2 ], [3, 4, 5] ]\nnested_mixed_array = [ [ 1, 2 ], [\"a\", \"b\", \"c\"] ]\nnumbers = [ 0.1, 0.2, 0.5, 1, 2, 5 ]\ncontributors = [\n  \"Foo Bar <foo@example.com>\",\n  { name = \"Baz Qux\", email = \"bazqux@example.com\", url = \"https://example.com/bazqux\" }\n]\nintegers2 = [\n  1, 2, 3 # comment\n]\nintegers3 = [\n  1,\n  2, # this is ok\n]\n",
	"[table-1]\nkey1 = \"some string\"\nkey2 = 123\n\n[table-2]\nkey1 = \"another string\"\nkey2 = 456\n[dog.\"tater.man\"]\ntype.name = \"pug\"\n[a.b.c]\n[ d.e.f ]\n[ g .  h  . i ]\n[ j . \"ʞ\" . 'l' ]\n",
	"[x.y.z.w]\n\n[x]\n[fruit]\napple.color = \"red\"\napple.taste.sweet = true\n[fruit.apple.texture]\nsmooth = true\n",
	"name = { first = \"Tom\", last = \"Preston-Werner\" }\npoint = { x = 1, y = 2 }\nanimal = { type.name = \"pug\" }\n",
	"[[products]]\nname = \"Hammer\"\nsku = 738594937\n\n[[products]]  # empty table within the array\n\n[[products]]\nname = \"Nail\"\nsku = 284758393\n\ncolor = \"gray\"\n",
	"[[fruits]]\nname = \"apple\"\n\n[fruits.physical]  # subtable\ncolor = \"red\"\nshape = \"round\"\n\n[[fruits.varieties]]  # nested array of tables\nname = \"red delicious\"\n\n[[fruits.varieties]]\nname = \"granny smith\"\n\n[[fruits]]\nname = \"banana\"\n\n[[fruits.varieties]]\nname = \"plantain\"\n",
	"points = [ { x = 1, y = 2, z = 3 },\n           { x = 7, y = 8, z = 9 },\n           { x = 2, y = 4, z = 8 } ]\n",
	"t = {\n  a = 1, # first\n  b = { c = 2 },\n}\nesc = \"\\e\\x41\"\n",
	"key = \"value\"\r\nother = [1,\r\n 2]\r\n[t]\r\nx = 1 # c\r\n",
}

// The scan finds the keys the reference parser lists (checked inside
// scanTOML against MetaData.Keys), and every value it finds reads, alone,
// as the parser read it in the document.
func TestScanAgreesWithTheReferenceParser(t *testing.T) {
	for _, doc := range append(append([]string(nil), tomlSamples...), stringsOf(DemoFiles())...) {
		var m map[string]any
		md, err := toml.Decode(doc, &m)
		require.NoError(t, err, "%s", doc)
		d, err := scanTOML([]byte(doc), md)
		require.NoError(t, err, "%s", doc)
		checkSpans(t, d, m)
	}
}

func stringsOf(files map[string][]byte) []string {
	var out []string
	for _, k := range SortedKeys(map[string]float64{"laminating.toml": 0, "shortening.toml": 0, "stocks.toml": 0}) {
		out = append(out, string(files[k]))
	}
	return out
}

// checkSpans decodes each value span of d alone and compares it with the
// value at its path in m, the reference parser's reading of the document.
func checkSpans(t testing.TB, d *tomlDoc, m map[string]any) {
	t.Helper()
	for _, e := range d.entries {
		want, ok := lookup(m, e.path)
		if !ok {
			continue // inside an array element the path names by position only
		}
		text := string(d.src[e.val.start:e.val.end])
		var one map[string]any
		_, err := toml.Decode("v = "+text, &one)
		require.NoError(t, err, "value %q of %v", text, e.path)
		assert.Equal(t, nanFree(want), nanFree(one["v"]), "value %q of %v", text, e.path)
	}
}

// nanFree writes each NaN in v as the text "NaN", so that values compare
// (NaN is equal to nothing, itself included).
func nanFree(v any) any {
	switch x := v.(type) {
	case float64:
		if math.IsNaN(x) {
			return "NaN"
		}
	case map[string]any:
		out := make(map[string]any, len(x))
		for k, e := range x {
			out[k] = nanFree(e)
		}
		return out
	case []map[string]any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = nanFree(e)
		}
		return out
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = nanFree(e)
		}
		return out
	}
	return v
}

func lookup(m map[string]any, path []string) (any, bool) {
	var cur any = m
	for _, p := range path {
		switch x := cur.(type) {
		case map[string]any:
			v, ok := x[p]
			if !ok {
				return nil, false
			}
			cur = v
		case []map[string]any:
			i, ok := arrayIndex(p)
			if !ok || i >= len(x) {
				return nil, false
			}
			cur = x[i]
		case []any:
			i, ok := arrayIndex(p)
			if !ok || i >= len(x) {
				return nil, false
			}
			cur = x[i]
		default:
			return nil, false
		}
	}
	return cur, true
}
