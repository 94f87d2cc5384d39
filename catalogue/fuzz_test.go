package catalogue

import (
	"bytes"
	"math"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
	"github.com/stretchr/testify/require"
)

// FuzzParse feeds arbitrary bytes to ParseStocks and ParseSpec (with and
// without a catalogue). They must never panic and must return either a value
// or at least one error, never both and never neither; whatever parses must
// survive a write and a re-parse unchanged. Seeds: the demo files and the
// bad-input corpus. Run: go test ./catalogue -fuzz FuzzParse -fuzztime 20s
func FuzzParse(f *testing.F) {
	for _, data := range DemoFiles() {
		f.Add(data)
	}
	for _, b := range readBadCorpus(f) {
		f.Add(b.data)
	}
	demo := DemoStocks()
	f.Fuzz(func(t *testing.T, data []byte) {
		cat, ps := ParseStocks("f.toml", data)
		if cat == nil {
			require.NotEmpty(t, ps.Errors(), "no catalogue and no error")
		} else {
			require.Empty(t, ps.Errors(), "a catalogue together with errors")
			var buf bytes.Buffer
			require.NoError(t, WriteStocks(&buf, cat))
			back, ps2 := ParseStocks("f.toml", buf.Bytes())
			require.Empty(t, ps2.Errors(), "written catalogue does not parse:\n%s\n%v", buf.String(), ps2)
			require.Equal(t, cat, back)
		}
		for _, c := range []*Catalogue{nil, demo} {
			s, ps := ParseSpec("f.toml", data, c)
			if s == nil {
				require.NotEmpty(t, ps.Errors(), "no spec and no error")
				continue
			}
			require.Empty(t, ps.Errors(), "a spec together with errors")
			var buf bytes.Buffer
			require.NoError(t, WriteSpec(&buf, s))
			back, ps2 := ParseSpec("f.toml", buf.Bytes(), c)
			require.Empty(t, ps2.Errors(), "written spec does not parse:\n%s\n%v", buf.String(), ps2)
			require.Equal(t, s, back)
		}
	})
}

// fuzzBytes hands out the fuzzer's bytes one at a time (0 when used up).
type fuzzBytes struct{ b []byte }

func (f *fuzzBytes) next() int {
	if len(f.b) == 0 {
		return 0
	}
	v := int(f.b[0])
	f.b = f.b[1:]
	return v
}

// value is a number in 0..100 with quarters, thirds or tenths.
func (f *fuzzBytes) value() float64 {
	whole := float64(f.next() % 101)
	switch f.next() % 4 {
	case 1:
		return whole + 0.25
	case 2:
		return math.Min(100, whole+1.0/3)
	case 3:
		return whole + 0.1
	}
	return whole
}

