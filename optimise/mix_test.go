package optimise

import (
	"fmt"
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
)

// TestMixMatchesBlendMix: the report's blend properties, summed from the
// stocks' profiles, equal blend.Mix of the same blend (the package that
// owns the chemistry) in every field to 1e-12 relative, on the optimal
// blends of 120 seeded random specs, with and without a profile cache, on
// specs whose limits need no profile (fatty acids only, nothing at all),
// and with a stock carrying a fatty acid outside the reference table.
func TestMixMatchesBlendMix(t *testing.T) {
	var pc profileCache
	checked := 0
	check := func(where string, cat *catalogue.Catalogue, spec *catalogue.Spec, cache *profileCache) {
		t.Helper()
		m, lay, err := buildWith(cat, spec, cache)
		require.NoError(t, err, where)
		s, err := defaultEngine().solveLP(m)
		require.NoError(t, err, where)
		if s.status != solOptimal {
			return
		}
		var parts []blend.Part
		var idx []int
		for j, x := range s.x {
			if x > usedTol {
				parts = append(parts, blend.Part{Stock: &cat.Stocks[j], Pct: x})
				idx = append(idx, j)
			}
		}
		temps := blend.Temps(20, 33)
		want, err := blend.Mix(parts, temps)
		require.NoError(t, err, where)
		got, err := lay.mix(parts, idx, temps)
		require.NoError(t, err, where)
		assertClose(t, want, got, 1e-12, where)
		checked++
	}
	for k, c := range randomSuite(t, 120, "") {
		check(fmt.Sprintf("case %d, no cache", k), c.cat, c.spec, nil)
		check(fmt.Sprintf("case %d, cache", k), c.cat, c.spec, &pc)
		faOnly := c.spec.Clone()
		faOnly.Limits = nil
		for _, l := range c.spec.Limits {
			if _, ok := catalogue.Lookup(l.Name); ok {
				faOnly.Limits = append(faOnly.Limits, l)
			}
		}
		check(fmt.Sprintf("case %d, fatty-acid limits only", k), c.cat, faOnly, nil)
		none := c.spec.Clone()
		none.Limits, none.SFC = nil, nil
		check(fmt.Sprintf("case %d, no limits", k), c.cat, none, &pc)
	}
	c := randomSuite(t, 1, "")[0]
	for j := range c.cat.Stocks {
		c.cat.Stocks[j].FattyAcids["C99:1"] = 2 // an acid blend.Profile does not know
	}
	check("unknown acid, no cache", c.cat, c.spec, nil)
	check("unknown acid, cache", c.cat, c.spec, &pc)
	require.Greater(t, checked, 400)
}
