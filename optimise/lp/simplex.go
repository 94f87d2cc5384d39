package lp

import (
	"errors"
	"fmt"
	"math"
)

// Simplex is lipoplan's own LP engine: a bounded-variable simplex method
// on the computational form [A -I]·(x, r) = 0 (see the package comment),
// in pure Go. Its parts and their sources:
//
//   - Dual simplex (dual.go) with dual steepest-edge pricing (Forrest &
//     Goldfarb, Math. Programming 57 (1992) 341, the dual algorithm of
//     their section 3) and the bound-flipping ("long-step") ratio test with
//     Harris' tolerances (Koberstein 2005, ch. 3, algorithms 4 and 7;
//     Harris, Math. Programming 5 (1973) 1). It is the method for warm
//     starts after bound and limit edits and for cold starts: the slack
//     basis of a blend is dual feasible, and otherwise boxed variables are
//     flipped and the remaining dual infeasibilities removed by shifting
//     their costs (Koberstein 2005, ch. 4, "cost modification"), the
//     shifts being taken out again at the end and cleaned up by the
//     primal simplex.
//   - Primal simplex (primal.go) with Devex pricing (Harris 1973; the
//     reference-framework weights as in Forrest & Goldfarb 1992, section
//     2) and Harris' two-pass ratio test, with a phase 1 that minimises
//     the sum of infeasibilities (Maros 2003, ch. 9). It finishes a warm
//     start after cost edits (the basis stays primal feasible) and the
//     cleanup after the dual's cost shifts; Options.Method = Primal makes
//     it the method for cold starts too.
//   - LU factorisation of the basis with product-form updates and a fresh
//     factorisation every 64 updates (lu.go); scaling (scale.go).
//   - Anti-cycling: a run of degenerate iterations switches on a small
//     random perturbation of the costs (dual) or of the basic variables'
//     bounds (primal), removed at the end (Koberstein 2005, ch. 5; Maros
//     2003, ch. 9, on perturbation against stalling); if the run
//     continues, Bland's smallest-index rule, which cannot cycle (Bland,
//     Math. Oper. Res. 2 (1977) 103; Chvátal 1983, Linear Programming,
//     ch. 3), until progress resumes.
//
// Tolerances (scaled problem): primal feasibility tolPrimal, dual
// feasibility tolDual, the least pivot tolPivot, documented at their
// declarations. Every optimum is confirmed on a fresh factorisation with
// primal and dual values recomputed from scratch before it is reported.
//
// A Simplex keeps its basis, factors and pricing weights between solves:
// Load of a problem of the same shape keeps the basis (and the factors
// when the matrix is unchanged), so the next Solve is warm.
type Simplex struct {
	opt    Options
	loaded bool
	prob   Problem // as loaded, unscaled (an own copy)
	m, n   int
	rs, cs []float64 // row and column scale factors

	// The matrix by columns (the problem's copy, scaled on the fly:
	// rs[i]·a_ij·cs[j]) and, scaled, by rows.
	cStart, cIdx []int
	rStart, rIdx []int
	rVal         []float64

	// per variable k: columns 0..n-1 then the logicals n..n+m-1 (scaled)
	cost     []float64 // the problem's costs (0 for logicals)
	shift    []float64 // cost shifts in force (perturbation, Harris, dual phase 1)
	lo0, up0 []float64 // the problem's bounds
	lo, up   []float64 // working bounds (lo0, up0 unless the primal perturbs)
	stat     []VarStatus
	pos      []int // basis position, -1 when nonbasic
	x, d     []float64
	head     []int     // variable at each basis position
	y        []float64 // row duals of the last pricing (scaled)
	dse      []float64 // dual steepest-edge weights by position
	devex    []float64 // primal Devex weights by variable (made by primal)

	lu                   factor
	haveBasis, luOK      bool
	dseOK                bool
	shifted, perturbedUp bool // costs shifted / bounds perturbed
	bland                bool
	degenerate, iters    int
	maxIter, troubles    int
	rnd                  uint64
	farkasU, rayX        []float64 // certificates of the last solve
	accepted             []int     // variables whose bound a solve moved by up to tolVerdict
	// fresh: x and d hold the last solve\'s optimal values for the basis
	// and factors held; costsEdited, boundsEdited: what changed since.
	fresh, costsEdited, boundsEdited bool
	bStart, bIdx                     []int
	bVal                             []float64
	wRow, wPos, rho, tau             []float64
	alphaQ, alphaR                   []float64
	inR                              []bool // variables listed in nzR
	nzR                              []int  // variables whose pivot-row entry may be nonzero
	cand                             []candidate
	flips                            []int
	scaleWork                        []float64
	seen                             []int
	scaledBy                         *scaling // sc of the last load (nil: Load)
}

