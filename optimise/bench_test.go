package optimise

import (
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/optimize/convex/lp"

	"lipoplan/catalogue"
	lplayer "lipoplan/optimise/lp"
)

// bench30x20 is the DESIGN section 7 benchmark model: 30 stocks and 20
// limits (the 8 properties, 8 fatty acids and SFC at 4 temperatures), from
// the seeded generator of the random suite.
func bench30x20(tb testing.TB) (*catalogue.Catalogue, *catalogue.Spec) {
	r := rand.New(rand.NewPCG(30, 20))
	cat := genStocks(r, 30)
	spec := genSpec(r, cat, 20)
	if n := len(spec.Limits) + len(spec.SFC); n != 20 {
		tb.Fatalf("benchmark spec has %d limits, want 20", n)
	}
	return cat, spec
}

// BenchmarkBlend30x20/Solve is the whole optimise.Solve call: model
// building, CLP, duals, ranging, properties and reports.
// BenchmarkBlend30x20/Solver is the same through one Solver kept across
// solves (as a workspace session would).
// BenchmarkBlend30x20/GonumSimplex is gonum's lp.Simplex alone on the same
// model in standard form, prebuilt. BenchmarkBlend30x20/BareCLP and
// BareCLPReused (cgo builds, bench_coin_test.go) are CLP through the binding
// on prebuilt arrays, with a new CLP model per solve and with one model.
func BenchmarkBlend30x20(b *testing.B) {
	cat, spec := bench30x20(b)
	b.Run("Solve", func(b *testing.B) {
		for b.Loop() {
			r, err := Solve(cat, spec, Options{})
			if err != nil || r.Status != Optimal {
				b.Fatal(err, r.Status)
			}
		}
	})
	b.Run("Solver", func(b *testing.B) {
		s := NewSolver()
		defer s.Close()
		for b.Loop() {
			r, err := s.Solve(cat, spec, Options{})
			if err != nil || r.Status != Optimal {
				b.Fatal(err, r.Status)
			}
		}
	})
	b.Run("GonumSimplex", func(b *testing.B) {
		m, _, err := build(cat, spec)
		if err != nil {
			b.Fatal(err)
		}
		st, err := lplayer.ToStandard((&engine{}).problem(m))
		if err != nil {
			b.Fatal(err)
		}
		for b.Loop() {
			if _, _, err := lp.Simplex(st.C, st.A, st.B, 1e-10, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
	benchBareCLP(b, cat, spec)
}
