package lptest

import (
	"math"
	"math/rand/v2"

	"lipoplan/optimise/lp"
)

// Kind is the shape of a random problem.
type Kind int

// Kinds of random problem. The data are synthetic; what tests check is that
// engines and outside solvers agree on them.
const (
	// Blend: shares of 3..40 columns adding up to 100 (an equality row),
	// 2..24 dense rows of property-like coefficients (0..3, some zeros)
	// bounded around a hidden feasible blend on one side, both sides or as
	// equalities; column caps and minimums; positive costs.
	Blend Kind = iota
	// Plan: 2..5 blend blocks over 3..12 shared columns each, coupled by
	// one balance row per shared column (tonnes used = own + bought, own
	// capped, buying dearer): block-sparse like lipoplan's plans.
	Plan
	// Degenerate: a blend with duplicated and scaled copies of rows
	// (redundant), a row that is the sum of two others, bounds through the
	// hidden blend (many tight at once) and tied costs.
	Degenerate
	// FreeRows: a blend with rows that have no bounds, every column capped
	// and some bounded above only, and a free column tied in by an
	// equality row.
	FreeRows
	// Infeasible: a blend with a row no blend can meet, or two that
	// contradict each other.
	Infeasible
	// Unbounded: a blend without the share row where a column of negative
	// cost can grow without limit.
	Unbounded
)

// Kinds lists every kind.
var Kinds = []Kind{Blend, Plan, Degenerate, FreeRows, Infeasible, Unbounded}

func (k Kind) String() string {
	return [...]string{"blend", "plan", "degenerate", "free-rows", "infeasible", "unbounded"}[k]
}

// builder assembles a dense problem row by row.
type builder struct {
	n             int
	obj, clo, cup []float64
	rows          [][]float64
	rlo, rup      []float64
	hidden        []float64 // a feasible point
}

func (b *builder) addRow(coef []float64, lo, up float64) {
	b.rows = append(b.rows, coef)
	b.rlo = append(b.rlo, lo)
	b.rup = append(b.rup, up)
}

func (b *builder) act(coef []float64) float64 {
	s := 0.0
	for j, v := range coef {
		s += v * b.hidden[j]
	}
	return s
}

func (b *builder) problem() *lp.Problem {
	m := len(b.rows)
	a := make([]float64, m*b.n)
	for i, r := range b.rows {
		copy(a[i*b.n:], r)
	}
	p := &lp.Problem{Obj: b.obj, ColLo: b.clo, ColUp: b.cup, RowLo: b.rlo, RowUp: b.rup}
	p.Dense(m, b.n, a)
	return p
}

// bound returns the bounds of a row whose hidden activity is v: one side,
// both sides or an equality, with margins of up to spread.
func bound(r *rand.Rand, v, spread float64) (lo, up float64) {
	switch r.IntN(5) {
	case 0:
		return v - spread*r.Float64(), math.Inf(1)
	case 1:
		return math.Inf(-1), v + spread*r.Float64()
	case 2, 3:
		return v - spread*r.Float64(), v + spread*r.Float64()
	}
	return v, v
}

// blend makes the blend-shaped core with n columns and k property rows.
func blend(r *rand.Rand, n, k int) *builder {
	b := &builder{n: n}
	b.obj = make([]float64, n)
	b.clo = make([]float64, n)
	b.cup = make([]float64, n)
	b.hidden = make([]float64, n)
	var sum float64
	used := 1 + r.IntN(min(n, 6))
	for _, j := range r.Perm(n)[:used] {
		b.hidden[j] = r.ExpFloat64()
		sum += b.hidden[j]
	}
	for j := range b.hidden {
		b.hidden[j] *= 100 / sum
		b.obj[j] = 7 + 18*r.Float64()
		b.cup[j] = math.Inf(1)
		if r.Float64() < 0.25 {
			b.cup[j] = b.hidden[j] + 60*r.Float64()
		}
		if b.hidden[j] > 0 && r.Float64() < 0.1 {
			b.clo[j] = b.hidden[j] * r.Float64()
		}
	}
	ones := make([]float64, n)
	for j := range ones {
		ones[j] = 1
	}
	b.addRow(ones, 100, 100)
	for i := 0; i < k; i++ {
		coef := make([]float64, n)
		scale := math.Pow(10, -2+3*r.Float64()) // rows from 0.01 to 10 in size
		for j := range coef {
			if r.Float64() < 0.8 {
				coef[j] = 3 * scale * r.Float64()
			}
		}
		v := b.act(coef)
		lo, up := bound(r, v, 0.3*(1+math.Abs(v)))
		b.addRow(coef, lo, up)
	}
	return b
}

