package optimise

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"gonum.org/v1/gonum/optimize/convex/lp"

	"lipoplan/catalogue"
	lplayer "lipoplan/optimise/lp"
)

// bench30x20 is the benchmark model of the README's table: 30 stocks and
// 20 limits (the 8 properties, 8 fatty acids and SFC at 4 temperatures),
// from the seeded generator of the random suite.
func bench30x20(tb testing.TB) (*catalogue.Catalogue, *catalogue.Spec) {
	r := rand.New(rand.NewPCG(30, 20))
	cat := genStocks(r, 30)
	spec := genSpec(r, cat, 20)
	if n := len(spec.Limits) + len(spec.SFC); n != 20 {
		tb.Fatalf("benchmark spec has %d limits, want 20", n)
	}
	return cat, spec
}

func benchProblem(tb testing.TB, cat *catalogue.Catalogue, spec *catalogue.Spec) *lplayer.Problem {
	m, _, err := build(cat, spec)
	if err != nil {
		tb.Fatal(err)
	}
	return (&engine{}).problem(m).Clone()
}

// benchCold times cold solves of p: a fresh engine, load, solve.
func benchCold(b *testing.B, p *lplayer.Problem) {
	for b.Loop() {
		coldSolve(b, p)
	}
}

func coldSolve(b *testing.B, p *lplayer.Problem) {
	e := lplayer.New()
	if err := e.Load(p); err != nil {
		b.Fatal(err)
	}
	mustSolve(b, e)
}

// interleave runs f and g in turn in every iteration and reports the ratio
// of their total times as the metric name, so that the load of a shared
// machine falls on both alike.
func interleave(b *testing.B, name string, f, g func()) {
	var tf, tg time.Duration
	for b.Loop() {
		t0 := time.Now()
		f()
		t1 := time.Now()
		g()
		tf, tg = tf+t1.Sub(t0), tg+time.Since(t1)
	}
	b.ReportMetric(float64(tf)/float64(tg), name)
}

func mustSolve(b *testing.B, e lplayer.Engine) *lplayer.Solution {
	s, err := e.Solve()
	if err != nil || s.Status != lplayer.Optimal {
		b.Fatal(err, s)
	}
	return s
}