// Options tune a Simplex. The zero value is the default.
type Options struct {
	Method Method
	// Dantzig prices by the largest infeasibility (dual) or reduced cost
	// (primal) instead of steepest edge / Devex; for tests of the
	// anti-cycling fallback.
	Dantzig bool
	// NoPerturbation leaves out the perturbation against stalling, so that
	// only Bland's rule guards against cycling; for tests.
	NoPerturbation bool
	// Bland prices by Bland's rule from the first iteration on (the
	// fallback against cycling, otherwise used only after a long run of
	// degenerate iterations); for tests.
	Bland bool
	// NoScaling solves the problem as given.
	NoScaling bool
	// MaxIter caps the iterations of one Solve; 0 means
	// 10000 + 20·(rows+columns).
	MaxIter int
}

// Method chooses the simplex variant for a solve.
type Method int

// Methods. Auto runs the primal simplex when the start basis is primal
// feasible and the dual simplex otherwise (cleaning up with the other as
// needed), except that a cold start (the slack basis) of a problem of
// coldPrimalRows rows or more runs the primal; Dual and Primal force the
// method for the first phase.
const (
	Auto Method = iota
	Dual
	Primal
)

// Tolerances of the simplex method, on the scaled problem. 1e-9 is
// tighter than the 1e-7 of CLP and GLPK: lipoplan's models are small and
// well scaled, and answers are compared with those solvers to 1e-7
// relative.
const (
	tolPrimal  = 1e-9  // a basic variable may violate a bound by this much
	tolDual    = 1e-9  // a reduced cost may have the wrong sign by this much
	tolPivot   = 1e-9  // entries of a pivot row or column below this are not pivots
	tolCheck   = 1e-8  // relative disagreement of a pivot computed two ways that forces a new factorisation
	tolVerdict = 1e-7  // a violation no pivot can remove is accepted up to this (relative), as CLP and GLPK do
	perturbEp  = 5e-7  // relative size of the anti-stalling perturbation
	stallRun   = 40    // degenerate iterations in a row before perturbing
	blandRun   = 400   // ... and before Bland's rule
	minWeight  = 1e-10 // floor of steepest-edge weights
)

// coldPrimalRows is the size from which a cold start runs the primal
// simplex. Measured on lipoplan's models from the slack basis (go test
// -run TestColdMethod -v ./optimise): blends (21 rows) solve 3 to 10 times
// faster by the dual, whose slack basis is dual feasible; plans (62 to 338
// rows, block-structured) 1.3 to 3.4 times faster by the primal, whose
// iterations there are cheaper and fewer.
const coldPrimalRows = 60

// ErrIterationLimit is returned when a solve needs more iterations than
// Options.MaxIter allows.
var ErrIterationLimit = errors.New("simplex: iteration limit reached")

// errTrouble is numerical trouble a fresh start may cure.
var errTrouble = errors.New("simplex: numerical trouble")

// New makes lipoplan's simplex engine with default options.
func New() *Simplex { return NewWith(Options{}) }

// NewWith makes a simplex engine with the given options.
func NewWith(opt Options) *Simplex { return &Simplex{opt: opt} }

// Name is "lipoplan-simplex".
func (s *Simplex) Name() string { return "lipoplan-simplex" }

// Close frees nothing the garbage collector would not; it is there for the
// Engine interface.
func (s *Simplex) Close() {}

// Load copies p in. When p has the shape of the problem loaded before, the
// basis is kept as the start of the next Solve (and the factorisation and
// weights with it when the matrix is the same too).
func (s *Simplex) Load(p *Problem) error {
	if !s.loaded && len(p.RowLo) == p.Rows && len(p.Obj) == p.Cols && len(p.Index) == len(p.Value) {
		// A fresh engine has nothing to keep: lay everything out before
		// the check, whose scratch is part of the block.
		s.allocShape(p.Rows, p.Cols, len(p.Value))
	}
	if err := p.check(&s.seen); err != nil {
		return err
	}
	return s.load(p, nil, false)
}

