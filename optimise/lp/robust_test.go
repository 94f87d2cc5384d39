package lp_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp"
	"lipoplan/optimise/lp/lptest"
)

// rescaled is p with row i multiplied by 10^ri (its bounds too) and column
// j by 10^cj (its cost too, its bounds divided): the same programme in
// other units, whose optimum is the same (x_j becomes x_j/10^cj). The
// columns in keep (integer columns) keep their units. It returns the row
// and column factors too.
func rescaled(r *rand.Rand, p *lp.Problem, spread int, keep ...int) (q *lp.Problem, rs, cs []float64) {
	q = p.Clone()
	rs = make([]float64, p.Rows)
	cs = make([]float64, p.Cols)
	for i := range rs {
		rs[i] = math.Pow(10, float64(r.IntN(2*spread+1)-spread))
		q.RowLo[i] *= rs[i]
		q.RowUp[i] *= rs[i]
	}
	for j := range cs {
		cs[j] = math.Pow(10, float64(r.IntN(2*spread+1)-spread))
		if slices.Contains(keep, j) {
			cs[j] = 1
		}
		q.Obj[j] *= cs[j]
		q.ColLo[j] /= cs[j]
		q.ColUp[j] /= cs[j]
		for k := q.Start[j]; k < q.Start[j+1]; k++ {
			q.Value[k] *= rs[q.Index[k]] * cs[j]
		}
	}
	return q, rs, cs
}

// TestBadlyScaledProblems: 120 random problems of every kind, each also
// written in other units (rows and columns multiplied by powers of ten up
// to 1e±6, a coefficient spread of up to 1e24), solve to the same status
// and objective (1e-7 relative) and the same point in the original units.
func TestBadlyScaledProblems(t *testing.T) {
	for c := 0; c < 120; c++ {
		kind := lptest.Kinds[c%len(lptest.Kinds)]
		r := rand.New(rand.NewPCG(1975, uint64(c)))
		p := lptest.Random(r, kind)
		q, _, cs := rescaled(r, p, 6)
		name := fmt.Sprintf("case %d (%v)", c, kind)
		want := solveWith(t, lp.New(), p)
		got := solveWith(t, lp.New(), q)
		if !assert.Equal(t, want.Status, got.Status, name) || want.Status != lp.Optimal {
			continue
		}
		assert.True(t, lptest.RelClose(want.Obj, got.Obj, 1e-7), "%s: objective %v, rescaled %v", name, want.Obj, got.Obj)
		assert.NoError(t, lptest.Optimality(q, got, 1e-6), name)
		if lptest.Nondegenerate(p, want, 1e-6) {
			for j := range want.X {
				assert.True(t, lptest.RelClose(want.X[j], got.X[j]*cs[j], 1e-6), "%s column %d: %v, rescaled %v", name, j, want.X[j], got.X[j]*cs[j])
			}
		}
	}
}

// TestAwkwardProblems: problems a careless engine trips over solve with the
// right verdict and no panic: no rows, no columns, empty rows and columns,
// a fixed column, crossed bounds, duplicated columns, a zero matrix, free
// rows only, and a row whose only column is fixed outside it.
func TestAwkwardProblems(t *testing.T) {
	inf := math.Inf(1)
	dense := func(rows, cols int, a, obj, clo, cup, rlo, rup []float64) *lp.Problem {
		p := &lp.Problem{Obj: obj, ColLo: clo, ColUp: cup, RowLo: rlo, RowUp: rup}
		p.Dense(rows, cols, a)
		return p
	}
	cases := []struct {
		name string
		p    *lp.Problem
		want lp.Status
		obj  float64
	}{
		{"no rows, bounded", dense(0, 2, nil, []float64{1, -1}, []float64{0, 0}, []float64{5, 3}, nil, nil), lp.Optimal, -3},
		{"no rows, unbounded", dense(0, 1, nil, []float64{-1}, []float64{0}, []float64{inf}, nil, nil), lp.Unbounded, 0},
		{"no columns, feasible", dense(2, 0, nil, nil, nil, nil, []float64{-1, 0}, []float64{1, 0}), lp.Optimal, 0},
		{"no columns, infeasible", dense(1, 0, nil, nil, nil, nil, []float64{1}, []float64{2}), lp.Infeasible, 0},
		{"empty row and column", dense(2, 2, []float64{1, 0, 0, 0}, []float64{1, 2}, []float64{0, 0}, []float64{inf, inf}, []float64{3, -inf}, []float64{inf, inf}), lp.Optimal, 3},
		{"fixed column", dense(1, 2, []float64{1, 1}, []float64{1, 3}, []float64{2, 0}, []float64{2, inf}, []float64{5}, []float64{5}), lp.Optimal, 2 + 9},
		{"crossed column bounds", dense(1, 1, []float64{1}, []float64{1}, []float64{2}, []float64{1}, []float64{0}, []float64{10}), lp.Infeasible, 0},
		{"crossed row bounds", dense(1, 1, []float64{1}, []float64{1}, []float64{0}, []float64{10}, []float64{3}, []float64{2}), lp.Infeasible, 0},
		{"duplicated columns", dense(2, 3, []float64{1, 1, 1, 2, 2, 1}, []float64{1, 1, 2}, []float64{0, 0, 0}, []float64{inf, inf, inf}, []float64{4, 6}, []float64{inf, inf}), lp.Optimal, 4},
		{"zero matrix", dense(2, 2, []float64{0, 0, 0, 0}, []float64{1, 1}, []float64{0, 0}, []float64{1, 1}, []float64{-1, 0}, []float64{1, 0}), lp.Optimal, 0},
		{"free rows only", dense(2, 2, []float64{1, 2, 3, 4}, []float64{1, 1}, []float64{0, 0}, []float64{1, 1}, []float64{-inf, -inf}, []float64{inf, inf}), lp.Optimal, 0},
		{"fixed column outside its row", dense(1, 1, []float64{2}, []float64{1}, []float64{1}, []float64{1}, []float64{3}, []float64{5}), lp.Infeasible, 0},
	}
	for _, c := range cases {
		for _, m := range []lp.Method{lp.Auto, lp.Primal, lp.Dual} {
			s := solveWith(t, lp.NewWith(lp.Options{Method: m}), c.p)
			require.Equal(t, c.want, s.Status, "%s method %d", c.name, m)
			if c.want == lp.Optimal {
				assert.InDelta(t, c.obj, s.Obj, 1e-9, c.name)
				assert.NoError(t, lptest.Optimality(c.p, s, 1e-9), c.name)
			}
		}
	}
}

