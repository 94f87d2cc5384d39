package randomise_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

func TestSN13Relation(t *testing.T) {
	// x13 = (3 x_total - x_sn2) / 2 (1,3-random-2-random; Vander Wal 1960,
	// Coleman 1961): worked by hand, x = (0.5, 0.5), x2 = (0, 1) gives
	// x13 = (0.75, 0.25).
	x13, clamped := randomise.SN13([]float64{0.5, 0.5}, []float64{0, 1})
	assert.Empty(t, clamped)
	assert.InDeltaSlice(t, []float64{0.75, 0.25}, x13, 1e-15)

	// sn-2 richer in acid 0 than the fat allows: (3*0.2 - 0.9)/2 < 0 -> 0,
	// the rest renormalised: acid 1 gets everything at sn-1,3.
	x13, clamped = randomise.SN13([]float64{0.2, 0.8}, []float64{0.9, 0.1})
	assert.Equal(t, []int{0}, clamped)
	assert.InDeltaSlice(t, []float64{0, 1}, x13, 1e-15)
}

func TestNativeFollowsSN2Profile(t *testing.T) {
	palm := palmOil()
	d := distribute(t, []catalogue.Part{{Stock: &palm, Pct: 100}}, randomise.Native, 0)
	acids, x, err := catalogue.MolFractions(palm.FattyAcids)
	require.NoError(t, err)
	sn1, sn2, sn3 := d.Positions()
	var sn2Sum float64
	for _, v := range palm.SN2 {
		sn2Sum += v
	}
	for a, f := range acids {
		i := index(t, d, f.Key)
		x2 := palm.SN2[f.Key] / sn2Sum
		// x13 = (3 x_total - x_sn2) / 2 (Vander Wal; Coleman)
		assert.InDelta(t, (3*x[a]-x2)/2, sn1[i], 1e-12, f.Key)
		assert.InDelta(t, sn1[i], sn3[i], 1e-15, f.Key)
		assert.InDelta(t, x2, sn2[i], 1e-12, f.Key)
	}
	assert.Empty(t, d.Notes, "palm oil has an sn-2 profile and no clamping")
	// Palm oil TAGs (from memory: POP about 25-30 mol%, POO about 20-25,
	// PPP about 5-7 in published HPLC profiles): the 1,3-random-2-random
	// prediction lands there.
	reg := speciesByTag(d.SpeciesBy(randomise.Regio))
	assert.InDelta(t, 27, reg["POP"].MolPct, 3)
	assert.InDelta(t, 21, reg["POO"].MolPct, 3)
	assert.InDelta(t, 6, reg["PPP"].MolPct, 1.5)
}

func TestNoSN2MeansRandomAndIsNoted(t *testing.T) {
	pko := palmKernelOil()
	d := distribute(t, []catalogue.Part{{Stock: &pko, Pct: 100}}, randomise.Native, 0)
	require.Len(t, d.Notes, 1)
	assert.Contains(t, d.Notes[0], `"pko"`)
	assert.Contains(t, d.Notes[0], "random")
	sn1, sn2, sn3 := d.Positions()
	assert.InDeltaSlice(t, sn1, sn2, 1e-12)
	assert.InDeltaSlice(t, sn1, sn3, 1e-12)

	// A chemical reaction run to the end does not depend on sn-2: no note.
	d = distribute(t, []catalogue.Part{{Stock: &pko, Pct: 100}}, randomise.Chemical, 1)
	assert.Empty(t, d.Notes)
}

func TestClampIsReported(t *testing.T) {
	s := catalogue.Stock{ID: "odd", FattyAcids: map[string]float64{"C16:0": 20, "C18:1": 80},
		SN2: map[string]float64{"C16:0": 90, "C18:1": 10}}
	d := distribute(t, []catalogue.Part{{Stock: &s, Pct: 100}}, randomise.Native, 0)
	require.Len(t, d.Notes, 1)
	assert.Contains(t, d.Notes[0], "C16:0")
	assert.Contains(t, d.Notes[0], "set to 0")
	sn1, _, _ := d.Positions()
	assert.InDelta(t, 0, sn1[0], 1e-15)
	assert.InDelta(t, 100, sumMol(d), 1e-9)
}

