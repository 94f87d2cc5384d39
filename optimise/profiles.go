package optimise

import (
	"lipoplan/blend"
	"lipoplan/catalogue"
)

// profileCache keeps, for the stock at each position of the catalogue last
// built, what the model needs of its fatty acids: blend.Profile of them and
// their wt% laid out by the reference table's order (catalogue.Rank), with
// the fatty acids they were computed from, so that a stock whose fatty
// acids are unchanged is neither profiled nor looked up again.
// blend.Profile is about half the time of building a 30-stock model (it
// copies the profile's map and looks every fatty acid up in the reference
// table); comparing a stock's few fatty acids with the kept ones is a
// fraction of that. A Solver keeps one across its solves, Plan one for all
// its orders. Not safe for concurrent use.
type profileCache struct {
	stocks []stockProfile
}

// stockProfile is what the cache keeps of one stock.
type stockProfile struct {
	keys  []string  // the fatty acids it was computed from ...
	vals  []float64 // ... and their values
	share []float64 // wt% by catalogue.Rank; nil when a key is not in the table
	props blend.Properties
}

// reserve makes room for n stocks, so that entries do not move while a
// build hands out pointers to them. A nil cache does nothing.
func (c *profileCache) reserve(n int) {
	if c != nil && len(c.stocks) < n {
		c.stocks = append(c.stocks, make([]stockProfile, n-len(c.stocks))...)
	}
}

// profile is the kept entry of the stock at position j, computed afresh
// unless the stock's fatty acids equal those it was computed from.
func (c *profileCache) profile(j int, s *catalogue.Stock) *stockProfile {
	c.reserve(j + 1)
	e := &c.stocks[j]
	if e.keys != nil && e.same(s.FattyAcids) {
		return e
	}
	nref := len(catalogue.Keys())
	*e = stockProfile{
		keys:  make([]string, 0, len(s.FattyAcids)+1), // never nil once computed
		vals:  make([]float64, 0, len(s.FattyAcids)),
		share: make([]float64, nref),
		props: blend.Profile(s.FattyAcids),
	}
	for k, v := range s.FattyAcids {
		e.keys, e.vals = append(e.keys, k), append(e.vals, v)
		if r := catalogue.Rank(k); r >= 0 && e.share != nil {
			e.share[r] = v
		} else {
			e.share = nil
		}
	}
	return e
}

// same reports whether fa has exactly the kept keys and values (a NaN
// never matches, so it is computed, and rejected, anew).
func (e *stockProfile) same(fa map[string]float64) bool {
	if len(fa) != len(e.keys) {
		return false
	}
	for i, k := range e.keys {
		if v, ok := fa[k]; !ok || v != e.vals[i] {
			return false
		}
	}
	return true
}
