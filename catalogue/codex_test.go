package catalogue

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/BurntSushi/toml"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// codexOil is one [[oil]] of testdata/codex-cxs210.toml: the GLC ranges and
// IV/SV ranges of Codex Alimentarius CXS 210-1999 (see that file's header for
// which values were checked and which recalled).
type codexOil struct {
	Name       string                `toml:"name"`
	IV         [2]float64            `toml:"iv"`
	SV         [2]float64            `toml:"sv"`
	FattyAcids map[string][2]float64 `toml:"fatty_acids"`
}

// codexIV is the calculated iodine value of a FAME profile from first
// principles (AOCS Cd 1c-85 factors are the theoretical IV of each pure TAG
// / 100: 3 x double bonds x M(I2) / M(TAG)), and codexSV the saponification
// value 3 x 56106 / M(mean TAG), with FAME wt% turned into moles with the
// methyl esters' molar masses. Written here independently of package blend.
func codexIV(fa map[string]float64) (iv, sv float64) {
	const i2 = 2 * 126.90447 // IUPAC standard atomic weight of iodine
	var moles, acidMass float64
	for k, w := range fa {
		f, _ := Lookup(k)
		iv += w * 3 * float64(f.DoubleBonds) * i2 / TAGMolarMass(f, f, f)
		n := w / f.EsterMolarMass()
		moles += n
		acidMass += n * f.MolarMass()
	}
	meanTAG := Glycerol.Mass() + 3*acidMass/moles - 3*Water.Mass()
	return iv, 3 * 56106 / meanTAG
}

// The demo compositions are typical values inside the Codex CXS 210-1999
// GLC ranges (as its header says), and their calculated IV and SV fall in the
// Codex IV and SV ranges. Acids the table does not list must stay minor
// (<= 0.5 %: Codex gives most minor acids as ND-0.x; common practice).
func TestDemoInsideCodexRanges(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("..", "testdata", "codex-cxs210.toml"))
	require.NoError(t, err)
	var file struct {
		Oil []codexOil `toml:"oil"`
	}
	_, err = toml.Decode(string(data), &file)
	require.NoError(t, err)
	byName := map[string]codexOil{}
	for _, o := range file.Oil {
		byName[o.Name] = o
	}
	// demoCodex maps the demo stocks that Codex CXS 210-1999 covers to its oils.
	demoCodex := map[string]string{
		"rapeseed":     "rapeseed oil, low erucic acid",
		"sunflower":    "sunflowerseed oil",
		"hosun":        "sunflowerseed oil, high oleic acid",
		"soybean":      "soyabean oil",
		"palm":         "palm oil",
		"palm-olein":   "palm olein",
		"palm-st-soft": "palm stearin",
		"palm-st-hard": "palm stearin",
		"pko":          "palm kernel oil",
		"coconut":      "coconut oil",
	}
	cat := DemoStocks()
	for id, oilName := range demoCodex {
		s, ok := cat.Find(id)
		require.True(t, ok, id)
		oil, ok := byName[oilName]
		require.True(t, ok, oilName)
		for k, v := range s.FattyAcids {
			if r, listed := oil.FattyAcids[k]; listed {
				assert.GreaterOrEqual(t, v, r[0], "%s %s below Codex %s range", id, k, oilName)
				assert.LessOrEqual(t, v, r[1], "%s %s above Codex %s range", id, k, oilName)
			} else {
				assert.LessOrEqual(t, v, 0.5, "%s %s is not in the Codex %s table and must be minor", id, k, oilName)
			}
		}
		iv, sv := codexIV(s.FattyAcids)
		assert.GreaterOrEqual(t, iv, oil.IV[0], "%s IV %.1f", id, iv)
		assert.LessOrEqual(t, iv, oil.IV[1], "%s IV %.1f", id, iv)
		assert.GreaterOrEqual(t, sv, oil.SV[0], "%s SV %.1f", id, sv)
		assert.LessOrEqual(t, sv, oil.SV[1], "%s SV %.1f", id, sv)
	}
	// The fully hardened rapeseed is a hardstock: IV below 5 (brief).
	fh, _ := cat.Find("fh-rapeseed")
	iv, _ := codexIV(fh.FattyAcids)
	assert.Less(t, iv, 5.0)
}
