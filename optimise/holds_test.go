package optimise

import (
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// moveBound returns copies of cat and spec with the bound of limit name
// ("sfc.35.min", "iv.max", "use.x.max", "avail.x") set to v.
func moveBound(t *testing.T, cat *catalogue.Catalogue, spec *catalogue.Spec, name string, v float64) (*catalogue.Catalogue, *catalogue.Spec) {
	t.Helper()
	c, s := cat.Clone(), spec.Clone()
	if id, ok := strings.CutPrefix(name, "avail."); ok {
		st, _ := c.Find(id)
		st.Available = v
		return c, s
	}
	i := strings.LastIndex(name, ".")
	stem, side := name[:i], name[i+1:]
	set := func(b *catalogue.Bound) {
		if side == "min" {
			b.Min = v
		} else {
			b.Max = v
		}
	}
	if id, ok := strings.CutPrefix(stem, "use."); ok {
		for k := range s.Use {
			if s.Use[k].Stock == id {
				set(&s.Use[k].Bound)
				return c, s
			}
		}
	}
	if tk, ok := strings.CutPrefix(stem, "sfc."); ok {
		for k := range s.SFC {
			if catalogue.TempKey(s.SFC[k].Temp) == tk {
				set(&s.SFC[k].Bound)
				return c, s
			}
		}
	}
	for k := range s.Limits {
		if s.Limits[k].Name == stem {
			set(&s.Limits[k].Bound)
			return c, s
		}
	}
	t.Fatalf("no limit %s", name)
	return nil, nil
}

// The range over which a holding limit's shadow price holds, checked by
// solving again (right-hand-side ranging is exact within the range, the
// textbook result; Chvátal 1983, ch. 10): with the bound moved to a point
// inside the range the cost changes by exactly shadow price × move; moved
// past the range's end the cost per unit moved is no longer the shadow price
// (the blend's make-up has changed) or the spec becomes impossible. Over
// every holding limit of both demo specs and a few price variants.
func TestShadowPriceRangesByResolving(t *testing.T) {
	checked, beyond := 0, 0
	for _, id := range catalogue.DemoSpecIDs() {
		spec, _ := catalogue.DemoSpec(id)
		for _, bump := range []float64{0, 60, -60} {
			cat := catalogue.DemoStocks()
			for i := range cat.Stocks {
				cat.Stocks[i].Price += bump * float64(i%3-1)
			}
			base, err := Solve(cat, spec, Options{})
			require.NoError(t, err)
			require.Equal(t, Optimal, base.Status)
			for _, l := range base.Limits {
				if !l.Binding || l.Excluded || math.IsNaN(l.HoldsFrom) || math.Abs(l.ShadowPrice) < 1e-6 {
					continue
				}
				assert.LessOrEqual(t, l.HoldsFrom, l.Bound+1e-9, "%s %s", id, l.Name)
				assert.GreaterOrEqual(t, l.HoldsTo, l.Bound-1e-9, "%s %s", id, l.Name)
				for _, end := range []float64{l.HoldsFrom, l.HoldsTo} {
					if math.IsInf(end, 0) || math.Abs(end-l.Bound) < 1e-6 {
						continue
					}
					inside := l.Bound + 0.9*(end-l.Bound)
					c, s := moveBound(t, cat, spec, l.Name, inside)
					r, err := Solve(c, s, Options{})
					require.NoError(t, err)
					require.Equal(t, Optimal, r.Status, "%s %s moved to %v inside its range", id, l.Name, inside)
					want := base.CostPerTonne - l.ShadowPrice*(inside-l.Bound)
					assert.InDelta(t, want, r.CostPerTonne, 1e-6*math.Max(1, math.Abs(want)), "%s %s: inside the range the shadow price holds", id, l.Name)
					checked++

					past := end + 0.25*(end-l.Bound) + math.Copysign(0.5, end-l.Bound)
					if past < 0 {
						continue
					}
					c, s = moveBound(t, cat, spec, l.Name, past)
					r, err = Solve(c, s, Options{})
					require.NoError(t, err)
					if r.Status != Optimal {
						beyond++
						continue
					}
					naive := base.CostPerTonne - l.ShadowPrice*(past-l.Bound)
					assert.Greater(t, math.Abs(naive-r.CostPerTonne), 1e-6*math.Max(1, math.Abs(naive)), "%s %s: past the range the shadow price no longer holds", id, l.Name)
					beyond++
				}
			}
		}
	}
	t.Logf("%d range ends checked inside, %d beyond", checked, beyond)
	assert.Greater(t, checked, 10)
}

// Holding lists the binding limits by falling size of shadow price, and a
// stock capped at 0 (left out: ph-soy in the demo shortening) appears in LeftOut and nowhere in Holding;
// every use.<id> and avail.<id> limit names its stock. The shadow prices
// themselves are checked against re-solves in TestShadowPriceRangesByResolving.
func TestHoldingAndLeftOut(t *testing.T) {
	cat := catalogue.DemoStocks()
	spec, ok := catalogue.DemoSpec("shortening")
	require.True(t, ok)
	r, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	require.Equal(t, Optimal, r.Status)
	assert.Equal(t, []string{"ph-soy"}, r.LeftOut(), "the demo shortening caps ph-soy at 0")
	h := r.Holding()
	require.NotEmpty(t, h)
	for i, l := range h {
		assert.True(t, l.Binding && !l.Excluded, l.Name)
		if i > 0 {
			assert.GreaterOrEqual(t, math.Abs(h[i-1].ShadowPrice), math.Abs(l.ShadowPrice), "dearest first")
		}
	}
	for _, l := range r.Limits {
		if id, ok := strings.CutPrefix(l.Name, "use."); ok {
			assert.Equal(t, id[:strings.LastIndex(id, ".")], l.Stock, l.Name)
		} else if id, ok := strings.CutPrefix(l.Name, "avail."); ok {
			assert.Equal(t, id, l.Stock, l.Name)
		} else {
			assert.Empty(t, l.Stock, l.Name)
		}
	}
}
