package catalogue

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// No real fat is refused by the property ranges: the largest iodine and
// saponification values any single-acid TAG of the reference table can have
// lie inside QtyIV and QtySV. IV is g of iodine taken up per 100 g of fat, one
// I2 per double bond (definition of AOCS Cd 1-25); SV is mg KOH per g, three
// KOH per TAG; molar masses from the IUPAC 2021 standard atomic weights
// (iodine 126.904, KOH 56.106 g/mol).
func TestPropertyRangesHoldEveryPureTAG(t *testing.T) {
	const iodine, koh = 126.904, 56.106
	var maxIV, maxSV float64
	for _, f := range FattyAcids() {
		m := TAGMolarMass(f, f, f)
		maxIV = math.Max(maxIV, 100*3*float64(f.DoubleBonds)*2*iodine/m)
		maxSV = math.Max(maxSV, 3*koh*1000/m)
	}
	// trilinolenin IV about 262 and tributyrin SV about 557 (handbook values, from memory)
	assert.InDelta(t, 262, maxIV, 2)
	assert.InDelta(t, 557, maxSV, 2)
	assert.True(t, QtyIV.Range().Contains(maxIV), "IV %.1f", maxIV)
	assert.True(t, QtySV.Range().Contains(maxSV), "SV %.1f", maxSV)
	// pure linolenic acid: Cox = 21.6 (Fatemi & Hammond 1980, Lipids 15:379)
	assert.True(t, QtyCox.Range().Contains(21.6))
}

// Boundaries of the stated ranges (README "Accepted magnitudes"): 1 kg is the
// smallest tonnage, a million tonnes the largest, 1e9 per tonne the dearest.
func TestQuantityCheck(t *testing.T) {
	for _, tc := range []struct {
		q    Quantity
		good []float64
		bad  []float64
	}{
		{QtyPrice, []float64{0, 0.001, 1280, 1e9}, []float64{-1, 1e-320, 0.0009, 1e9 * 1.0001, 1e25, math.NaN(), math.Inf(1)}},
		{QtyOnHand, []float64{0, 0.001, 60, 1e6}, []float64{-0.5, 1e-7, 1e6 + 1, 1e308}},
		{QtyTonnes, []float64{0.001, 25, 1e6}, []float64{0, 1e-320, 1e308, -20}},
		{QtyIV, []float64{0, 48, 300}, []float64{-5, 301}},
		{QtySV, []float64{0, 250, 600}, []float64{601}},
		{QtyCox, []float64{0, 2.5, 25}, []float64{26, 1e300}},
		{QtyPercent, []float64{0, 1e-9, 55, 100}, []float64{-1e-9, 100.5}},
	} {
		for _, v := range tc.good {
			assert.NoError(t, tc.q.Check("x", v), "%v accepted for %v", v, tc.q.Range())
		}
		for _, v := range tc.bad {
			err := tc.q.Check("x", v)
			require.Error(t, err, "%v refused for %v", v, tc.q.Range())
			assert.True(t, IsBadInput(err))
			assert.Contains(t, err.Error(), tc.q.Range().String(), "the message states the range")
		}
	}
	err := QtyPrice.Check(`price of "palm"`, 1e25)
	assert.EqualError(t, err, `price of "palm" = 1e+25 is outside the accepted range 0, or 0.001 to 1e9 per tonne`)
	assert.EqualError(t, QtyTonnes.Check("batch", -20), "batch = -20 is negative; accepted: 0.001 to 1e6 t")
}
