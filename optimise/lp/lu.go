package lp

import "math"

// factor is a sparse LU factorisation of a basis matrix B (m x m) with a
// product-form update file.
//
// Factorisation. Gaussian elimination column by column (the left-looking
// form, Gilbert & Peierls, SIAM J. Sci. Stat. Comput. 9 (1988) 862), the
// columns taken in order of increasing count of nonzeros so that the slack
// (logical) columns and other singletons come first and cost nothing, and
// the remaining "nucleus" is what is really eliminated (Maros 2003,
// Computational Techniques of the Simplex Method, ch. 8 on the LU
// factorisation of the basis). Each column's pivot row is chosen by
// threshold partial pivoting: among the rows not yet pivoted whose entry is
// at least luThreshold times the largest, the one with the fewest nonzeros
// in the basis (a Markowitz-type count; Suhl & Suhl, ORSA J. Computing 2
// (1990) 325, on threshold pivoting in simplex bases).
//
// Step t pivots basis position pcol[t] on row prow[t]. With B̃ = B·Q (the
// columns in step order) B̃ = L̃·Ũ: L̃ has a unit entry at (prow[t], t) and
// multipliers in rows pivoted later; Ũ is upper triangular in steps. L̃'s
// columns are stored by step (rows, multipliers), Ũ's by step (earlier
// steps, values) with the diagonal apart.
//
// Updates. After a basis change at position r with entering column
// α = B⁻¹a_q, B' = B·E with E = I + (α - e_r)e_rᵀ, so B'⁻¹ = E⁻¹B⁻¹: each
// update appends one eta column (α, r) that FTRAN applies after the LU
// solve and BTRAN before it, in reverse (the product form of the inverse,
// Dantzig & Orchard-Hays, Math. Tables Aids Comput. 8 (1954) 64; Maros
// 2003, ch. 8). The basis is factorised afresh after maxEtas updates or
// when the eta file outgrows the factors.
type factor struct {
	m            int
	prow, pcol   []int
	rowStep      []int // step of each row, -1 before it is pivoted
	diag         []float64
	lStart, lIdx []int
	lVal         []float64
	lSteps       []int // steps whose L̃ column has multipliers, in order
	uStart, uIdx []int
	uVal         []float64
	nnz          int // nonzeros of L̃ and Ũ (off the diagonal)
	// The update file: eta e pivots on position ePos[e] (pivot ePiv[e]);
	// its other entries are eVal[eStart[e]:eStart[e+1]], at the positions
	// eIdx[eIdxAt[e]:] when eIdxAt[e] >= 0 (sparse) and at every position,
	// the pivot's and dropped ones zero, when eIdxAt[e] < 0 (dense). eNZ
	// counts the nonzeros the etas hold.
	eStart, eIdx, eIdxAt, ePos []int
	eVal, ePiv                 []float64
	eNZ                        int
	work                       []float64
	// factorisation scratch
	count, order, touched, rc []int
	mark                      []bool
}

// Tolerances of the factorisation (Maros 2003, ch. 8, recommends a
// threshold between 0.01 and 0.1; the bases here are small, so stability
// comes first).
const (
	luThreshold = 0.1   // relative partial-pivoting threshold
	luSingular  = 1e-11 // a column whose largest remaining entry is below this (relative) is dependent
	luDrop      = 1e-14 // entries below this (absolute, the matrix is scaled) are dropped
	maxEtas     = 64    // updates before a fresh factorisation
)

// basisMatrix lays out by columns the basis matrix whose position r holds
// variable head[r]: column k < n of the matrix given by columns (start,
// index, value), scaled to rs[i]·a_ij·cs[k] when rs is not nil, or -e_i
// for row i's logical n+i. bStart, bIdx and bVal are reused when large
// enough, and grown with room to spare when not.
func basisMatrix(head []int, n int, start, index []int, value, rs, cs []float64, bStart, bIdx []int, bVal []float64) ([]int, []int, []float64) {
	bStart = resize(bStart, len(head)+1)
	nz := 0
	for r, k := range head {
		bStart[r] = nz
		if k >= n {
			nz++
		} else {
			nz += start[k+1] - start[k]
		}
	}
	bStart[len(head)] = nz
	bIdx, bVal = grow(bIdx, nz), grow(bVal, nz)
	for r, k := range head {
		q := bStart[r]
		if k >= n {
			bIdx[q], bVal[q] = k-n, -1
			continue
		}
		idx, val := index[start[k]:start[k+1]], value[start[k]:start[k+1]]
		copy(bIdx[q:], idx)
		if rs == nil {
			copy(bVal[q:], val)
			continue
		}
		out, c := bVal[q:q+len(idx)], cs[k]
		val = val[:len(idx)]
		for t, i := range idx {
			out[t] = rs[i] * val[t] * c
		}
	}
	return bStart, bIdx, bVal
}

