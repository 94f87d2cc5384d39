//go:build cgo && !purego

package optimise

import (
	"errors"
	"fmt"

	"lipoplan/optimise/coin"
)

// defaultEngine is COIN-OR CLP for LPs and CBC for MILPs, with a C model
// created, used and closed inside every call.
func defaultEngine() engine { return &coinEngine{} }

// reusableEngine is COIN-OR CLP/CBC keeping one CLP model, and the buffers
// that feed it, from one LP solve to the next until close.
func reusableEngine() engine { return &coinEngine{keep: true} }

// coinEngine solves through the optimise/coin binding. With keep set the CLP
// model is made on the first LP and reloaded for every later one (each load
// starts from the slack basis, so answers do not depend on what was solved
// before); otherwise every C model lives inside one call. MILP models are
// always made per call (CBC's model is built around its problem).
type coinEngine struct {
	keep bool
	lp   *coin.LP     // kept CLP model; nil until needed
	mat  csc          // column-form matrix, reused by every load
	st   []coin.Basis // basis statuses read from CLP, reused
}

func (*coinEngine) name() string     { return "clp" }
func (*coinEngine) milpName() string { return "cbc" }

func (e *coinEngine) close() {
	if e.lp != nil {
		e.lp.Close()
		e.lp = nil
	}
}

func (e *coinEngine) problem(m *model) *coin.Problem {
	m.cscInto(&e.mat)
	return &coin.Problem{
		Cols: m.nCols, Rows: m.nRows,
		Start: e.mat.start, Index: e.mat.index, Value: e.mat.value,
		ColLower: m.colLo, ColUpper: m.colUp, Obj: m.obj,
		RowLower: m.rowLo, RowUpper: m.rowUp,
		Integer: m.integer,
	}
}

// coinProblem is m for the binding, with its own matrix arrays.
func (m *model) coinProblem() *coin.Problem { return (&coinEngine{}).problem(m) }

func (e *coinEngine) solveLP(m *model) (*solution, error) {
	p := e.problem(m)
	// Blend rows are per % of batch with coefficients of order 0..3 and
	// bounds of order 1..100: already well scaled, and CLP runs markedly
	// faster on them without its own scaling pass. CLP's dual simplex from
	// the slack basis (Clp_dual) is the fastest of its methods here: on the
	// 30-stock, 20-limit benchmark model it takes 452k instructions against
	// 541k for Clp_primal and 923k for Clp_initialSolve (callgrind, CLP
	// 1.17.6). Should the dual simplex stop short (numerical trouble), the
	// model is solved again from scratch with scaling and CLP's own method
	// choice, in a model of its own.
	s, err := e.solveOnce(m, p, false)
	if err == nil || !errors.Is(err, errStopped) {
		return s, err
	}
	return e.solveOnce(m, p, true)
}

var errStopped = errors.New("clp stopped short")

func (e *coinEngine) solveOnce(m *model, p *coin.Problem, careful bool) (*solution, error) {
	lp := e.lp
	switch {
	case careful || !e.keep:
		// Clp_initialSolve may leave options of its own choosing on the
		// model, so the careful solve never runs in the kept one.
		lp = coin.NewLP()
		defer lp.Close()
	case lp == nil:
		lp = coin.NewLP()
		e.lp = lp
	}
	if err := lp.Load(p); err != nil {
		return nil, fmt.Errorf("clp: %w", err)
	}
	var st coin.Status
	if careful {
		st = lp.SolveInitial() // a new model: CLP's default scaling
	} else {
		lp.SetScaling(false)
		st = lp.Solve()
	}
	switch st {
	case coin.Infeasible:
		return &solution{status: solInfeasible}, nil
	case coin.Unbounded:
		return &solution{status: solUnbounded}, nil
	case coin.Optimal:
	default:
		return nil, fmt.Errorf("clp: solve %s after %d iterations: %w", st, lp.Iterations(), errStopped)
	}
	n, r := m.nCols, m.nRows
	s := newSolution(n, r)
	s.obj = lp.Objective()
	if cap(e.st) < n+r {
		e.st = make([]coin.Basis, n+r)
	}
	bs := e.st[:n+r]
	if err := lp.Solution(s.x, s.act, s.y, s.d, bs); err != nil {
		return nil, fmt.Errorf("clp: %w", err)
	}
	for j := 0; j < n; j++ {
		s.basis[j] = classify(bs[j] == coin.Basic, s.x[j], m.colLo[j], m.colUp[j])
	}
	for i := 0; i < r; i++ {
		s.basis[n+i] = classify(bs[n+i] == coin.Basic, s.act[i], m.rowLo[i], m.rowUp[i])
	}
	return s, nil
}

func (e *coinEngine) solveMILP(m *model) (*solution, error) {
	mp := coin.NewMIP()
	defer mp.Close()
	if err := mp.Load(e.problem(m)); err != nil {
		return nil, fmt.Errorf("cbc: %w", err)
	}
	mp.SetMaxSeconds(60)
	// Primal heuristics find good points early in large searches; blend
	// MILPs are small, branch and bound proves the optimum either way, and
	// without them CBC is about three times faster here.
	mp.SetParameter("heuristicsOnOff", "off")
	switch st := mp.Solve(); st {
	case coin.Infeasible:
		return &solution{status: solInfeasible}, nil
	case coin.Unbounded:
		return &solution{status: solUnbounded}, nil
	case coin.Optimal:
	default:
		return nil, fmt.Errorf("cbc: branch and bound %s (time limit 60 s)", st)
	}
	x := mp.ColSolution(nil)
	return &solution{status: solOptimal, obj: mp.Objective(), x: x, act: m.activity(x, nil)}, nil
}