// loadScaled is Load of p scaled by sc (as scaling.apply scales it),
// written straight into the engine's own copy instead of through a scaled
// copy of p first. p has passed Check; the scaled problem is checked
// again (a bound scaled past the largest float is an error, as Load of
// the scaled copy reports it). same reports that p's matrix is the one
// of the last loadScaled with sc, whose factors have not changed since
// (Scaled knows it): the engine's scaled copy is then the same without
// comparing it entry by entry (sameScaled), unless a Load came between.
func (s *Simplex) loadScaled(p *Problem, sc *scaling, same bool) error {
	if !s.loaded {
		s.allocShape(p.Rows, p.Cols, len(p.Value))
	}
	return s.load(p, sc, same && s.scaledBy == sc)
}

// load puts the checked problem p in, scaled by sc when sc is not nil;
// same is loadScaled's, checked.
func (s *Simplex) load(p *Problem, sc *scaling, same bool) error {
	var sameMatrix bool
	if sc == nil {
		sameMatrix = s.loaded && s.prob.sameMatrix(p)
	} else {
		sameMatrix = s.loaded && (same || s.prob.sameScaled(p, sc))
	}
	s.scaledBy = sc
	sameShape := s.loaded && s.m == p.Rows && s.n == p.Cols
	if s.loaded && !sameShape {
		s.allocShape(p.Rows, p.Cols, len(p.Value))
	}
	if sc == nil {
		p.copyInto(&s.prob)
	} else {
		sc.applyInto(p, &s.prob)
		if err := s.prob.check(&s.seen); err != nil {
			s.loaded, s.haveBasis = false, false // the copy held is not a loaded problem
			return err
		}
	}
	s.loaded = true
	s.fresh = false
	s.m, s.n = p.Rows, p.Cols
	if !sameMatrix {
		s.setMatrix()
		s.luOK, s.dseOK = false, false
	}
	if !sameShape {
		s.haveBasis = false
	}
	clear(s.shift)
	for j := 0; j < s.n; j++ {
		s.setCol(j)
	}
	for i := 0; i < s.m; i++ {
		s.setRow(i)
	}
	return nil
}

// setMatrix scales the loaded matrix and lays it out by rows. By columns
// the matrix is the problem's own copy, unscaled: the simplex scales a
// column as it reads it, with the same products rs[i]·a_ij·cs[j] as the
// layout by rows holds. The layout by rows is made first, of the unscaled
// values: the scaling's row passes run on it, and it is scaled in place
// after.
func (s *Simplex) setMatrix() {
	p := &s.prob
	m := s.m
	s.cStart, s.cIdx = p.Start, p.Index // the own copy of the problem
	s.rStart, s.rIdx, s.rVal = byRows(m, p.Start, p.Index, p.Value, s.rStart, s.rIdx, s.rVal)
	if s.opt.NoScaling {
		for i := range s.rs {
			s.rs[i] = 1
		}
		for j := range s.cs {
			s.cs[j] = 1
		}
		return
	}
	scaleFactors(p, &rowMatrix{s.rStart, s.rIdx, s.rVal}, s.rs, s.cs, &s.scaleWork)
	rs, cs, rStart := s.rs[:m], s.cs[:s.n], s.rStart[:m+1]
	for i, r := range rs {
		lo, hi := rStart[i], rStart[i+1]
		idx, val := s.rIdx[lo:hi], s.rVal[lo:hi]
		val = val[:len(idx)]
		for k, j := range idx {
			val[k] = r * val[k] * cs[j]
		}
	}
}

// setCol scales column j's cost and bounds.
func (s *Simplex) setCol(j int) {
	c := s.cs[j]
	s.cost[j] = s.prob.Obj[j] * c
	s.lo0[j], s.up0[j] = s.prob.ColLo[j]/c, s.prob.ColUp[j]/c
	s.lo[j], s.up[j] = s.lo0[j], s.up0[j]
}

// setRow scales row i's bounds (its logical's).
func (s *Simplex) setRow(i int) {
	k := s.n + i
	r := s.rs[i]
	s.cost[k] = 0
	s.lo0[k], s.up0[k] = s.prob.RowLo[i]*r, s.prob.RowUp[i]*r
	s.lo[k], s.up[k] = s.lo0[k], s.up0[k]
}

// SetObj sets column j's cost.
func (s *Simplex) SetObj(j int, c float64) {
	s.prob.Obj[j] = c
	s.setCol(j)
	s.costsEdited = true
}

// SetColBounds sets column j's bounds.
func (s *Simplex) SetColBounds(j int, lo, up float64) {
	s.prob.ColLo[j], s.prob.ColUp[j] = lo, up
	s.setCol(j)
	s.boundsEdited = true
}