// FuzzPatch applies random edits of the kinds the workspace makes (prices,
// amounts on hand, limit sides set and cleared, limits, SFC temperatures
// and [use] bounds added and dropped, stocks left out, rules, the batch, the
// reactor's cost and share through it) to the demo files and checks the in-place edit: it is
// made in place, reads back (ParseStocks, ParseSpec) to exactly the edited
// values, keeps every comment, and leaves every line but one per changed
// value byte for byte. Edits the workspace would refuse (Catalogue.Check,
// Spec.Check) are not written. Run: go test ./catalogue -run '^$' -fuzz
// FuzzPatch -fuzztime 2000x
func FuzzPatch(f *testing.F) {
	f.Add([]byte{0, 3, 40, 1, 1, 5, 7, 3, 0, 3, 1, 20, 2})
	f.Add([]byte{1, 5, 6, 8, 2, 9, 4, 1, 6, 3, 30, 1, 10, 5})
	f.Add([]byte{2, 11, 50, 3, 7, 2, 1, 9, 3, 40, 0, 8, 12, 1})
	f.Add([]byte{0, 4, 0, 4, 1, 4, 2, 8, 0, 8, 1, 8, 2, 8, 3})
	files := DemoFiles()
	files["process-margarine.toml"] = readTestdata(f, "process-margarine.toml")
	names := []string{"laminating.toml", "shortening.toml", "process-margarine.toml"}
	cat := DemoStocks()
	specs := make([]*Spec, len(names))
	for i, n := range names {
		s, ps := ParseSpec(n, files[n], cat)
		require.Empty(f, ps.Errors())
		specs[i] = s
	}
	temps := []float64{5, 10, 12.5, 15, 20, 25, 30, 33.3, 35, 40, 45}
	limitNames := append(append([]string(nil), Properties...), "C18:2", "C16:0", "C18:1t")
	f.Fuzz(func(t *testing.T, data []byte) {
		r := &fuzzBytes{b: data}
		pick := r.next() % len(names)
		c, s := cat.Clone(), specs[pick].Clone()
		for n := 0; len(r.b) > 0 && n < 12; n++ {
			st := &c.Stocks[r.next()%len(c.Stocks)]
			switch r.next() % 12 {
			case 0:
				st.Price = 500 + 10*r.value()
			case 1:
				st.Available = r.value() + 1
			case 2:
				st.Available = math.Inf(1)
			case 3, 4:
				if len(s.Limits) > 0 {
					b := &s.Limits[r.next()%len(s.Limits)].Bound
					setSide(b, r.next()%3, r.value())
				}
			case 5:
				if len(s.Limits) > 0 {
					i := r.next() % len(s.Limits)
					s.Limits = append(s.Limits[:i:i], s.Limits[i+1:]...)
				}
			case 6:
				name := limitNames[r.next()%len(limitNames)]
				if !hasLimit(s, name) {
					b := Free()
					setSide(&b, r.next()%2, r.value())
					s.Limits = append(s.Limits, Limit{Name: name, Bound: b})
				}
			case 7:
				temp := temps[r.next()%len(temps)]
				i := sfcIndex(s, temp)
				if i < 0 {
					s.SFC = append(s.SFC, SFCLimit{Temp: temp, Bound: Free()})
					i = len(s.SFC) - 1
				}
				setSide(&s.SFC[i].Bound, r.next()%3, r.value())
				if !s.SFC[i].HasMin() && !s.SFC[i].HasMax() {
					s.SFC = append(s.SFC[:i:i], s.SFC[i+1:]...)
				}
			case 8: // left out, as the workspace writes it
				setUse(s, st.ID, Bound{Min: math.Inf(-1), Max: 0})
			case 9:
				b := Free()
				setSide(&b, r.next()%2, r.value())
				setUse(s, st.ID, b)
			case 10:
				s.Rules = Rules{MaxStocks: r.next() % 6, SmallestShare: float64(r.next() % 8)}
			case 11:
				s.Batch = 1 + r.value()
				if p := s.Process; p != nil {
					p.Cost = 10 + r.value()
					switch r.next() % 3 {
					case 0:
						p.Through = nil
					case 1: // the reactor made to take part
						p.Through = &Bound{Min: 1 + r.value()/2, Max: math.Inf(1)}
					}
				}
			}
			s.SortLimits()
		}
		keepFree := s.Limits[:0]
		for _, l := range s.Limits {
			if l.HasMin() || l.HasMax() {
				keepFree = append(keepFree, l)
			}
		}
		s.Limits = keepFree
		if c.Check().Err() != nil || s.Check(c).Err() != nil {
			return // refused by the workspace: never written
		}
		ps, err := PatchStocks("stocks.toml", files["stocks.toml"], c)
		require.NoError(t, err)
		checkFuzzPatch(t, files["stocks.toml"], ps)
		back, probs := ParseStocks("stocks.toml", ps.Data)
		require.Empty(t, probs.Errors())
		c.File = "stocks.toml"
		require.Equal(t, c, back)

		name := names[pick]
		pp, err := PatchSpec(name, files[name], s, c)
		require.NoError(t, err)
		checkFuzzPatch(t, files[name], pp)
		sb, probs := ParseSpec(name, pp.Data, c)
		require.Empty(t, probs.Errors(), "%s", pp.Data)
		s.File, s.ID = name, SpecID(name)
		require.Equal(t, asRead(s), sb)
	})
}

