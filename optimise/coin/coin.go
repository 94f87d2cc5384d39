//go:build coin

// Package coin is a thin cgo binding over the C interfaces of COIN-OR CLP
// (Clp_C_Interface.h, linear programmes) and CBC (Cbc_C_Interface.h, mixed
// integer programmes), as shipped by Debian's coinor-libclp-dev and
// coinor-libcbc-dev.
//
// LP models may be solved from several goroutines at once (one model per
// goroutine); CBC solves are serialised inside the binding because CBC's
// driver is not reentrant.
//
// Every model owns C memory and is freed deterministically by Close; there
// are no finalizers. Models are created with log level 0 so solver messages
// never reach stdout. A model is not safe for concurrent use; separate models
// may be used from separate goroutines.
//
// Matrices are passed in compressed sparse column form (start, index, value),
// exactly as Clp_loadProblem and Cbc_loadProblem take them; bounds of ±Inf
// mean "no bound" and are passed to COIN-OR as ±COIN_DBL_MAX.
package coin

/*
#cgo pkg-config: clp cbc
#include <float.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <Clp_C_Interface.h>
#include <Cbc_C_Interface.h>

// The binding passes []int32 as CoinBigIndex*: Debian builds CoinUtils with a
// 32-bit CoinBigIndex. Any other build fails here at compile time.
typedef char coin_bigindex_is_32_bits[(sizeof(CoinBigIndex) == 4) ? 1 : -1];
static void coin_flush_stdout(void) { fflush(stdout); }

// coin_lp_dual runs the dual simplex and returns the outcome in one call:
// 0 optimal, 1 primal infeasible, 2 dual infeasible, 3 stopped.
static int coin_lp_dual(Clp_Simplex *m) {
	Clp_dual(m, 0);
	if (Clp_isProvenOptimal(m)) return 0;
	if (Clp_isProvenPrimalInfeasible(m)) return 1;
	if (Clp_isProvenDualInfeasible(m)) return 2;
	return 3;
}

static void coin_copy(double *dst, const double *src, int n) {
	if (n <= 0) return;
	if (src) memcpy(dst, src, (size_t)n * sizeof(double));
	else memset(dst, 0, (size_t)n * sizeof(double));
}

// coin_lp_solution copies the whole answer of the last solve out in one
// call: column values, row activities, row duals, reduced costs and the
// basis status of every column then every row (low 3 bits of the status
// array). Any pointer may be NULL to skip that part.
static void coin_lp_solution(Clp_Simplex *m, int cols, int rows,
		double *x, double *act, double *y, double *d, unsigned char *st) {
	if (x) coin_copy(x, Clp_getColSolution(m), cols);
	if (act) coin_copy(act, Clp_getRowActivity(m), rows);
	if (y) coin_copy(y, Clp_getRowPrice(m), rows);
	if (d) coin_copy(d, Clp_getReducedCost(m), cols);
	if (st) {
		const unsigned char *s = Clp_statusArray(m);
		for (int k = 0; k < cols + rows; k++) st[k] = s ? (s[k] & 7) : 0;
	}
}
*/
import "C"

import (
	"errors"
	"fmt"
	"math"
	"sync"
	"unsafe"
)

// Status is the outcome of a solve.
type Status int

// Outcomes of a solve.
const (
	Optimal    Status = iota // proven optimal
	Infeasible               // proven primal infeasible
	Unbounded                // proven dual infeasible (objective unbounded)
	Stopped                  // stopped on a limit or numerical trouble
)

func (s Status) String() string {
	switch s {
	case Optimal:
		return "optimal"
	case Infeasible:
		return "infeasible"
	case Unbounded:
		return "unbounded"
	default:
		return "stopped"
	}
}

// Basis status of a column or row, as Clp_getColumnStatus reports it.
type Basis int8