// reserve gives f its arrays for bases of m rows, the fixed ones and an
// update file for etaReserve dense updates and L̃ and Ũ for the slack
// basis, carved by takeInt and takeFloat from
// the caller's blocks; factorize then allocates only what a basis
// denser than the slack basis needs.
func (f *factor) reserve(m int, takeInt func(int) []int, takeFloat func(int) []float64, mark []bool) {
	ints := takeInt(9*m + 4)
	f.prow, f.pcol, f.rowStep = ints[:m:m], ints[m:2*m:2*m], ints[2*m:3*m:3*m]
	f.lStart, f.uStart = ints[3*m:3*m:4*m+1], ints[4*m+1:4*m+1:5*m+2]
	f.order, f.rc, f.count = ints[5*m+2:6*m+2:6*m+2], ints[6*m+2:7*m+2:7*m+2], ints[7*m+2:8*m+4:8*m+4]
	f.touched = ints[8*m+4 : 8*m+4 : 9*m+4]
	fl := takeFloat(2 * m)
	f.diag, f.work = fl[:m:m], fl[m:]
	f.mark = mark[:m:m]
	f.eIdx, f.eVal = takeInt(etaReserve * m / 4)[:0], takeFloat(etaReserve * m)[:0]
	f.eStart, f.ePos, f.ePiv = takeInt(etaReserve + 1)[:0], takeInt(etaReserve)[:0], takeFloat(etaReserve)[:0]
	f.eIdxAt = takeInt(etaReserve)[:0]
	nz := m/2 + m // what factorize asks for the slack basis
	f.lIdx, f.uIdx, f.lVal, f.uVal = takeInt(nz)[:0], takeInt(nz)[:0], takeFloat(nz)[:0], takeFloat(nz)[:0]
}

// etaReserve is the update file's first size, in dense updates (or four
// times as many sparse ones, of at most half the positions each) of the
// basis's rows (a cold solve of a blend makes a dozen or two).
const etaReserve = 16

