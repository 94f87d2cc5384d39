package optimise

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

// errNoMILP is returned by an engine that cannot honour integer rules.
var errNoMILP = errors.New("integer rules (max_stocks, min_if_used) need the COIN-OR build: " +
	"install coinor-libcbc-dev and build with cgo and without -tags purego")

// gonumEngine solves LPs with gonum's dense simplex (lp.Simplex), the pure-Go
// fallback. lp.Simplex takes the standard form min cᵀz, Az = b, z >= 0 and
// returns only z, so this engine converts the bounded model itself and
// recovers an optimal basis, duals and reduced costs from z:
//
//  1. The bounds are loosened by tiny, irregular amounts (1e-7 relative,
//     different for every bound), which makes the programme nondegenerate in
//     practice: at its optimum exactly nRows variables lie strictly between
//     their bounds, and those are the basis. (Charnes' perturbation method
//     against degeneracy, from memory; see e.g. Chvátal, Linear Programming
//     (1983), on degeneracy.)
//  2. With that basis and every nonbasic variable at its original bound the
//     vertex of the original programme is recomputed exactly from B z_B =
//     -N z_N; its duals solve Bᵀy = c_B and reduced costs are d = c - Aᵀy.
//     Both are the same formulas CLP's basis satisfies, so nondegenerate
//     models get identical shadow prices from either engine.
//  3. Should the recomputed vertex violate a bound (the perturbation jumped
//     a vertex), the unperturbed programme is solved and its basis completed
//     from the variables at a bound.
type gonumEngine struct{}

func (gonumEngine) name() string     { return "gonum" }
func (gonumEngine) milpName() string { return "gonum" }

func (gonumEngine) solveMILP(*model) (*solution, error) { return nil, errNoMILP }

func (gonumEngine) close() {}

func (gonumEngine) solveLP(m *model) (*solution, error) {
	p := perturbed(m)
	s, err := simplexBounded(p)
	if err != nil {
		return nil, err
	}
	if s.status != solOptimal {
		return s, nil
	}
	if basis, ok := basisOf(p, s.x, s.act, true); ok {
		if out, err := vertexOf(m, basis); err == nil {
			return out, nil
		}
	}
	s, err = simplexBounded(m)
	if err != nil || s.status != solOptimal {
		return s, err
	}
	basis, _ := basisOf(m, s.x, s.act, false)
	basis, err = completeBasis(m, basis)
	if err != nil {
		return nil, fmt.Errorf("gonum: %w", err)
	}
	f, err := newBasisFactor(m, basis)
	if err != nil {
		return nil, fmt.Errorf("gonum: %w", err)
	}
	s.y, s.d, err = f.duals()
	if err != nil {
		return nil, fmt.Errorf("gonum: %w", err)
	}
	s.basis = basis
	return s, nil
}

// perturbed returns a copy of m with every finite bound that is not fixed
// moved outwards by 1e-7·(1+|bound|)·(1+frac(k·φ)), k the bound's serial
// number and φ the golden ratio, so no two bounds move alike.
func perturbed(m *model) *model {
	p := m.clone()
	k := 0
	eps := func(v float64) float64 {
		k++
		f := math.Mod(float64(k)*0.6180339887498949, 1)
		return 1e-7 * (1 + math.Abs(v)) * (1 + f)
	}
	for j := range p.colLo {
		if p.colLo[j] == p.colUp[j] {
			continue
		}
		if !math.IsInf(p.colLo[j], 0) {
			p.colLo[j] -= eps(p.colLo[j])
		}
		if !math.IsInf(p.colUp[j], 0) {
			p.colUp[j] += eps(p.colUp[j])
		}
	}
	for i := range p.rowLo {
		if !math.IsInf(p.rowLo[i], 0) {
			p.rowLo[i] -= eps(p.rowLo[i])
		}
		if !math.IsInf(p.rowUp[i], 0) {
			p.rowUp[i] += eps(p.rowUp[i])
		}
	}
	return p
}

// standard is the gonum standard form of a bounded model.
type standard struct {
	c, b  []float64
	a     *mat.Dense
	col   []int // standard variable of each model column, -1 when fixed
	infea bool  // a row with no free column cannot be met
}

