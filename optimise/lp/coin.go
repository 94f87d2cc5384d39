//go:build coin

package lp

import (
	"errors"
	"fmt"
	"math"

	"lipoplan/optimise/coin"
)

// Coin solves LPs with COIN-OR CLP through lipoplan's cgo binding
// (lipoplan/optimise/coin), built only with -tags coin. One CLP model is
// kept and reloaded for every solve; each load starts from CLP's slack
// basis, so this engine does not warm-start (SetBasis is ignored) and
// gives no certificates.
type Coin struct {
	stored
	lp    *coin.LP
	start []int32
	index []int32
	st    []coin.Basis
}

// NewCoin makes a CLP engine. Call Close to free its C model.
func NewCoin() *Coin { return &Coin{} }

// CoinVersion reports the CLP and CBC library versions.
func CoinVersion() string { return coin.Version() }

// Name is "clp".
func (*Coin) Name() string { return "clp" }

// SetBasis is ignored: every solve starts from CLP's slack basis.
func (*Coin) SetBasis([]VarStatus) error { return nil }

// Close frees the C model.
func (c *Coin) Close() {
	if c.lp != nil {
		c.lp.Close()
		c.lp = nil
	}
}

// coinProblem is p for the binding (32-bit indices, as Debian's CoinUtils
// is built); its arrays are reused across calls.
func coinProblem(p *Problem, start, index *[]int32, integer []int) *coin.Problem {
	*start = resize(*start, p.Cols+1)
	*index = resize(*index, len(p.Index))
	for j, v := range p.Start {
		(*start)[j] = int32(v)
	}
	for k, v := range p.Index {
		(*index)[k] = int32(v)
	}
	return &coin.Problem{
		Cols: p.Cols, Rows: p.Rows,
		Start: *start, Index: *index, Value: p.Value,
		ColLower: p.ColLo, ColUpper: p.ColUp, Obj: p.Obj,
		RowLower: p.RowLo, RowUpper: p.RowUp,
		Integer: integer,
	}
}

var errStopped = errors.New("clp stopped short")

// Solve solves the loaded problem. lipoplan's rows are well scaled and
// CLP runs faster on them without its own scaling pass; its dual simplex
// from the slack basis (Clp_dual) is the fastest of its methods here.
// Should it stop short (numerical trouble), the problem is solved again
// from scratch with scaling and CLP's own method choice (Clp_initialSolve)
// in a model of its own.
func (c *Coin) Solve() (*Solution, error) {
	if c.p.Cols == 0 {
		return nil, fmt.Errorf("clp: %w: no columns", ErrBadProblem)
	}
	cp := coinProblem(&c.p, &c.start, &c.index, nil)
	s, err := c.solveOnce(cp, false)
	if errors.Is(err, errStopped) {
		return c.solveOnce(cp, true)
	}
	return s, err
}

func (c *Coin) solveOnce(cp *coin.Problem, careful bool) (*Solution, error) {
	m := c.lp
	switch {
	case careful:
		m = coin.NewLP()
		defer m.Close()
	case m == nil:
		m = coin.NewLP()
		c.lp = m
	}
	if err := m.Load(cp); err != nil {
		return nil, fmt.Errorf("clp: %w", err)
	}
	var st coin.Status
	if careful {
		st = m.SolveInitial()
	} else {
		m.SetScaling(false)
		st = m.Solve()
	}
	switch st {
	case coin.Infeasible:
		return &Solution{Status: Infeasible, Iterations: m.Iterations()}, nil
	case coin.Unbounded:
		return &Solution{Status: Unbounded, Iterations: m.Iterations()}, nil
	case coin.Optimal:
	default:
		return nil, fmt.Errorf("clp: solve %s after %d iterations: %w", st, m.Iterations(), errStopped)
	}
	p := &c.p
	n, r := p.Cols, p.Rows
	v := make([]float64, 2*n+2*r)
	s := &Solution{Status: Optimal, Obj: m.Objective(), Iterations: m.Iterations(),
		X: v[:n:n], D: v[n : 2*n : 2*n], RowAct: v[2*n : 2*n+r : 2*n+r], Y: v[2*n+r:],
		Basis: make([]VarStatus, n+r)}
	c.st = resize(c.st, n+r)
	if err := m.Solution(s.X, s.RowAct, s.Y, s.D, c.st); err != nil {
		return nil, fmt.Errorf("clp: %w", err)
	}
	for j := 0; j < n; j++ {
		s.Basis[j] = statusOf(c.st[j] == coin.Basic, s.X[j], p.ColLo[j], p.ColUp[j])
	}
	for i := 0; i < r; i++ {
		s.Basis[n+i] = statusOf(c.st[n+i] == coin.Basic, s.RowAct[i], p.RowLo[i], p.RowUp[i])
	}
	return s, nil
}

func statusOf(basic bool, v, lo, up float64) VarStatus {
	if basic {
		return Basic
	}
	return nonbasicStatus(v, lo, up)
}

// CBC solves MIPs with COIN-OR CBC through the binding, with the node and
// time limits of Limits (CBC's nodes, which are not lipoplan's LPs; a
// search stopped there is NotProven or NoSolution) and its primal
// heuristics off (lipoplan's MIPs are small; branch and
// bound proves the optimum either way and is faster without them).
type CBC struct {
	start, index []int32
}

// NewCBC makes the CBC engine.
func NewCBC() *CBC { return &CBC{} }

// Name is "cbc".
func (*CBC) Name() string { return "cbc" }

// SolveMIP solves p with the columns in integer restricted to integers.
func (c *CBC) SolveMIP(p *Problem, integer []int, lim Limits) (*MIPSolution, error) {
	if err := p.Check(); err != nil {
		return nil, err
	}
	lim = lim.orDefault()
	mp := coin.NewMIP()
	defer mp.Close()
	if err := mp.Load(coinProblem(p, &c.start, &c.index, integer)); err != nil {
		return nil, fmt.Errorf("cbc: %w", err)
	}
	mp.SetMaxSeconds(lim.MaxTime.Seconds())
	mp.SetMaxNodes(lim.MaxNodes)
	mp.SetParameter("heuristicsOnOff", "off")
	if lim.Progress != nil {
		lim.Progress(0, ProgressTotal)
	}
	st := mp.Solve()
	if lim.Progress != nil && (st == coin.Optimal || st == coin.Infeasible) {
		lim.Progress(ProgressTotal, ProgressTotal)
	}
	switch st {
	case coin.Infeasible:
		return &MIPSolution{Status: Infeasible, Bound: math.Inf(1), Nodes: mp.Nodes()}, nil
	case coin.Unbounded:
		return &MIPSolution{Status: Unbounded, Nodes: mp.Nodes()}, nil
	case coin.Optimal:
	default:
		// Stopped: by a limit, with or without an integer point.
		limit := mp.LimitReached()
		if limit == "" {
			return nil, fmt.Errorf("cbc: branch and bound %s", st)
		}
		s := &MIPSolution{Status: NoSolution, Bound: mp.BestBound(), Nodes: mp.Nodes(), Limit: limit}
		if x := mp.BestSolution(nil); x != nil {
			s.Status, s.X, s.Obj = NotProven, x, p.Objective(x)
			s.Bound = min(s.Bound, s.Obj)
		}
		return s, nil
	}
	x := mp.ColSolution(nil)
	return &MIPSolution{Status: Optimal, Obj: mp.Objective(), Bound: mp.Objective(), X: x, Nodes: mp.Nodes()}, nil
}