// Random makes a problem of the given kind.
func Random(r *rand.Rand, kind Kind) *lp.Problem {
	n, k := 3+r.IntN(38), 1+r.IntN(23)
	switch kind {
	case Plan:
		return plan(r)
	case Degenerate:
		b := blend(r, n, k)
		for c := 0; c < 1+r.IntN(4); c++ {
			i := 1 + r.IntN(len(b.rows)-1)
			f := []float64{1, -1, 2, 0.5}[r.IntN(4)]
			coef := make([]float64, n)
			for j, v := range b.rows[i] {
				coef[j] = f * v
			}
			lo, up := b.rlo[i]*f, b.rup[i]*f
			if f < 0 {
				lo, up = up, lo
			}
			b.addRow(coef, lo, up)
		}
		if len(b.rows) > 3 {
			coef := make([]float64, n)
			for j := range coef {
				coef[j] = b.rows[1][j] + b.rows[2][j]
			}
			v := b.act(coef)
			b.addRow(coef, v, v+r.Float64())
		}
		// Bounds through the hidden blend and tied costs.
		for i := 1; i < len(b.rows); i++ {
			if r.IntN(2) == 0 {
				v := b.act(b.rows[i])
				if r.IntN(2) == 0 {
					b.rlo[i] = v
				} else {
					b.rup[i] = v
				}
				if b.rlo[i] > b.rup[i] {
					b.rlo[i], b.rup[i] = v, v
				}
			}
		}
		for j := 1; j < n; j++ {
			if r.IntN(3) == 0 {
				b.obj[j] = b.obj[j-1]
			}
		}
		return b.problem()
	case FreeRows:
		b := blend(r, n, k)
		for c := 0; c < 1+r.IntN(3); c++ {
			coef := make([]float64, n)
			for j := range coef {
				coef[j] = r.Float64()
			}
			b.addRow(coef, math.Inf(-1), math.Inf(1))
		}
		// Columns bounded above only: with every column capped, the share
		// row keeps each bounded below too (x_j >= 100 - Σ other caps).
		for j := 0; j < n; j++ {
			if math.IsInf(b.cup[j], 1) {
				b.cup[j] = b.hidden[j] + 60*r.Float64()
			}
			if b.clo[j] == 0 && r.IntN(3) == 0 {
				b.clo[j] = math.Inf(-1)
			}
		}
		// A free column z with z = Σ_j w_j x_j (an equality row), costing a
		// little: it is bounded through the blend.
		b.n++
		b.obj = append(b.obj, 0.1*r.NormFloat64())
		b.clo = append(b.clo, math.Inf(-1))
		b.cup = append(b.cup, math.Inf(1))
		var z float64
		for i := range b.rows {
			b.rows[i] = append(b.rows[i], 0)
		}
		coef := make([]float64, b.n)
		for j := 0; j < b.n-1; j++ {
			coef[j] = r.Float64() - 0.5
			z += coef[j] * b.hidden[j]
		}
		coef[b.n-1] = -1
		b.hidden = append(b.hidden, z)
		b.addRow(coef, 0, 0)
		return b.problem()
	case Infeasible:
		b := blend(r, n, k)
		coef := make([]float64, n)
		big := 0.0
		for j := range coef {
			coef[j] = r.Float64()
			big = max(big, coef[j])
		}
		if r.IntN(2) == 0 {
			// Above what any blend of shares adding to 100 reaches.
			b.addRow(coef, 100*big*(1.01+r.Float64()), math.Inf(1))
		} else {
			v := b.act(coef)
			b.addRow(coef, v+1+r.Float64(), math.Inf(1))
			b.addRow(coef, math.Inf(-1), v)
		}
		return b.problem()
	case Unbounded:
		b := blend(r, n, k)
		b.rows, b.rlo, b.rup = b.rows[1:], b.rlo[1:], b.rup[1:]
		j := r.IntN(n)
		b.obj[j] = -1 - r.Float64()
		b.cup[j] = math.Inf(1)
		for i, row := range b.rows {
			// x_j only eases the rows it appears in: it has coefficients
			// of the right sign or none.
			switch {
			case !math.IsInf(b.rup[i], 1) && !math.IsInf(b.rlo[i], -1):
				row[j] = 0
			case !math.IsInf(b.rup[i], 1):
				row[j] = -math.Abs(row[j])
			default:
				row[j] = math.Abs(row[j])
			}
		}
		for i, row := range b.rows { // keep the hidden point feasible
			v := b.act(row)
			b.rlo[i], b.rup[i] = min(b.rlo[i], v), max(b.rup[i], v)
		}
		return b.problem()
	}
	return blend(r, n, k).problem()
}