// CLP basis statuses (ClpSimplex::Status).
const (
	Free       Basis = 0
	Basic      Basis = 1
	AtUpper    Basis = 2
	AtLower    Basis = 3
	Superbasic Basis = 4
	Fixed      Basis = 5
)

// Version reports the CLP and CBC library versions.
func Version() string {
	return fmt.Sprintf("CLP %s, CBC %s", C.GoString(C.Clp_Version()), C.GoString(C.Cbc_getVersion()))
}

// FlushStdout flushes C's stdout buffer; tests use it to prove that the
// solvers print nothing.
func FlushStdout() { C.coin_flush_stdout() }

// Problem is a model in compressed sparse column form: column j has its
// nonzeros at Index[Start[j]:Start[j+1]] with values Value[...].
type Problem struct {
	Cols, Rows         int
	Start              []int32 // len Cols+1
	Index              []int32
	Value              []float64
	ColLower, ColUpper []float64 // len Cols
	Obj                []float64 // len Cols, minimised
	RowLower, RowUpper []float64 // len Rows
	Integer            []int     // columns that must take integer values (MIP only)
}

func (p *Problem) check() error {
	if p.Cols <= 0 {
		return errors.New("coin: problem has no columns")
	}
	if len(p.Start) != p.Cols+1 || len(p.ColLower) != p.Cols || len(p.ColUpper) != p.Cols || len(p.Obj) != p.Cols {
		return fmt.Errorf("coin: column arrays do not match %d columns", p.Cols)
	}
	if len(p.RowLower) != p.Rows || len(p.RowUpper) != p.Rows {
		return fmt.Errorf("coin: row bounds do not match %d rows", p.Rows)
	}
	nz := int(p.Start[p.Cols])
	if p.Start[0] != 0 || nz != len(p.Index) || nz != len(p.Value) {
		return fmt.Errorf("coin: matrix has %d indices and %d values for %d nonzeros", len(p.Index), len(p.Value), nz)
	}
	for k, i := range p.Index {
		if i < 0 || int(i) >= p.Rows {
			return fmt.Errorf("coin: nonzero %d has row %d outside 0..%d", k, i, p.Rows-1)
		}
	}
	for j := 0; j < p.Cols; j++ {
		if p.Start[j] > p.Start[j+1] {
			return fmt.Errorf("coin: column starts decrease at column %d", j)
		}
	}
	for _, j := range p.Integer {
		if j < 0 || j >= p.Cols {
			return fmt.Errorf("coin: integer column %d outside 0..%d", j, p.Cols-1)
		}
	}
	return nil
}

// finite appends src to dst with ±Inf mapped to ±COIN_DBL_MAX, COIN-OR's
// infinity.
func finite(dst, src []float64) []float64 {
	for _, v := range src {
		switch {
		case math.IsInf(v, 1):
			v = math.MaxFloat64
		case math.IsInf(v, -1):
			v = -math.MaxFloat64
		}
		dst = append(dst, v)
	}
	return dst
}

// loadArgs holds the C views of a problem for one load call; the Go slices
// behind them stay alive until the call returns.
type loadArgs struct {
	start, index        unsafe.Pointer
	value               *C.double
	cl, cu, obj, rl, ru *C.double
}

func ptr(s []float64) *C.double {
	if len(s) == 0 {
		return nil
	}
	return (*C.double)(unsafe.Pointer(&s[0]))
}

// args returns the C views of p. The bounds, with ±Inf mapped to
// ±COIN_DBL_MAX, are written into scratch (grown as needed and returned, so
// a model that is loaded again and again reuses one buffer).
func (p *Problem) args(scratch []float64) (loadArgs, []float64) {
	var a loadArgs
	a.start = unsafe.Pointer(&p.Start[0])
	if len(p.Index) > 0 {
		a.index = unsafe.Pointer(&p.Index[0])
	}
	a.value = ptr(p.Value)
	n := 2*p.Cols + 2*p.Rows
	if cap(scratch) < n {
		scratch = make([]float64, 0, n)
	}
	b := finite(scratch[:0], p.ColLower)
	b = finite(b, p.ColUpper)
	b = finite(b, p.RowLower)
	b = finite(b, p.RowUpper)
	c, r := p.Cols, p.Rows
	a.cl, a.cu = ptr(b[:c]), ptr(b[c:2*c])
	a.rl, a.ru = ptr(b[2*c:2*c+r]), ptr(b[2*c+r:])
	a.obj = ptr(p.Obj)
	return a, b
}

