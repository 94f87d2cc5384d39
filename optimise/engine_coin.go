//go:build cgo && !purego

package optimise

import (
	"errors"
	"fmt"

	"lipoplan/optimise/coin"
)

// defaultEngine is COIN-OR CLP for LPs and CBC for MILPs.
func defaultEngine() engine { return coinEngine{} }

// coinEngine solves through the optimise/coin binding. Every C model is
// created, used and closed inside one call.
type coinEngine struct{}

func (coinEngine) name() string     { return "clp" }
func (coinEngine) milpName() string { return "cbc" }

func (m *model) coinProblem() *coin.Problem {
	c := m.csc()
	return &coin.Problem{
		Cols: m.nCols, Rows: m.nRows,
		Start: c.start, Index: c.index, Value: c.value,
		ColLower: m.colLo, ColUpper: m.colUp, Obj: m.obj,
		RowLower: m.rowLo, RowUpper: m.rowUp,
		Integer: m.integer,
	}
}

func (e coinEngine) solveLP(m *model) (*solution, error) {
	p := m.coinProblem()
	// Blend rows are per % of batch with coefficients of order 0..3 and
	// bounds of order 1..100: already well scaled, and CLP runs markedly
	// faster on them without its own scaling pass. Should the dual simplex
	// stop short (numerical trouble), the model is solved again from scratch
	// with scaling and CLP's own method choice.
	s, err := e.solveOnce(m, p, false)
	if err == nil || !errors.Is(err, errStopped) {
		return s, err
	}
	return e.solveOnce(m, p, true)
}

var errStopped = errors.New("clp stopped short")

func (coinEngine) solveOnce(m *model, p *coin.Problem, careful bool) (*solution, error) {
	lp := coin.NewLP()
	defer lp.Close()
	if err := lp.Load(p); err != nil {
		return nil, fmt.Errorf("clp: %w", err)
	}
	var st coin.Status
	if careful {
		st = lp.SolveInitial()
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
	s := &solution{
		status: solOptimal,
		obj:    lp.Objective(),
		x:      lp.ColSolution(nil),
		act:    lp.RowActivity(nil),
		y:      lp.RowPrice(nil),
		d:      lp.ReducedCost(nil),
		basis:  make([]varState, m.nCols+m.nRows),
	}
	bs := lp.Statuses(nil)
	for j := 0; j < m.nCols; j++ {
		s.basis[j] = classify(bs[j] == coin.Basic, s.x[j], m.colLo[j], m.colUp[j])
	}
	for i := 0; i < m.nRows; i++ {
		s.basis[m.nCols+i] = classify(bs[m.nCols+i] == coin.Basic, s.act[i], m.rowLo[i], m.rowUp[i])
	}
	return s, nil
}

func (coinEngine) solveMILP(m *model) (*solution, error) {
	mp := coin.NewMIP()
	defer mp.Close()
	if err := mp.Load(m.coinProblem()); err != nil {
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