// plan makes the block-sparse plan shape: P products of S shares each,
// each product's shares adding to 100 with a few property rows, and per
// shared stock a balance row Σ_p t_p·x_pj/100 - own_j - buy_j = 0 with own
// capped and buying at 20 % over the price.
func plan(r *rand.Rand) *lp.Problem {
	P, S := 2+r.IntN(4), 3+r.IntN(10)
	return PlanOf(r, P, S)
}

// PlanOf is a random plan of P products over S stocks.
func PlanOf(r *rand.Rand, P, S int) *lp.Problem {
	price := make([]float64, S)
	props := make([][]float64, 6)
	for j := range price {
		price[j] = 7 + 18*r.Float64()
	}
	for q := range props {
		props[q] = make([]float64, S)
		for j := range props[q] {
			if r.Float64() < 0.8 {
				props[q][j] = 3 * r.Float64()
			}
		}
	}
	limited := make([]bool, S)
	nLim := 0
	for j := range limited {
		limited[j] = r.Float64() < 0.4
		if limited[j] {
			nLim++
		}
	}
	n := P*S + 2*nLim
	b := &builder{n: n}
	b.obj = make([]float64, n)
	b.clo = make([]float64, n)
	b.cup = make([]float64, n)
	b.hidden = make([]float64, n)
	tonnes := make([]float64, P)
	for p := 0; p < P; p++ {
		tonnes[p] = 5 + 50*r.Float64()
		x := make([]float64, S)
		var sum float64
		for _, j := range r.Perm(S)[:1+r.IntN(min(S, 5))] {
			x[j] = r.ExpFloat64()
			sum += x[j]
		}
		for j := range x {
			c := p*S + j
			b.hidden[c] = x[j] * 100 / sum
			b.cup[c] = math.Inf(1)
			if !limited[j] {
				b.obj[c] = price[j] * tonnes[p] / 100
			}
		}
	}
	own := make([]int, S)
	c := P * S
	for j := 0; j < S; j++ {
		own[j] = -1
		if !limited[j] {
			continue
		}
		own[j] = c
		used := 0.0
		for p := 0; p < P; p++ {
			used += tonnes[p] * b.hidden[p*S+j] / 100
		}
		b.obj[c], b.obj[c+1] = price[j], 1.2*price[j]
		b.cup[c], b.cup[c+1] = 40*r.Float64(), math.Inf(1)
		b.hidden[c] = min(used, b.cup[c])
		b.hidden[c+1] = used - b.hidden[c]
		c += 2
	}
	for p := 0; p < P; p++ {
		coef := make([]float64, n)
		for j := 0; j < S; j++ {
			coef[p*S+j] = 1
		}
		b.addRow(coef, 100, 100)
		for q := 0; q < 1+r.IntN(len(props)); q++ {
			coef := make([]float64, n)
			for j := 0; j < S; j++ {
				coef[p*S+j] = props[q][j] / 100
			}
			v := b.act(coef)
			lo, up := bound(r, v, 0.3*(1+math.Abs(v)))
			b.addRow(coef, lo, up)
		}
	}
	for j := 0; j < S; j++ {
		if own[j] < 0 {
			continue
		}
		coef := make([]float64, n)
		for p := 0; p < P; p++ {
			coef[p*S+j] = tonnes[p] / 100
		}
		coef[own[j]], coef[own[j]+1] = -1, -1
		b.addRow(coef, 0, 0)
	}
	return b.problem()
}

// AllLowerFinite reports whether every column has a finite lower bound
// (what gonum's standard form needs).
func AllLowerFinite(p *lp.Problem) bool {
	for _, v := range p.ColLo {
		if math.IsInf(v, -1) {
			return false
		}
	}
	return true
}
