//go:build coin

package optimise

import (
	"testing"
	"time"

	"lipoplan/catalogue"
	"lipoplan/optimise/coin"
	"lipoplan/optimise/lp"
)

// benchBareCLP times CLP alone through the binding on prebuilt arrays, with
// the settings lp.Coin uses (no scaling pass, dual simplex from the slack
// basis): load the problem, solve, read primal and dual values. BareCLP
// makes and frees the CLP model on every solve; BareCLPReused loads every
// solve into one model made beforehand.
func benchBareCLP(b *testing.B, cat *catalogue.Catalogue, spec *catalogue.Spec) {
	m, _, err := build(cat, spec)
	if err != nil {
		b.Fatal(err)
	}
	p := coinOf((&engine{}).problem(m))
	x := make([]float64, m.nCols)
	y := make([]float64, m.nRows)
	d := make([]float64, m.nCols)
	solve := func(b *testing.B, l *coin.LP) { bareCLP(b, l, p, x, y, d) }
	b.Run("BareCLP", func(b *testing.B) {
		for b.Loop() {
			l := coin.NewLP()
			solve(b, l)
			l.Close()
		}
	})
	b.Run("BareCLPReused", func(b *testing.B) {
		l := coin.NewLP()
		defer l.Close()
		for b.Loop() {
			solve(b, l)
		}
	})
}

// benchCBC is CBC on the MILP (coin build).
func benchCBC(b *testing.B, p *lp.Problem, integer []int) {
	b.Run("CBC", func(b *testing.B) {
		c := lp.NewCBC()
		for b.Loop() {
			s, err := c.SolveMIP(p, integer, lp.Limits{})
			if err != nil || s.Status != lp.Optimal {
				b.Fatal(err, s)
			}
		}
	})
}

// benchInterleaved runs lipoplan's cold solve (a fresh engine, load, solve)
// and the bare CLP solve one after the other in every iteration and reports
// the ratio of their total times ("lp/clp"), so that the load of a shared
// machine falls on both alike.
func benchInterleaved(b *testing.B, p *lp.Problem) {
	b.Run("LPvsBareCLP", func(b *testing.B) {
		cp := coinOf(p)
		x, y, d := make([]float64, p.Cols), make([]float64, p.Rows), make([]float64, p.Cols)
		var ours, clp time.Duration
		for b.Loop() {
			t0 := time.Now()
			e := lp.New()
			if err := e.Load(p); err != nil {
				b.Fatal(err)
			}
			if s, err := e.Solve(); err != nil || s.Status != lp.Optimal {
				b.Fatal(err)
			}
			t1 := time.Now()
			l := coin.NewLP()
			bareCLP(b, l, cp, x, y, d)
			l.Close()
			ours, clp = ours+t1.Sub(t0), clp+time.Since(t1)
		}
		b.ReportMetric(float64(ours)/float64(clp), "lp/clp")
	})
}

// coinOf is p for the binding (32-bit indices).
func coinOf(p *lp.Problem) *coin.Problem {
	cp := &coin.Problem{Cols: p.Cols, Rows: p.Rows, Value: p.Value,
		ColLower: p.ColLo, ColUpper: p.ColUp, Obj: p.Obj, RowLower: p.RowLo, RowUpper: p.RowUp}
	for _, v := range p.Start {
		cp.Start = append(cp.Start, int32(v))
	}
	for _, v := range p.Index {
		cp.Index = append(cp.Index, int32(v))
	}
	return cp
}

// bareCLP loads p into l and solves it with the settings lp.Coin uses (no
// scaling pass, dual simplex from the slack basis), reading x, y and d.
func bareCLP(b *testing.B, l *coin.LP, p *coin.Problem, x, y, d []float64) {
	if err := l.Load(p); err != nil {
		b.Fatal(err)
	}
	l.SetScaling(false)
	if st := l.Solve(); st != coin.Optimal {
		b.Fatal(st)
	}
	if err := l.Solution(x, nil, y, d, nil); err != nil {
		b.Fatal(err)
	}
}
