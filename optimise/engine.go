package optimise

import (
	"fmt"
	"hash/fnv"
	"math"
	"time"

	"lipoplan/optimise/lp"
)

// The engine layer's statuses under the names this package has long used.
type (
	varState  = lp.VarStatus
	solStatus = lp.Status
)

const (
	stBasic = lp.Basic
	stLower = lp.AtLower
	stUpper = lp.AtUpper
	stFixed = lp.Fixed
	stFree  = lp.Free

	solOptimal    = lp.Optimal
	solInfeasible = lp.Infeasible
	solUnbounded  = lp.Unbounded
	solNotProven  = lp.NotProven
	solNoSolution = lp.NoSolution
)

// solution is an engine's answer to one model, in the model's terms.
//
// Signs follow the usual minimisation convention shared by CLP: y[i] is
// d(objective)/d(bound) of the bound row i sits at, and the reduced cost of
// column j is d[j] = obj[j] - Σ_i y[i]·A[i][j]. A row's logical (its activity
// r = A x as a variable with bounds rowLo..rowUp) has reduced cost y[i].
type solution struct {
	status solStatus
	obj    float64
	x      []float64 // column values
	act    []float64 // row activities A x
	y      []float64 // row duals; nil for a MILP answer
	d      []float64 // reduced costs; nil for a MILP answer
	// basis holds nCols column states then nRows row-logical states of an
	// optimal basis; nil when the engine has none (MILP).
	basis []varState
	// MILP only: the proven lower bound, nodes and the limit that stopped
	// branch and bound (NotProven, NoSolution).
	bound  float64
	nodes  int
	limit  string
	limits lp.Limits
}

// engine is optimise's way to the engine layer (lipoplan/optimise/lp): an
// LP engine per model structure, so that a model solved again after an
// edit (the same rows and columns, other bounds or costs) warm-starts
// from the basis its previous solve ended with, and a MIP solver for the
// integer rules. Which engines: engine_default.go (lipoplan's own simplex
// and branch and bound) or, with -tags coin, engine_coin.go (COIN-OR CLP
// and CBC); gonumEngine is a test reference.
type engine struct {
	lpName, mipName string
	newLP           func() lp.Engine
	mip             lp.MIPSolver // nil: integer rules are refused
	limits          lp.Limits
	// LP engines by model structure, most recently used last.
	keys []uint64
	lps  []lp.Engine
	prob lp.Problem // conversion scratch (engines copy what they load)
}

// keepEngines is how many model structures an engine keeps warm: a solve
// touches at most four (the base LP, the LP with integer choices fixed,
// the elastic programme, a process LP).
const keepEngines = 6

func (e *engine) name() string     { return e.lpName }
func (e *engine) milpName() string { return e.mipName }

// close frees every LP engine held.
func (e *engine) close() {
	for _, l := range e.lps {
		l.Close()
	}
	e.keys, e.lps = nil, nil
}

// structure identifies a model's structure: its shape and row and column
// names (FNV-1a). Models of one structure share an LP engine; a collision
// costs a cold start at worst, never a wrong answer (an engine solves
// whatever it is given).
func structure(m *model) uint64 {
	h := fnv.New64a()
	var b [8]byte
	put := func(v int) {
		for i := range b {
			b[i] = byte(v >> (8 * i))
		}
		h.Write(b[:])
	}
	put(m.nRows)
	put(m.nCols)
	for _, s := range m.colName {
		h.Write([]byte(s))
		h.Write([]byte{0})
	}
	for _, s := range m.rowName {
		h.Write([]byte(s))
		h.Write([]byte{0})
	}
	return h.Sum64()
}

// lpFor is the LP engine for m's structure, made when new.
func (e *engine) lpFor(m *model) lp.Engine {
	k := structure(m)
	for i, key := range e.keys {
		if key == k {
			l := e.lps[i]
			copy(e.keys[i:], e.keys[i+1:])
			copy(e.lps[i:], e.lps[i+1:])
			e.keys[len(e.keys)-1], e.lps[len(e.lps)-1] = k, l
			return l
		}
	}
	if len(e.lps) == keepEngines {
		e.lps[0].Close()
		e.keys, e.lps = e.keys[1:], e.lps[1:]
	}
	l := e.newLP()
	e.keys, e.lps = append(e.keys, k), append(e.lps, l)
	return l
}