// Tripalmitin and triolein 1:1 by moles, randomised: each position holds P
// or O with probability 1/2, so S3 = U3 = 1/8 and S2U = SU2 = 3/8, and of the
// S2U the SUS isomer is 1 of 3 arrangements (SUS : SSU = 1 : 2). First
// principles (binomial counting).
func TestRandomTripalmitinTriolein(t *testing.T) {
	ppp, ooo := single("ppp", "PPP"), single("ooo", "OOO")
	// equal moles: mass shares in the ratio of the molar masses
	mP := catalogue.TAGMolarMass(mustLookup(t, "C16:0"), mustLookup(t, "C16:0"), mustLookup(t, "C16:0"))
	mO := catalogue.TAGMolarMass(mustLookup(t, "C18:1"), mustLookup(t, "C18:1"), mustLookup(t, "C18:1"))
	parts := []catalogue.Part{{Stock: &ppp, Pct: mP}, {Stock: &ooo, Pct: mO}}

	native := distribute(t, parts, randomise.Native, 0)
	c := native.Classes().Mol
	assert.InDelta(t, 50, c.S3, 1e-9)
	assert.InDelta(t, 50, c.U3, 1e-9)

	d := distribute(t, parts, randomise.Chemical, 1)
	c = d.Classes().Mol
	assert.InDelta(t, 12.5, c.S3, 1e-9)
	assert.InDelta(t, 37.5, c.S2U, 1e-9)
	assert.InDelta(t, 37.5, c.SU2, 1e-9)
	assert.InDelta(t, 12.5, c.U3, 1e-9)
	assert.InDelta(t, 12.5, c.SUS, 1e-9)
	assert.InDelta(t, 25, c.SSU, 1e-9)
	assert.InDelta(t, 2, c.SSU/c.SUS, 1e-9, "SUS:SSU 1:2")
	assert.InDelta(t, 12.5, c.USU, 1e-9)
	assert.InDelta(t, 25, c.UUS, 1e-9)

	// Carbon numbers: P contributes 16, O 18: CN 48/50/52/54 in 1:3:3:1.
	cn := d.ByCN()
	assert.InDelta(t, 12.5, cn[48], 1e-9)
	assert.InDelta(t, 37.5, cn[50], 1e-9)
	assert.InDelta(t, 37.5, cn[52], 1e-9)
	assert.InDelta(t, 12.5, cn[54], 1e-9)
	// ECN = CN - 2 x double bonds: P (16) and O (18 - 2) are a critical
	// pair, every species has ECN 48 (common practice in RP-HPLC of TAGs).
	assert.Equal(t, map[int]float64{48: 100}, roundMap(d.ByECN()))

	// Molar masses: tripalmitin 807.3 and triolein 885.4 g/mol (PubChem,
	// from memory).
	sp := speciesByTag(d.Species())
	assert.InDelta(t, 807.3, sp["PPP"].MolarMass, 0.1)
	assert.InDelta(t, 885.4, sp["OOO"].MolarMass, 0.1)
	assert.Equal(t, "C51H98O6", sp["PPP"].Formula.String())
	assert.Equal(t, "C57H104O6", sp["OOO"].Formula.String())
	assert.Len(t, d.Species(), 8, "2^3 positional species")
	// wt%: mass of each class over the total (PPP 807.3 of a mean 846.3)
	assert.InDelta(t, 12.5*mP/((mP+mO)/2), d.Classes().Wt.S3, 1e-9)
}

// An SUS fat (POP/SOS type, sn-2 all oleic) whose sn-1,3 acids are already
// random is the equilibrium of sn-1,3 lipase interesterification, so
// enzymatic IE leaves it unchanged, while chemical IE scatters oleic acid
// over all positions (first principles).
func TestEnzymaticKeepsSUSFat(t *testing.T) {
	s := catalogue.Stock{ID: "sus",
		FattyAcids: fatWithMol(t, map[string]float64{"C16:0": 1.0 / 3, "C18:0": 1.0 / 3, "C18:1": 1.0 / 3}),
		SN2:        map[string]float64{"C18:1": 100}}
	parts := []catalogue.Part{{Stock: &s, Pct: 100}}
	native := distribute(t, parts, randomise.Native, 0)
	require.InDelta(t, 100, native.Classes().Mol.SUS, 1e-9)

	enz := distribute(t, parts, randomise.Enzymatic, 1)
	assert.InDeltaSlice(t, native.Mol, enz.Mol, 1e-12)
	assert.InDelta(t, 100, enz.Classes().Mol.SUS, 1e-9)

	chem := distribute(t, parts, randomise.Chemical, 1)
	c := chem.Classes().Mol
	// saturated mole fraction 2/3 at every position
	assert.InDelta(t, 100*8.0/27, c.S3, 1e-9)
	assert.InDelta(t, 100*4.0/27, c.SUS, 1e-9)
	assert.InDelta(t, 100*1.0/27, c.U3, 1e-9)

	// Measured TAGs POP 60 / SOS 40: the lipase shuffles sn-1,3 (POS and SOP
	// appear) but every molecule keeps oleic acid at sn-2: still 100 % SUS.
	m := catalogue.Stock{ID: "cbe", TAGs: map[string]float64{"POP": 60, "SOS": 40}}
	parts = []catalogue.Part{{Stock: &m, Pct: 100}}
	native = distribute(t, parts, randomise.Native, 0)
	enz = distribute(t, parts, randomise.Enzymatic, 1)
	assert.InDelta(t, 100, enz.Classes().Mol.SUS, 1e-9)
	assert.NotContains(t, speciesByTag(native.Species()), "POS")
	assert.Contains(t, speciesByTag(enz.Species()), "POS")
	chem = distribute(t, parts, randomise.Chemical, 1)
	assert.Less(t, chem.Classes().Mol.SUS, 50.0)
}

