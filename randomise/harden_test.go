package randomise_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// Fully hydrogenated soybean oil: IV below 2 and about 85-90 % stearic acid
// (common practice for soybean hardstock; mid-range Codex CXS 210-1999
// soybean composition, see soybeanOil).
func TestHardenSoybean(t *testing.T) {
	soy := soybeanOil()
	soy.SFC = catalogue.Curve{{Temp: 10, Solid: 0}}
	soy.TAGs = map[string]float64{"LLL": 20, "LOL": 30, "POL": 50}
	h, err := randomise.Harden(soy)
	require.NoError(t, err)
	p := blend.Profile(h.FattyAcids)
	assert.Less(t, p.IV, 2.0)
	assert.InDelta(t, 0, p.IV, 1e-12, "every double bond saturated")
	assert.GreaterOrEqual(t, h.FattyAcids["C18:0"], 85.0)
	assert.LessOrEqual(t, h.FattyAcids["C18:0"], 90.0)
	assert.InDelta(t, 100, sumValues(h.FattyAcids), 1e-9)
	for k := range h.FattyAcids {
		f, _ := catalogue.Lookup(k)
		assert.True(t, f.Saturated(), k)
	}
	assert.Equal(t, "soy-fh", h.ID)
	assert.Nil(t, h.SFC, "the measured curve of the liquid oil no longer applies")
	assert.Equal(t, map[string]float64{"SSS": 50, "PSS": 50}, h.TAGs)
	assert.InDelta(t, 100, sumValues(h.SN2), 1e-9)
	assert.InDelta(t, 1.0+0.3+22.0+69.7+7.0-1.0, h.SN2["C18:0"], 1e-9)
	assert.InDelta(t, 10.5, soy.FattyAcids["C16:0"], 0, "input left alone")

	// Moles are conserved acid by acid: the hardstock's C18:0 mole fraction
	// is the sum of the oil's C18 mole fractions (first principles), while
	// the wt% of C18:0 grows by the added hydrogen.
	acids, x, err := catalogue.MolFractions(soy.FattyAcids)
	require.NoError(t, err)
	var c18 float64
	var c18wt float64
	for i, f := range acids {
		if f.Carbons == 18 {
			c18 += x[i]
			c18wt += soy.FattyAcids[f.Key]
		}
	}
	hAcids, hx, err := catalogue.MolFractions(h.FattyAcids)
	require.NoError(t, err)
	for i, f := range hAcids {
		if f.Key == "C18:0" {
			assert.InDelta(t, c18, hx[i], 1e-12)
		}
	}
	assert.Greater(t, h.FattyAcids["C18:0"], c18wt/sumValues(soy.FattyAcids)*100)

	// Tristearin, the main TAG of the hardstock, is 891.5 g/mol (PubChem,
	// from memory).
	d := distribute(t, []catalogue.Part{{Stock: &h, Pct: 100}}, randomise.Native, 0)
	sp := speciesByTag(d.Species())
	assert.InDelta(t, 891.5, sp["SSS"].MolarMass, 0.1)
	assert.InDelta(t, 100, d.Classes().Mol.S3, 1e-9)
}

func TestHardenTransAndOtherChains(t *testing.T) {
	// every unsaturated acid of the table goes to the saturated acid of its
	// chain length (structural rule)
	for _, f := range catalogue.FattyAcids() {
		s, err := randomise.Saturated(f)
		require.NoError(t, err, f.Key)
		assert.Equal(t, f.Carbons, s.Carbons)
		assert.Zero(t, s.DoubleBonds)
	}
	s := catalogue.Stock{ID: "phvo", FattyAcids: map[string]float64{
		"C14:1": 1, "C16:1": 2, "C18:1": 30, "C18:1t": 40, "C18:2t": 2, "C20:1": 5, "C22:1": 20}}
	h, err := randomise.Harden(s)
	require.NoError(t, err)
	assert.ElementsMatch(t, []string{"C14:0", "C16:0", "C18:0", "C20:0", "C22:0"}, catalogue.SortedKeys(h.FattyAcids))
	assert.Zero(t, blend.Profile(h.FattyAcids).Trans)

	_, err = randomise.Harden(catalogue.Stock{ID: "bad", FattyAcids: map[string]float64{"C19:1": 1}})
	assert.True(t, catalogue.IsBadInput(err))
}