// LP is one CLP model. One model may be loaded and solved any number of
// times: each Load replaces the problem and starts the next solve afresh from
// the slack basis, so a caller solving many small LPs saves the cost of
// Clp_newModel (CLP builds its message tables there, a sizeable part of a
// small solve) by keeping one LP.
type LP struct {
	m       unsafe.Pointer // Clp_Simplex*
	cols    int
	rows    int
	scratch []float64 // bounds with COIN-OR's infinity, reused by Load
}

// NewLP makes an empty CLP model with logging off. Call Close when done.
func NewLP() *LP {
	m := C.Clp_newModel()
	C.Clp_setLogLevel(m, 0)
	return &LP{m: m}
}

// Close frees the C model. It is safe to call more than once.
func (lp *LP) Close() {
	if lp.m != nil {
		C.Clp_deleteModel(lp.m)
		lp.m = nil
	}
}

// Load copies the problem into the model (Clp_loadProblem), replacing any
// problem loaded before together with its basis and solution.
func (lp *LP) Load(p *Problem) error {
	if lp.m == nil {
		return errors.New("coin: LP used after Close")
	}
	if err := p.check(); err != nil {
		return err
	}
	var a loadArgs
	a, lp.scratch = p.args(lp.scratch)
	C.Clp_loadProblem(lp.m, C.int(p.Cols), C.int(p.Rows),
		(*C.CoinBigIndex)(a.start), (*C.int)(a.index), a.value,
		a.cl, a.cu, a.obj, a.rl, a.ru)
	lp.cols, lp.rows = p.Cols, p.Rows
	return nil
}

// SetScaling switches CLP's matrix scaling on (the default, geometric and
// equilibrium scaling) or off (Clp_scaling mode 0). Well-scaled small models
// solve faster without it.
func (lp *LP) SetScaling(on bool) {
	mode := 3 // ClpModel::scaling: 3 = auto
	if !on {
		mode = 0
	}
	C.Clp_scaling(lp.m, C.int(mode))
}

// Solve runs CLP's dual simplex from the slack basis (Clp_dual without a
// values pass); for the small dense blend models this is faster than
// Clp_initialSolve's presolve and chooses the same optimum.
func (lp *LP) Solve() Status {
	return Status(C.coin_lp_dual(lp.m))
}

// SolveInitial runs Clp_initialSolve: presolve, CLP's choice of method,
// postsolve; slower on small models, steadier on awkward ones.
func (lp *LP) SolveInitial() Status {
	C.Clp_initialSolve(lp.m)
	return lp.status()
}

func (lp *LP) status() Status {
	switch {
	case C.Clp_isProvenOptimal(lp.m) != 0:
		return Optimal
	case C.Clp_isProvenPrimalInfeasible(lp.m) != 0:
		return Infeasible
	case C.Clp_isProvenDualInfeasible(lp.m) != 0:
		return Unbounded
	default:
		return Stopped
	}
}

// Objective is the objective value of the last solve.
func (lp *LP) Objective() float64 { return float64(C.Clp_getObjValue(lp.m)) }

// Iterations is the simplex iteration count of the last solve.
func (lp *LP) Iterations() int { return int(C.Clp_getIterationCount(lp.m)) }

func copyOut(dst []float64, src *C.double, n int) []float64 {
	if cap(dst) < n {
		dst = make([]float64, n)
	}
	dst = dst[:n]
	if n == 0 || src == nil {
		clear(dst)
		return dst
	}
	copy(dst, unsafe.Slice((*float64)(unsafe.Pointer(src)), n))
	return dst
}