func TestInteresterificationConservesFattyAcids(t *testing.T) {
	palm, soy, pko := palmOil(), soybeanOil(), palmKernelOil()
	cbe := catalogue.Stock{ID: "cbe", TAGs: map[string]float64{"POP": 20, "POS": 40, "SOS": 30, "POO": 10}}
	parts := []catalogue.Part{{Stock: &palm, Pct: 40}, {Stock: &soy, Pct: 25}, {Stock: &pko, Pct: 20}, {Stock: &cbe, Pct: 15}}
	native := distribute(t, parts, randomise.Native, 0)
	x0 := native.FattyAcidMol()
	_, sn2Native, _ := native.Positions()
	for _, m := range []randomise.Method{randomise.Chemical, randomise.Enzymatic} {
		for _, deg := range []float64{0.3, 1} {
			d := distribute(t, parts, m, deg)
			require.Equal(t, native.Acids, d.Acids)
			// interesterification exchanges acids between positions and
			// molecules; it makes or destroys none (first principles)
			assert.InDeltaSlice(t, x0, d.FattyAcidMol(), 1e-12, "%s %.1f", m, deg)
			fa0, fa := native.FattyAcids(), d.FattyAcids()
			for k, v := range fa0 {
				assert.InDelta(t, v, fa[k], 1e-9, k)
			}
			sn1, sn2, sn3 := d.Positions()
			if deg == 1 {
				assert.InDeltaSlice(t, sn1, sn3, 1e-12, "sn-1 = sn-3 after %s IE", m)
			}
			if m == randomise.Enzymatic {
				assert.InDeltaSlice(t, sn2Native, sn2, 1e-12, "sn-1,3 lipase keeps sn-2")
			}
			if m == randomise.Chemical && deg == 1 {
				assert.InDeltaSlice(t, sn1, sn2, 1e-12, "fully random: every position alike")
			}
		}
	}
	// The blend's overall acid composition is a mole balance: each stock
	// brings 3 x (mass / mean TAG molar mass) moles of acids with its own mole
	// fractions (first principles).
	mixParts := parts[:3]
	d := distribute(t, mixParts, randomise.Chemical, 1)
	want := map[string]float64{}
	var tot float64
	for _, p := range mixParts {
		acids, x, err := catalogue.MolFractions(p.Stock.FattyAcids)
		require.NoError(t, err)
		var meanAcid float64
		for i, f := range acids {
			meanAcid += x[i] * f.MolarMass()
		}
		tagMoles := p.Pct / (catalogue.Glycerol.Mass() - 3*catalogue.Water.Mass() + 3*meanAcid)
		for i, f := range acids {
			want[f.Key] += tagMoles * x[i]
			tot += tagMoles * x[i]
		}
	}
	got := d.FattyAcidMol()
	for i, f := range d.Acids {
		assert.InDelta(t, want[f.Key]/tot, got[i], 1e-12, f.Key)
	}
	// Weighting FAME wt% linearly by fat mass (what blend.Mix and an LP do,
	// common practice) is close to it: a lauric oil gives a little more FAME
	// mass per gram of fat, so the two differ by hundredths of a percent.
	mix, err := blend.Mix(mixParts, nil)
	require.NoError(t, err)
	for k, v := range d.FattyAcids() {
		assert.InDelta(t, mix.FattyAcids[k]*100/sumValues(mix.FattyAcids), v, 0.02, k)
	}
}

