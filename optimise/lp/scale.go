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
func scaleFactors(p *Problem, rs, cs []float64, work *[]float64) {
	for i := range rs {
		rs[i] = 1
	}
	for j := range cs {
		cs[j] = 1
	}
	if len(p.Value) == 0 {
		return
	}
	// |a_ij| once; every pass reads it with the current factors.
	w := resize(*work, len(p.Value)+3*p.Rows+p.Cols)
	*work = w
	abs, w := w[:len(p.Value)], w[len(p.Value):]
	rmin, rmax, saveR, saveC := w[:p.Rows], w[p.Rows:2*p.Rows], w[2*p.Rows:3*p.Rows], w[3*p.Rows:]
	for k, v := range p.Value {
		if v < 0 {
			v = -v
		}
		abs[k] = v
	}
	prev := math.Inf(1)
	for pass := 0; pass < 8; pass++ {
		copy(saveR, rs)
		copy(saveC, cs)
		for i := range rmin {
			rmin[i], rmax[i] = math.Inf(1), 0
		}
		for j := 0; j < p.Cols; j++ {
			c := cs[j]
			for k := p.Start[j]; k < p.Start[j+1]; k++ {
				i := p.Index[k]
				a := abs[k] * c
				if a < rmin[i] {
					rmin[i] = a
				}
				if a > rmax[i] {
					rmax[i] = a
				}
			}
		}
		if pass == 0 {
			lo, hi := math.Inf(1), 0.0
			for i := range rmin {
				if rmax[i] > 0 {
					lo, hi = min(lo, rmin[i]), max(hi, rmax[i])
				}
			}
			if hi <= 4*lo {
				return // already well scaled: entries within a factor of 4
			}
		}
		for i := range rs {
			if rmax[i] > 0 {
				rs[i] = 1 / math.Sqrt(rmin[i]*rmax[i])
			}
		}
		// Columns: scale, and the spread after this pass.
		lo, hi := math.Inf(1), 0.0
		for j := 0; j < p.Cols; j++ {
			cmin, cmax := math.Inf(1), 0.0
			for k := p.Start[j]; k < p.Start[j+1]; k++ {
				a := abs[k] * rs[p.Index[k]]
				if a < cmin {
					cmin = a
				}
				if a > cmax {
					cmax = a
				}
			}
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
	for j := 0; j < p.Cols; j++ {
		hi := 0.0
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			hi = max(hi, abs[k]*rs[p.Index[k]])
		}
		if hi > 0 {
			cs[j] = pow2(1 / hi)
		}
	}
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
