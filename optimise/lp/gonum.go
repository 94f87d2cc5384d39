package lp

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

// Gonum solves LPs with gonum's dense simplex (lp.Simplex), an outside
// reference for lipoplan's own engine in tests; nothing in the commands
// uses it. lp.Simplex takes the standard form min cᵀz, Az = b, z >= 0 and
// returns only z, so this engine converts the bounded problem itself and
// recovers an optimal basis, duals and reduced costs from z:
//
//  1. The bounds are loosened by tiny, irregular amounts (1e-7 relative,
//     different for every bound), which makes the programme nondegenerate
//     in practice: at its optimum exactly Rows variables lie strictly
//     between their bounds, and those are the basis (Charnes' perturbation
//     method against degeneracy; Chvátal 1983, ch. 3, on degeneracy).
//  2. With that basis and every nonbasic variable at its original bound the
//     vertex of the original programme is recomputed from B z_B = -N z_N;
//     its duals solve Bᵀy = c_B and the reduced costs are d = c - Aᵀy, the
//     formulas every basis satisfies, so nondegenerate problems get the
//     same duals from any correct engine.
//  3. Should the recomputed vertex violate a bound (the perturbation jumped
//     a vertex), the unperturbed programme is solved and its basis
//     completed from the variables at a bound.
//
// It has no warm start and no certificates.
type Gonum struct {
	stored
}

// NewGonum makes the gonum reference engine.
func NewGonum() *Gonum { return &Gonum{} }

// Name is "gonum".
func (*Gonum) Name() string { return "gonum" }

// SetBasis is ignored: lp.Simplex always starts afresh.
func (*Gonum) SetBasis([]VarStatus) error { return nil }

// Close does nothing.
func (*Gonum) Close() {}

// Solve solves the loaded problem.
func (g *Gonum) Solve() (*Solution, error) {
	m := &g.p
	for j := 0; j < m.Cols; j++ {
		if m.ColLo[j] > m.ColUp[j] {
			return &Solution{Status: Infeasible}, nil
		}
	}
	for i := 0; i < m.Rows; i++ {
		if m.RowLo[i] > m.RowUp[i] {
			return &Solution{Status: Infeasible}, nil
		}
	}
	dense := toDense(m)
	p := perturbed(m)
	s, err := simplexBounded(p, dense)
	if err != nil {
		return nil, err
	}
	if s.Status != Optimal {
		return s, nil
	}
	if basis, ok := basisOf(p, dense, s.X, s.RowAct, true); ok {
		if out, err := vertexOf(m, basis); err == nil {
			return out, nil
		}
	}
	s, err = simplexBounded(m, dense)
	if err != nil || s.Status != Optimal {
		return s, err
	}
	basis, _ := basisOf(m, dense, s.X, s.RowAct, false)
	basis, err = completeBasis(m, basis)
	if err != nil {
		return nil, fmt.Errorf("gonum: %w", err)
	}
	b, err := newBasisLU(m, basis)
	if err != nil {
		return nil, fmt.Errorf("gonum: %w", err)
	}
	s.Y, s.D = duals(m, b)
	s.Basis = basis
	return s, nil
}

// toDense is p's matrix, dense and row-major.
func toDense(p *Problem) []float64 {
	a := make([]float64, p.Rows*p.Cols)
	for j := 0; j < p.Cols; j++ {
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			a[p.Index[k]*p.Cols+j] = p.Value[k]
		}
	}
	return a
}

// perturbed returns a copy of p with every finite bound that is not fixed
// moved outwards by 1e-7·(1+|bound|)·(1+frac(k·φ)), k the bound's serial
// number and φ the golden ratio, so no two bounds move alike.
func perturbed(m *Problem) *Problem {
	p := m.Clone()
	k := 0
	eps := func(v float64) float64 {
		k++
		f := math.Mod(float64(k)*0.6180339887498949, 1)
		return 1e-7 * (1 + math.Abs(v)) * (1 + f)
	}
	for j := range p.ColLo {
		if p.ColLo[j] == p.ColUp[j] {
			continue
		}
		if !math.IsInf(p.ColLo[j], 0) {
			p.ColLo[j] -= eps(p.ColLo[j])
		}
		if !math.IsInf(p.ColUp[j], 0) {
			p.ColUp[j] += eps(p.ColUp[j])
		}
	}
	for i := range p.RowLo {
		if !math.IsInf(p.RowLo[i], 0) {
			p.RowLo[i] -= eps(p.RowLo[i])
		}
		if !math.IsInf(p.RowUp[i], 0) {
			p.RowUp[i] += eps(p.RowUp[i])
		}
	}
	return p
}