// factorize computes the LU factors of the m x m matrix whose column p is
// given in compressed sparse column form (bStart, bIdx, bVal). It returns
// the positions whose columns turned out linearly dependent on the others
// and the rows left without a pivot (equally many). When any column is
// dependent the factors are incomplete: the caller repairs the basis (a
// row's logical for each dependent column) and factorises again.
func (f *factor) factorize(m int, bStart, bIdx []int, bVal []float64) (bad, freeRows []int) {
	f.m = m
	if cap(f.prow) < m || cap(f.lStart) < m+1 {
		// One block for the per-row and per-step arrays.
		ints := make([]int, 9*m+4)
		f.prow, f.pcol, f.rowStep = ints[:m:m], ints[m:2*m:2*m], ints[2*m:3*m:3*m]
		f.lStart, f.uStart = ints[3*m:3*m:4*m+1], ints[4*m+1:4*m+1:5*m+2]
		f.order, f.rc, f.count = ints[5*m+2:6*m+2:6*m+2], ints[6*m+2:7*m+2:7*m+2], ints[7*m+2:8*m+4:8*m+4]
		f.touched = ints[8*m+4 : 8*m+4 : 9*m+4]
		fl := make([]float64, 2*m)
		f.diag, f.work = fl[:m:m], fl[m:]
		f.mark = make([]bool, m)
	}
	f.prow = f.prow[:m]
	f.pcol = f.pcol[:m]
	f.rowStep = f.rowStep[:m]
	f.diag = f.diag[:m]
	f.lStart = f.lStart[:1]
	f.uStart = f.uStart[:1]
	f.lStart[0], f.uStart[0] = 0, 0
	if nz := bStart[m]/2 + m; cap(f.lIdx) < nz || cap(f.uIdx) < nz {
		// Room to spare, as grow gives: the basis fills in from one
		// factorisation to the next.
		nz += nz / 2
		ints := make([]int, 2*nz)
		fl := make([]float64, 2*nz)
		f.lIdx, f.uIdx, f.lVal, f.uVal = ints[:0:nz], ints[nz:nz], fl[:0:nz], fl[nz:nz]
	}
	f.lIdx, f.lVal, f.uIdx, f.uVal = f.lIdx[:0], f.lVal[:0], f.uIdx[:0], f.uVal[:0]
	f.lSteps = f.lSteps[:0]
	if cap(f.eVal) < 8*m || cap(f.eStart) < etaReserve+1 {
		f.eIdx, f.eVal = make([]int, 0, etaReserve*m/4), make([]float64, 0, etaReserve*m)
		f.eStart, f.ePos, f.ePiv = make([]int, 0, etaReserve+1), make([]int, 0, etaReserve), make([]float64, 0, etaReserve)
		f.eIdxAt = make([]int, 0, etaReserve)
	}
	f.eStart = append(f.eStart[:0], 0)
	f.eIdx, f.eVal, f.ePos, f.ePiv = f.eIdx[:0], f.eVal[:0], f.ePos[:0], f.ePiv[:0]
	f.eIdxAt, f.eNZ = f.eIdxAt[:0], 0
	f.work = resize(f.work, m)
	f.mark = resize(f.mark, m)
	clear(f.work)
	clear(f.mark)

	// Row counts, and the column order by count (a counting sort, so
	// stable: equal counts keep position order).
	f.rc = resize(f.rc, m)
	clear(f.rc)
	for _, i := range bIdx[:bStart[m]] {
		f.rc[i]++
	}
	f.count = resize(f.count, m+2)
	clear(f.count)
	for p := 0; p < m; p++ {
		f.count[min(bStart[p+1]-bStart[p], m)+1]++
	}
	for c := 1; c <= m+1; c++ {
		f.count[c] += f.count[c-1]
	}
	f.order = resize(f.order, m)
	for p := 0; p < m; p++ {
		c := min(bStart[p+1]-bStart[p], m)
		f.order[f.count[c]] = p
		f.count[c]++
	}
	rc := f.rc
	for i := range f.rowStep {
		f.rowStep[i] = -1
	}
	touched := f.touched[:0]
	w, mark := f.work, f.mark
	steps := 0
	f.nnz = 0
	for _, p := range f.order {
		touched = touched[:0]
		colMax := 0.0
		for k := bStart[p]; k < bStart[p+1]; k++ {
			i := bIdx[k]
			w[i] = bVal[k]
			mark[i] = true
			touched = append(touched, i)
			colMax = max(colMax, math.Abs(bVal[k]))
		}
		for _, t := range f.lSteps {
			v := w[f.prow[t]]
			if v == 0 {
				continue
			}
			for k := f.lStart[t]; k < f.lStart[t+1]; k++ {
				i := f.lIdx[k]
				if !mark[i] {
					mark[i] = true
					touched = append(touched, i)
				}
				w[i] -= f.lVal[k] * v
			}
		}
		big := 0.0
		for _, i := range touched {
			if f.rowStep[i] < 0 {
				big = max(big, math.Abs(w[i]))
			}
		}
		if big <= luSingular*max(1, colMax) {
			bad = append(bad, p)
			for _, i := range touched {
				w[i], mark[i] = 0, false
			}
			continue
		}
		piv, pivCount, pivAbs := -1, 0, 0.0
		for _, i := range touched {
			if f.rowStep[i] >= 0 {
				continue
			}
			a := math.Abs(w[i])
			if a < luThreshold*big {
				continue
			}
			if piv < 0 || rc[i] < pivCount || rc[i] == pivCount && (a > pivAbs || a == pivAbs && i < piv) {
				piv, pivCount, pivAbs = i, rc[i], a
			}
		}
		t := steps
		steps++
		d := w[piv]
		f.prow[t], f.pcol[t], f.diag[t] = piv, p, d
		f.rowStep[piv] = t
		for _, i := range touched {
			v := w[i]
			w[i], mark[i] = 0, false
			if i == piv || math.Abs(v) <= luDrop {
				continue
			}
			if s := f.rowStep[i]; s >= 0 {
				f.uIdx = append(f.uIdx, s)
				f.uVal = append(f.uVal, v)
			} else {
				f.lIdx = append(f.lIdx, i)
				f.lVal = append(f.lVal, v/d)
			}
		}
		f.uStart = append(f.uStart, len(f.uIdx))
		if len(f.lIdx) > f.lStart[t] {
			f.lSteps = append(f.lSteps, t)
		}
		f.lStart = append(f.lStart, len(f.lIdx))
	}
	f.touched = touched
	f.nnz = len(f.lIdx) + len(f.uIdx)
	if len(bad) > 0 {
		for i, s := range f.rowStep {
			if s < 0 {
				freeRows = append(freeRows, i)
			}
		}
	}
	return bad, freeRows
}

