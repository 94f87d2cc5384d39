// Package lp is lipoplan's engine layer: bounded linear programmes, the
// engines that solve them, and branch and bound for integer columns. It knows
// nothing of fats or blends; package optimise builds the models and reads
// the answers.
//
// A Problem is
//
//	minimise   Obj·x
//	subject to RowLo <= A x <= RowUp,   ColLo <= x <= ColUp
//
// with A in compressed sparse column form and ±Inf for an absent bound.
// Internally every engine works on the computational form of Koberstein
// (2005, The dual simplex method, techniques for a fast and stable
// implementation, PhD thesis, Paderborn, ch. 2): one logical variable r_i
// per row, r = A x, bounded by the row's range, so that the constraints
// are [A -I]·(x, r) = 0 with bounds on every variable.
//
// Engines (all behind the Engine interface):
//
//   - New: lipoplan's own bounded-variable dual and primal simplex (see
//     simplex.go), pure Go, the default everywhere;
//   - NewGonum: gonum's lp.Simplex on the standard form, a test reference;
//   - NewCoin (build tag coin, cgo): COIN-OR CLP and CBC through
//     lipoplan/optimise/coin.
//
// Sign conventions are those of CLP: Y[i] is d(objective)/d(bound) of the
// bound row i sits at, D[j] = Obj[j] - Σ_i Y[i]·A[i][j], and a row's
// logical r_i has reduced cost Y[i].
package lp

import (
	"errors"
	"fmt"
	"math"
)

// Problem is a bounded linear programme. Column j's nonzeros are
// Index[Start[j]:Start[j+1]] (row numbers, each row at most once per
// column) with values Value[Start[j]:Start[j+1]].
type Problem struct {
	Rows, Cols   int
	Start        []int // len Cols+1
	Index        []int
	Value        []float64
	Obj          []float64 // len Cols, minimised
	ColLo, ColUp []float64 // len Cols
	RowLo, RowUp []float64 // len Rows
}

// VarStatus is the basis status of a column or a row's logical.
type VarStatus int8

// Basis statuses. A nonbasic variable sits at a bound (Fixed when both
// bounds are equal) or, when it has none, at zero (Free).
const (
	Basic VarStatus = iota
	AtLower
	AtUpper
	Fixed
	Free
)

func (s VarStatus) String() string {
	switch s {
	case Basic:
		return "basic"
	case AtLower:
		return "at lower"
	case AtUpper:
		return "at upper"
	case Fixed:
		return "fixed"
	case Free:
		return "free"
	}
	return fmt.Sprintf("VarStatus(%d)", int(s))
}

// Status is an engine's verdict on a problem.
type Status int

// Outcomes of a solve.
const (
	Optimal    Status = iota // proven optimal
	Infeasible               // proven infeasible (Solution.Farkas proves it for an LP)
	Unbounded                // objective unbounded below (Solution.Ray for an LP)
	NotProven                // MIP: a limit stopped branch and bound; the incumbent is not proven optimal
	NoSolution               // MIP: a limit stopped branch and bound before any integer point was found
)

func (s Status) String() string {
	switch s {
	case Optimal:
		return "optimal"
	case Infeasible:
		return "infeasible"
	case Unbounded:
		return "unbounded"
	case NotProven:
		return "not proven optimal"
	case NoSolution:
		return "no solution found"
	}
	return fmt.Sprintf("Status(%d)", int(s))
}

// Solution is an engine's answer to one LP.
type Solution struct {
	Status Status
	Obj    float64
	X      []float64 // column values
	RowAct []float64 // row activities A x
	Y      []float64 // row duals
	D      []float64 // column reduced costs
	// Basis holds the status of every column, then of every row's logical,
	// of the optimal basis; nil when the engine has none.
	Basis []VarStatus
	// Farkas, when Status is Infeasible and the engine proves it: row
	// multipliers u such that the largest value of (Aᵀu)·x over the column
	// bounds is below the smallest value of u·r over the row bounds, so no
	// x has A x within the row bounds (Farkas' lemma for bounded rows).
	Farkas []float64
	// Ray, when Status is Unbounded and the engine proves it: a direction
	// of the columns with Obj·Ray < 0 along which every bound and row
	// range stays met from any feasible point.
	Ray        []float64
	Iterations int
}

