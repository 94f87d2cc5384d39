package lp_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp"
	"lipoplan/optimise/lp/lptest"
)

// cardinality adds the integer rules of a blend to p (whose first row is
// the share row): a binary used_j per column, link rows x_j - U_j·used_j
// <= 0 (U_j the column's cap, at most 100), with a minimum dose m rows
// x_j - m·used_j >= 0, and a count row Σ used_j <= N.
func cardinality(p *lp.Problem, N int, dose float64) (*lp.Problem, []int) {
	n, m := p.Cols, p.Rows
	a := make([][]float64, m)
	for i := range a {
		a[i] = make([]float64, 2*n)
	}
	for j := 0; j < n; j++ {
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			a[p.Index[k]][j] = p.Value[k]
		}
	}
	lo, up := append([]float64(nil), p.RowLo...), append([]float64(nil), p.RowUp...)
	inf := math.Inf(1)
	for j := 0; j < n; j++ {
		row := make([]float64, 2*n)
		row[j], row[n+j] = 1, -min(p.ColUp[j], 100)
		a, lo, up = append(a, row), append(lo, -inf), append(up, 0)
		if dose > 0 {
			row := make([]float64, 2*n)
			row[j], row[n+j] = 1, -dose
			a, lo, up = append(a, row), append(lo, 0), append(up, inf)
		}
	}
	if N > 0 {
		row := make([]float64, 2*n)
		for j := 0; j < n; j++ {
			row[n+j] = 1
		}
		a, lo, up = append(a, row), append(lo, -inf), append(up, float64(N))
	}
	q := &lp.Problem{RowLo: lo, RowUp: up}
	q.Obj = append(append([]float64(nil), p.Obj...), make([]float64, n)...)
	q.ColLo = append(append([]float64(nil), p.ColLo...), make([]float64, n)...)
	q.ColUp = append([]float64(nil), p.ColUp...)
	ints := make([]int, n)
	for j := 0; j < n; j++ {
		q.ColUp = append(q.ColUp, 1)
		ints[j] = n + j
	}
	flat := make([]float64, 0, len(a)*2*n)
	for _, r := range a {
		flat = append(flat, r...)
	}
	q.Dense(len(a), 2*n, flat)
	return q, ints
}

// enumerate solves p by fixing the integer columns at every combination of
// their (finite) values and solving each LP with gonum's simplex, an
// engine independent of lipoplan's: the least objective, or +Inf.
func enumerate(t *testing.T, p *lp.Problem, ints []int) float64 {
	t.Helper()
	best := math.Inf(1)
	val := make([]float64, len(ints))
	for t0 := range ints {
		val[t0] = p.ColLo[ints[t0]]
	}
	q := p.Clone()
	g := lp.NewGonum()
	for {
		for t0, j := range ints {
			q.ColLo[j], q.ColUp[j] = val[t0], val[t0]
		}
		require.NoError(t, g.Load(q))
		s, err := g.Solve()
		if err == nil && s.Status == lp.Optimal {
			best = min(best, s.Obj)
		}
		k := 0
		for ; k < len(ints); k++ {
			if val[k]+1 <= p.ColUp[ints[k]] {
				val[k]++
				break
			}
			val[k] = p.ColLo[ints[k]]
		}
		if k == len(ints) {
			return best
		}
	}
}

// TestBranchAndBoundAgainstEnumeration solves 120 seeded random blends
// (3..8 columns) with integer rules — at most N columns used, each used one
// at a minimum dose — and 40 small general-integer programmes (columns
// 0..4) by lipoplan's branch and bound, and compares the optimum with
// brute-force enumeration of the integer values (every combination's LP
// solved by gonum), with GLPK's branch and bound (glpsol on the MPS file)
// where available, and with CBC in the coin build. Infeasible cases must
// be reported as such by all.
func TestBranchAndBoundAgainstEnumeration(t *testing.T) {
	dir := t.TempDir()
	cbc := coinMIP()
	var feasible, infeasible int
	for c := 0; c < 160; c++ {
		r := rand.New(rand.NewPCG(1960, uint64(c)))
		var p *lp.Problem
		var ints []int
		if c < 120 {
			base := lptest.Random(r, lptest.Blend)
			for base.Cols > 8 {
				base = lptest.Random(r, lptest.Blend)
			}
			dose := 0.0
			if r.IntN(3) > 0 {
				dose = 5 + 25*r.Float64()
			}
			p, ints = cardinality(base, 1+r.IntN(3), dose)
		} else {
			p, ints = generalIP(r)
		}
		name := fmt.Sprintf("case %d (%dx%d, %d integer)", c, p.Rows, p.Cols, len(ints))
		want := enumerate(t, p, ints)
		got, err := lp.NewBranchAndBound().SolveMIP(p, ints, lp.Limits{})
		require.NoError(t, err, name)
		if math.IsInf(want, 1) {
			infeasible++
			assert.Equal(t, lp.Infeasible, got.Status, name)
		} else {
			feasible++
			if assert.Equal(t, lp.Optimal, got.Status, name) {
				assert.True(t, lptest.RelClose(want, got.Obj, 1e-7), "%s: branch and bound %v, enumeration %v", name, got.Obj, want)
				assert.Equal(t, got.Obj, got.Bound, name)
				checkIntegral(t, name, p, ints, got.X)
			}
		}
		if cbc != nil {
			s, err := cbc.SolveMIP(p, ints, lp.Limits{})
			require.NoError(t, err, name)
			assert.Equal(t, got.Status, s.Status, name+": cbc")
			if s.Status == lp.Optimal {
				assert.True(t, lptest.RelClose(s.Obj, got.Obj, 1e-7), "%s: branch and bound %v, CBC %v", name, got.Obj, s.Obj)
			}
		}
		if lptest.HaveGlpsol() {
			path := filepath.Join(dir, fmt.Sprintf("mip%03d.mps", c))
			require.NoError(t, os.WriteFile(path, lp.MPS(p, "mip", nil, nil, ints), 0o644))
			g := lptest.Glpsol(t, path, false)
			assert.Equal(t, got.Status.String(), g.Status, name+": glpsol")
			if g.Status == "optimal" {
				assert.True(t, lptest.RelClose(g.Obj, got.Obj, 1e-7), "%s: branch and bound %v, GLPK %v", name, got.Obj, g.Obj)
			}
		}
	}
	t.Logf("%d feasible, %d infeasible", feasible, infeasible)
	assert.Greater(t, feasible, 80)
	assert.Greater(t, infeasible, 5)
}

