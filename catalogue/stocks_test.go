package catalogue

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The stock used by several tests: a palm kernel oil with a composition
// inside the Codex CXS 210-1999 ranges (typical values, chosen for the test).
const pkoStock = `
[[stock]]
id = "pko-r"
name = "Palm kernel oil, refined"
price = 1280.0
available = 60.0
[stock.fatty_acids]
"C8:0" = 3.8
"C10:0" = 3.7
"C12:0" = 48.5
"C14:0" = 16.3
"C16:0" = 8.3
"C18:0" = 2.2
"C18:1" = 15.0
"C18:2" = 2.2
[stock.sfc]
"20" = 28.0
"10" = 48.0
"37.5" = 0.0
`

func TestParseStocksValues(t *testing.T) {
	cat, ps := ParseStocks("stocks.toml", []byte(pkoStock+`
[[stock]]
id = "rapeseed"
price = 1150
[stock.fatty_acids]
"C16:0" = 4.5
"C18:0" = 1.7
"C18:1" = 62.2
"C18:2" = 20.0
"C18:3" = 9.6
"C20:1" = 2.0
`))
	require.Empty(t, ps, "%v", ps)
	require.NotNil(t, cat)
	assert.Equal(t, "stocks.toml", cat.File)
	assert.Equal(t, "EUR", cat.Currency, "currency defaults to EUR")
	require.Len(t, cat.Stocks, 2)
	pko := cat.Stocks[0]
	assert.Equal(t, "pko-r", pko.ID)
	assert.Equal(t, 1280.0, pko.Price)
	assert.Equal(t, 60.0, pko.Available)
	assert.True(t, pko.Limited())
	assert.Equal(t, 48.5, pko.FattyAcids["C12:0"])
	assert.Equal(t, Curve{{10, 48}, {20, 28}, {37.5, 0}}, pko.SFC, "curve sorted by temperature")
	assert.Nil(t, pko.SN2)
	assert.Nil(t, pko.TAGs)
	rs := cat.Stocks[1]
	assert.True(t, math.IsInf(rs.Available, 1), "no available = unlimited")
	assert.Equal(t, 1150.0, rs.Price, "integer price accepted")
	assert.Equal(t, "rapeseed", rs.Name, "name defaults to the id")
}

// The example message of the brief, character for character.
func TestUnknownKeyMessage(t *testing.T) {
	_, ps := ParseStocks("stocks.toml", []byte(strings.Replace(pkoStock, "price = 1280.0", "pirce = 1280.0\nprice = 1280.0", 1)))
	require.NotEmpty(t, ps)
	assert.Equal(t, `stocks.toml: error: stock "pko-r": unknown key "pirce"; known keys are id, name, price, available, fatty_acids, sn2, sfc, tags; did you mean "price"?`, ps[0].String())
	assert.True(t, IsBadInput(ps))
}

// Every problem of a file is reported in one run, each under its own stock.
func TestEveryProblemReported(t *testing.T) {
	data := `
[[stock]]
id = "a"
price = "cheap"
[stock.fatty_acids]
"C16:0" = 50.0

[[stock]]
id = "B"
price = -1.0
available = nan
[stock.fatty_acids]
"C18:1 t" = 100.0

[[stock]]
id = "c"
price = 1.0
colour = "red"
[stock.fatty_acids]
"C18:1" = 100.0
[stock.sfc]
"hot" = 1.0
`
	cat, ps := ParseStocks("s.toml", []byte(data))
	assert.Nil(t, cat)
	want := []string{
		`stock "a": price must be a number`,
		`stock "a": fatty_acids sum to 50.00`,
		`stock "B": id "B" may use only`,
		`stock "B": price = -1 is negative`,
		`stock "B": available = NaN`,
		`stock "B": fatty_acids: unknown fatty-acid key "C18:1 t"; did you mean "C18:1t"?`,
		`stock "c": unknown key "colour"`,
		`stock "c": sfc key "hot" is not a temperature`,
	}
	text := ps.Error()
	for _, w := range want {
		assert.Contains(t, text, w)
	}
	assert.Len(t, ps.Errors(), len(want), text)
}