// Random interesterification of palm oil lifts the trisaturates from about
// 5-8 % to about 12-15 % (common practice), and the first-principles value is
// x_S^3 with x_S the mole fraction of saturated acids.
func TestRandomPalmOilTrisaturates(t *testing.T) {
	palm := palmOil()
	parts := []catalogue.Part{{Stock: &palm, Pct: 100}}
	acids, x, err := catalogue.MolFractions(palm.FattyAcids)
	require.NoError(t, err)
	var xs float64
	for i, f := range acids {
		if f.Saturated() {
			xs += x[i]
		}
	}
	native := distribute(t, parts, randomise.Native, 0).Classes().Mol
	chem := distribute(t, parts, randomise.Chemical, 1).Classes().Mol
	assert.InDelta(t, 100*xs*xs*xs, chem.S3, 1e-9)
	assert.InDelta(t, 100*3*xs*xs*(1-xs), chem.S2U, 1e-9)
	assert.GreaterOrEqual(t, chem.S3, 12.0)
	assert.LessOrEqual(t, chem.S3, 15.0)
	assert.InDelta(t, 6.5, native.S3, 1.5)
	// native palm oil is mostly SUS (POP, POS); randomisation turns most of
	// it into SSU (common practice)
	assert.Greater(t, native.SUS, 3*native.SSU)
	assert.InDelta(t, 2, chem.SSU/chem.SUS, 1e-9)
}

func TestPartialDegree(t *testing.T) {
	palm, pko := palmOil(), palmKernelOil()
	parts := []catalogue.Part{{Stock: &palm, Pct: 60}, {Stock: &pko, Pct: 40}}
	native := distribute(t, parts, randomise.Native, 0)
	for _, m := range []randomise.Method{randomise.Chemical, randomise.Enzymatic} {
		zero := distribute(t, parts, m, 0)
		one := distribute(t, parts, m, 1)
		half := distribute(t, parts, m, 0.25)
		assert.InDeltaSlice(t, native.Mol, zero.Mol, 1e-15)
		for i := range half.Mol {
			require.InDelta(t, 0.75*native.Mol[i]+0.25*one.Mol[i], half.Mol[i], 1e-15)
		}
	}
	// degree 1 chemical is the product of the overall acid fractions
	one := distribute(t, parts, randomise.Chemical, 1)
	x := native.FattyAcidMol()
	n := len(x)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			for k := 0; k < n; k++ {
				require.InDelta(t, x[i]*x[j]*x[k], one.At(i, j, k), 1e-15)
			}
		}
	}
}

func TestDistributeBadInput(t *testing.T) {
	palm := palmOil()
	ok := []catalogue.Part{{Stock: &palm, Pct: 100}}
	for name, fn := range map[string]func() error{
		"method":     func() error { _, err := randomise.Distribute(ok, "steam", 1); return err },
		"degree>1":   func() error { _, err := randomise.Distribute(ok, randomise.Chemical, 1.5); return err },
		"degree NaN": func() error { _, err := randomise.Distribute(ok, randomise.Chemical, math.NaN()); return err },
		"no parts":   func() error { _, err := randomise.Distribute(nil, randomise.Native, 0); return err },
		"zero": func() error {
			_, err := randomise.Distribute([]catalogue.Part{{Stock: &palm}}, randomise.Native, 0)
			return err
		},
		"negative": func() error {
			_, err := randomise.Distribute([]catalogue.Part{{Stock: &palm, Pct: -1}}, randomise.Native, 0)
			return err
		},
		"fa key": func() error {
			s := catalogue.Stock{ID: "x", FattyAcids: map[string]float64{"C18:7": 100}}
			_, err := randomise.Distribute([]catalogue.Part{{Stock: &s, Pct: 1}}, randomise.Native, 0)
			return err
		},
		"tag code": func() error {
			s := catalogue.Stock{ID: "x", TAGs: map[string]float64{"PQP": 100}}
			_, err := randomise.Distribute([]catalogue.Part{{Stock: &s, Pct: 1}}, randomise.Native, 0)
			return err
		},
		"empty stock": func() error {
			s := catalogue.Stock{ID: "x"}
			_, err := randomise.Distribute([]catalogue.Part{{Stock: &s, Pct: 1}}, randomise.Native, 0)
			return err
		},
		"sn2 zero": func() error {
			s := catalogue.Stock{ID: "x", FattyAcids: map[string]float64{"C16:0": 100}, SN2: map[string]float64{"C16:0": 0}}
			_, err := randomise.Distribute([]catalogue.Part{{Stock: &s, Pct: 1}}, randomise.Native, 0)
			return err
		},
	} {
		err := fn()
		require.Error(t, err, name)
		assert.True(t, catalogue.IsBadInput(err), "%s: %v", name, err)
	}
}

