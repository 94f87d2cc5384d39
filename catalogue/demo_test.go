package catalogue

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The embedded demo data must load without a single problem (not even a
// warning), so DemoStocks and DemoSpecs never panic.
func TestDemoLoadsClean(t *testing.T) {
	files := DemoFiles()
	require.Contains(t, files, "stocks.toml")
	cat, ps := ParseStocks("stocks.toml", files["stocks.toml"])
	require.Empty(t, ps, "%v", ps)
	require.NotNil(t, cat)
	assert.Equal(t, "EUR", cat.Currency)
	assert.GreaterOrEqual(t, len(cat.Stocks), 14)
	for _, id := range DemoSpecIDs() {
		data, ok := files[id+".toml"]
		require.True(t, ok, id)
		s, ps := ParseSpec(id+".toml", data, cat)
		require.Empty(t, ps, "%s: %v", id, ps)
		require.NotNil(t, s)
		assert.Equal(t, id, s.ID)
	}
	require.NotPanics(t, func() { DemoStocks(); DemoSpecs() })
}

// Every demo stock's fatty acids sum to 100 +- 0.3 wt% (the warning band of
// the file format, README "File formats"), and its sn-2 profile, when given,
// to 100 +- 1 mol%.
func TestDemoCompositionsSum(t *testing.T) {
	for _, s := range DemoStocks().Stocks {
		var sum float64
		for _, v := range s.FattyAcids {
			sum += v
		}
		assert.InDelta(t, 100, sum, 0.3, s.ID)
		if s.SN2 != nil {
			var s2 float64
			for _, v := range s.SN2 {
				s2 += v
			}
			assert.InDelta(t, 100, s2, 1.0, s.ID)
		}
		// every demo stock has a measured curve at 10..45 C every 5 C
		for tc := 10.0; tc <= 45; tc += 5 {
			_, ok := s.SFC.At(tc)
			assert.True(t, ok, "%s at %g C", s.ID, tc)
		}
	}
}

// The demo carries the stock kinds the brief asks for, the incumbent
// partially hardened fat has 25-40 % trans C18:1, and the fully hardened
// liquid oil has almost no unsaturation left.
func TestDemoContents(t *testing.T) {
	cat := DemoStocks()
	for _, id := range []string{"rapeseed", "sunflower", "hosun", "soybean", "palm", "palm-olein",
		"palm-st-soft", "palm-st-hard", "pko", "pk-stearin", "coconut", "fh-rapeseed", "ph-soy", "shea-st"} {
		_, ok := cat.Find(id)
		assert.True(t, ok, id)
	}
	ph, _ := cat.Find("ph-soy")
	assert.GreaterOrEqual(t, ph.FattyAcids["C18:1t"], 25.0)
	assert.LessOrEqual(t, ph.FattyAcids["C18:1t"], 40.0)
	fh, _ := cat.Find("fh-rapeseed")
	var unsat float64
	for k, v := range fh.FattyAcids {
		f, _ := Lookup(k)
		if f.DoubleBonds > 0 {
			unsat += v
		}
	}
	assert.Less(t, unsat, 5.0, "fully hardened: IV < 5 needs under ~5 %% C18:1")
	var limited, unlimited int
	for _, s := range cat.Stocks {
		if math.IsInf(s.Available, 1) {
			unlimited++
		} else {
			limited++
		}
		assert.GreaterOrEqual(t, s.Price, 900.0, s.ID)
		assert.LessOrEqual(t, s.Price, 3000.0, s.ID)
	}
	assert.Positive(t, limited)
	assert.Positive(t, unlimited)
}

// The incumbent alone breaks the demo specs' trans limit.
func TestDemoTransExcludesIncumbent(t *testing.T) {
	ph, _ := DemoStocks().Find("ph-soy")
	var trans float64
	for k, v := range ph.FattyAcids {
		if f, _ := Lookup(k); f.Trans {
			trans += v
		}
	}
	for _, s := range DemoSpecs() {
		var found bool
		for _, l := range s.Limits {
			if l.Name == "trans" {
				found = true
				assert.Greater(t, trans, 10*l.Max, "%s: incumbent must be far above the trans max", s.ID)
			}
		}
		assert.True(t, found, "%s has a trans limit", s.ID)
	}
}

func TestDemoSpecByID(t *testing.T) {
	for _, id := range []string{"laminating", "shortening"} {
		s, ok := DemoSpec(id)
		require.True(t, ok, id)
		assert.NotEmpty(t, s.Name)
		assert.Positive(t, s.Batch)
		assert.NotEmpty(t, s.SFC)
	}
	_, ok := DemoSpec("nope")
	assert.False(t, ok)
}