// Warnings do not stop a load: a sum between 0.3 and 1 away from 100, a
// rising SFC curve, and an sn-2 analysis that leaves sn-1,3 negative under
// x13 = (3x - x2)/2 (1,3-random-2-random, Vander Wal; Coleman).
func TestWarnings(t *testing.T) {
	data := `
[[stock]]
id = "w"
price = 1000.0
[stock.fatty_acids]
"C16:0" = 10.0
"C18:1" = 90.6
[stock.sn2]
"C16:0" = 40.0
"C18:1" = 60.0
[stock.sfc]
"10" = 5.0
"20" = 7.0
`
	cat, ps := ParseStocks("w.toml", []byte(data))
	require.NotNil(t, cat, "%v", ps)
	assert.Empty(t, ps.Errors())
	require.Len(t, ps.Warnings(), 3, "%v", ps)
	text := ps.Error()
	assert.Contains(t, text, "warning: stock \"w\": fatty_acids sum to 100.60 wt%")
	assert.Contains(t, text, "sfc rises from 5 % at 10 C to 7 % at 20 C")
	// By hand: 10 wt% methyl palmitate (270.45 g/mol) with 90.6 wt% methyl
	// oleate (296.49 g/mol) is 10.8 mol% C16:0; 40 mol% at sn-2 leaves
	// (3 x 10.8 - 40)/2 = -3.8 mol% at sn-1,3.
	assert.Contains(t, text, `sn2 "C16:0" = 40.0 mol% is more than three times its share of the whole fat (10.8 mol%), leaving -3.8 mol% at sn-1,3`)
	assert.False(t, IsBadInput(ps), "warnings alone are not bad input")
}

func TestLoadStocksMissingFile(t *testing.T) {
	p := filepath.Join(t.TempDir(), "nope.toml")
	cat, ps := LoadStocks(p)
	assert.Nil(t, cat)
	require.Len(t, ps, 1)
	assert.Equal(t, p, ps[0].File)
	assert.Contains(t, ps[0].String(), "cannot read the stock catalogue: no such file or directory; check the path")
}

// TestEachStockHalves holds the checking of a catalogue's two halves at
// once (eachStock from 0) to the one pass (eachStock from more than the
// stocks), problem for problem, on 300-stock catalogues with seeded faults
// (prices below nothing, ids used twice, fatty-acid sums off by a warning's
// or an error's worth): from a few problems to far beyond maxProblems,
// reported and quiet.
func TestEachStockHalves(t *testing.T) {
	demo := DemoStocks()
	for _, rate := range []float64{0, 0.01, 0.05, 0.2, 0.6} {
		r := rand.New(rand.NewPCG(uint64(rate*1000), 7))
		cat := demo.Clone()
		for k := 0; len(cat.Stocks) < 300; k++ {
			s := demo.Stocks[k%len(demo.Stocks)]
			s.ID = fmt.Sprintf("%s-v%03d", s.ID, k)
			if r.Float64() < rate {
				s.Price = -5
			}
			if r.Float64() < rate {
				s.ID = cat.Stocks[r.IntN(len(cat.Stocks))].ID
			}
			if r.Float64() < rate {
				f := 1.005 // a sum 0.5 over 100: a warning
				if r.Float64() < 0.5 {
					f = 1.05 // 5 over: an error
				}
				fa := map[string]float64{}
				for key, v := range s.FattyAcids {
					fa[key] = v * f
				}
				s.FattyAcids = fa
			}
			cat.Stocks = append(cat.Stocks, s)
		}
		var b bytes.Buffer
		require.NoError(t, WriteStocks(&b, cat))
		raw, ok := fastStocks(b.Bytes())
		require.True(t, ok)
		for _, quiet := range []bool{false, true} {
			one := &collector{file: "stocks.toml", quiet: quiet}
			oneStocks := one.eachStock(raw.Stock, len(raw.Stock)+1)
			two := &collector{file: "stocks.toml", quiet: quiet}
			twoStocks := two.eachStock(raw.Stock, 0)
			require.Equal(t, one.problems(), two.problems(), "rate %g quiet %v", rate, quiet)
			require.Equal(t, [3]int{one.errors, one.warnings, one.dropped}, [3]int{two.errors, two.warnings, two.dropped}, "rate %g quiet %v", rate, quiet)
			require.Equal(t, oneStocks, twoStocks)
			if rate == 0.6 && !quiet {
				require.Positive(t, one.dropped, "the worst catalogue has problems beyond maxProblems")
			}
			if rate == 0.01 && !quiet {
				require.NotEmpty(t, one.ps)
			}
		}
	}
}
