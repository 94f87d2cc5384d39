package blend

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

func fa(t *testing.T, key string) catalogue.FattyAcid {
	t.Helper()
	f, ok := catalogue.Lookup(key)
	require.True(t, ok, key)
	return f
}

// The theoretical IV of the pure TAGs, which are the AOCS Cd 1c-85 factors
// x 100 (the method's factors are each pure TAG's theoretical IV / 100):
// triolein 86.0, trilinolein 173.2, trilinolenin 261.6, tripalmitolein 95.0.
func TestTheoreticalIodineValues(t *testing.T) {
	for key, want := range map[string]float64{"C18:1": 86.0, "C18:2": 173.2, "C18:3": 261.6, "C16:1": 95.0} {
		assert.InDelta(t, want, TAGIodineValue(fa(t, key)), 0.1, key)
	}
	assert.Zero(t, TAGIodineValue(fa(t, "C16:0")), "a saturated TAG takes up no iodine")
}

// AOCS Official Method Cd 1c-85 publishes the factors 0.950 (C16:1), 0.860
// (C18:1), 1.732 (C18:2), 2.616 (C18:3), 0.785 (C20:1), 0.723 (C22:1). The
// derived factors must equal them (to the 3 decimals published), and the
// published ones applied to a profile give the same IV as ours ("both ways").
func TestDerivedFactorsEqualCd1c85(t *testing.T) {
	published := map[string]float64{"C16:1": 0.950, "C18:1": 0.860, "C18:2": 1.732, "C18:3": 2.616, "C20:1": 0.785, "C22:1": 0.723}
	for key, want := range published {
		assert.InDelta(t, want, IVFactor(fa(t, key)), 0.0006, key)
	}
	// A soybean-like profile: IV from the published factors vs ours.
	profile := map[string]float64{"C16:0": 10.7, "C18:0": 3.7, "C18:1": 23.4, "C18:2": 53.3, "C18:3": 7.7, "C20:1": 0.3, "C22:1": 0.1, "C16:1": 0.1, "C20:0": 0.4, "C22:0": 0.3}
	var byPublished float64
	for k, w := range profile {
		byPublished += w * published[k]
	}
	assert.InDelta(t, byPublished, Profile(profile).IV, 0.05)
}

// Saponification value of tripalmitin 208.5 mg KOH/g: 3 x 56106 / 807.3
// (AOCS Cd 3-25 defines SV as mg KOH to saponify 1 g; tripalmitin's molar
// mass from PubChem, from memory).
func TestSaponificationValue(t *testing.T) {
	assert.InDelta(t, 208.5, SVFactor(fa(t, "C16:0")), 0.05)
	// Profile SV of pure palmitic FAME treated as its fat equals the TAG's SV.
	assert.InDelta(t, 208.5, Profile(map[string]float64{"C16:0": 100}).SV, 0.05)
	// Triolein 190.1 (3 x 56106 / 885.4, same formula).
	assert.InDelta(t, 190.1, Profile(map[string]float64{"C18:1": 100}).SV, 0.05)
	assert.InDelta(t, 885.45, Profile(map[string]float64{"C18:1": 100}).MeanMolarMass, 0.01)
}

// Cox value, Fatemi & Hammond (1980) Lipids 15:379:
// Cox = [1(C18:1) + 10.3(C18:2) + 21.6(C18:3)] / 100.
func TestCox(t *testing.T) {
	p := Profile(map[string]float64{"C18:1": 60, "C18:2": 20, "C18:3": 10, "C16:0": 10})
	assert.InDelta(t, (60+10.3*20+21.6*10)/100, p.Cox, 1e-12)
	// trans C18:1 is not counted as an oxidisable cis acid, nor as MUFA
	p = Profile(map[string]float64{"C18:1t": 30, "C18:0": 70})
	assert.Zero(t, p.Cox)
	assert.Zero(t, p.MUFA)
	assert.InDelta(t, 30, p.Trans, 1e-12)
	assert.InDelta(t, 70, p.SAFA, 1e-12)
}

func TestClassesAddUp(t *testing.T) {
	p := Profile(map[string]float64{"C12:0": 48, "C14:0": 16, "C16:0": 9, "C18:0": 3, "C18:1": 15, "C18:2": 2.5, "C18:3": 0.5, "C18:1t": 6})
	assert.InDelta(t, 100, p.SAFA+p.MUFA+p.PUFA+p.Trans, 1e-9)
	assert.InDelta(t, 0.5, p.Omega3, 1e-12)
}

