package sle_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

func acid(t *testing.T, key string) catalogue.FattyAcid {
	t.Helper()
	f, ok := catalogue.Lookup(key)
	require.True(t, ok, key)
	return f
}

// single builds a distribution holding one positional species.
func single(t *testing.T, code string) *randomise.Distribution {
	t.Helper()
	fs, err := catalogue.ParseTAGCode(code)
	require.NoError(t, err)
	var acids []catalogue.FattyAcid
	idx := func(f catalogue.FattyAcid) int {
		for i, a := range acids {
			if a.Key == f.Key {
				return i
			}
		}
		acids = append(acids, f)
		return len(acids) - 1
	}
	i, j, k := idx(fs[0]), idx(fs[1]), idx(fs[2])
	n := len(acids)
	d := &randomise.Distribution{Acids: acids, Mol: make([]float64, n*n*n), Method: randomise.Native}
	d.Mol[(i*n+j)*n+k] = 1
	return d
}

func TestPureTAGSolidBelowMeltingPointLiquidAbove(t *testing.T) {
	// A pure substance is all solid below its melting point and all liquid
	// above it (phase rule, one component at fixed pressure).
	for _, code := range []string{"SSS", "PPP", "POP", "LaLaLa"} {
		for _, p := range []sle.Polymorph{sle.Alpha, sle.BetaPrime, sle.Beta} {
			m := melting(t, code, p)
			tm := m.TmCelsius()
			sfc, err := sle.Predict(single(t, code), []float64{tm - 20, tm - 0.1, tm + 0.1, tm + 20}, sle.Options{Polymorph: p})
			require.NoError(t, err)
			assert.InDelta(t, 100, sfc[tm-20], 1e-9, "%s %s", code, p)
			assert.InDelta(t, 100, sfc[tm-0.1], 1e-9, "%s %s", code, p)
			assert.Zero(t, sfc[tm+0.1], "%s %s", code, p)
			assert.Zero(t, sfc[tm+20], "%s %s", code, p)
		}
	}
}

func TestBinaryPPPOOOAgainstHildebrandByHand(t *testing.T) {
	// 50:50 mol tripalmitin/triolein at temperatures where triolein is fully
	// liquid: the liquid is saturated in PPP (Hildebrand), L = 0.5/(1 - xs),
	// solid PPP = 0.5 - L xs mol per mol, SFC = 100 solid M(PPP) / mean M,
	// with M from catalogue.TAGMolarMass (tripalmitin 807.3, triolein 885.4
	// g/mol, PubChem, from memory), so the set's own masses are checked too.
	p, o := acid(t, "C16:0"), acid(t, "C18:1")
	d := &randomise.Distribution{Acids: []catalogue.FattyAcid{p, o}, Mol: make([]float64, 8)}
	d.Mol[0] = 0.5 // PPP (0,0,0)
	d.Mol[7] = 0.5 // OOO (1,1,1)
	mP := catalogue.TAGMolarMass(p, p, p)
	mO := catalogue.TAGMolarMass(o, o, o)
	mppp := melting(t, "PPP", sle.Beta)
	temps := []float64{30, 40, 50, 60}
	sfc, err := sle.Predict(d, temps, sle.Options{Polymorph: sle.Beta})
	require.NoError(t, err)
	for _, tc := range temps {
		xs := math.Exp(mppp.DH / sle.GasConstant * (1/mppp.Tm - 1/(tc+273.15)))
		L := 0.5 / (1 - xs)
		want := 100 * (0.5 - L*xs) * mP / (0.5*mP + 0.5*mO)
		assert.InDelta(t, want, sfc[tc], 1e-9, "%v C", tc)
	}
	// and the hand-computed curve falls with temperature (30 C ~ 49 %, 60 C ~ 35 %)
	assert.Greater(t, sfc[30], sfc[60])
}

func TestMirrorImagesGiveTheSameSFC(t *testing.T) {
	a, err := sle.Predict(single(t, "PPO"), []float64{10, 20, 30}, sle.Options{})
	require.NoError(t, err)
	b, err := sle.Predict(single(t, "OPP"), []float64{10, 20, 30}, sle.Options{})
	require.NoError(t, err)
	assert.Equal(t, a, b)
}