// generalIP is a small programme over 2..4 integer columns in 0..4 and a
// few continuous ones: rows of random sign, bounds around a hidden integer
// point (feasible) or, one time in six, a contradiction.
func generalIP(r *rand.Rand) (*lp.Problem, []int) {
	ni, nc := 2+r.IntN(3), r.IntN(3)
	n := ni + nc
	m := 2 + r.IntN(4)
	hidden := make([]float64, n)
	p := &lp.Problem{Obj: make([]float64, n), ColLo: make([]float64, n), ColUp: make([]float64, n)}
	ints := make([]int, ni)
	for j := 0; j < n; j++ {
		p.Obj[j] = r.Float64()*10 - 6
		if j < ni {
			ints[j] = j
			p.ColUp[j] = 4
			hidden[j] = float64(r.IntN(5))
		} else {
			p.ColUp[j] = 10
			hidden[j] = 10 * r.Float64()
		}
	}
	a := make([]float64, m*n)
	for i := 0; i < m; i++ {
		act := 0.0
		for j := 0; j < n; j++ {
			a[i*n+j] = math.Round(10*(r.Float64()*2-1)) / 2
			act += a[i*n+j] * hidden[j]
		}
		lo, up := act-3*r.Float64(), act+3*r.Float64()
		if r.IntN(2) == 0 {
			lo = math.Inf(-1)
		}
		p.RowLo, p.RowUp = append(p.RowLo, lo), append(p.RowUp, up)
	}
	if r.IntN(6) == 0 {
		p.RowLo[0], p.RowUp[0] = p.RowUp[0]+1, p.RowUp[0]+2 // cannot hold with the others? often not
	}
	p.Dense(m, n, a)
	return p, ints
}

func checkIntegral(t *testing.T, name string, p *lp.Problem, ints []int, x []float64) {
	t.Helper()
	for _, j := range ints {
		assert.InDelta(t, math.Round(x[j]), x[j], 1e-6, "%s: column %d", name, j)
	}
	act := p.Activity(x, nil)
	for i, a := range act {
		assert.True(t, a >= p.RowLo[i]-1e-6*(1+math.Abs(p.RowLo[i])) && a <= p.RowUp[i]+1e-6*(1+math.Abs(p.RowUp[i])), "%s: row %d = %v outside %v..%v", name, i, a, p.RowLo[i], p.RowUp[i])
	}
}

// TestBranchAndBoundLimits: with a limit of 3 nodes the search on a blend
// that needs more says so (NotProven with a point meeting every row, or
// NoSolution), and its bound never exceeds the proven optimum.
func TestBranchAndBoundLimits(t *testing.T) {
	checked := 0
	for c := 0; c < 40 && checked < 5; c++ {
		r := rand.New(rand.NewPCG(77, uint64(c)))
		base := lptest.Random(r, lptest.Blend)
		if base.Cols < 10 {
			continue
		}
		p, ints := cardinality(base, 2, 10)
		full, err := lp.NewBranchAndBound().SolveMIP(p, ints, lp.Limits{})
		require.NoError(t, err)
		if full.Status != lp.Optimal || full.Nodes <= 3 {
			continue
		}
		checked++
		cut, err := lp.NewBranchAndBound().SolveMIP(p, ints, lp.Limits{MaxNodes: 3})
		require.NoError(t, err)
		assert.Contains(t, []lp.Status{lp.NotProven, lp.NoSolution}, cut.Status)
		assert.Equal(t, "nodes", cut.Limit)
		assert.LessOrEqual(t, cut.Bound, full.Obj+1e-9*(1+math.Abs(full.Obj)), "case %d: bound above the optimum", c)
		if cut.Status == lp.NotProven {
			checkIntegral(t, fmt.Sprint("case ", c), p, ints, cut.X)
			assert.GreaterOrEqual(t, cut.Obj, full.Obj-1e-9*(1+math.Abs(full.Obj)))
		}
	}
	assert.Greater(t, checked, 2)
}
