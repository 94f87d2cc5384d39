package optimise

import "math"

// model is a bounded linear (or mixed integer) programme in the form of
// the engine layer (lipoplan/optimise/lp):
//
//	minimise   obj·x
//	subject to rowLo <= A x <= rowUp,  colLo <= x <= colUp,
//	           x[j] integer for j in integer.
//
// A is held dense and row-major in a (nRows x nCols): blend models are small
// and nearly dense (every stock has an IV, an SFC, a SAFA ...); the engine
// layer gets it in compressed sparse column form (lp.Problem.Dense). An
// absent bound is ±Inf.
type model struct {
	nCols, nRows int
	colName      []string
	rowName      []string
	obj          []float64
	colLo, colUp []float64
	rowLo, rowUp []float64
	a            []float64 // row-major, len nRows*nCols
	integer      []int     // binary columns (integer rules)
}

func newModel(nCols int) *model {
	m := &model{nCols: nCols}
	m.colName = make([]string, nCols)
	m.obj = make([]float64, nCols)
	m.colLo = make([]float64, nCols)
	m.colUp = make([]float64, nCols)
	for j := range m.colUp {
		m.colUp[j] = math.Inf(1)
	}
	return m
}

// addRow appends a row with coefficients coef (len nCols, copied) and bounds.
func (m *model) addRow(name string, coef []float64, lo, up float64) int {
	m.rowName = append(m.rowName, name)
	m.rowLo = append(m.rowLo, lo)
	m.rowUp = append(m.rowUp, up)
	m.a = append(m.a, coef...)
	m.nRows++
	return m.nRows - 1
}

// addCol appends a column (zero in every existing row) and returns its index.
// The dense matrix is re-laid out, so callers add columns before rows where
// they can.
func (m *model) addCol(name string, obj, lo, up float64) int {
	old := m.a
	n := m.nCols
	m.a = make([]float64, m.nRows*(n+1))
	for i := 0; i < m.nRows; i++ {
		copy(m.a[i*(n+1):i*(n+1)+n], old[i*n:(i+1)*n])
	}
	m.nCols++
	m.colName = append(m.colName, name)
	m.obj = append(m.obj, obj)
	m.colLo = append(m.colLo, lo)
	m.colUp = append(m.colUp, up)
	return n
}

func (m *model) at(i, j int) float64 { return m.a[i*m.nCols+j] }

func (m *model) set(i, j int, v float64) { m.a[i*m.nCols+j] = v }

// row returns row i's coefficients (a view, not a copy).
func (m *model) row(i int) []float64 { return m.a[i*m.nCols : (i+1)*m.nCols] }

// clone returns a deep copy.
func (m *model) clone() *model {
	out := *m
	out.colName = append([]string(nil), m.colName...)
	out.rowName = append([]string(nil), m.rowName...)
	out.obj = append([]float64(nil), m.obj...)
	out.colLo = append([]float64(nil), m.colLo...)
	out.colUp = append([]float64(nil), m.colUp...)
	out.rowLo = append([]float64(nil), m.rowLo...)
	out.rowUp = append([]float64(nil), m.rowUp...)
	out.a = append([]float64(nil), m.a...)
	out.integer = append([]int(nil), m.integer...)
	return &out
}

// activity computes A x into dst.
func (m *model) activity(x, dst []float64) []float64 {
	dst = grow(dst, m.nRows)
	for i := 0; i < m.nRows; i++ {
		var s float64
		for j, v := range m.row(i) {
			s += v * x[j]
		}
		dst[i] = s
	}
	return dst
}

// objective computes obj·x.
func (m *model) objective(x []float64) float64 {
	var s float64
	for j, c := range m.obj {
		s += c * x[j]
	}
	return s
}

func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	s = s[:n]
	clear(s)
	return s
}