// checkFuzzPatch checks that p was made in place from orig, kept every
// comment and changed at most one line of orig per changed value.
func checkFuzzPatch(t *testing.T, orig []byte, p Patch) {
	t.Helper()
	require.True(t, p.InPlace, p.Reason)
	out, _, _ := lineDiff(lines(orig), lines(p.Data))
	require.LessOrEqual(t, len(out), len(p.Changes), "lines taken out %q for changes %v", out, p.Changes)
	have := strings.Join(comments(p.Data), "\n")
	for _, cm := range comments(orig) {
		require.Contains(t, have, cm)
	}
}

// asRead is s with no limits, SFC limits or [use] bounds written as no
// slice, as ParseSpec reads them.
func asRead(s *Spec) *Spec {
	if len(s.Limits) == 0 {
		s.Limits = nil
	}
	if len(s.SFC) == 0 {
		s.SFC = nil
	}
	if len(s.Use) == 0 {
		s.Use = nil
	}
	return s
}

// setSide sets the min (0), the max (1) or clears the min (2) of b.
func setSide(b *Bound, side int, v float64) {
	switch side {
	case 0:
		b.Min = v
	case 1:
		b.Max = v
	default:
		b.Min = math.Inf(-1)
	}
}

func hasLimit(s *Spec, name string) bool {
	for _, l := range s.Limits {
		if l.Name == name {
			return true
		}
	}
	return false
}

func sfcIndex(s *Spec, temp float64) int {
	for i, l := range s.SFC {
		if l.Temp == temp {
			return i
		}
	}
	return -1
}

func setUse(s *Spec, id string, b Bound) {
	for i := range s.Use {
		if s.Use[i].Stock == id {
			s.Use[i].Bound = b
			return
		}
	}
	s.Use = append(s.Use, Use{Stock: id, Bound: b})
}

// FuzzTOMLScan feeds arbitrary text to the scanner behind the in-place
// edit. On every document the reference parser (BurntSushi/toml) accepts,
// it must not panic, and where it does not give up it must find the keys
// the parser lists (scanTOML checks) with value spans that read, alone, as
// the parser read them. A stocks or spec file among them gets one value
// changed, which must read back. Seeds: samples in the forms of TOML
// v1.0.0's examples, the demo files and the bad-input corpus. Run: go test
// ./catalogue -run '^$' -fuzz FuzzTOMLScan -fuzztime 100000x
func FuzzTOMLScan(f *testing.F) {
	for _, s := range tomlSamples {
		f.Add([]byte(s))
	}
	for _, data := range DemoFiles() {
		f.Add(data)
	}
	for _, b := range readBadCorpus(f) {
		f.Add(b.data)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if !utf8.Valid(data) || CheckTOMLDepth(data) != nil {
			return
		}
		var m map[string]any
		md, err := toml.Decode(string(data), &m)
		if err != nil {
			return
		}
		if d, err := scanTOML(data, md); err == nil {
			checkSpans(t, d, m)
		}
		if cat, _ := ParseStocks("f.toml", data); cat != nil {
			c := cat.Clone()
			c.Stocks[0].Price++
			p, err := PatchStocks("f.toml", data, c)
			require.NoError(t, err)
			back, ps := ParseStocks("f.toml", p.Data)
			require.Empty(t, ps.Errors(), "in place %v (%s):\n%s", p.InPlace, p.Reason, p.Data)
			require.Equal(t, c, back)
		}
		if s, _ := ParseSpec("f.toml", data, nil); s != nil {
			w := s.Clone()
			w.Batch++
			if len(w.Limits) > 0 {
				w.Limits = w.Limits[1:]
			}
			p, err := PatchSpec("f.toml", data, w, nil)
			require.NoError(t, err)
			back, ps := ParseSpec("f.toml", p.Data, nil)
			if w.Check(nil).Err() == nil {
				require.Empty(t, ps.Errors(), "in place %v (%s):\n%s", p.InPlace, p.Reason, p.Data)
				require.Equal(t, asRead(w), back)
			}
		}
	})
}