// Engine solves linear programmes. An Engine is for one goroutine at a
// time. Load copies the problem in; the Set methods edit the loaded
// problem; Solve solves it. An engine that warm-starts (New) begins each
// Solve from the basis the previous one ended with when the problem kept
// its shape, so a model solved again after small edits needs few pivots.
type Engine interface {
	// Name names the engine in reports ("lipoplan-simplex", "clp", "gonum").
	Name() string
	// Load replaces the problem. p is copied.
	Load(p *Problem) error
	// SetObj, SetColBounds and SetRowBounds edit the loaded problem.
	SetObj(j int, c float64)
	SetColBounds(j int, lo, up float64)
	SetRowBounds(i int, lo, up float64)
	// SetBasis makes the next Solve start from basis b (Cols then Rows
	// statuses, Rows of them Basic); nil starts from the slack basis.
	// Engines without warm starts ignore it.
	SetBasis(b []VarStatus) error
	// Solve solves the loaded problem.
	Solve() (*Solution, error)
	// Close frees what the engine holds; it is not used after.
	Close()
}

// ErrBadProblem is wrapped by every error about a malformed Problem.
var ErrBadProblem = errors.New("malformed problem")

// Check reports the first inconsistency of p: array lengths, row indices,
// NaN or infinite data, a lower bound of +Inf or an upper bound of -Inf.
// A lower bound above its upper bound is not an error: the problem is
// infeasible.
func (p *Problem) Check() error {
	var seen []int
	return p.check(&seen)
}

// check is Check with a reusable buffer.
func (p *Problem) check(buf *[]int) error {
	bad := func(format string, args ...any) error {
		return fmt.Errorf("%w: %s", ErrBadProblem, fmt.Sprintf(format, args...))
	}
	if p.Rows < 0 || p.Cols < 0 {
		return bad("%d rows, %d columns", p.Rows, p.Cols)
	}
	if len(p.Start) != p.Cols+1 || len(p.Obj) != p.Cols || len(p.ColLo) != p.Cols || len(p.ColUp) != p.Cols {
		return bad("column arrays do not match %d columns", p.Cols)
	}
	if len(p.RowLo) != p.Rows || len(p.RowUp) != p.Rows {
		return bad("row bounds do not match %d rows", p.Rows)
	}
	nz := p.Start[p.Cols]
	if p.Start[0] != 0 || nz != len(p.Index) || nz != len(p.Value) {
		return bad("%d indices and %d values for %d nonzeros", len(p.Index), len(p.Value), nz)
	}
	seen := resize(*buf, p.Rows)
	*buf = seen
	for i := range seen {
		seen[i] = -1
	}
	start, index, value := p.Start, p.Index, p.Value
	for j := 0; j < p.Cols; j++ {
		if start[j] > start[j+1] {
			return bad("column starts decrease at column %d", j)
		}
		if start[j+1] > nz {
			return bad("column %d ends at %d after the %d nonzeros", j, start[j+1], nz)
		}
		idx, val := index[start[j]:start[j+1]], value[start[j]:start[j+1]]
		for k, i := range idx {
			if uint(i) >= uint(len(seen)) {
				return bad("column %d has row %d outside 0..%d", j, i, p.Rows-1)
			}
			if seen[i] == j {
				return bad("column %d lists row %d twice", j, i)
			}
			seen[i] = j
			if v := val[k]; math.IsNaN(v) || math.IsInf(v, 0) {
				return bad("coefficient (%d, %d) is %v", i, j, v)
			}
		}
		if c := p.Obj[j]; math.IsNaN(c) || math.IsInf(c, 0) {
			return bad("objective of column %d is %v", j, c)
		}
		if err := checkBounds(p.ColLo[j], p.ColUp[j]); err != nil {
			return bad("column %d: %v", j, err)
		}
	}
	for i := 0; i < p.Rows; i++ {
		if err := checkBounds(p.RowLo[i], p.RowUp[i]); err != nil {
			return bad("row %d: %v", i, err)
		}
	}
	return nil
}

