package lp

import "math"

// scaleFactors sets row factors rs and column factors cs so that the
// scaled matrix R·A·C (entries rs[i]·a_ij·cs[j]) has entries near 1:
// geometric scaling, rows and columns in turn each divided by the geometric
// mean of its smallest and largest |entry|, repeated while the spread of
// the matrix (largest over smallest |entry|) shrinks by more than a tenth
// (at most 8 passes), then each column equilibrated to a largest |entry|
// of 1 (Tomlin, Math. Programming Study 4 (1975) 146, on scaling LPs, and
// Maros 2003, ch. 7, who recommends this order). Every factor is rounded to
// a power of two, so scaling and unscaling are exact in binary floating
// point (Maros 2003, ch. 7).
//
// rows, when not nil, is p's matrix by rows (byRows): the row passes then
// run row by row on it; without it they run on the columns, gathering
// each row's extremes in scratch. Either way the factors are the same.
func scaleFactors(p *Problem, rows *rowMatrix, rs, cs []float64, work *[]float64) {
	for i := range rs {
		rs[i] = 1
	}
	for j := range cs {
		cs[j] = 1
	}
	if len(p.Value) == 0 {
		return
	}
	nw := p.Rows + p.Cols
	if rows == nil {
		nw += 2 * p.Rows
	}
	w := resize(*work, nw)
	*work = w
	saveR, saveC := w[:p.Rows], w[p.Rows:p.Rows+p.Cols]
	// Every pass reads |a_ij| with the current factors. The loops run on
	// local slices, column by column (or row by row), so that the compiler
	// keeps the bounds in registers and checks each column's once.
	start, index, val := p.Start[:p.Cols+1], p.Index, p.Value
	prev := math.Inf(1)
	for pass := 0; pass < 8; pass++ {
		copy(saveR, rs)
		copy(saveC, cs)
		var done bool
		if rows != nil {
			done = rows.rowPass(rs, cs, pass == 0)
		} else {
			done = colRowPass(start, index, val, rs, cs, w[p.Rows+p.Cols:], pass == 0)
		}
		if done {
			return // already well scaled: entries within a factor of 4
		}
		// Columns: scale, and the spread after this pass.
		lo, hi := math.Inf(1), 0.0
		for j := range cs {
			cmin, cmax := scaledExtremes(index[start[j]:start[j+1]], val[start[j]:start[j+1]], rs)
			if cmax > 0 {
				c := 1 / math.Sqrt(cmin*cmax)
				cs[j] = c
				lo, hi = min(lo, cmin*c), max(hi, cmax*c)
			}
		}
		spread := hi / lo
		if spread > 0.9*prev {
			if spread > prev {
				copy(rs, saveR)
				copy(cs, saveC)
			}
			break
		}
		prev = spread
	}
	for i := range rs {
		rs[i] = pow2(rs[i])
	}
	for j := range cs {
		_, hi := scaledExtremes(index[start[j]:start[j+1]], val[start[j]:start[j+1]], rs)
		if hi > 0 {
			cs[j] = pow2(1 / hi)
		}
	}
}

// rowMatrix is a matrix by rows: row i's column numbers are
// idx[start[i]:start[i+1]] with values val[...] (byRows).
type rowMatrix struct {
	start, idx []int
	val        []float64
}

// rowPass sets each nonempty row's factor rs[i] to 1/√(min·max) of its
// |a_ij|·cs[j], the geometric scaling of scaleFactors' row pass. On the
// first pass (first), when every entry is already within a factor of 4 of
// every other, it leaves rs at 1 and reports true.
func (a *rowMatrix) rowPass(rs, cs []float64, first bool) bool {
	start := a.start[:len(rs)+1]
	lo, hi := math.Inf(1), 0.0
	for i := range rs {
		rmin, rmax := scaledExtremes(a.idx[start[i]:start[i+1]], a.val[start[i]:start[i+1]], cs)
		if rmax > 0 {
			lo, hi = min(lo, rmin), max(hi, rmax)
			rs[i] = 1 / math.Sqrt(rmin*rmax)
		}
	}
	if first && hi <= 4*lo {
		for i := range rs {
			rs[i] = 1
		}
		return true
	}
	return false
}

// scaledExtremes is the smallest and largest |v[k]|·f[idx[k]] of one
// packed row or column (v holds its values, idx their positions in the
// other dimension, f that dimension's factors): +Inf and 0 when it is
// empty. The row and column passes of scaleFactors and its final
// equilibration use it.
func scaledExtremes(idx []int, v, f []float64) (lo, hi float64) {
	v = v[:len(idx)]
	lo = math.Inf(1)
	for k, i := range idx {
		a := math.Abs(v[k]) * f[i]
		if a < lo {
			lo = a
		}
		if a > hi {
			hi = a
		}
	}
	return lo, hi
}