// SetRowBounds sets row i's range.
func (s *Simplex) SetRowBounds(i int, lo, up float64) {
	s.prob.RowLo[i], s.prob.RowUp[i] = lo, up
	s.setRow(i)
	s.boundsEdited = true
}

// SetBasis makes the next Solve start from b (nil: the slack basis). A
// basis equal to the one held keeps the factorisation.
func (s *Simplex) SetBasis(b []VarStatus) error {
	if b == nil {
		s.haveBasis = false
		return nil
	}
	if !s.loaded || len(b) != s.n+s.m {
		return fmt.Errorf("simplex: basis of %d statuses for %d columns and %d rows", len(b), s.n, s.m)
	}
	nb := 0
	for _, st := range b {
		if st == Basic {
			nb++
		}
	}
	if nb != s.m {
		return fmt.Errorf("simplex: basis has %d basic variables for %d rows", nb, s.m)
	}
	if s.haveBasis && len(s.stat) == len(b) {
		same := true
		for k, st := range b {
			if (st == Basic) != (s.stat[k] == Basic) {
				same = false
				break
			}
		}
		if same {
			copy(s.stat, b) // nonbasic bounds may differ; the basis is the same
			s.boundsEdited = true
			return nil
		}
	}
	copy(s.stat, b)
	r := 0
	for k, st := range b {
		s.pos[k] = -1
		if st == Basic {
			s.head[r], s.pos[k] = k, r
			r++
		}
	}
	s.haveBasis, s.luOK, s.dseOK, s.fresh = true, false, false, false
	return nil
}

// Basis returns the statuses of the basis held (Cols then Rows), or nil.
func (s *Simplex) Basis() []VarStatus {
	if !s.haveBasis {
		return nil
	}
	return append([]VarStatus(nil), s.stat...)
}

// allocShape lays out every array of an m x n problem with nz nonzeros
// that a load and a solve need (the shape's arrays, the problem's copy,
// the scaled matrix by columns and by rows, the scaling's and the check's
// scratch): floats in one block and integers in another, so that a cold
// solve makes few allocations for the garbage collector to follow.
func (s *Simplex) allocShape(m, n, nz int) {
	nm := n + m
	const perVar, perRow = 9, 8
	scaled := m + n // the scaling's scratch
	if s.opt.NoScaling {
		scaled = 0
	}
	nf := perVar*nm + perRow*m + n + // the shape's
		nz + 3*n + 2*m + // the problem's copy
		nz + scaled + // by rows, and the scaling's
		2*m + etaReserve*m + etaReserve + 2*(m/2+m) + // the factors'
		2*m // the basis matrix's first columns
	f := make([]float64, nf)
	take := func(k int) []float64 {
		v := f[:k:k]
		f = f[k:]
		return v
	}
	s.cost, s.shift, s.lo0, s.up0, s.lo = take(nm), take(nm), take(nm), take(nm), take(nm)
	s.up, s.x, s.d, s.alphaR = take(nm), take(nm), take(nm), take(nm)
	s.devex = nil // the primal simplex's, made by its first run
	s.y, s.dse, s.wRow, s.wPos = take(m), take(m), take(m), take(m)
	s.rho, s.tau, s.alphaQ, s.rs = take(m), take(m), take(m), take(m)
	s.cs = take(n)
	// Empty with room: copyInto, byRows and scaleFactors fill them.
	s.prob.Value, s.prob.Obj, s.prob.ColLo, s.prob.ColUp = take(nz)[:0], take(n)[:0], take(n)[:0], take(n)[:0]
	s.prob.RowLo, s.prob.RowUp = take(m)[:0], take(m)[:0]
	s.rVal = take(nz)[:0]
	if !s.opt.NoScaling {
		s.scaleWork = take(m + n)[:0]
	}
	ints := make([]int, 3*nm+m+(n+1)+nz+(m+1)+nz+m+
		9*m+4+etaReserve*m/4+3*etaReserve+1+2*(m/2+m)+ // the factors'
		m+1+2*m) // the basis matrix's
	takeInt := func(k int) []int {
		v := ints[:k:k]
		ints = ints[k:]
		return v
	}
	s.pos, s.head = takeInt(nm), takeInt(m)
	s.nzR, s.flips = takeInt(nm)[:0], takeInt(nm)[:0]
	s.prob.Start, s.prob.Index = takeInt(n + 1)[:0], takeInt(nz)[:0]
	s.rStart, s.rIdx, s.seen = takeInt(m + 1)[:0], takeInt(nz)[:0], takeInt(m)[:0]
	s.bStart, s.bIdx, s.bVal = takeInt(m + 1)[:0], takeInt(2 * m)[:0], take(2 * m)[:0]
	bools := make([]bool, nm+m)
	s.inR = bools[:nm:nm]
	s.lu.reserve(m, takeInt, take, bools[nm:])
	s.stat = make([]VarStatus, nm)
	s.cand = make([]candidate, 0, nm)
}

