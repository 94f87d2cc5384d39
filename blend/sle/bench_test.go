package sle

import (
	"math"
	"testing"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// bench550 is randomly interesterified demo palm oil: 10 acids, so every one
// of the 10^2 x 11 / 2 = 550 TAG identities occurs (the case of the
// performance target in DEVELOPERS.md, "Project decisions": about 500 TAGs,
// 8 temperatures).
func bench550(b *testing.B) (*randomise.Distribution, []float64) {
	st, ok := catalogue.DemoStocks().Find("palm")
	if !ok {
		b.Fatal("demo palm oil missing")
	}
	d, err := randomise.Distribute([]catalogue.Part{{Stock: st, Pct: 100}}, randomise.Chemical, 1)
	if err != nil {
		b.Fatal(err)
	}
	if s := NewSet(d.Acids, Options{}); s.Len() != 550 {
		b.Fatalf("%d TAG identities, want 550", s.Len())
	}
	return d, catalogue.DefaultTemps
}

// BenchmarkCurve is the hot path of a successive-LP optimiser: the TAG set
// is prepared once, each call groups the species and solves 8 temperatures.
func BenchmarkCurve(b *testing.B) {
	d, temps := bench550(b)
	s := NewSet(d.Acids, Options{})
	out := make([]float64, len(temps))
	var w Work
	b.ReportAllocs()
	for b.Loop() {
		if err := s.Curve(d.Mol, temps, out, &w); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCurveIsomorph is BenchmarkCurve with the solid-solution model
// (Phases, one ideal solid solution per saturation pattern and carbon
// number).
func BenchmarkCurveIsomorph(b *testing.B) {
	d, temps := bench550(b)
	s := NewSet(d.Acids, Options{Solids: IsomorphSolutions})
	out := make([]float64, len(temps))
	var w Work
	b.ReportAllocs()
	for b.Loop() {
		if err := s.Curve(d.Mol, temps, out, &w); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPredict is one whole prediction from a distribution: TAG set and
// melting properties built, curve solved, map returned.
func BenchmarkPredict(b *testing.B) {
	d, temps := bench550(b)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Predict(d, temps, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCurveBisectionReference solves the same equilibria by plain
// bisection on L (the textbook method, 200 halvings at most) as the
// reference for BenchmarkCurve in the same run.
func BenchmarkCurveBisectionReference(b *testing.B) {
	d, temps := bench550(b)
	s := NewSet(d.Acids, Options{})
	z := make([]float64, s.Len())
	for idx, v := range d.Mol {
		z[s.group[idx]] += v
	}
	xs := make([]float64, len(z))
	out := make([]float64, len(temps))
	b.ReportAllocs()
	for b.Loop() {
		for ti, t := range temps {
			tk := t + 273.15
			for i := range z {
				xs[i] = math.Min(1, math.Exp(s.dhR[i]*(1/s.tm[i]-1/tk)))
			}
			L := bisectLiquid(z, xs)
			var solid, total float64
			for i, zi := range z {
				solid += math.Max(0, zi-L*xs[i]) * s.mass[i]
				total += zi * s.mass[i]
			}
			out[ti] = 100 * solid / total
		}
	}
}

// BenchmarkDistributeReference is the TAG distribution of the same blend
// (randomise; its target is under 100 us, DEVELOPERS.md "Project
// decisions"), for scale.
func BenchmarkDistributeReference(b *testing.B) {
	st, _ := catalogue.DemoStocks().Find("palm")
	parts := []catalogue.Part{{Stock: st, Pct: 100}}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := randomise.Distribute(parts, randomise.Chemical, 1); err != nil {
			b.Fatal(err)
		}
	}
}

func TestBisectionReferenceAgrees(t *testing.T) {
	// The benchmark's reference computes the same curve (within 1e-9 % solid).
	st, _ := catalogue.DemoStocks().Find("palm")
	d, err := randomise.Distribute([]catalogue.Part{{Stock: st, Pct: 100}}, randomise.Chemical, 1)
	if err != nil {
		t.Fatal(err)
	}
	s := NewSet(d.Acids, Options{})
	z := make([]float64, s.Len())
	for idx, v := range d.Mol {
		z[s.group[idx]] += v
	}
	out := make([]float64, len(catalogue.DefaultTemps))
	if err := s.Curve(d.Mol, catalogue.DefaultTemps, out, nil); err != nil {
		t.Fatal(err)
	}
	for ti, tc := range catalogue.DefaultTemps {
		xs := make([]float64, len(z))
		for i := range z {
			xs[i] = Solubility(s.dhR[i]*GasConstant, s.tm[i], tc+273.15)
		}
		L := bisectLiquid(z, xs)
		var solid, total float64
		for i, zi := range z {
			solid += math.Max(0, zi-L*xs[i]) * s.mass[i]
			total += zi * s.mass[i]
		}
		if got := 100 * solid / total; math.Abs(got-out[ti]) > 1e-9 {
			t.Errorf("%v C: bisection %.12f, Curve %.12f", tc, got, out[ti])
		}
	}
}

// BenchmarkCalibrateDemo fits the five class shifts to every measured curve
// of the demo catalogue (14 stocks, 4 of them liquid oils), without the
// held-out check: the fit a user runs with lipoplan calibrate.
func BenchmarkCalibrateDemo(b *testing.B) {
	cat := catalogue.DemoStocks()
	var sts []*catalogue.Stock
	for i := range cat.Stocks {
		sts = append(sts, &cat.Stocks[i])
	}
	for b.Loop() {
		if _, err := Calibrate(sts, DefaultOptions(), false); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkBlendModelSFC is one prediction of a final blend over all 14
// demo stocks (two through a chemical reactor) at four spec temperatures:
// the unit of work of the optimiser's predicted-SFC model.
func BenchmarkBlendModelSFC(b *testing.B) {
	cat := catalogue.DemoStocks()
	var sts []*catalogue.Stock
	for i := range cat.Stocks {
		sts = append(sts, &cat.Stocks[i])
	}
	m, err := NewBlendModel(sts, randomise.Chemical, []float64{10, 20, 35, 40}, DefaultOptions())
	if err != nil {
		b.Fatal(err)
	}
	direct, feed := make([]float64, len(sts)), make([]float64, len(sts))
	for j := range direct {
		direct[j] = 5
	}
	feed[7], feed[8] = 20, 10
	out := make([]float64, 4)
	b.ReportAllocs()
	for b.Loop() {
		if err := m.SFC(direct, feed, out); err != nil {
			b.Fatal(err)
		}
	}
}