// colRowPass is rowPass on the matrix by columns (start, index, val),
// each row's extremes gathered in scratch (2·len(rs) floats).
func colRowPass(start, index []int, val, rs, cs, scratch []float64, first bool) bool {
	rmin, rmax := scratch[:len(rs)], scratch[len(rs):2*len(rs)]
	rmax = rmax[:len(rmin)] // one bounds check serves both
	for i := range rmin {
		rmin[i], rmax[i] = math.Inf(1), 0
	}
	for j, c := range cs {
		idx := index[start[j]:start[j+1]]
		v := val[start[j]:start[j+1]]
		v = v[:len(idx)]
		for k, i := range idx {
			a := math.Abs(v[k]) * c
			if a < rmin[i] {
				rmin[i] = a
			}
			if a > rmax[i] {
				rmax[i] = a
			}
		}
	}
	if first {
		lo, hi := math.Inf(1), 0.0
		for i := range rmin {
			if rmax[i] > 0 {
				lo, hi = min(lo, rmin[i]), max(hi, rmax[i])
			}
		}
		if hi <= 4*lo {
			return true
		}
	}
	for i := range rs {
		if rmax[i] > 0 {
			rs[i] = 1 / math.Sqrt(rmin[i]*rmax[i])
		}
	}
	return false
}

// pow2 is the power of two nearest to v > 0 (in the logarithm): with
// v = f·2^e, f in [0.5, 1), it is 2^e when f >= 1/√2 and 2^(e-1) below.
func pow2(v float64) float64 {
	if v <= 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return 1
	}
	f, e := math.Frexp(v)
	if f < math.Sqrt2/2 {
		e--
	}
	return math.Ldexp(1, e)
}

// scaling is a problem's scale factors as engines see it: row i is
// multiplied by rs[i], column j's variable is x_j = cs[j]·x'_j (its matrix
// column multiplied by cs[j], its bounds divided by it) and the objective
// by obj. Every factor is a power of two, so scaling and unscaling are
// exact.
type scaling struct {
	rs, cs []float64
	obj    float64
	work   []float64
}

// set computes the factors of p: rows and columns by scaleFactors, the
// columns in integer kept unscaled (their values must stay integers), and
// the objective by objFactor.
func (sc *scaling) set(p *Problem, integer []int) {
	sc.rs, sc.cs = resize(sc.rs, p.Rows), resize(sc.cs, p.Cols)
	scaleFactors(p, nil, sc.rs, sc.cs, &sc.work)
	for _, j := range integer {
		if j >= 0 && j < p.Cols {
			sc.cs[j] = 1
		}
	}
	sc.obj = objFactor(p.Obj, sc.cs)
}

// objFactor scales the objective the way scaleFactors scales a row: by
// the power of two nearest to 1/√(min·max) of its nonzero scaled entries
// |c_j·cs_j| (Tomlin 1975's geometric scaling applied to the objective
// row), so that the costs straddle 1. A price of 1e9 per tonne and one
// of 0.001 in one model then reach an engine as about 1e6 and 1e-6
// instead of 1e7 and 1e-5 — and a model whose costs are all tiny (prices
// of 0.001 on orders of 0.001 t: costs of 1e-8) as costs near 1, far
// above the engines' dual tolerances (1e-9 for lipoplan's simplex, 1e-7
// for CLP), which otherwise swallow every difference between them.
func objFactor(obj, cs []float64) float64 {
	lo, hi := math.Inf(1), 0.0
	for j, c := range obj {
		if c != 0 {
			v := math.Abs(c) * cs[j]
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	if hi == 0 {
		return 1
	}
	return pow2(1 / math.Sqrt(lo*hi))
}

// apply writes p scaled into dst. dst shares p's Start and Index (engines
// copy what they load); its other arrays are dst's own, reused.
func (sc *scaling) apply(p, dst *Problem) {
	dst.Start, dst.Index = p.Start, p.Index
	sc.scaleInto(p, dst)
}

// applyInto is apply with p's Start and Index copied into dst's own
// arrays (reused when large enough).
func (sc *scaling) applyInto(p, dst *Problem) {
	dst.Start = append(dst.Start[:0], p.Start...)
	dst.Index = append(dst.Index[:0], p.Index...)
	sc.scaleInto(p, dst)
}

// scaleInto writes p's values, costs and bounds scaled into dst's arrays
// (reused when large enough) and sets dst's shape.
func (sc *scaling) scaleInto(p, dst *Problem) {
	dst.Rows, dst.Cols = p.Rows, p.Cols
	dst.Value = resize(dst.Value, len(p.Value))
	for j := 0; j < p.Cols; j++ {
		c := sc.cs[j]
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			dst.Value[k] = sc.rs[p.Index[k]] * p.Value[k] * c
		}
	}
	dst.Obj, dst.ColLo, dst.ColUp = resize(dst.Obj, p.Cols), resize(dst.ColLo, p.Cols), resize(dst.ColUp, p.Cols)
	for j := 0; j < p.Cols; j++ {
		dst.Obj[j], dst.ColLo[j], dst.ColUp[j] = sc.costOf(j, p.Obj[j]), p.ColLo[j]/sc.cs[j], p.ColUp[j]/sc.cs[j]
	}
	dst.RowLo, dst.RowUp = resize(dst.RowLo, p.Rows), resize(dst.RowUp, p.Rows)
	for i := 0; i < p.Rows; i++ {
		dst.RowLo[i], dst.RowUp[i] = p.RowLo[i]*sc.rs[i], p.RowUp[i]*sc.rs[i]
	}
}

// sameScaled reports whether q is the matrix of p scaled by sc (as
// scaleInto scales it): sameMatrix without the scaled copy.
func (q *Problem) sameScaled(p *Problem, sc *scaling) bool {
	if p.Rows != q.Rows || p.Cols != q.Cols || len(p.Index) != len(q.Index) {
		return false
	}
	for j, s := range p.Start {
		if q.Start[j] != s {
			return false
		}
	}
	for j := 0; j < p.Cols; j++ {
		c := sc.cs[j]
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			if q.Index[k] != p.Index[k] || q.Value[k] != sc.rs[p.Index[k]]*p.Value[k]*c {
				return false
			}
		}
	}
	return true
}