// slackBasis makes every logical basic and puts each column at a bound:
// the lower one when finite (the upper one for a boxed column of negative
// cost, which keeps its reduced cost dual feasible), else the upper one,
// else zero.
func (s *Simplex) slackBasis() {
	n := s.n
	for j := 0; j < n; j++ {
		s.pos[j] = -1
		lo, up := s.lo0[j], s.up0[j]
		switch {
		case lo == up:
			s.stat[j] = Fixed
		case !math.IsInf(lo, -1) && !math.IsInf(up, 1) && s.cost[j] < 0:
			s.stat[j] = AtUpper
		case !math.IsInf(lo, -1):
			s.stat[j] = AtLower
		case !math.IsInf(up, 1):
			s.stat[j] = AtUpper
		default:
			s.stat[j] = Free
		}
	}
	for i := 0; i < s.m; i++ {
		s.stat[n+i], s.pos[n+i], s.head[i] = Basic, i, n+i
	}
	for i := range s.dse {
		s.dse[i] = 1 // B = -I: every row of B⁻¹ has norm 1
	}
	s.haveBasis, s.luOK, s.dseOK = true, false, true
}

// placeNonbasic makes each nonbasic variable's status agree with its
// bounds and sets its value to the bound it sits at.
func (s *Simplex) placeNonbasic() {
	for k, st := range s.stat {
		if st == Basic {
			continue
		}
		lo, up := s.lo[k], s.up[k]
		loF, upF := !math.IsInf(lo, -1), !math.IsInf(up, 1)
		switch {
		case lo == up:
			st = Fixed
		case st == AtUpper && upF, st == AtLower && loF:
		case st == AtUpper && loF, st == Fixed && loF, st == Free && loF:
			st = AtLower
		case upF:
			st = AtUpper
		case loF:
			st = AtLower
		default:
			st = Free
		}
		s.stat[k] = st
		s.x[k] = s.boundValue(k)
	}
}

// boundValue is the value of nonbasic variable k at its status.
func (s *Simplex) boundValue(k int) float64 {
	switch s.stat[k] {
	case AtUpper:
		return s.up[k]
	case Free:
		return 0
	}
	return s.lo[k]
}

// addCol adds v times the column of variable k (a scaled column of A, or
// -e_i for row i's logical) to w, indexed by row.
func (s *Simplex) addCol(k int, v float64, w []float64) {
	if k >= s.n {
		w[k-s.n] -= v
		return
	}
	idx := s.cIdx[s.cStart[k]:s.cStart[k+1]]
	val := s.prob.Value[s.cStart[k]:s.cStart[k+1]]
	val = val[:len(idx)]
	rs, c := s.rs, s.cs[k]
	for q, i := range idx {
		a := rs[i] * val[q] * c
		w[i] += v * a
	}
}

// refactor factorises the basis afresh, replacing dependent columns by
// logicals of the rows left without a pivot (Koberstein 2005, ch. 6, on
// basis repair). It reports whether the basis changed.
func (s *Simplex) refactor() (repaired bool, err error) {
	m := s.m
	for attempt := 0; ; attempt++ {
		s.bStart, s.bIdx, s.bVal = basisMatrix(s.head, s.n, s.cStart, s.cIdx, s.prob.Value, s.rs, s.cs, s.bStart, s.bIdx, s.bVal)
		bad, free := s.lu.factorize(m, s.bStart, s.bIdx, s.bVal)
		if len(bad) == 0 {
			s.luOK = true
			return repaired, nil
		}
		if attempt >= 3 || len(bad) != len(free) {
			return repaired, fmt.Errorf("%w: basis stays singular after repair", errTrouble)
		}
		for t, p := range bad {
			k := s.head[p]
			s.stat[k] = nonbasicStatus(s.x[k], s.lo[k], s.up[k])
			s.pos[k] = -1
			s.x[k] = s.boundValue(k)
			l := s.n + free[t]
			s.head[p], s.pos[l], s.stat[l] = l, p, Basic
		}
		repaired = true
		s.dseOK = false
	}
}