// problem converts m for the engine layer, into the scratch problem.
func (e *engine) problem(m *model) *lp.Problem {
	p := &e.prob
	p.Dense(m.nRows, m.nCols, m.a)
	p.Obj, p.ColLo, p.ColUp, p.RowLo, p.RowUp = m.obj, m.colLo, m.colUp, m.rowLo, m.rowUp
	return p
}

// solveLP solves m ignoring m.integer.
func (e *engine) solveLP(m *model) (*solution, error) {
	l := e.lpFor(m)
	if err := l.Load(e.problem(m)); err != nil {
		return nil, fmt.Errorf("%s: %w", l.Name(), err)
	}
	s, err := l.Solve()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", l.Name(), err)
	}
	return &solution{status: s.Status, obj: s.Obj, x: s.X, act: s.RowAct, y: s.Y, d: s.D, basis: s.Basis}, nil
}

// solveMILP solves m honouring m.integer.
func (e *engine) solveMILP(m *model) (*solution, error) {
	if e.mip == nil {
		return nil, fmt.Errorf("the %s engine has no branch and bound", e.lpName)
	}
	s, err := e.mip.SolveMIP(e.problem(m), m.integer, e.limits)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", e.mip.Name(), err)
	}
	out := &solution{status: s.Status, obj: s.Obj, x: s.X, bound: s.Bound, nodes: s.Nodes, limit: s.Limit, limits: e.limits}
	if s.X != nil {
		out.act = m.activity(s.X, nil)
	}
	return out, nil
}

// withLimits sets the branch-and-bound limits of later MILP solves and
// where they report their progress (nil: nowhere).
func (e *engine) withLimits(nodes int, t time.Duration, progress func(done, total int)) {
	e.limits = lp.Limits{MaxNodes: nodes, MaxTime: t, Progress: progress}
}

// stage maps the progress of part k (from 0) of n equal parts of some work
// onto the whole; nil stays nil.
func stage(p func(done, total int), k, n int) func(done, total int) {
	if p == nil {
		return nil
	}
	return func(done, total int) { p(k*total+done, n*total) }
}

// rangingOf prepares cost ranging on an optimal LP solution of m.
func rangingOf(m *model, s *solution) (*lp.Ranging, error) {
	p := &lp.Problem{Obj: m.obj, ColLo: m.colLo, ColUp: m.colUp, RowLo: m.rowLo, RowUp: m.rowUp}
	p.Dense(m.nRows, m.nCols, m.a)
	return lp.NewRanging(p, &lp.Solution{Status: s.status, X: s.x, RowAct: s.act, Y: s.y, D: s.d, Basis: s.basis})
}

// simplexEngine is lipoplan's own simplex and branch and bound.
func simplexEngine() *engine {
	return &engine{lpName: "lipoplan-simplex", mipName: "lipoplan-bb",
		newLP: func() lp.Engine { return lp.New() }, mip: lp.NewBranchAndBound()}
}

// gonumEngine is gonum's simplex, a test reference (no integer rules).
func gonumEngine() *engine {
	return &engine{lpName: "gonum", mipName: "gonum", newLP: func() lp.Engine { return lp.NewGonum() }}
}

// notProvenNote is the plain-words account of a branch and bound stopped
// by its limit.
func notProvenNote(s *solution, found bool) string {
	l := s.limits
	if l.MaxNodes <= 0 {
		l.MaxNodes = 100000
	}
	if l.MaxTime <= 0 {
		l.MaxTime = 60 * time.Second
	}
	lim := fmt.Sprintf("its limit of %d LPs", l.MaxNodes)
	if s.limit == "time" {
		lim = fmt.Sprintf("its time limit of %v (%d LPs)", l.MaxTime, s.nodes)
	}
	if !found {
		return fmt.Sprintf("branch and bound for the [rules] stopped at %s without finding a blend that meets them; the spec is not proven impossible", lim)
	}
	gap := ""
	if !math.IsInf(s.bound, 0) && s.obj != 0 {
		gap = fmt.Sprintf("; no blend can cost less than %.6g per tonne (gap %.2g %%)", s.bound, 100*max(0, s.obj-s.bound)/math.Abs(s.obj))
	}
	return fmt.Sprintf("NOT PROVEN OPTIMAL: branch and bound for the [rules] stopped at %s; this is the cheapest blend it found%s", lim, gap)
}