// ColSolution copies the column values into dst (grown as needed).
func (lp *LP) ColSolution(dst []float64) []float64 {
	return copyOut(dst, C.Clp_getColSolution(lp.m), lp.cols)
}

// RowActivity copies the row activities A x into dst.
func (lp *LP) RowActivity(dst []float64) []float64 {
	return copyOut(dst, C.Clp_getRowActivity(lp.m), lp.rows)
}

// RowPrice copies the row duals into dst: d(objective)/d(row bound) of the
// bound a row sits at, so that reduced cost = obj - Aᵀ·price.
func (lp *LP) RowPrice(dst []float64) []float64 {
	return copyOut(dst, C.Clp_getRowPrice(lp.m), lp.rows)
}

// ReducedCost copies the column reduced costs into dst.
func (lp *LP) ReducedCost(dst []float64) []float64 {
	return copyOut(dst, C.Clp_getReducedCost(lp.m), lp.cols)
}

// Solution copies the whole answer of the last solve in one call: column
// values x and reduced costs d (len Cols), row activities act and duals y
// (len Rows) and the basis status of every column then every row logical
// into st (len Cols+Rows). Each slice must have its length or be nil to
// skip it.
func (lp *LP) Solution(x, act, y, d []float64, st []Basis) error {
	if lp.m == nil {
		return errors.New("coin: LP used after Close")
	}
	c, r := lp.cols, lp.rows
	for _, s := range []struct {
		name string
		got  int
		want int
	}{{"x", len(x), c}, {"act", len(act), r}, {"y", len(y), r}, {"d", len(d), c}, {"st", len(st), c + r}} {
		if s.got != 0 && s.got != s.want {
			return fmt.Errorf("coin: solution slice %s has length %d, want %d", s.name, s.got, s.want)
		}
	}
	var stp *C.uchar
	if len(st) > 0 {
		stp = (*C.uchar)(unsafe.Pointer(&st[0]))
	}
	C.coin_lp_solution(lp.m, C.int(c), C.int(r), ptr(x), ptr(act), ptr(y), ptr(d), stp)
	return nil
}

// Statuses copies the basis status of every column, then every row logical,
// into dst (Clp_statusArray, one call for the whole basis).
func (lp *LP) Statuses(dst []Basis) []Basis {
	n := lp.cols + lp.rows
	if cap(dst) < n {
		dst = make([]Basis, n)
	}
	dst = dst[:n]
	arr := C.Clp_statusArray(lp.m)
	if arr == nil {
		clear(dst)
		return dst
	}
	for k, v := range unsafe.Slice((*byte)(unsafe.Pointer(arr)), n) {
		dst[k] = Basis(v & 7)
	}
	return dst
}

// ColStatus is the basis status of column j after a solve.
func (lp *LP) ColStatus(j int) Basis { return Basis(C.Clp_getColumnStatus(lp.m, C.int(j))) }

// RowStatus is the basis status of row i's logical after a solve.
func (lp *LP) RowStatus(i int) Basis { return Basis(C.Clp_getRowStatus(lp.m, C.int(i))) }

// MIP is one CBC model.
type MIP struct {
	m    unsafe.Pointer // Cbc_Model*
	cols int
	rows int
}

// NewMIP makes an empty CBC model with logging off. Call Close when done.
func NewMIP() *MIP {
	m := C.Cbc_newModel()
	C.Cbc_setLogLevel(m, 0)
	return &MIP{m: m}
}

// Close frees the C model. It is safe to call more than once.
func (mp *MIP) Close() {
	if mp.m != nil {
		C.Cbc_deleteModel(mp.m)
		mp.m = nil
	}
}