// computeX sets the basic variables from the nonbasic ones: x_B = -B⁻¹N x_N.
func (s *Simplex) computeX() {
	w := s.wRow
	clear(w)
	for k, st := range s.stat {
		if st != Basic && s.x[k] != 0 {
			s.addCol(k, s.x[k], w)
		}
	}
	s.lu.ftran(w, s.wPos)
	for r, k := range s.head {
		s.x[k] = -s.wPos[r]
	}
}

// priceCols sets the reduced cost d_j of every column j from the duals
// y of the last btran: cost_j + shift_j - Σ_i rs_i·a_ij·cs_j·y_i over
// its scaled entries, cost and shift nil standing for zero (phase 1's
// costs), and d_j = 0 when j is basic. e (m floats, used up by btran) is
// scratch.
//
// Every scale factor is a power of two, so multiplying by one is exact
// and commutes with rounding: the row factors go into the duals once
// (ry = rs·y, in e) and column j's factor c divides its cost and
// multiplies the result, d_j = c·((cost_j+shift_j)/c - Σ a_ij·ry_i),
// which is the same reduced cost bit for bit with one product per entry
// instead of three. Both simplex methods run this pass over the whole
// matrix at every pricing from scratch (phase 1 at every iteration).
func (s *Simplex) priceCols(e, cost, shift []float64) {
	n := s.n
	ry := e[:s.m]
	for i, r := range s.rs[:s.m] {
		ry[i] = r * s.y[i]
	}
	stat, d, cs, cStart, cIdx, cVal := s.stat[:n], s.d[:n], s.cs[:n], s.cStart[:n+1], s.cIdx, s.prob.Value
	for j, st := range stat {
		if st == Basic {
			d[j] = 0
			continue
		}
		c := cs[j]
		v := 0.0
		if cost != nil {
			v = (cost[j] + shift[j]) / c
		}
		idx := cIdx[cStart[j]:cStart[j+1]]
		val := cVal[cStart[j]:cStart[j+1]]
		val = val[:len(idx)]
		for q, i := range idx {
			v -= val[q] * ry[i]
		}
		d[j] = v * c
	}
}

// computeD sets the duals y (Bᵀy = c_B, with the shifts in force) and the
// reduced costs of the nonbasic variables.
func (s *Simplex) computeD() {
	e := s.wPos
	for r, k := range s.head {
		e[r] = s.cost[k] + s.shift[k]
	}
	s.lu.btran(e, s.y)
	s.priceCols(e, s.cost, s.shift)
	for i := 0; i < s.m; i++ {
		k := s.n + i
		if s.stat[k] == Basic {
			s.d[k] = 0
		} else {
			s.d[k] = s.shift[k] + s.y[i]
		}
	}
}

// primalInfeasibility is the largest bound violation of a basic variable.
func (s *Simplex) primalInfeasibility() float64 {
	worst := 0.0
	for _, k := range s.head {
		v := s.x[k]
		worst = max(worst, max(s.lo[k]-v, v-s.up[k]))
	}
	return worst
}

// dualInfeasible reports whether nonbasic variable k's reduced cost has the
// wrong sign for its status (beyond tolDual).
func (s *Simplex) dualInfeasible(k int) bool {
	d := s.d[k]
	switch s.stat[k] {
	case AtLower:
		return d < -tolDual
	case AtUpper:
		return d > tolDual
	case Free:
		return math.Abs(d) > tolDual
	}
	return false
}

func (s *Simplex) dualFeasible() bool {
	for k, st := range s.stat {
		if st != Basic && s.dualInfeasible(k) {
			return false
		}
	}
	return true
}

// random is a xorshift64* generator (Marsaglia, J. Stat. Softw. 8 (2003);
// Vigna's multiplier), seeded afresh by every Solve so that answers do not
// depend on earlier solves' draws; it draws perturbations in [0, 1).
func (s *Simplex) random() float64 {
	s.rnd ^= s.rnd >> 12
	s.rnd ^= s.rnd << 25
	s.rnd ^= s.rnd >> 27
	return float64((s.rnd*2685821657736338717)>>11) / (1 << 53)
}

// removeShifts restores the problem's costs.
func (s *Simplex) removeShifts() {
	if s.shifted {
		clear(s.shift)
		s.shifted = false
	}
}

