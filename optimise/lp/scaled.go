package lp

// Scaled wraps an engine so that it only ever sees the problem scaled:
// rows and columns by geometric scaling and column equilibration, the
// objective by the geometric mean of its entries (scaleFactors,
// objFactor; Tomlin 1975, Maros 2003, ch. 7), every factor a power of
// two. Answers, duals, reduced costs and certificates come back unscaled
// and exact (powers of two). With a price of 1e9 per tonne beside one of
// 0.001, orders of 1e6 t beside orders of 1 kg, or availability of 1 kg
// against a batch of a million tonnes, the coefficients an engine sees
// stay within a few orders of magnitude of 1, so no engine's absolute
// tolerances swallow a cost or a bound, and no engine (CLP, which lipoplan
// runs without its own scaling, least of all) meets numbers it cannot
// handle.
//
// The factors are kept while the matrix stays the same (an engine that
// warm-starts then keeps its factorisation too); the objective factor is
// taken anew at every Load and kept by SetObj. lipoplan's simplex inside
// Scaled needs no scaling of its own: NewScaled makes that pair.
func Scaled(e Engine) Engine { return &scaled{inner: e} }

// NewScaled is lipoplan's simplex behind Scaled, its own scaling off (the
// problem it sees is scaled already).
func NewScaled() Engine { return Scaled(NewWith(Options{NoScaling: true})) }

type scaled struct {
	inner  Engine
	p      Problem // as loaded, unscaled
	sp     Problem // as the inner engine has it (unless it is lipoplan's simplex)
	sc     scaling
	loaded bool
	seen   []int
}

// Name is the inner engine's.
func (s *scaled) Name() string { return s.inner.Name() }

// Load scales p and loads it into the inner engine.
func (s *scaled) Load(p *Problem) error {
	if err := p.check(&s.seen); err != nil {
		return err
	}
	same := s.loaded && s.p.sameMatrix(p)
	p.copyInto(&s.p)
	s.loaded = true
	if same {
		s.sc.obj = objFactor(s.p.Obj, s.sc.cs)
	} else {
		s.sc.set(&s.p, nil)
	}
	if in, ok := s.inner.(*Simplex); ok {
		return in.loadScaled(&s.p, &s.sc, same) // no scaled copy in between
	}
	s.sc.apply(&s.p, &s.sp)
	return s.inner.Load(&s.sp)
}

// SetObj sets column j's cost (scaled by the factors of the last Load).
func (s *scaled) SetObj(j int, c float64) {
	s.p.Obj[j] = c
	s.inner.SetObj(j, s.sc.costOf(j, c))
}

// SetColBounds sets column j's bounds.
func (s *scaled) SetColBounds(j int, lo, up float64) {
	s.p.ColLo[j], s.p.ColUp[j] = lo, up
	c := s.sc.cs[j]
	s.inner.SetColBounds(j, lo/c, up/c)
}

// SetRowBounds sets row i's range.
func (s *scaled) SetRowBounds(i int, lo, up float64) {
	s.p.RowLo[i], s.p.RowUp[i] = lo, up
	r := s.sc.rs[i]
	s.inner.SetRowBounds(i, lo*r, up*r)
}

// SetBasis passes b on: scaling keeps every status.
func (s *scaled) SetBasis(b []VarStatus) error { return s.inner.SetBasis(b) }

// Solve solves the scaled problem and unscales the answer. When the
// optimum shows that the objective factor was far off for the costs that
// decide it (scaling.refit), the costs are scaled anew and the problem
// solved again from that optimum; should that solve fail, the first answer
// stands.
func (s *scaled) Solve() (*Solution, error) {
	sol, err := s.inner.Solve()
	if err != nil || sol == nil {
		return sol, err
	}
	if sol.Status != Optimal {
		s.sc.unscale(sol)
		return sol, nil
	}
	if f, ok := s.sc.refit(&s.p, sol.X); ok {
		first := s.sc.obj
		s.setObjFactor(f)
		again, err := s.inner.Solve()
		if err == nil && again != nil && again.Status == Optimal {
			sol = again
		} else {
			s.setObjFactor(first)
		}
	}
	s.sc.unscale(sol)
	return sol, nil
}

// setObjFactor rescales every cost the inner engine has to factor f.
func (s *scaled) setObjFactor(f float64) {
	s.sc.obj = f
	for j, c := range s.p.Obj {
		s.inner.SetObj(j, s.sc.costOf(j, c))
	}
}

// Close closes the inner engine.
func (s *scaled) Close() { s.inner.Close() }

// ScaledMIP wraps a MIP solver as Scaled wraps an engine, with the integer
// columns left unscaled so that their values stay integers: rows,
// continuous columns and the objective are scaled, the answer, its
// objective and bound unscaled.
func ScaledMIP(m MIPSolver) MIPSolver { return &scaledMIP{inner: m} }

type scaledMIP struct {
	inner MIPSolver
	sp    Problem
	sc    scaling
}

// Name is the inner solver's.
func (s *scaledMIP) Name() string { return s.inner.Name() }

// SolveMIP scales p, solves it with the inner solver and unscales the
// answer.
func (s *scaledMIP) SolveMIP(p *Problem, integer []int, lim Limits) (*MIPSolution, error) {
	if err := p.Check(); err != nil {
		return nil, err
	}
	s.sc.set(p, integer)
	s.sc.apply(p, &s.sp)
	sol, err := s.inner.SolveMIP(&s.sp, integer, lim)
	if err != nil || sol == nil {
		return sol, err
	}
	if sol.Status != Optimal || len(sol.X) != p.Cols {
		return s.unscale(sol), nil
	}
	if f, ok := s.sc.refit(p, sol.X); ok {
		// As scaled.Solve: the costs scaled anew for the optimum found.
		first := s.sc.obj
		s.sc.obj = f
		for j, c := range p.Obj {
			s.sp.Obj[j] = s.sc.costOf(j, c)
		}
		if again, err := s.inner.SolveMIP(&s.sp, integer, lim); err == nil && again != nil && again.Status == Optimal {
			sol = again
		} else {
			s.sc.obj = first
		}
	}
	return s.unscale(sol), nil
}

// unscale turns an answer to the scaled MIP into one to the MIP.
func (s *scaledMIP) unscale(sol *MIPSolution) *MIPSolution {
	for j := range sol.X {
		sol.X[j] *= s.sc.cs[j]
	}
	sol.Obj /= s.sc.obj
	sol.Bound /= s.sc.obj
	return sol
}