// ftran solves B z = a. a is indexed by row and is overwritten; z, indexed
// by basis position, receives the solution. (The loops run on local
// slices, one column's at a time, so that bounds are checked once per
// column rather than once per entry.)
func (f *factor) ftran(a, z []float64) {
	m := f.m
	prow, pcol, diag := f.prow[:m], f.pcol[:m], f.diag[:m]
	lStart, lIdx, lVal := f.lStart, f.lIdx, f.lVal
	for _, t := range f.lSteps {
		v := a[prow[t]]
		if v == 0 {
			continue
		}
		idx := lIdx[lStart[t]:lStart[t+1]]
		val := lVal[lStart[t]:lStart[t+1]]
		val = val[:len(idx)]
		for k, i := range idx {
			a[i] -= val[k] * v
		}
	}
	if len(f.uIdx) == 0 {
		// Ũ is diagonal (the slack basis and other triangular ones
		// whose columns are singletons): one pass, same operations.
		for t, i := range prow {
			v := a[i]
			if v != 0 {
				v /= diag[t]
			}
			z[pcol[t]] = v
		}
	} else {
		y := f.work[:m]
		for t, i := range prow {
			y[t] = a[i]
		}
		uStart, uIdx, uVal := f.uStart, f.uIdx, f.uVal
		for t := m - 1; t >= 0; t-- {
			v := y[t]
			if v == 0 {
				continue
			}
			v /= diag[t]
			y[t] = v
			idx := uIdx[uStart[t]:uStart[t+1]]
			val := uVal[uStart[t]:uStart[t+1]]
			val = val[:len(idx)]
			for k, s := range idx {
				y[s] -= val[k] * v
			}
		}
		for t, p := range pcol {
			z[p] = y[t]
		}
	}
	eStart, eIdx, eIdxAt, eVal, ePiv := f.eStart, f.eIdx, f.eIdxAt, f.eVal, f.ePiv
	for e, r := range f.ePos {
		v := z[r]
		if v == 0 {
			continue
		}
		v /= ePiv[e]
		z[r] = v
		val := eVal[eStart[e]:eStart[e+1]]
		if at := eIdxAt[e]; at < 0 {
			axpy(z[:len(val)], val, -v)
		} else {
			idx := eIdx[at : at+len(val)]
			for k, i := range idx {
				z[i] -= val[k] * v
			}
		}
	}
}

