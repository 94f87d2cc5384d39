package randomise_test

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// onto re-indexes a distribution over the blender's acids.
func onto(t *testing.T, d *randomise.Distribution, acids []catalogue.FattyAcid) []float64 {
	t.Helper()
	n, m := len(acids), len(d.Acids)
	pos := make([]int, m)
	for i, a := range d.Acids {
		pos[i] = -1
		for j, b := range acids {
			if a.Key == b.Key {
				pos[i] = j
			}
		}
		require.GreaterOrEqual(t, pos[i], 0, a.Key)
	}
	out := make([]float64, n*n*n)
	for i := 0; i < m; i++ {
		for j := 0; j < m; j++ {
			for k := 0; k < m; k++ {
				out[(pos[i]*n+pos[j])*n+pos[k]] += d.Mol[(i*m+j)*m+k]
			}
		}
	}
	return out
}

// Blender.Mix against Distribute, the reference implementation of the same
// statistics (1,3-random-2-random natives; random and sn-1,3 equilibria):
// direct-only blends equal Distribute native; feed-only blends equal
// Distribute chemical/enzymatic at degree 1; and a blend of both equals the
// mole-weighted sum of the two, each weighted by its mass over its mean TAG
// molar mass (TAG moles are conserved by blending and by the reaction).
func TestBlenderAgainstDistribute(t *testing.T) {
	cat := catalogue.DemoStocks()
	var stocks []*catalogue.Stock
	for i := range cat.Stocks {
		stocks = append(stocks, &cat.Stocks[i])
	}
	b, err := randomise.NewBlender(stocks)
	require.NoError(t, err)
	out := make([]float64, b.Len())
	r := rand.New(rand.NewPCG(7, 8))
	for trial := 0; trial < 60; trial++ {
		direct, feed := make([]float64, len(stocks)), make([]float64, len(stocks))
		var dParts, fParts []catalogue.Part
		var dMass, fMass float64
		for j := range stocks {
			if r.IntN(3) == 0 {
				direct[j] = 100 * r.Float64()
				dParts = append(dParts, catalogue.Part{Stock: stocks[j], Pct: direct[j]})
				dMass += direct[j]
			}
			if r.IntN(4) == 0 {
				feed[j] = 100 * r.Float64()
				fParts = append(fParts, catalogue.Part{Stock: stocks[j], Pct: feed[j]})
				fMass += feed[j]
			}
		}
		if len(dParts)+len(fParts) == 0 {
			continue
		}
		method := randomise.Chemical
		if trial%2 == 1 {
			method = randomise.Enzymatic
		}
		require.NoError(t, b.Mix(direct, feed, method, out))
		want := make([]float64, len(out))
		var moles float64
		add := func(parts []catalogue.Part, m randomise.Method, mass float64) {
			if len(parts) == 0 {
				return
			}
			d, err := randomise.Distribute(parts, m, 1)
			require.NoError(t, err)
			w := mass / d.Summarise().MeanMolarMass
			for i, v := range onto(t, d, b.Acids) {
				want[i] += w * v
			}
			moles += w
		}
		add(dParts, randomise.Native, dMass)
		add(fParts, method, fMass)
		for i := range want {
			want[i] /= moles
		}
		for i := range out {
			assert.InDelta(t, want[i], out[i], 1e-12, "trial %d species %d", trial, i)
		}
	}
}

func TestBlenderNamesAStockWithoutComposition(t *testing.T) {
	_, err := randomise.NewBlender([]*catalogue.Stock{{ID: "mystery"}})
	require.Error(t, err)
	assert.True(t, catalogue.IsBadInput(err))
	assert.Contains(t, err.Error(), `"mystery"`)
}
