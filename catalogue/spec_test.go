package catalogue

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

const fullSpec = `
name = "Laminating fat, trans-free"
batch = 25.0
[limits]
iv    = { min = 38, max = 48 }
safa  = { max = 55 }
trans = { max = 1.0 }
"C18:2" = { min = 2.5 }
[limits.sfc]
"35" = { min = 8,  max = 14 }
"20" = { min = 38, max = 48 }
"37.5" = { max = 6 }
[use]
"pko-r" = { max = 25 }
"rapeseed" = { min = 5, max = 30 }
[rules]
max_stocks     = 4
smallest_share = 5.0
[process]
interesterify = ["rapeseed", "pko-r"]
method = "enzymatic"
cost = 45.0
through = { min = 20, max = 60 }
feed_ratio = { "pko-r" = 2, rapeseed = 3 }
`

func TestParseSpecValues(t *testing.T) {
	cat, ps := ParseStocks("stocks.toml", []byte(pkoStock+`
[[stock]]
id = "rapeseed"
price = 1150.0
[stock.fatty_acids]
"C18:1" = 100.0
`))
	require.Empty(t, ps)
	s, ps := ParseSpec("specs/lam.toml", []byte(fullSpec), cat)
	require.Empty(t, ps, "%v", ps)
	require.NotNil(t, s)
	assert.Equal(t, "lam", s.ID)
	assert.Equal(t, "specs/lam.toml", s.File)
	assert.Equal(t, 25.0, s.Batch)
	inf := math.Inf(1)
	assert.Equal(t, []Limit{
		{"C18:2", Bound{2.5, inf}},
		{"iv", Bound{38, 48}},
		{"safa", Bound{math.Inf(-1), 55}},
		{"trans", Bound{math.Inf(-1), 1}},
	}, s.Limits)
	assert.Equal(t, []SFCLimit{{20, Bound{38, 48}}, {35, Bound{8, 14}}, {37.5, Bound{math.Inf(-1), 6}}}, s.SFC)
	assert.Equal(t, []Use{{"pko-r", Bound{math.Inf(-1), 25}}, {"rapeseed", Bound{5, 30}}}, s.Use)
	assert.Equal(t, Rules{MaxStocks: 4, SmallestShare: 5}, s.Rules)
	require.NotNil(t, s.Process)
	assert.Equal(t, Process{Interesterify: []string{"rapeseed", "pko-r"}, Method: "enzymatic", Cost: 45, SFC: "predicted",
		Through: &Bound{20, 60}, FeedRatio: []FeedPart{{"rapeseed", 3}, {"pko-r", 2}}}, *s.Process,
		"sfc defaults to predicted: the measured curves no longer apply after the reactor; the feed ratio in the order of interesterify")
	assert.True(t, s.Process.Required())
	assert.Equal(t, map[string]float64{"rapeseed": 0.6, "pko-r": 0.4}, s.Process.FeedShares())
	// a clone shares nothing with the spec it came from
	c := s.Clone()
	c.Process.Through.Min = 1
	c.Process.FeedRatio[0].Parts = 9
	assert.Equal(t, 20.0, s.Process.Through.Min)
	assert.Equal(t, 3.0, s.Process.FeedRatio[0].Parts)

	// Without a catalogue the stock ids are not checked.
	_, ps = ParseSpec("x.toml", []byte(strings.Replace(fullSpec, `"pko-r" = { max = 25 }`, `"ghost" = { max = 25 }`, 1)), nil)
	assert.Empty(t, ps)
	// With one they are.
	_, ps = ParseSpec("x.toml", []byte(strings.Replace(fullSpec, `"pko-r" = { max = 25 }`, `"ghost" = { max = 25 }`, 1)), cat)
	assert.Contains(t, ps.Error(), `x.toml: error: use "ghost": no stock "ghost" in stocks.toml`)

	// The old name min_if_used is still read, with a warning saying to rename it.
	old, ps := ParseSpec("x.toml", []byte(strings.Replace(fullSpec, "smallest_share = 5.0", "min_if_used = 5.0", 1)), cat)
	require.NotNil(t, old)
	assert.Empty(t, ps.Errors())
	assert.Equal(t, 5.0, old.Rules.SmallestShare)
	assert.Contains(t, ps.Error(), "x.toml: warning: [rules]: min_if_used is the old name of smallest_share")
}

func TestLoadSpecDemoPath(t *testing.T) {
	s, ps := LoadSpec(filepath.Join("demo", "shortening.toml"), DemoStocks())
	require.Empty(t, ps)
	assert.Equal(t, "shortening", s.ID)
	_, ps = LoadSpec(filepath.Join("demo", "missing.toml"), nil)
	assert.Contains(t, ps.Error(), "cannot read the product spec")
}

// The infeasible example spec in testdata (for relaxation demos) is itself
// valid input against the demo catalogue: its problem is the numbers, not the file.
func TestImpossibleSpecIsValidInput(t *testing.T) {
	s, ps := LoadSpec(filepath.Join("..", "testdata", "impossible-laminating.toml"), DemoStocks())
	require.Empty(t, ps, "%v", ps)
	assert.Equal(t, "impossible-laminating", s.ID)
}