// BenchmarkBlend30x20 times one blend LP, 30 stocks x 20 limits, on
// prebuilt arrays:
//
//	LP            lipoplan's simplex: a fresh engine, load, solve, the answer
//	              with duals and basis (what BareCLP does with CLP)
//	ScaledVsLP    the same through lp.NewScaled (the model scaled and the
//	              answer unscaled outside the engine, as every solve for the
//	              commands runs) and LP in turn, their ratio as scaled/lp
//	BareCLP       CLP through the binding, a fresh CLP model per solve
//	              (coin build; bench_coin_test.go), and BareCLPReused
//	LPvsBareCLP   LP and BareCLP in turn in every iteration, their ratio as
//	              the metric lp/clp (coin build)
//	GonumSimplex  gonum's lp.Simplex on the same model in standard form
//	GonumVsLP     GonumSimplex and LP in turn in every iteration, their ratio
//	              as the metric gonum/lp
//	WarmPrice     one engine re-solving after a price edit (a stock's cost
//	              up or down 5 % in turn): primal simplex from the last basis
//	WarmLimit     the same after a limit edit (a row bound moved by 2 % of its
//	              size in turn): dual simplex from the last basis
//	ColdReused    one engine solving again from the slack basis (the cold
//	              solve the warm ones save)
//
// and the whole optimise.Solve (model, solve, duals, ranging, properties,
// report), alone and through a Solver after a price edit.
func BenchmarkBlend30x20(b *testing.B) {
	cat, spec := bench30x20(b)
	p := benchProblem(b, cat, spec)
	b.Run("LP", func(b *testing.B) { benchCold(b, p) })
	benchBareCLP(b, cat, spec)
	benchInterleaved(b, p)
	b.Run("ScaledVsLP", func(b *testing.B) {
		interleave(b, "scaled/lp", func() {
			e := lplayer.NewScaled()
			if err := e.Load(p); err != nil {
				b.Fatal(err)
			}
			mustSolve(b, e)
		}, func() { coldSolve(b, p) })
	})
	b.Run("GonumSimplex", func(b *testing.B) {
		st, err := lplayer.ToStandard(p)
		if err != nil {
			b.Fatal(err)
		}
		for b.Loop() {
			if _, _, err := lp.Simplex(st.C, st.A, st.B, 1e-10, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("GonumVsLP", func(b *testing.B) {
		st, err := lplayer.ToStandard(p)
		if err != nil {
			b.Fatal(err)
		}
		interleave(b, "gonum/lp", func() {
			if _, _, err := lp.Simplex(st.C, st.A, st.B, 1e-10, nil); err != nil {
				b.Fatal(err)
			}
		}, func() { coldSolve(b, p) })
	})
	warm := func(b *testing.B, edit func(e *lplayer.Simplex, k int)) {
		e := lplayer.New()
		if err := e.Load(p); err != nil {
			b.Fatal(err)
		}
		mustSolve(b, e)
		k := 0
		for b.Loop() {
			edit(e, k)
			mustSolve(b, e)
			k++
		}
	}
	sol := func() *lplayer.Solution {
		e := lplayer.New()
		_ = e.Load(p)
		s, _ := e.Solve()
		return s
	}()
	in := -1 // a stock in the blend
	for j, x := range sol.X {
		if x > 1e-6 && (in < 0 || x > sol.X[in]) {
			in = j
		}
	}
	tight := 1 // a binding limit row
	for i := 1; i < p.Rows; i++ {
		if sol.Basis[p.Cols+i] != lplayer.Basic {
			tight = i
			break
		}
	}
	b.Run("WarmPrice", func(b *testing.B) {
		warm(b, func(e *lplayer.Simplex, k int) {
			f := 1.05
			if k%2 == 1 {
				f = 1 / 1.05
			}
			e.SetObj(in, p.Obj[in]*f)
		})
	})
	b.Run("WarmLimit", func(b *testing.B) {
		lo, up := p.RowLo[tight], p.RowUp[tight]
		size := 1.0
		for _, v := range []float64{lo, up} {
			if !math.IsInf(v, 0) {
				size = max(size, abs(v))
			}
		}
		warm(b, func(e *lplayer.Simplex, k int) {
			d := 0.02 * size
			if k%2 == 1 {
				d = 0
			}
			e.SetRowBounds(tight, lo-d, up-d)
		})
	})
	b.Run("ColdReused", func(b *testing.B) {
		warm(b, func(e *lplayer.Simplex, _ int) { _ = e.SetBasis(nil) })
	})
	b.Run("Solve", func(b *testing.B) {
		for b.Loop() {
			r, err := Solve(cat, spec, Options{})
			if err != nil || r.Status != Optimal {
				b.Fatal(err, r.Status)
			}
		}
	})
	b.Run("SolverPriceEdit", func(b *testing.B) {
		s := NewSolver()
		defer s.Close()
		work := cat.Clone()
		st := &work.Stocks[in]
		price := st.Price
		k := 0
		for b.Loop() {
			st.Price = price * 1.05
			if k%2 == 1 {
				st.Price = price
			}
			k++
			r, err := s.Solve(work, spec, Options{})
			if err != nil || r.Status != Optimal {
				b.Fatal(err, r.Status)
			}
		}
	})
}

func abs(v float64) float64 {
	if v < 0 {
		return -v
	}
	return v
}

// BenchmarkSweep50 is a 50-step price sweep of a stock in the 30 x 20
// blend, over a range that crosses several breakpoints (Sweep, parametric
// LP), against one cold optimise.Solve of the same spec (ColdSolve) in the
// same run; LPSteps is the engine alone re-solving warm at each of the 50
// prices.
func BenchmarkSweep50(b *testing.B) {
	cat, spec := bench30x20(b)
	res, err := Solve(cat, spec, Options{})
	if err != nil {
		b.Fatal(err)
	}
	id, price := res.Blend[0].Stock, 0.0
	for _, g := range res.Ranging {
		if g.Stock == id {
			price = g.Price
		}
	}
	b.Run("Sweep", func(b *testing.B) {
		for b.Loop() {
			r, err := Sweep(cat, spec, id, price*0.5, price*1.5, 50, Options{})
			if err != nil || len(r.Points) != 50 {
				b.Fatal(err)
			}
		}
	})
	b.Run("ColdSolve", func(b *testing.B) {
		for b.Loop() {
			if _, err := Solve(cat, spec, Options{}); err != nil {
				b.Fatal(err)
			}
		}
	})
	p := benchProblem(b, cat, spec)
	j := -1
	for k, c := range cat.Stocks {
		if c.ID == id {
			j = k
		}
	}
	b.Run("LPSteps", func(b *testing.B) {
		for b.Loop() {
			e := lplayer.New()
			if err := e.Load(p); err != nil {
				b.Fatal(err)
			}
			for k := 0; k < 50; k++ {
				e.SetObj(j, p.Obj[j]*(0.5+float64(k)/49))
				mustSolve(b, e)
			}
		}
	})
}

// BenchmarkMaxStocks4 is the 30 x 20 blend with max_stocks = 4: its MILP by
// lipoplan's branch and bound (BranchAndBound; CBC in the coin build)
// against the LP relaxation of the same model by lipoplan's simplex
// (LPRelaxation), in the same run; BranchAndBoundVsLP runs the two in turn
// and reports their ratio (bb/lp).
func BenchmarkMaxStocks4(b *testing.B) {
	cat, spec := bench30x20(b)
	spec = spec.Clone()
	spec.Rules = catalogue.Rules{MaxStocks: 4}
	base, lay, err := build(cat, spec)
	if err != nil {
		b.Fatal(err)
	}
	mm := lay.withRules(base, func(j int) float64 { return min(base.colUp[j], 100) })
	p := (&engine{}).problem(mm).Clone()
	b.Run("LPRelaxation", func(b *testing.B) { benchCold(b, p) })
	b.Run("BranchAndBound", func(b *testing.B) {
		nodes := 0
		for b.Loop() {
			s, err := lplayer.NewBranchAndBound().SolveMIP(p, mm.integer, lplayer.Limits{})
			if err != nil || s.Status != lplayer.Optimal {
				b.Fatal(err, s)
			}
			nodes = s.Nodes
		}
		b.ReportMetric(float64(nodes), "nodes")
	})
	b.Run("BranchAndBoundVsLP", func(b *testing.B) {
		interleave(b, "bb/lp", func() {
			if s, err := lplayer.NewBranchAndBound().SolveMIP(p, mm.integer, lplayer.Limits{}); err != nil || s.Status != lplayer.Optimal {
				b.Fatal(err, s)
			}
		}, func() { coldSolve(b, p) })
	})
	benchCBC(b, p, mm.integer)
}