// Load copies the problem into the model (Cbc_loadProblem) and marks the
// integer columns (Cbc_setInteger).
func (mp *MIP) Load(p *Problem) error {
	if mp.m == nil {
		return errors.New("coin: MIP used after Close")
	}
	if err := p.check(); err != nil {
		return err
	}
	a, _ := p.args(nil)
	C.Cbc_loadProblem(mp.m, C.int(p.Cols), C.int(p.Rows),
		(*C.CoinBigIndex)(a.start), (*C.int)(a.index), a.value,
		a.cl, a.cu, a.obj, a.rl, a.ru)
	for _, j := range p.Integer {
		C.Cbc_setInteger(mp.m, C.int(j))
	}
	mp.cols, mp.rows = p.Cols, p.Rows
	return nil
}

// SetParameter sets a CBC command-line parameter (Cbc_setParameter), e.g.
// ("heuristicsOnOff", "off").
func (mp *MIP) SetParameter(name, value string) {
	n, v := C.CString(name), C.CString(value)
	defer C.free(unsafe.Pointer(n))
	defer C.free(unsafe.Pointer(v))
	C.Cbc_setParameter(mp.m, n, v)
}

// SetMaxSeconds bounds the branch-and-bound time.
func (mp *MIP) SetMaxSeconds(s float64) { C.Cbc_setMaximumSeconds(mp.m, C.double(s)) }

// SetMaxNodes bounds the branch-and-bound nodes (Cbc_setMaximumNodes).
func (mp *MIP) SetMaxNodes(n int) { C.Cbc_setMaximumNodes(mp.m, C.int(n)) }

// LimitReached names the limit that stopped the last solve: "nodes",
// "time", or "" for none.
func (mp *MIP) LimitReached() string {
	switch {
	case C.Cbc_isNodeLimitReached(mp.m) != 0:
		return "nodes"
	case C.Cbc_isSecondsLimitReached(mp.m) != 0:
		return "time"
	}
	return ""
}

// BestSolution copies the best integer solution found into dst (grown as
// needed), or returns nil when none was found (Cbc_bestSolution).
func (mp *MIP) BestSolution(dst []float64) []float64 {
	p := C.Cbc_bestSolution(mp.m)
	if p == nil {
		return nil
	}
	return copyOut(dst, p, mp.cols)
}

// BestBound is the best proven lower bound on the optimum
// (Cbc_getBestPossibleObjValue).
func (mp *MIP) BestBound() float64 { return float64(C.Cbc_getBestPossibleObjValue(mp.m)) }

// Nodes is the number of branch-and-bound nodes of the last solve.
func (mp *MIP) Nodes() int { return int(C.Cbc_getNodeCount(mp.m)) }

// cbcMu serialises Cbc_solve. CBC's solver driver (CbcMain1, which
// Cbc_solve calls) keeps process-wide static state, so two branch-and-bound
// runs at once corrupt each other (seen in optimise's TestConcurrentSolves:
// stray output and runs stopped early). It guards the C library, not data of
// ours; CLP models need no such lock.
var cbcMu sync.Mutex

// Solve runs CBC's branch and bound (Cbc_solve). Calls from several
// goroutines are run one at a time.
func (mp *MIP) Solve() Status {
	cbcMu.Lock()
	C.Cbc_solve(mp.m)
	cbcMu.Unlock()
	switch {
	case C.Cbc_isProvenOptimal(mp.m) != 0:
		return Optimal
	case C.Cbc_isProvenInfeasible(mp.m) != 0:
		return Infeasible
	case C.Cbc_isContinuousUnbounded(mp.m) != 0:
		return Unbounded
	default:
		return Stopped
	}
}

// Objective is the objective of the best integer solution.
func (mp *MIP) Objective() float64 { return float64(C.Cbc_getObjValue(mp.m)) }

// ColSolution copies the best solution's column values into dst.
func (mp *MIP) ColSolution(dst []float64) []float64 {
	return copyOut(dst, C.Cbc_getColSolution(mp.m), mp.cols)
}
