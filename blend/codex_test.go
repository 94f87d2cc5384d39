package blend

import (
	"os"
	"testing"

	"github.com/BurntSushi/toml"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Codex CXS 210-1999 (Standard for Named Vegetable Oils): a computed IV and SV
// of a mid-range composition must fall inside the oil's Codex IV and SV
// ranges. The ranges and their provenance are in testdata/codex-cxs210.toml.
func TestCodexMidRangeOils(t *testing.T) {
	var data struct {
		Oil []struct {
			Name       string
			IV         [2]float64
			SV         [2]float64
			FattyAcids map[string][2]float64 `toml:"fatty_acids"`
		}
	}
	raw, err := os.ReadFile("../testdata/codex-cxs210.toml")
	require.NoError(t, err)
	md, err := toml.Decode(string(raw), &data)
	require.NoError(t, err)
	require.Empty(t, md.Undecoded())
	require.GreaterOrEqual(t, len(data.Oil), 8, "at least 8 Codex oils")
	for _, oil := range data.Oil {
		mid := map[string]float64{}
		var sum float64
		for k, r := range oil.FattyAcids {
			mid[k] = (r[0] + r[1]) / 2
			sum += mid[k]
		}
		for k := range mid {
			mid[k] *= 100 / sum
		}
		p := Profile(mid)
		assert.GreaterOrEqual(t, p.IV, oil.IV[0], "%s: IV %.1f below Codex range %v", oil.Name, p.IV, oil.IV)
		assert.LessOrEqual(t, p.IV, oil.IV[1], "%s: IV %.1f above Codex range %v", oil.Name, p.IV, oil.IV)
		assert.GreaterOrEqual(t, p.SV, oil.SV[0], "%s: SV %.1f below Codex range %v", oil.Name, p.SV, oil.SV)
		assert.LessOrEqual(t, p.SV, oil.SV[1], "%s: SV %.1f above Codex range %v", oil.Name, p.SV, oil.SV)
		t.Logf("%-36s IV %6.1f (Codex %v)  SV %6.1f (Codex %v)", oil.Name, p.IV, oil.IV, p.SV, oil.SV)
	}
}