// btran solves Bᵀ π = e. e is indexed by basis position and is
// overwritten; π, indexed by row, receives the solution.
func (f *factor) btran(e, pi []float64) {
	m := f.m
	eStart, eIdx, eIdxAt, eVal, ePiv := f.eStart, f.eIdx, f.eIdxAt, f.eVal, f.ePiv
	for k := len(f.ePos) - 1; k >= 0; k-- {
		r := f.ePos[k]
		s := e[r]
		val := eVal[eStart[k]:eStart[k+1]]
		if at := eIdxAt[k]; at < 0 {
			s = subDot(s, val, e)
		} else {
			idx := eIdx[at : at+len(val)]
			for q, i := range idx {
				s -= val[q] * e[i]
			}
		}
		e[r] = s / ePiv[k]
	}
	prow, pcol, diag := f.prow[:m], f.pcol[:m], f.diag[:m]
	if len(f.uIdx) == 0 && len(f.lIdx) == 0 {
		// L̃ and Ũ are diagonal: one pass, same operations.
		for t, p := range pcol {
			pi[prow[t]] = e[p] / diag[t]
		}
		return
	}
	y := f.work[:m]
	uStart, uIdx, uVal := f.uStart, f.uIdx, f.uVal
	for t, p := range pcol {
		s := e[p]
		idx := uIdx[uStart[t]:uStart[t+1]]
		val := uVal[uStart[t]:uStart[t+1]]
		val = val[:len(idx)]
		for k, u := range idx {
			s -= val[k] * y[u]
		}
		y[t] = s / diag[t]
	}
	lStart, lIdx, lVal := f.lStart, f.lIdx, f.lVal
	for t := m - 1; t >= 0; t-- {
		s := y[t]
		idx := lIdx[lStart[t]:lStart[t+1]]
		val := lVal[lStart[t]:lStart[t+1]]
		val = val[:len(idx)]
		for k, i := range idx {
			s -= val[k] * pi[i]
		}
		pi[prow[t]] = s
	}
}

// update records the basis change at position r whose entering column is
// alpha = B⁻¹a_q (indexed by position). An eta with nonzeros in more than
// half the positions is kept dense: FTRAN and BTRAN then run over it
// without indices, which costs less than reading them (the choice of
// storage by density, as for the hypersparse and dense solves of
// Koberstein 2005, ch. 6). Entries at most luDrop are zero either way.
func (f *factor) update(r int, alpha []float64) {
	f.ePos = append(f.ePos, r)
	f.ePiv = append(f.ePiv, alpha[r])
	nz := 0
	for i, v := range alpha {
		if i != r && math.Abs(v) > luDrop {
			nz++
		}
	}
	f.eNZ += nz
	if 2*nz > len(alpha) {
		f.eIdxAt = append(f.eIdxAt, -1)
		at := len(f.eVal)
		f.eVal = append(f.eVal, alpha...)
		ev := f.eVal[at:]
		for i, v := range ev {
			if i == r || math.Abs(v) <= luDrop {
				ev[i] = 0
			}
		}
	} else {
		f.eIdxAt = append(f.eIdxAt, len(f.eIdx))
		for i, v := range alpha {
			if i != r && math.Abs(v) > luDrop {
				f.eIdx = append(f.eIdx, i)
				f.eVal = append(f.eVal, v)
			}
		}
	}
	f.eStart = append(f.eStart, len(f.eVal))
}

// updates is the number of updates since the last factorisation.
func (f *factor) updates() int { return len(f.ePos) }

// due reports whether the basis should be factorised afresh: after maxEtas
// updates, or once the eta file holds several times the nonzeros of the
// factors (solves then cost more than a new factorisation saves).
func (f *factor) due() bool {
	return len(f.ePos) >= maxEtas || f.eNZ > max(8*(f.nnz+f.m), 32*f.m)
}

// axpy adds a·x to y (len(y) >= len(x)), unrolled by four; each entry
// gets y_i + a·x_i, i.e. y_i - v·x_i for a = -v exactly as written out.
func axpy(y, x []float64, a float64) {
	y = y[:len(x)]
	i := 0
	for ; i+4 <= len(x); i += 4 {
		xs, ys := x[i:i+4:i+4], y[i:i+4:i+4]
		ys[0] += a * xs[0]
		ys[1] += a * xs[1]
		ys[2] += a * xs[2]
		ys[3] += a * xs[3]
	}
	for ; i < len(x); i++ {
		y[i] += a * x[i]
	}
}

// subDot is s - x_0·y_0 - x_1·y_1 - ..., subtracted in that order
// (len(y) >= len(x)), unrolled by four.
func subDot(s float64, x, y []float64) float64 {
	y = y[:len(x)]
	i := 0
	for ; i+4 <= len(x); i += 4 {
		xs, ys := x[i:i+4:i+4], y[i:i+4:i+4]
		s -= xs[0] * ys[0]
		s -= xs[1] * ys[1]
		s -= xs[2] * ys[2]
		s -= xs[3] * ys[3]
	}
	for ; i < len(x); i++ {
		s -= x[i] * y[i]
	}
	return s
}