func checkBounds(lo, up float64) error {
	if math.IsNaN(lo) || math.IsNaN(up) || math.IsInf(lo, 1) || math.IsInf(up, -1) {
		return fmt.Errorf("bounds %v..%v", lo, up)
	}
	return nil
}

// Clone returns a deep copy of p.
func (p *Problem) Clone() *Problem {
	q := &Problem{Rows: p.Rows, Cols: p.Cols}
	q.Start = append([]int(nil), p.Start...)
	q.Index = append([]int(nil), p.Index...)
	q.Value = append([]float64(nil), p.Value...)
	q.Obj = append([]float64(nil), p.Obj...)
	q.ColLo = append([]float64(nil), p.ColLo...)
	q.ColUp = append([]float64(nil), p.ColUp...)
	q.RowLo = append([]float64(nil), p.RowLo...)
	q.RowUp = append([]float64(nil), p.RowUp...)
	return q
}

// copyInto makes dst a deep copy of p, reusing dst's arrays (or laying out
// new ones in one block of floats and one of indices).
func (p *Problem) copyInto(dst *Problem) {
	if cap(dst.Value) < len(p.Value) || cap(dst.Obj) < p.Cols || cap(dst.RowLo) < p.Rows || cap(dst.Start) < p.Cols+1 {
		nz, n, m := len(p.Value), p.Cols, p.Rows
		f := make([]float64, nz+4*n+2*m)
		dst.Value, dst.Obj, dst.ColLo, dst.ColUp = f[:0:nz], f[nz:nz:nz+n], f[nz+n:nz+n:nz+2*n], f[nz+2*n:nz+2*n:nz+3*n]
		dst.RowLo, dst.RowUp = f[nz+3*n:nz+3*n:nz+3*n+m], f[nz+3*n+m:nz+3*n+m:nz+3*n+2*m]
		ix := make([]int, nz+n+1)
		dst.Index, dst.Start = ix[:0:nz], ix[nz:nz]
	}
	dst.Rows, dst.Cols = p.Rows, p.Cols
	dst.Start = append(dst.Start[:0], p.Start...)
	dst.Index = append(dst.Index[:0], p.Index...)
	dst.Value = append(dst.Value[:0], p.Value...)
	dst.Obj = append(dst.Obj[:0], p.Obj...)
	dst.ColLo = append(dst.ColLo[:0], p.ColLo...)
	dst.ColUp = append(dst.ColUp[:0], p.ColUp...)
	dst.RowLo = append(dst.RowLo[:0], p.RowLo...)
	dst.RowUp = append(dst.RowUp[:0], p.RowUp...)
}

// sameMatrix reports whether p and q have the same shape and coefficients.
func (p *Problem) sameMatrix(q *Problem) bool {
	if p.Rows != q.Rows || p.Cols != q.Cols || len(p.Index) != len(q.Index) {
		return false
	}
	for j, s := range p.Start {
		if q.Start[j] != s {
			return false
		}
	}
	for k, i := range p.Index {
		if q.Index[k] != i || q.Value[k] != p.Value[k] {
			return false
		}
	}
	return true
}

// Dense sets p's matrix from a dense row-major rows x cols array, dropping
// exact zeros. It reuses p's matrix arrays and sets Rows and Cols.
func (p *Problem) Dense(rows, cols int, a []float64) {
	p.Rows, p.Cols = rows, cols
	nz := 0
	for _, v := range a[:rows*cols] {
		if v != 0 {
			nz++
		}
	}
	p.Start = resize(p.Start, cols+1)
	p.Index = resize(p.Index, nz)
	p.Value = resize(p.Value, nz)
	k := 0
	for j := 0; j < cols; j++ {
		p.Start[j] = k
		for i, off := 0, j; i < rows; i, off = i+1, off+cols {
			if v := a[off]; v != 0 {
				p.Index[k], p.Value[k] = i, v
				k++
			}
		}
	}
	p.Start[cols] = k
}

