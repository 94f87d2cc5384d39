package optimise

import (
	"lipoplan/blend"
	"lipoplan/catalogue"
)

// profileCache keeps blend.Profile of the stock at each position of the
// catalogue last built, with a copy of the fatty acids it was computed
// from, so that a stock whose fatty acids are unchanged is not profiled
// again. blend.Profile is about half the time of building a 30-stock model
// (it copies the profile's map and looks every fatty acid up in the
// reference table); comparing a stock's few fatty acids with the copy is a
// fraction of that. A Solver keeps one across its solves, Plan one for all
// its orders. Not safe for concurrent use.
type profileCache struct {
	fa    []map[string]float64
	props []blend.Properties
}

// profile is blend.Profile(s.FattyAcids) for the stock at position j,
// taken from the cache when the stock's fatty acids equal those it was
// computed from. A nil cache computes it every time.
func (c *profileCache) profile(j int, s *catalogue.Stock) blend.Properties {
	if c == nil {
		return blend.Profile(s.FattyAcids)
	}
	if j < len(c.fa) && c.fa[j] != nil && sameProfile(c.fa[j], s.FattyAcids) {
		return c.props[j]
	}
	for len(c.fa) <= j {
		c.fa = append(c.fa, nil)
		c.props = append(c.props, blend.Properties{})
	}
	cp := make(map[string]float64, len(s.FattyAcids))
	for k, v := range s.FattyAcids {
		cp[k] = v
	}
	c.fa[j], c.props[j] = cp, blend.Profile(s.FattyAcids)
	return c.props[j]
}

// sameProfile reports whether two fatty-acid profiles have the same keys
// and values (a NaN never matches, so it is profiled, and rejected, anew).
func sameProfile(a, b map[string]float64) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if w, ok := b[k]; !ok || w != v {
			return false
		}
	}
	return true
}