// curve builds an SFC curve from temperature, solid pairs.
func curve(pairs ...float64) catalogue.Curve {
	var c catalogue.Curve
	for i := 0; i+1 < len(pairs); i += 2 {
		c = append(c, catalogue.Point{Temp: pairs[i], Solid: pairs[i+1]})
	}
	return c
}

func stock(id string, fa map[string]float64, sfc catalogue.Curve) *catalogue.Stock {
	return &catalogue.Stock{ID: id, FattyAcids: fa, SFC: sfc, Available: math.Inf(1)}
}

// A physical mix is linear in mass share: properties of 30/70 equal 0.3 x A +
// 0.7 x B for every linear property (common practice: mass balance).
func TestMixIsLinear(t *testing.T) {
	a := stock("a", map[string]float64{"C16:0": 45, "C18:0": 5, "C18:1": 40, "C18:2": 10},
		curve(10, 50, 20, 26, 30, 9, 40, 2))
	b := stock("b", map[string]float64{"C16:0": 4, "C18:0": 2, "C18:1": 62, "C18:2": 20, "C18:3": 10, "C20:1": 2},
		curve(10, 0, 20, 0, 30, 0, 40, 0))
	p, err := Mix([]Part{{Stock: a, Pct: 30}, {Stock: b, Pct: 70}}, []float64{10, 25, 40, 45})
	require.NoError(t, err)
	pa, pb := Profile(a.FattyAcids), Profile(b.FattyAcids)
	for _, name := range []string{"iv", "sv", "safa", "mufa", "pufa", "trans", "cox", "C18:1"} {
		va, _ := pa.Value(name)
		vb, _ := pb.Value(name)
		got, ok := p.Value(name)
		require.True(t, ok)
		assert.InDelta(t, 0.3*va+0.7*vb, got, 1e-9, name)
	}
	assert.InDelta(t, 0.3*50, p.SFC[10], 1e-9)
	assert.InDelta(t, 0.3*(26+9)/2, p.SFC[25], 1e-9, "a interpolated halfway between 20 and 30 C; b is liquid")
	_, has45 := p.SFC[45]
	assert.False(t, has45, "45 C is outside both measured curves: reported missing, not zero")
	assert.Equal(t, []string{"a", "b"}, p.SFCMissing[45])
}

func TestMixRejectsBadShares(t *testing.T) {
	a := stock("a", map[string]float64{"C16:0": 100}, nil)
	_, err := Mix([]Part{{Stock: a, Pct: -1}}, nil)
	assert.ErrorContains(t, err, `stock "a"`)
	_, err = Mix([]Part{{Stock: a, Pct: 0}}, nil)
	assert.Error(t, err)
	_, err = Mix([]Part{{Stock: a, Pct: math.NaN()}}, nil)
	assert.Error(t, err)
	// a line without a stock is an error, not a panic
	_, err = Mix([]Part{{Stock: a, Pct: 50}, {Stock: nil, Pct: 50}}, nil)
	assert.ErrorContains(t, err, "line 2 of the mix has no stock")
}

func TestCoefficientMatchesValue(t *testing.T) {
	s := stock("s", map[string]float64{"C18:1": 70, "C18:2": 20, "C16:0": 10}, nil)
	v, ok := Coefficient(s, "iv")
	require.True(t, ok)
	assert.InDelta(t, 70*IVFactor(fa(t, "C18:1"))+20*IVFactor(fa(t, "C18:2")), v, 1e-9)
	_, ok = Coefficient(s, "nonsense")
	assert.False(t, ok)
	v, ok = Coefficient(s, "C18:3")
	assert.True(t, ok)
	assert.Zero(t, v)
}

func TestTemps(t *testing.T) {
	assert.Equal(t, []float64{10, 15, 20, 25, 30, 33.3, 35, 40, 45}, Temps(33.3, 20))
}

// TestProfileValuesIsProfile: ProfileValues gives every value of Profile,
// bit for bit, without the copy of the profile, on every demo stock and on
// a profile with a zero entry and an acid outside the reference table.
func TestProfileValuesIsProfile(t *testing.T) {
	profiles := []map[string]float64{{"C16:0": 50, "C18:1": 0, "C99:9": 3, "C18:2": 47}}
	for _, s := range catalogue.DemoStocks().Stocks {
		profiles = append(profiles, s.FattyAcids)
	}
	for _, fa := range profiles {
		want := Profile(fa)
		got := ProfileValues(fa)
		require.Nil(t, got.FattyAcids)
		got.FattyAcids = want.FattyAcids
		require.Equal(t, want, got, "%v", fa)
	}
}