// Standard is the gonum standard form of a bounded problem: min cᵀz,
// A z = b, z >= 0.
type Standard struct {
	C, B      []float64
	A         *mat.Dense
	col       []int // standard variable of each column, -1 when fixed
	infea     bool  // a row with no free column cannot be met
	unbounded bool  // a column in no binding row pays to grow without limit
}

// inBoundedRow reports whether column j has a nonzero in a row with a bound.
func inBoundedRow(m *Problem, dense []float64, j int) bool {
	for i := 0; i < m.Rows; i++ {
		if dense[i*m.Cols+j] != 0 && (!math.IsInf(m.RowLo[i], -1) || !math.IsInf(m.RowUp[i], 1)) {
			return true
		}
	}
	return false
}

// ToStandard writes p as min cᵀz, Az = b, z >= 0: column j becomes
// z = x_j - lo_j (a fixed column is substituted), a finite upper bound adds
// z + u = up - lo, a row bound adds a slack (a·z + s = up', a·z - t = lo'),
// free rows and rows without a free column are left out. Every column
// needs a finite lower bound.
func ToStandard(m *Problem) (*Standard, error) {
	return toStandard(m, toDense(m))
}

func toStandard(m *Problem, dense []float64) (*Standard, error) {
	st := &Standard{col: make([]int, m.Cols)}
	nv := 0
	for j := 0; j < m.Cols; j++ {
		if math.IsInf(m.ColLo[j], -1) {
			return nil, fmt.Errorf("gonum: column %d has no lower bound", j)
		}
		st.col[j] = -1
		if m.ColLo[j] == m.ColUp[j] {
			continue
		}
		if math.IsInf(m.ColUp[j], 1) && !inBoundedRow(m, dense, j) {
			// A column in no row that binds (lp.Simplex rejects a zero
			// column): at its lower bound, unless it pays to grow it.
			if m.Obj[j] < 0 {
				st.unbounded = true
			}
			continue
		}
		st.col[j] = nv
		nv++
	}
	type srow struct {
		coef  []float64 // over structural standard variables
		slack float64   // +1, -1 or 0
		rhs   float64
	}
	var rows []srow
	for j := 0; j < m.Cols; j++ {
		if st.col[j] >= 0 && !math.IsInf(m.ColUp[j], 1) {
			coef := make([]float64, nv)
			coef[st.col[j]] = 1
			rows = append(rows, srow{coef, 1, m.ColUp[j] - m.ColLo[j]})
		}
	}
	for i := 0; i < m.Rows; i++ {
		lo, up := m.RowLo[i], m.RowUp[i]
		if math.IsInf(lo, -1) && math.IsInf(up, 1) {
			continue
		}
		coef := make([]float64, nv)
		var shift float64
		empty := true
		for j, v := range dense[i*m.Cols : (i+1)*m.Cols] {
			if v == 0 {
				continue
			}
			shift += v * m.ColLo[j]
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
	st.C = make([]float64, cols)
	for j := 0; j < m.Cols; j++ {
		if k := st.col[j]; k >= 0 {
			st.C[k] = m.Obj[j]
		}
	}
	st.B = make([]float64, ns)
	if ns > 0 {
		st.A = mat.NewDense(ns, cols, nil)
	}
	for r, row := range rows {
		for k, v := range row.coef {
			if v != 0 {
				st.A.Set(r, k, v)
			}
		}
		st.A.Set(r, nv+r, row.slack)
		st.B[r] = row.rhs
	}
	return st, nil
}

// simplexBounded solves m with lp.Simplex and maps the answer back to
// columns and row activities.
func simplexBounded(m *Problem, dense []float64) (*Solution, error) {
	st, err := toStandard(m, dense)
	if err != nil {
		return nil, err
	}
	if st.infea {
		return &Solution{Status: Infeasible}, nil
	}
	if st.unbounded {
		// Unbounded if feasible at all: solve without the column to know.
		s, err := simplexBounded(withoutUnbounded(m), dense)
		if err != nil || s.Status != Optimal {
			return s, err
		}
		return &Solution{Status: Unbounded}, nil
	}
	var z []float64
	if st.A != nil {
		_, z, err = lp.Simplex(st.C, st.A, st.B, 1e-10, nil)
		switch {
		case errors.Is(err, lp.ErrInfeasible):
			return &Solution{Status: Infeasible}, nil
		case errors.Is(err, lp.ErrUnbounded):
			return &Solution{Status: Unbounded}, nil
		case err != nil:
			return nil, fmt.Errorf("gonum simplex: %w", err)
		}
	} else {
		for _, c := range st.C {
			if c < 0 {
				return &Solution{Status: Unbounded}, nil
			}
		}
		z = make([]float64, len(st.C))
	}
	x := make([]float64, m.Cols)
	for j := range x {
		x[j] = m.ColLo[j]
		if k := st.col[j]; k >= 0 {
			x[j] += z[k]
		}
	}
	return &Solution{Status: Optimal, Obj: m.Objective(x), X: x, RowAct: m.Activity(x, nil)}, nil
}

// basisOf reads a basis off a vertex: variables strictly inside their bounds
// are basic, as are the logicals of free rows and of rows without a free
// column (their -e_i is the only column touching them); the rest sit at a
// bound. ok reports whether exactly Rows are basic; with strict=false the
// partial basis is returned for completion.
func basisOf(m *Problem, dense, x, act []float64, strict bool) ([]VarStatus, bool) {
	basis := make([]VarStatus, m.Cols+m.Rows)
	nb := 0
	inside := func(v, lo, up float64) bool {
		return (math.IsInf(lo, -1) || v > lo+1e-9*(1+math.Abs(lo))) &&
			(math.IsInf(up, 1) || v < up-1e-9*(1+math.Abs(up)))
	}
	for j := 0; j < m.Cols; j++ {
		if m.ColLo[j] != m.ColUp[j] && inside(x[j], m.ColLo[j], m.ColUp[j]) {
			basis[j] = Basic
			nb++
			continue
		}
		basis[j] = nonbasicStatus(x[j], m.ColLo[j], m.ColUp[j])
	}
	for i := 0; i < m.Rows; i++ {
		k := m.Cols + i
		forced := math.IsInf(m.RowLo[i], -1) && math.IsInf(m.RowUp[i], 1)
		if !forced {
			forced = true
			for j, v := range dense[i*m.Cols : (i+1)*m.Cols] {
				if v != 0 && m.ColLo[j] != m.ColUp[j] {
					forced = false
					break
				}
			}
		}
		if forced || (m.RowLo[i] != m.RowUp[i] && inside(act[i], m.RowLo[i], m.RowUp[i])) {
			basis[k] = Basic
			nb++
			continue
		}
		basis[k] = nonbasicStatus(act[i], m.RowLo[i], m.RowUp[i])
	}
	return basis, nb == m.Rows || !strict
}

// vertexOf recomputes the vertex of m for a basis: nonbasic variables at
// their bounds, B z_B = -A_N x_N + r_N. It fails when the basis is singular
// or the vertex breaks a bound by more than 1e-7 relative.
func vertexOf(m *Problem, basis []VarStatus) (*Solution, error) {
	b, err := newBasisLU(m, basis)
	if err != nil {
		return nil, err
	}
	x := make([]float64, m.Cols)
	rhs := make([]float64, m.Rows)
	at := func(s VarStatus, lo, up float64) float64 {
		switch s {
		case AtUpper:
			return up
		case Free:
			return 0
		default:
			return lo
		}
	}
	for j := 0; j < m.Cols; j++ {
		if basis[j] != Basic {
			x[j] = at(basis[j], m.ColLo[j], m.ColUp[j])
			if x[j] != 0 {
				for k := m.Start[j]; k < m.Start[j+1]; k++ {
					rhs[m.Index[k]] -= m.Value[k] * x[j]
				}
			}
		}
	}
	for i := 0; i < m.Rows; i++ {
		if s := basis[m.Cols+i]; s != Basic {
			rhs[i] += at(s, m.RowLo[i], m.RowUp[i])
		}
	}
	zb := b.solve(rhs)
	for p, k := range b.head {
		if k < m.Cols {
			x[k] = zb[p]
		}
	}
	act := m.Activity(x, nil)
	outside := func(v, lo, up float64) bool {
		return v < lo-1e-7*(1+math.Abs(lo)) || v > up+1e-7*(1+math.Abs(up))
	}
	for j, v := range x {
		if outside(v, m.ColLo[j], m.ColUp[j]) {
			return nil, fmt.Errorf("column %d at %g outside %g..%g", j, v, m.ColLo[j], m.ColUp[j])
		}
		x[j] = min(max(v, m.ColLo[j]), m.ColUp[j])
	}
	for i, v := range act {
		if outside(v, m.RowLo[i], m.RowUp[i]) {
			return nil, fmt.Errorf("row %d at %g outside %g..%g", i, v, m.RowLo[i], m.RowUp[i])
		}
	}
	y, d := duals(m, b)
	// The perturbed problem loosened fixed rows; in m they are fixed again.
	for k, s := range basis {
		if s == Basic {
			continue
		}
		if k < m.Cols && m.ColLo[k] == m.ColUp[k] || k >= m.Cols && m.RowLo[k-m.Cols] == m.RowUp[k-m.Cols] {
			basis[k] = Fixed
		}
	}
	return &Solution{Status: Optimal, Obj: m.Objective(x), X: x, RowAct: act, Y: y, D: d, Basis: basis}, nil
}

// duals computes y from Bᵀy = c_B (logicals cost nothing) and the reduced
// costs d = c - Aᵀy of every column.
func duals(m *Problem, b *basisLU) (y, d []float64) {
	cb := make([]float64, m.Rows)
	for p, k := range b.head {
		if k < m.Cols {
			cb[p] = m.Obj[k]
		}
	}
	y = b.solveT(cb)
	d = make([]float64, m.Cols)
	for j := range d {
		d[j] = m.Obj[j]
		for k := m.Start[j]; k < m.Start[j+1]; k++ {
			d[j] -= m.Value[k] * y[m.Index[k]]
		}
	}
	return y, d
}

// completeBasis adds nonbasic variables to a partial basis, logicals first,
// while they are linearly independent of those already in (modified
// Gram-Schmidt), until it is square.
func completeBasis(m *Problem, basis []VarStatus) ([]VarStatus, error) {
	r := m.Rows
	column := func(k int) []float64 {
		c := make([]float64, r)
		if k < m.Cols {
			for q := m.Start[k]; q < m.Start[k+1]; q++ {
				c[m.Index[q]] = m.Value[q]
			}
		} else {
			c[k-m.Cols] = -1
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
		if s == Basic && !add(k) {
			return nil, fmt.Errorf("%w: basic columns are dependent", ErrBasis)
		}
	}
	order := make([]int, 0, len(basis))
	for k := m.Cols; k < len(basis); k++ {
		order = append(order, k)
	}
	for k := 0; k < m.Cols; k++ {
		order = append(order, k)
	}
	for _, k := range order {
		if len(q) == r {
			break
		}
		if basis[k] != Basic && add(k) {
			basis[k] = Basic
		}
	}
	if len(q) != r {
		return nil, fmt.Errorf("%w: %d independent columns for %d rows", ErrBasis, len(q), r)
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

// withoutUnbounded is m with the columns that would grow without limit
// held at their lower bounds.
func withoutUnbounded(m *Problem) *Problem {
	q := m.Clone()
	dense := toDense(m)
	for j := 0; j < m.Cols; j++ {
		if m.ColLo[j] != m.ColUp[j] && math.IsInf(m.ColUp[j], 1) && !inBoundedRow(m, dense, j) && m.Obj[j] < 0 {
			q.ColUp[j] = q.ColLo[j]
		}
	}
	return q
}