func TestMeasuredProfileSplitsMirrorImages(t *testing.T) {
	s := catalogue.Stock{ID: "m", TAGs: map[string]float64{"PPO": 50, "POP": 30, "OOO": 18}}
	d := distribute(t, []catalogue.Part{{Stock: &s, Pct: 100}}, randomise.Native, 0)
	require.Len(t, d.Notes, 1, "98 mol%% is rescaled and said so")
	sp := speciesByTag(d.Species())
	assert.InDelta(t, 25/0.98, sp["PPO"].MolPct, 1e-9)
	assert.InDelta(t, 25/0.98, sp["OPP"].MolPct, 1e-9)
	assert.InDelta(t, 30/0.98, sp["POP"].MolPct, 1e-9)
	reg := speciesByTag(d.SpeciesBy(randomise.Regio))
	assert.InDelta(t, 50/0.98, reg["PPO"].MolPct, 1e-9)
	assert.NotContains(t, reg, "OPP")
	comb := speciesByTag(d.SpeciesBy(randomise.Combined))
	assert.InDelta(t, 80/0.98, comb["PPO"].MolPct, 1e-9)
	assert.Equal(t, "S2U", comb["PPO"].Pattern)
	assert.Len(t, comb, 2)
	assert.Equal(t, "SUS", sp["POP"].Pattern)
	assert.Equal(t, "SSU", sp["PPO"].Pattern)
	assert.Equal(t, "USS", sp["OPP"].Pattern)
	assert.Equal(t, [3]string{"C16:0", "C18:1", "C16:0"}, sp["POP"].Positions)
	assert.Equal(t, 50, sp["POP"].CN)
	assert.Equal(t, 48, sp["POP"].ECN)

	// A measured profile that contradicts the FA profile is flagged.
	s.FattyAcids = map[string]float64{"C16:0": 10, "C18:1": 90}
	d = distribute(t, []catalogue.Part{{Stock: &s, Pct: 100}}, randomise.Native, 0)
	assert.Len(t, d.Notes, 2)
}

func TestSpeciesSortedAndComplete(t *testing.T) {
	palm, soy := palmOil(), soybeanOil()
	d := distribute(t, []catalogue.Part{{Stock: &palm, Pct: 50}, {Stock: &soy, Pct: 50}}, randomise.Chemical, 0.7)
	for _, lvl := range []randomise.Isomers{randomise.Stereo, randomise.Regio, randomise.Combined} {
		ss := d.SpeciesBy(lvl)
		var mol, wt float64
		for i, s := range ss {
			mol += s.MolPct
			wt += s.WtPct
			if i > 0 {
				require.GreaterOrEqual(t, ss[i-1].MolPct, s.MolPct-1e-9, lvl.String())
			}
			assert.Equal(t, s.Acids[0].Code+s.Acids[1].Code+s.Acids[2].Code, s.Tag)
		}
		assert.InDelta(t, 100, mol, 1e-9, lvl.String())
		assert.InDelta(t, 100, wt, 1e-9, lvl.String())
	}
	n := len(d.Acids)
	assert.Len(t, d.Species(), n*n*n)
}

func index(t *testing.T, d *randomise.Distribution, key string) int {
	t.Helper()
	for i, f := range d.Acids {
		if f.Key == key {
			return i
		}
	}
	t.Fatalf("acid %s not in distribution", key)
	return -1
}

func mustLookup(t *testing.T, key string) catalogue.FattyAcid {
	t.Helper()
	f, ok := catalogue.Lookup(key)
	require.True(t, ok, key)
	return f
}

func sumMol(d *randomise.Distribution) float64 {
	var s float64
	for _, v := range d.Mol {
		s += v
	}
	return 100 * s
}

func sumValues(m map[string]float64) float64 {
	var s float64
	for _, v := range m {
		s += v
	}
	return s
}

func roundMap(m map[int]float64) map[int]float64 {
	out := map[int]float64{}
	for k, v := range m {
		out[k] = math.Round(v*1e9) / 1e9
	}
	return out
}