func TestSFCNonIncreasingWithTemperature(t *testing.T) {
	// Thermodynamics: every Hildebrand solubility rises with temperature, so
	// the equilibrium solid can only fall (see TestLiquidFractionRisesWithSolubility).
	cat := catalogue.DemoStocks()
	temps := []float64{-10, 0, 5, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 70, 80}
	for i := range cat.Stocks {
		for _, p := range []sle.Polymorph{sle.Alpha, sle.BetaPrime, sle.Beta} {
			sfc, _, err := sle.PredictParts([]catalogue.Part{{Stock: &cat.Stocks[i], Pct: 100}}, randomise.Native, 0, temps, sle.Options{Polymorph: p})
			require.NoError(t, err, cat.Stocks[i].ID)
			for k := 1; k < len(temps); k++ {
				assert.LessOrEqual(t, sfc[temps[k]], sfc[temps[k-1]]+1e-9, "%s %s %v C", cat.Stocks[i].ID, p, temps[k])
			}
			assert.GreaterOrEqual(t, sfc[-10], 0.0)
			assert.LessOrEqual(t, sfc[-10], 100.0)
		}
	}
}

func TestLiquidOilsAreLiquidAtRoomTemperature(t *testing.T) {
	// Refined sunflower, high-oleic sunflower, soybean and rapeseed oils are
	// clear liquids at 20 C with no solid fat by pulsed NMR (common practice).
	cat := catalogue.DemoStocks()
	for _, id := range []string{"sunflower", "hosun", "soybean", "rapeseed"} {
		st, ok := cat.Find(id)
		require.True(t, ok)
		sfc, _, err := sle.PredictParts([]catalogue.Part{{Stock: st, Pct: 100}}, randomise.Native, 0, []float64{20}, sle.DefaultOptions())
		require.NoError(t, err)
		assert.Less(t, sfc[20], 1.0, id)
	}
}

// hardstockBlend is a classic interesterification feed: 30 % fully hardened
// soybean oil (made by randomise.Harden) with 70 % liquid soybean oil.
func hardstockBlend(t testing.TB) []catalogue.Part {
	cat := catalogue.DemoStocks()
	soy, ok := cat.Find("soybean")
	if !ok {
		t.Fatal("demo soybean oil missing")
	}
	hard, err := randomise.Harden(*soy)
	if err != nil {
		t.Fatal(err)
	}
	return []catalogue.Part{{Stock: &hard, Pct: 30}, {Stock: soy, Pct: 70}}
}

func TestInteresterificationLowersHighTemperatureSFC(t *testing.T) {
	// Random interesterification of a hardstock / liquid oil blend turns the
	// high-melting S3 (SSS, about 70 C) into S2U and SU2 TAGs that melt lower,
	// so the SFC at body temperature and above falls (common practice: the
	// reason IE blends replace partially hydrogenated fats without a waxy
	// mouthfeel).
	parts := hardstockBlend(t)
	temps := []float64{35, 40, 45}
	native, _, err := sle.PredictParts(parts, randomise.Native, 0, temps, sle.DefaultOptions())
	require.NoError(t, err)
	chem, _, err := sle.PredictParts(parts, randomise.Chemical, 1, temps, sle.DefaultOptions())
	require.NoError(t, err)
	enz, _, err := sle.PredictParts(parts, randomise.Enzymatic, 1, temps, sle.DefaultOptions())
	require.NoError(t, err)
	for _, tc := range temps {
		t.Logf("%v C: native %.1f %%, chemical IE %.1f %%, enzymatic IE %.1f %%", tc, native[tc], chem[tc], enz[tc])
		assert.Less(t, chem[tc], native[tc], "chemical IE at %v C", tc)
		assert.Less(t, enz[tc], native[tc], "enzymatic IE at %v C", tc)
	}
	// Mass balance of the physical blend at 45 C: the liquid oil's own TAGs
	// are all liquid, so the solid is at most the 30 % hardstock, less the
	// little of it the oil dissolves (a few %, Hildebrand).
	assert.LessOrEqual(t, native[45], 30.0)
	assert.Greater(t, native[45], 20.0)
}

