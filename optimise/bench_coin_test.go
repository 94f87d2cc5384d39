//go:build cgo && !purego

package optimise

import (
	"testing"

	"lipoplan/catalogue"
	"lipoplan/optimise/coin"
)

// benchBareCLP times CLP alone on prebuilt arrays: create, load, solve,
// read primal and dual values, free.
func benchBareCLP(b *testing.B, cat *catalogue.Catalogue, spec *catalogue.Spec) {
	b.Run("BareCLP", func(b *testing.B) {
		m, _, err := build(cat, spec)
		if err != nil {
			b.Fatal(err)
		}
		p := m.coinProblem()
		x := make([]float64, m.nCols)
		y := make([]float64, m.nRows)
		d := make([]float64, m.nCols)
		for b.Loop() {
			l := coin.NewLP()
			if err := l.Load(p); err != nil {
				b.Fatal(err)
			}
			l.SetScaling(false) // as coinEngine does
			if st := l.Solve(); st != coin.Optimal {
				b.Fatal(st)
			}
			x = l.ColSolution(x)
			y = l.RowPrice(y)
			d = l.ReducedCost(d)
			l.Close()
		}
	})
}
