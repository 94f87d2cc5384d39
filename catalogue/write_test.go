package catalogue

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// roundTripStocks writes c and parses it back.
func roundTripStocks(t testing.TB, c *Catalogue) (*Catalogue, Problems, string) {
	var buf bytes.Buffer
	require.NoError(t, WriteStocks(&buf, c))
	back, ps := ParseStocks(c.File, buf.Bytes())
	return back, ps, buf.String()
}

func roundTripSpec(t testing.TB, s *Spec, cat *Catalogue) (*Spec, Problems, string) {
	var buf bytes.Buffer
	require.NoError(t, WriteSpec(&buf, s))
	back, ps := ParseSpec(s.File, buf.Bytes(), cat)
	return back, ps, buf.String()
}

func TestWriteStocksRoundTripDemo(t *testing.T) {
	cat := DemoStocks()
	back, ps, text := roundTripStocks(t, cat)
	require.Empty(t, ps, "%v\n%s", ps, text)
	assert.Equal(t, cat, back)
	assert.NotContains(t, text, "inf", "unlimited availability is written by omission")
}

func TestWriteSpecRoundTripDemo(t *testing.T) {
	cat := DemoStocks()
	for _, s := range DemoSpecs() {
		back, ps, text := roundTripSpec(t, s, cat)
		require.Empty(t, ps, "%v\n%s", ps, text)
		assert.Equal(t, s, back)
	}
}

func TestWriteSpecRoundTripFull(t *testing.T) {
	s, ps := ParseSpec("lam.toml", []byte(fullSpec), nil)
	require.Empty(t, ps)
	back, ps, text := roundTripSpec(t, s, nil)
	require.Empty(t, ps, "%v\n%s", ps, text)
	assert.Equal(t, s, back)
	assert.Contains(t, text, `"37.5" = { max = 6.0 }`)
	assert.Contains(t, text, `"C18:2" = { min = 2.5 }`)
	assert.Contains(t, text, "max_stocks = 4\n")
}

// Odd but valid values survive: quotes, backslashes, control characters and
// non-ASCII text in names, awkward floats, fractional temperatures, TAGs.
func TestWriteStocksRoundTripOdd(t *testing.T) {
	c := &Catalogue{File: "odd.toml", Currency: "CHF \"Fr.\"", Stocks: []Stock{{
		ID:         "x-1",
		Name:       "Tab\there, quote \" backslash \\ newline\n bell \a, crème, 油",
		Price:      0.1 + 0.2, // 0.30000000000000004 must come back exactly
		Available:  0.001,     // the smallest amount accepted (1 kg)
		FattyAcids: map[string]float64{"C16:0": 33.333333333333336, "C18:1": 66.66666666666667},
		SN2:        map[string]float64{"C16:0": 5, "C18:1": 95},
		SFC:        Curve{{-5, 80}, {0, 70}, {37.5, 1e-3}, {99.9, 0}},
		TAGs:       map[string]float64{"POP": 50, "POO": 25, "OOO": 25},
	}}}
	back, ps, text := roundTripStocks(t, c)
	require.Empty(t, ps.Errors(), "%v\n%s", ps, text)
	assert.Equal(t, c, back)
}

func TestWriteRefusesNonFinite(t *testing.T) {
	c := DemoStocks()
	c.Stocks[0].Price = math.NaN()
	assert.Error(t, WriteStocks(&bytes.Buffer{}, c))
	s, _ := DemoSpec("laminating")
	s.Batch = math.Inf(1)
	assert.Error(t, WriteSpec(&bytes.Buffer{}, s))
	s, _ = DemoSpec("laminating")
	s.Limits[0].Bound = Free()
	assert.Error(t, WriteSpec(&bytes.Buffer{}, s), "a limit with neither side cannot be written")
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "scenario.toml")
	require.NoError(t, WriteFileAtomic(p, []byte("old\n"), 0o600))
	require.NoError(t, WriteFileAtomic(p, []byte("new\n"), 0o640))
	data, err := os.ReadFile(p)
	require.NoError(t, err)
	assert.Equal(t, "new\n", string(data))
	st, err := os.Stat(p)
	require.NoError(t, err)
	assert.Equal(t, os.FileMode(0o640), st.Mode().Perm())
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1, "no temporary file left behind")

	// A directory that does not exist: an error naming the path, nothing written.
	bad := filepath.Join(dir, "no", "such", "dir", "x.toml")
	err = WriteFileAtomic(bad, []byte("x"), 0o644)
	require.Error(t, err)
	assert.True(t, strings.Contains(err.Error(), bad))
	// Renaming onto a directory fails after the temp file is written: the
	// temp file must be cleaned up.
	sub := filepath.Join(dir, "sub")
	require.NoError(t, os.Mkdir(sub, 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(sub, "keep"), nil, 0o644))
	require.Error(t, WriteFileAtomic(sub, []byte("x"), 0o644))
	entries, err = os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 2, "only scenario.toml and sub remain")
}