func TestSetGroupsMirrorImages(t *testing.T) {
	acids := []catalogue.FattyAcid{acid(t, "C16:0"), acid(t, "C18:0"), acid(t, "C18:1"), acid(t, "C18:2")}
	s := sle.NewSet(acids, sle.Options{})
	n := len(acids)
	assert.Equal(t, n*n*(n+1)/2, s.Len(), "n^2 (n+1)/2 TAG identities once mirror images are merged")
}

func TestPredictBadInput(t *testing.T) {
	_, err := sle.Predict(single(t, "SSS"), []float64{math.NaN()}, sle.Options{})
	require.Error(t, err)
	assert.True(t, catalogue.IsBadInput(err))
	_, err = sle.Predict(single(t, "SSS"), []float64{-300}, sle.Options{})
	assert.True(t, catalogue.IsBadInput(err))
	_, err = sle.Predict(nil, []float64{20}, sle.Options{})
	assert.Error(t, err)
	s := sle.NewSet(single(t, "SSS").Acids, sle.Options{})
	assert.Error(t, s.Curve([]float64{1, 0}, []float64{20}, make([]float64, 1), nil), "wrong species count")
	assert.Error(t, s.Curve([]float64{1}, []float64{20, 30}, make([]float64, 1), nil), "output too short")
	assert.Error(t, s.Curve([]float64{0}, []float64{20}, make([]float64, 1), nil), "empty composition")
}

// A prepared table gives the same curve as computing the solubilities on
// the way (the same equations, tabulated once), for both solid models.
func TestPreparedCurveEqualsCurve(t *testing.T) {
	cat := catalogue.DemoStocks()
	temps := []float64{10, 20, 30, 35, 40}
	for _, sm := range []sle.SolidModel{sle.PureSolids, sle.IsomorphSolutions} {
		for i := range cat.Stocks {
			d, err := randomise.Distribute([]catalogue.Part{{Stock: &cat.Stocks[i], Pct: 100}}, randomise.Chemical, 1)
			require.NoError(t, err)
			set := sle.NewSet(d.Acids, sle.Options{Solids: sm})
			a, b := make([]float64, len(temps)), make([]float64, len(temps))
			require.NoError(t, set.Curve(d.Mol, temps, a, nil))
			p, err := set.Prepare(temps)
			require.NoError(t, err)
			require.NoError(t, p.Curve(d.Mol, b, nil))
			for k := range a {
				assert.InDelta(t, a[k], b[k], 1e-9, "%s %s %v C", cat.Stocks[i].ID, sm, temps[k])
			}
		}
	}
}

// BlendModel against PredictParts (Distribute, then the equilibrium on the
// mix's own acid set): a blend of stocks as they are equals the native
// prediction, and one wholly through the reactor the interesterified one.
// The extra acids of the blender's common acid set are absent TAGs and must
// not change the answer.
func TestBlendModelMatchesPredictParts(t *testing.T) {
	cat := catalogue.DemoStocks()
	var sts []*catalogue.Stock
	for i := range cat.Stocks {
		sts = append(sts, &cat.Stocks[i])
	}
	temps := []float64{10, 20, 30, 35, 40}
	for _, method := range []randomise.Method{randomise.Chemical, randomise.Enzymatic} {
		m, err := sle.NewBlendModel(sts, method, temps, sle.DefaultOptions())
		require.NoError(t, err)
		pick := map[string]float64{"palm-st-hard": 40, "rapeseed": 45, "coconut": 15}
		shares := make([]float64, len(sts))
		var parts []catalogue.Part
		for j, s := range sts {
			if v, ok := pick[s.ID]; ok {
				shares[j] = v
				parts = append(parts, catalogue.Part{Stock: s, Pct: v})
			}
		}
		got := make([]float64, len(temps))
		for _, c := range []struct {
			direct, feed []float64
			method       randomise.Method
		}{{shares, nil, randomise.Native}, {nil, shares, method}} {
			require.NoError(t, m.SFC(c.direct, c.feed, got))
			want, _, err := sle.PredictParts(parts, c.method, 1, temps, sle.DefaultOptions())
			require.NoError(t, err)
			for k, tc := range temps {
				assert.InDelta(t, want[tc], got[k], 1e-9, "%s %v C", c.method, tc)
			}
		}
	}
}