// byRows lays out a matrix of rows rows, given by columns (column j's row
// numbers index[start[j]:start[j+1]] with values value[...]), by rows: row
// i's column numbers, in increasing order, are rIdx[rStart[i]:rStart[i+1]]
// with values rVal[...]. rStart, rIdx and rVal are reused when large
// enough.
func byRows(rows int, start, index []int, value []float64, rStart, rIdx []int, rVal []float64) ([]int, []int, []float64) {
	nz := start[len(start)-1]
	rStart = resize(rStart, rows+1)
	clear(rStart)
	for _, i := range index[:nz] {
		rStart[i+1]++
	}
	for i := 0; i < rows; i++ {
		rStart[i+1] += rStart[i]
	}
	rIdx, rVal = resize(rIdx, nz), resize(rVal, nz)
	// rStart[i] is row i's next free place while the entries are filled
	// in, and is moved back to row i's start after.
	for j := 0; j+1 < len(start); j++ {
		idx, val := index[start[j]:start[j+1]], value[start[j]:start[j+1]]
		val = val[:len(idx)]
		for k, i := range idx {
			q := rStart[i]
			rIdx[q], rVal[q] = j, val[k]
			rStart[i] = q + 1
		}
	}
	copy(rStart[1:], rStart[:rows])
	rStart[0] = 0
	return rStart, rIdx, rVal
}

// Activity computes A x into dst (grown as needed) and returns it.
func (p *Problem) Activity(x, dst []float64) []float64 {
	dst = resize(dst, p.Rows)
	clear(dst)
	for j := 0; j < p.Cols; j++ {
		if xj := x[j]; xj != 0 {
			for k := p.Start[j]; k < p.Start[j+1]; k++ {
				dst[p.Index[k]] += p.Value[k] * xj
			}
		}
	}
	return dst
}

// Objective is Obj·x.
func (p *Problem) Objective(x []float64) float64 {
	var s float64
	for j, c := range p.Obj {
		s += c * x[j]
	}
	return s
}

// resize returns s with length n, reusing its array when large enough. The
// contents are not cleared.
func resize[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	return s[:n]
}

// grow is resize for arrays whose length creeps up from one use to the
// next (the basis matrix and the LU factors, which fill in as the simplex
// brings columns into the basis): a new array has half as much again as
// n, so that a run of slightly larger sizes reallocates a few times
// instead of at every call.
func grow[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n, n+n/2)
	}
	return s[:n]
}

// nonbasicStatus is the status of a nonbasic variable with bounds lo..up
// placed at value v (at the nearer bound).
func nonbasicStatus(v, lo, up float64) VarStatus {
	switch {
	case lo == up:
		return Fixed
	case math.IsInf(lo, -1) && math.IsInf(up, 1):
		return Free
	case math.IsInf(up, 1):
		return AtLower
	case math.IsInf(lo, -1):
		return AtUpper
	case math.Abs(v-lo) <= math.Abs(v-up):
		return AtLower
	}
	return AtUpper
}

// stored is the loaded problem of an engine without warm starts (the gonum
// and COIN-OR adapters): Load copies the problem in, the Set methods edit
// the copy.
type stored struct {
	p Problem
}

// Load copies p in.
func (e *stored) Load(p *Problem) error {
	if err := p.Check(); err != nil {
		return err
	}
	p.copyInto(&e.p)
	return nil
}

// SetObj sets column j's cost.
func (e *stored) SetObj(j int, c float64) { e.p.Obj[j] = c }

// SetColBounds sets column j's bounds.
func (e *stored) SetColBounds(j int, lo, up float64) { e.p.ColLo[j], e.p.ColUp[j] = lo, up }

// SetRowBounds sets row i's range.
func (e *stored) SetRowBounds(i int, lo, up float64) { e.p.RowLo[i], e.p.RowUp[i] = lo, up }
