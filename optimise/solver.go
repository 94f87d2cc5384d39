package optimise

import (
	"errors"

	"lipoplan/catalogue"
)

// Solver solves one spec or plan after another with the same working
// memory. It keeps an LP engine per model structure (the same stocks and
// limits: a what-if edit of prices, limits or amounts on hand keeps it), and
// each re-solve warm-starts from the basis the last solve of that
// structure ended with, which after a small edit takes a few pivots of the
// dual simplex (bounds and limits) or of the primal (prices) instead of a
// solve from scratch. It also keeps each stock's computed fatty-acid
// properties (blend.Profile) for as long as that stock's fatty acids stay
// the same. The optimum found is the one a fresh Solve finds; where the
// programme has several optima (ties), a warm start may settle on another
// of them, as a solver with warm starts does.
//
// A Solver is for one goroutine at a time (a workspace session, a benchmark
// loop); give each goroutine its own. Close frees what it holds (C memory
// in the coin build); the zero value is not usable, make one with
// NewSolver.
type Solver struct {
	eng  *engine
	prof profileCache
	buf  scratch
}

// NewSolver makes a Solver. Call Close when done with it.
func NewSolver() *Solver { return &Solver{eng: reusableEngine()} }

var errSolverClosed = errors.New("optimise: Solver used after Close")

// Solve is Solve with the Solver's working memory.
func (s *Solver) Solve(cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	if s == nil || s.eng == nil {
		return nil, errSolverClosed
	}
	if spec != nil && spec.Process != nil {
		return solveProcessIn(s.eng, &s.prof, &s.buf, cat, spec, opt)
	}
	return solveIn(s.eng, &s.prof, &s.buf, cat, spec, opt)
}

// Plan is Plan with the Solver's working memory.
func (s *Solver) Plan(cat *catalogue.Catalogue, orders *catalogue.Orders) (*PlanResult, error) {
	if s == nil || s.eng == nil {
		return nil, errSolverClosed
	}
	return planIn(s.eng, &s.prof, cat, orders)
}

// Close frees the Solver's C memory. It is safe to call more than once;
// the Solver is not used after.
func (s *Solver) Close() {
	if s != nil && s.eng != nil {
		s.eng.close()
		s.eng, s.prof, s.buf = nil, profileCache{}, scratch{}
	}
}