// restoreBounds undoes a bound perturbation; nonbasic variables move to
// the true bound, so x must be recomputed.
func (s *Simplex) restoreBounds() {
	if !s.perturbedUp {
		return
	}
	copy(s.lo, s.lo0)
	copy(s.up, s.up0)
	s.perturbedUp = false
	for k, st := range s.stat {
		if st != Basic {
			s.x[k] = s.boundValue(k)
		}
	}
}

// accept moves variable k's violated bound to its value for this solve: a
// violation of at most tolVerdict (relative) that no pivot can remove is
// rounding, not infeasibility. restoreAccepted undoes it at the next
// solve.
func (s *Simplex) accept(k int) bool {
	v := s.x[k]
	switch {
	case v < s.lo[k] && s.lo[k]-v <= tolVerdict*(1+math.Abs(s.lo[k])):
		s.lo[k], s.lo0[k] = v, v
	case v > s.up[k] && v-s.up[k] <= tolVerdict*(1+math.Abs(s.up[k])):
		s.up[k], s.up0[k] = v, v
	default:
		return false
	}
	s.accepted = append(s.accepted, k)
	return true
}

func (s *Simplex) restoreAccepted() {
	for _, k := range s.accepted {
		if k < s.n {
			s.setCol(k)
		} else {
			s.setRow(k - s.n)
		}
	}
	s.accepted = s.accepted[:0]
}

// Solve solves the loaded problem from the basis held (the slack basis
// when there is none). A panic inside the engine is recovered into an
// error, so a bad input can never take its caller down.
func (s *Simplex) Solve() (*Solution, error) {
	st, err := s.solveStatus()
	if err != nil {
		return nil, err
	}
	return s.solution(st), nil
}

// solveStatus is Solve without building the Solution: the answer stays in
// the engine (value, objective, basisInto).
func (s *Simplex) solveStatus() (st Status, err error) {
	if !s.loaded {
		return 0, errors.New("simplex: Solve before Load")
	}
	defer func() {
		if r := recover(); r != nil {
			st, err = 0, fmt.Errorf("simplex: internal fault: %v", r)
			s.haveBasis = false
		}
	}()
	st, err = s.solve()
	if errors.Is(err, errTrouble) {
		// One fresh start from the slack basis, without the warm state.
		s.haveBasis = false
		st, err = s.solve()
	}
	if err != nil {
		s.haveBasis = false
		return 0, err
	}
	s.fresh = st == Optimal
	return st, nil
}

// value is column j's value in the answer held (unscaled; a basic value
// within tolerance of a bound is at the bound).
func (s *Simplex) value(j int) float64 {
	p := &s.prob
	switch s.stat[j] {
	case Basic:
		return min(max(s.x[j]*s.cs[j], p.ColLo[j]), p.ColUp[j])
	case AtUpper:
		return p.ColUp[j]
	case Free:
		return 0
	}
	return p.ColLo[j]
}

// values writes every column's value into dst (grown as needed).
func (s *Simplex) values(dst []float64) []float64 {
	dst = resize(dst, s.n)
	for j := range dst {
		dst[j] = s.value(j)
	}
	return dst
}

// objective is the objective of the answer held.
func (s *Simplex) objective() float64 {
	v := 0.0
	for j, c := range s.prob.Obj {
		if c != 0 {
			v += c * s.value(j)
		}
	}
	return v
}

// basisInto copies the basis held into dst (grown as needed).
func (s *Simplex) basisInto(dst []VarStatus) []VarStatus {
	return append(dst[:0], s.stat...)
}