// toStandard writes m as min cᵀz, Az = b, z >= 0: column j becomes
// z = x_j - lo_j (a fixed column is substituted), a finite upper bound adds
// z + u = up - lo, a row bound adds a slack (a·z + s = up', a·z - t = lo'),
// free rows and rows without a free column are left out.
func toStandard(m *model) (*standard, error) {
	st := &standard{col: make([]int, m.nCols)}
	nv := 0
	for j := 0; j < m.nCols; j++ {
		if math.IsInf(m.colLo[j], -1) {
			return nil, fmt.Errorf("gonum: column %q has no lower bound", m.colName[j])
		}
		st.col[j] = -1
		if m.colLo[j] != m.colUp[j] {
			st.col[j] = nv
			nv++
		}
	}
	type srow struct {
		coef  []float64 // over structural standard variables
		slack float64   // +1, -1 or 0
		rhs   float64
	}
	var rows []srow
	for j := 0; j < m.nCols; j++ {
		if st.col[j] >= 0 && !math.IsInf(m.colUp[j], 1) {
			coef := make([]float64, nv)
			coef[st.col[j]] = 1
			rows = append(rows, srow{coef, 1, m.colUp[j] - m.colLo[j]})
		}
	}
	for i := 0; i < m.nRows; i++ {
		lo, up := m.rowLo[i], m.rowUp[i]
		if math.IsInf(lo, -1) && math.IsInf(up, 1) {
			continue
		}
		coef := make([]float64, nv)
		var shift float64
		empty := true
		for j, v := range m.row(i) {
			if v == 0 {
				continue
			}
			shift += v * m.colLo[j]
			if k := st.col[j]; k >= 0 {
				coef[k] = v
				empty = false
			}
		}
		if empty {
			tol := 1e-9 * (1 + math.Abs(shift))
			if shift < lo-tol || shift > up+tol {
				st.infea = true
			}
			continue
		}
		if !math.IsInf(up, 1) {
			rows = append(rows, srow{coef, 1, up - shift})
		}
		if !math.IsInf(lo, -1) {
			rows = append(rows, srow{coef, -1, lo - shift})
		}
	}
	ns := len(rows)
	cols := nv + ns
	st.c = make([]float64, cols)
	for j := 0; j < m.nCols; j++ {
		if k := st.col[j]; k >= 0 {
			st.c[k] = m.obj[j]
		}
	}
	st.b = make([]float64, ns)
	if ns > 0 {
		st.a = mat.NewDense(ns, cols, nil)
	}
	for r, row := range rows {
		for k, v := range row.coef {
			if v != 0 {
				st.a.Set(r, k, v)
			}
		}
		st.a.Set(r, nv+r, row.slack)
		st.b[r] = row.rhs
	}
	return st, nil
}

// simplexBounded solves m (its LP relaxation) with lp.Simplex and maps the
// answer back to model columns and row activities.
func simplexBounded(m *model) (*solution, error) {
	st, err := toStandard(m)
	if err != nil {
		return nil, err
	}
	if st.infea {
		return &solution{status: solInfeasible}, nil
	}
	var z []float64
	if st.a != nil {
		_, z, err = lp.Simplex(st.c, st.a, st.b, 1e-10, nil)
		switch {
		case errors.Is(err, lp.ErrInfeasible):
			return &solution{status: solInfeasible}, nil
		case errors.Is(err, lp.ErrUnbounded):
			return &solution{status: solUnbounded}, nil
		case err != nil:
			return nil, fmt.Errorf("gonum simplex: %w", err)
		}
	} else {
		for _, c := range st.c {
			if c < 0 {
				return &solution{status: solUnbounded}, nil
			}
		}
		z = make([]float64, len(st.c))
	}
	x := make([]float64, m.nCols)
	for j := range x {
		x[j] = m.colLo[j]
		if k := st.col[j]; k >= 0 {
			x[j] += z[k]
		}
	}
	return &solution{status: solOptimal, obj: m.objective(x), x: x, act: m.activity(x, nil)}, nil
}

// basisOf reads a basis off a vertex: variables strictly inside their bounds
// are basic, as are the logicals of free rows and of rows without a free
// column (their -e_i is the only column touching them); the rest sit at a
// bound. ok reports whether exactly nRows are basic; with strict=false the
// partial basis is returned for completion.
func basisOf(m *model, x, act []float64, strict bool) ([]varState, bool) {
	basis := make([]varState, m.nCols+m.nRows)
	nb := 0
	inside := func(v, lo, up float64) bool {
		return (math.IsInf(lo, -1) || v > lo+1e-9*(1+math.Abs(lo))) &&
			(math.IsInf(up, 1) || v < up-1e-9*(1+math.Abs(up)))
	}
	for j := 0; j < m.nCols; j++ {
		if m.colLo[j] != m.colUp[j] && inside(x[j], m.colLo[j], m.colUp[j]) {
			basis[j] = stBasic
			nb++
			continue
		}
		basis[j] = classify(false, x[j], m.colLo[j], m.colUp[j])
	}
	for i := 0; i < m.nRows; i++ {
		k := m.nCols + i
		forced := math.IsInf(m.rowLo[i], -1) && math.IsInf(m.rowUp[i], 1)
		if !forced {
			forced = true
			for j, v := range m.row(i) {
				if v != 0 && m.colLo[j] != m.colUp[j] {
					forced = false
					break
				}
			}
		}
		if forced || (m.rowLo[i] != m.rowUp[i] && inside(act[i], m.rowLo[i], m.rowUp[i])) {
			basis[k] = stBasic
			nb++
			continue
		}
		basis[k] = classify(false, act[i], m.rowLo[i], m.rowUp[i])
	}
	return basis, nb == m.nRows || !strict
}