// costOf is column j's scaled cost for cost c.
func (sc *scaling) costOf(j int, c float64) float64 { return c * sc.obj * sc.cs[j] }

// unscale turns an answer to the scaled problem into one to the problem:
// x = C·x', r = R⁻¹·r', y = R·y'/obj, d = d'/(obj·C), and the
// certificates u = R·u' (Farkas) and ray = C·ray'.
func (sc *scaling) unscale(s *Solution) {
	for j := range s.X {
		s.X[j] *= sc.cs[j]
	}
	for j := range s.D {
		s.D[j] /= sc.obj * sc.cs[j]
	}
	for i := range s.RowAct {
		s.RowAct[i] /= sc.rs[i]
	}
	for i := range s.Y {
		s.Y[i] *= sc.rs[i] / sc.obj
	}
	for i := range s.Farkas {
		s.Farkas[i] *= sc.rs[i]
	}
	for j := range s.Ray {
		s.Ray[j] *= sc.cs[j]
	}
	s.Obj /= sc.obj
}

// scaleAnswer is unscale's inverse, for an answer given in the problem's
// terms (ranging works on the scaled problem).
func (sc *scaling) scaleAnswer(s *Solution) *Solution {
	out := &Solution{Status: s.Status, Obj: s.Obj * sc.obj, Basis: s.Basis, Iterations: s.Iterations}
	out.X = make([]float64, len(s.X))
	for j, v := range s.X {
		out.X[j] = v / sc.cs[j]
	}
	out.D = make([]float64, len(s.D))
	for j, v := range s.D {
		out.D[j] = v * sc.obj * sc.cs[j]
	}
	out.RowAct = make([]float64, len(s.RowAct))
	for i, v := range s.RowAct {
		out.RowAct[i] = v * sc.rs[i]
	}
	out.Y = make([]float64, len(s.Y))
	for i, v := range s.Y {
		out.Y[i] = v * sc.obj / sc.rs[i]
	}
	return out
}

// Bounds of the objective factor's second look (refit).
const (
	refitStep = 128     // refit when the deciding costs are this far below 1
	refitMax  = 1 << 40 // the largest scaled cost allowed after a refit
)

// refit is the objective factor's second look, once an answer x' to the
// scaled problem is known. The costs that decide an optimum are those of
// the columns strictly inside their bounds (the basic columns of a
// nondegenerate optimum; a column held at a bound, a dear stock forced in
// at its [use] minimum, decides nothing). When even the largest of them is
// far below 1 (by refitStep or more), the engines' absolute dual
// tolerances may have swallowed the differences between them, and refit
// returns the factor that brings it to about 1, the largest scaled cost of
// all staying at most refitMax. A catalogue with prices of 0.001 and of
// 1e9 per tonne has costs 1e12 apart: the factor objFactor takes leaves
// its cheap stocks' costs near 1e-6, within ten times CLP's dual tolerance
// of each other, and CLP stopped 2 % above the optimum among them before
// this refit. Large deciding costs need no refit (the tolerances are then
// fine beside them), and one was seen to cost accuracy: brought down to 1,
// it pushed the other deciding costs of a plan below CLP's tolerance. It
// reports false when no refit is due. p is the problem unscaled.
func (sc *scaling) refit(p *Problem, x []float64) (float64, bool) {
	inside, all := 0.0, 0.0
	for j, c := range p.Obj {
		v := math.Abs(c) * sc.cs[j] * sc.obj
		all = max(all, v)
		if xj := x[j] * sc.cs[j]; xj > p.ColLo[j] && xj < p.ColUp[j] {
			inside = max(inside, v)
		}
	}
	if inside == 0 {
		return sc.obj, false
	}
	f := min(1/inside, refitMax/all)
	if f < refitStep {
		return sc.obj, false
	}
	return sc.obj * pow2(f), true
}