// FuzzSimplex builds a small problem (up to 6 rows, 8 columns) from the
// fuzzer's bytes, coefficients and bounds included (zeros and infinite
// bounds among them), and requires every answer to prove itself: an
// optimum meets the optimality conditions, an infeasible verdict carries a
// Farkas certificate whose gap is positive, an unbounded one a ray; gonum
// must agree on the status where its standard form applies. The engine may
// return an error but never panic.
func FuzzSimplex(f *testing.F) {
	f.Add([]byte{3, 4, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100, 110, 120})
	f.Add([]byte{1, 1, 255, 0, 128})
	f.Add([]byte{6, 8, 1, 2, 3, 4, 5, 6, 7, 8, 9, 0, 0, 0, 200, 201, 202})
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) < 2 {
			return
		}
		rows, cols := int(data[0])%7, 1+int(data[1])%8
		k := 2
		next := func() byte {
			if k >= len(data) {
				k++
				return byte(k * 37)
			}
			k++
			return data[k-1]
		}
		num := func() float64 { return float64(int(next())%21-10) / 2 } // -5 .. 5 in halves, zero included
		bound := func(lo bool) float64 {
			b := next()
			switch {
			case b < 40 && lo:
				return math.Inf(-1)
			case b < 40:
				return math.Inf(1)
			}
			return float64(int(b)%41-20) / 2
		}
		a := make([]float64, rows*cols)
		for i := range a {
			a[i] = num()
		}
		p := &lp.Problem{Obj: make([]float64, cols), ColLo: make([]float64, cols), ColUp: make([]float64, cols), RowLo: make([]float64, rows), RowUp: make([]float64, rows)}
		for j := 0; j < cols; j++ {
			p.Obj[j] = num()
			p.ColLo[j], p.ColUp[j] = bound(true), bound(false)
			if p.ColLo[j] > p.ColUp[j] {
				p.ColLo[j], p.ColUp[j] = p.ColUp[j], p.ColLo[j]
			}
		}
		for i := 0; i < rows; i++ {
			p.RowLo[i], p.RowUp[i] = bound(true), bound(false)
			if p.RowLo[i] > p.RowUp[i] {
				p.RowLo[i], p.RowUp[i] = p.RowUp[i], p.RowLo[i]
			}
		}
		p.Dense(rows, cols, a)
		e := lp.New()
		require.NoError(t, e.Load(p))
		s, err := e.Solve()
		if err != nil {
			return
		}
		switch s.Status {
		case lp.Optimal:
			assert.NoError(t, lptest.Optimality(p, s, 1e-7))
		case lp.Infeasible:
			if s.Farkas != nil {
				assert.Greater(t, lp.FarkasGap(p, s.Farkas), 0.0)
			}
		case lp.Unbounded:
			assert.NoError(t, lptest.Ray(p, s.Ray, 1e-7))
		}
		if lptest.AllLowerFinite(p) {
			g := lp.NewGonum()
			require.NoError(t, g.Load(p))
			if gs, err := g.Solve(); err == nil && !(gs.Status == lp.Infeasible && s.Status == lp.Optimal) {
				assert.Equal(t, gs.Status, s.Status, "gonum")
				if gs.Status == lp.Optimal {
					assert.True(t, lptest.RelClose(gs.Obj, s.Obj, 1e-7), "objective %v, gonum %v", s.Obj, gs.Obj)
				}
			}
		}
	})
}

// TestEditsAreChecked: a NaN or inverted-infinite bound or cost set through
// the Set methods (which return nothing) is refused by the next Solve with
// ErrBadProblem, and the engine solves again once the edit is undone.
func TestEditsAreChecked(t *testing.T) {
	p := cyclingExamples()[0].problem()
	e := lp.New()
	want := solveWith(t, e, p)
	for _, edit := range []func(){
		func() { e.SetRowBounds(0, math.Inf(-1), math.NaN()) },
		func() { e.SetColBounds(1, math.Inf(1), math.Inf(1)) },
		func() { e.SetObj(2, math.Inf(1)) },
	} {
		edit()
		_, err := e.Solve()
		assert.ErrorIs(t, err, lp.ErrBadProblem)
		require.NoError(t, e.Load(p))
		s, err := e.Solve()
		require.NoError(t, err)
		assert.InDelta(t, want.Obj, s.Obj, 1e-12)
	}
}