func (s *Simplex) solve() (Status, error) {
	s.iters, s.troubles, s.degenerate, s.bland = 0, 0, 0, s.opt.Bland
	s.rnd = 0x9E3779B97F4A7C15
	s.maxIter = s.opt.MaxIter
	if s.maxIter <= 0 {
		s.maxIter = 10000 + 20*(s.n+s.m)
	}
	s.farkasU, s.rayX = nil, nil
	fresh := s.fresh && len(s.accepted) == 0
	s.fresh = false
	s.restoreAccepted()
	s.removeShifts()
	copy(s.lo, s.lo0)
	copy(s.up, s.up0)
	s.perturbedUp = false
	// The Set methods take what they are given; check it here.
	for j := 0; j < s.n; j++ {
		if c := s.prob.Obj[j]; math.IsNaN(c) || math.IsInf(c, 0) {
			return 0, fmt.Errorf("%w: objective of column %d is %v", ErrBadProblem, j, c)
		}
		if err := checkBounds(s.prob.ColLo[j], s.prob.ColUp[j]); err != nil {
			return 0, fmt.Errorf("%w: column %d: %v", ErrBadProblem, j, err)
		}
	}
	for i := 0; i < s.m; i++ {
		if err := checkBounds(s.prob.RowLo[i], s.prob.RowUp[i]); err != nil {
			return 0, fmt.Errorf("%w: row %d: %v", ErrBadProblem, i, err)
		}
	}
	for k := range s.lo0 {
		if s.lo0[k] > s.up0[k] {
			return Infeasible, nil // crossed bounds
		}
	}
	method := s.opt.Method
	fresh = fresh && s.haveBasis && s.luOK
	if !s.haveBasis {
		fresh = false
		s.slackBasis()
		if method == Auto && s.m >= coldPrimalRows {
			method = Primal
		}
	}
	s.placeNonbasic()
	if !s.luOK || s.lu.due() {
		fresh = false
		if _, err := s.refactor(); err != nil {
			return 0, err
		}
	}
	if !s.dseOK {
		s.initDSE()
	}
	// A cost edit cannot move x, a bound edit cannot change d: what the
	// last optimum left stays valid where nothing it depends on changed.
	if !fresh || s.boundsEdited {
		s.computeX()
	}
	if !fresh || s.costsEdited {
		s.computeD()
	}
	s.costsEdited, s.boundsEdited = false, false
	for round := 0; round < 20; round++ {
		pInf := s.primalInfeasibility() > tolPrimal
		var st Status
		var err error
		switch {
		case !pInf && !s.shifted && s.dualFeasible():
			return Optimal, nil
		case method == Primal || !pInf && method != Dual:
			st, err = s.primal()
		default:
			s.makeDualFeasible()
			st, err = s.dual()
		}
		method = Auto
		if err != nil {
			return 0, err
		}
		if st != Optimal {
			return st, nil
		}
		// The phase confirmed its answer on values recomputed from the
		// factors; with no shift or perturbation to take out, that is
		// the optimum. Otherwise take them out and look again.
		if !s.shifted && !s.perturbedUp && s.primalInfeasibility() <= tolPrimal && s.dualFeasible() {
			return Optimal, nil
		}
		s.removeShifts()
		s.restoreBounds()
		if s.lu.due() {
			if _, err := s.refactor(); err != nil {
				return 0, err
			}
		}
		s.computeX()
		s.computeD()
	}
	return 0, fmt.Errorf("%w: primal and dual cleanups did not settle", errTrouble)
}

// initDSE computes the dual steepest-edge weights ‖e_rᵀB⁻¹‖² exactly for
// small bases and sets them to 1 for large ones (Forrest & Goldfarb 1992
// start from 1 when exact weights cost too much).
func (s *Simplex) initDSE() {
	m := s.m
	if m > 120 {
		for r := range s.dse {
			s.dse[r] = 1
		}
		s.dseOK = true
		return
	}
	for r := 0; r < m; r++ {
		clear(s.wPos)
		s.wPos[r] = 1
		s.lu.btran(s.wPos, s.rho)
		v := 0.0
		for _, a := range s.rho {
			v += a * a
		}
		s.dse[r] = max(v, minWeight)
	}
	s.dseOK = true
}

// solution unscales the answer of the basis held.
func (s *Simplex) solution(st Status) *Solution {
	p := &s.prob
	n, m := s.n, s.m
	sol := &Solution{Status: st, Iterations: s.iters}
	switch st {
	case Infeasible:
		sol.Farkas = s.farkas()
		return sol
	case Unbounded:
		sol.Ray = s.ray()
		return sol
	}
	v := make([]float64, 2*n+2*m)
	sol.X, sol.D, sol.RowAct, sol.Y = v[:n:n], v[n:2*n:2*n], v[2*n:2*n+m:2*n+m], v[2*n+m:]
	sol.Basis = s.basisInto(nil)
	s.values(sol.X)
	for i := 0; i < m; i++ {
		sol.Y[i] = s.y[i] * s.rs[i]
	}
	p.Activity(sol.X, sol.RowAct)
	for j := 0; j < n; j++ {
		if s.stat[j] == Basic {
			continue
		}
		dj := p.Obj[j]
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			dj -= p.Value[k] * sol.Y[p.Index[k]]
		}
		sol.D[j] = dj
	}
	sol.Obj = p.Objective(sol.X)
	return sol
}

func (m Method) String() string {
	switch m {
	case Dual:
		return "dual"
	case Primal:
		return "primal"
	}
	return "auto"
}