// vertexOf recomputes the vertex of m for a basis: nonbasic variables at
// their bounds, B z_B = -A_N x_N + r_N. It fails when the basis is singular
// or the vertex breaks a bound by more than 1e-7 relative.
func vertexOf(m *model, basis []varState) (*solution, error) {
	f, err := newBasisFactor(m, basis)
	if err != nil {
		return nil, err
	}
	x := make([]float64, m.nCols)
	rhs := make([]float64, m.nRows)
	at := func(s varState, lo, up float64) float64 {
		switch s {
		case stUpper:
			return up
		case stFree:
			return 0
		default:
			return lo
		}
	}
	for j := 0; j < m.nCols; j++ {
		if basis[j] != stBasic {
			x[j] = at(basis[j], m.colLo[j], m.colUp[j])
			if x[j] != 0 {
				for i := 0; i < m.nRows; i++ {
					rhs[i] -= m.at(i, j) * x[j]
				}
			}
		}
	}
	for i := 0; i < m.nRows; i++ {
		if s := basis[m.nCols+i]; s != stBasic {
			rhs[i] += at(s, m.rowLo[i], m.rowUp[i])
		}
	}
	zb, err := f.solve(rhs)
	if err != nil {
		return nil, err
	}
	for p, k := range f.basic {
		if k < m.nCols {
			x[k] = zb[p]
		}
	}
	act := m.activity(x, nil)
	outside := func(v, lo, up float64) bool {
		return v < lo-1e-7*(1+math.Abs(lo)) || v > up+1e-7*(1+math.Abs(up))
	}
	for j, v := range x {
		if outside(v, m.colLo[j], m.colUp[j]) {
			return nil, fmt.Errorf("column %q at %g outside %g..%g", m.colName[j], v, m.colLo[j], m.colUp[j])
		}
		x[j] = math.Min(math.Max(v, m.colLo[j]), m.colUp[j])
	}
	for i, v := range act {
		if outside(v, m.rowLo[i], m.rowUp[i]) {
			return nil, fmt.Errorf("row %q at %g outside %g..%g", m.rowName[i], v, m.rowLo[i], m.rowUp[i])
		}
	}
	y, d, err := f.duals()
	if err != nil {
		return nil, err
	}
	// The perturbed model loosened fixed rows; in m they are fixed again.
	for k, s := range basis {
		if s == stBasic {
			continue
		}
		if k < m.nCols && m.colLo[k] == m.colUp[k] || k >= m.nCols && m.rowLo[k-m.nCols] == m.rowUp[k-m.nCols] {
			basis[k] = stFixed
		}
	}
	return &solution{status: solOptimal, obj: m.objective(x), x: x, act: act, y: y, d: d, basis: basis}, nil
}

// completeBasis adds nonbasic variables to a partial basis, logicals first,
// while they are linearly independent of those already in (modified
// Gram-Schmidt), until it is square.
func completeBasis(m *model, basis []varState) ([]varState, error) {
	r := m.nRows
	column := func(k int) []float64 {
		c := make([]float64, r)
		if k < m.nCols {
			for i := range c {
				c[i] = m.at(i, k)
			}
		} else {
			c[k-m.nCols] = -1
		}
		return c
	}
	var q [][]float64
	add := func(k int) bool {
		v := column(k)
		n0 := math.Sqrt(dot(v, v))
		if n0 == 0 {
			return false
		}
		for _, u := range q {
			p := dot(u, v)
			for i := range v {
				v[i] -= p * u[i]
			}
		}
		n := math.Sqrt(dot(v, v))
		if n <= 1e-9*n0 {
			return false
		}
		for i := range v {
			v[i] /= n
		}
		q = append(q, v)
		return true
	}
	for k, s := range basis {
		if s == stBasic && !add(k) {
			return nil, fmt.Errorf("%w: basic columns are dependent", errBasis)
		}
	}
	order := make([]int, 0, len(basis))
	for k := m.nCols; k < len(basis); k++ {
		order = append(order, k)
	}
	for k := 0; k < m.nCols; k++ {
		order = append(order, k)
	}
	for _, k := range order {
		if len(q) == r {
			break
		}
		if basis[k] != stBasic && add(k) {
			basis[k] = stBasic
		}
	}
	if len(q) != r {
		return nil, fmt.Errorf("%w: %d independent columns for %d rows", errBasis, len(q), r)
	}
	return basis, nil
}

func dot(a, b []float64) float64 {
	var s float64
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}
