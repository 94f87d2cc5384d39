package tui

import (
	"fmt"
	"math"
	"sort"
	"sync"
	"time"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// Snapshot is everything the panels show about one evaluated Scenario. Views
// read snapshots only; they never solve. A later stage (predicted SFC, a
// reactor step) adds its own fields here and its own step in Evaluate.
type Snapshot struct {
	Rev      int       // edit revision this snapshot belongs to
	Scenario *Scenario // what was evaluated (never changed afterwards)
	Result   *optimise.Result
	Err      error // the solve failed (bad input or an internal fault); Result is nil

	// Curve is the blend's SFC on a 1 °C grid, linear in the stocks'
	// measured curves; temperatures where a used stock has no measured value
	// are left out and named in CurveGaps.
	Curve     []catalogue.Point
	CurveGaps map[float64][]string

	TAG TAGView // TAG classes as blended and after interesterification

	At   time.Time     // when Evaluate started
	Took time.Duration // wall time of Evaluate
}

// Feasible reports whether the snapshot holds a blend: the optimal one, or
// the best one branch and bound found before its limit (NotProven, with
// its note).
func (s *Snapshot) Feasible() bool {
	return s != nil && s.Err == nil && s.Result != nil && hasBlend(s.Result)
}

// hasBlend reports whether a result holds a blend to show.
func hasBlend(r *optimise.Result) bool {
	return r.Status == optimise.Optimal || r.Status == optimise.NotProven && len(r.Blend) > 0
}

// Limit finds the optimiser's report for a limit name such as "iv.max".
func (s *Snapshot) Limit(name string) (optimise.LimitReport, bool) {
	if s == nil || s.Result == nil {
		return optimise.LimitReport{}, false
	}
	for _, l := range s.Result.Limits {
		if l.Name == name {
			return l, true
		}
	}
	return optimise.LimitReport{}, false
}

// Line finds the blend line of stock id.
func (s *Snapshot) Line(id string) (optimise.Line, bool) {
	if s == nil || s.Result == nil {
		return optimise.Line{}, false
	}
	for _, l := range s.Result.Blend {
		if l.Stock == id {
			return l, true
		}
	}
	return optimise.Line{}, false
}

// Range finds the price ranging of stock id.
func (s *Snapshot) Range(id string) (optimise.Range, bool) {
	if s == nil || s.Result == nil {
		return optimise.Range{}, false
	}
	for _, r := range s.Result.Ranging {
		if r.Stock == id {
			return r, true
		}
	}
	return optimise.Range{}, false
}

// Evaluate solves sc and derives every panel's data. It never panics: a
// fault inside a stage is returned in Snapshot.Err so the workspace keeps
// drawing.
func Evaluate(sc *Scenario, rev int) *Snapshot { return evaluateWith(nil, sc, rev) }

// evaluateWith is Evaluate through solver s (nil: a fresh solve), which
// warm-starts from the last solve of the same model.
func evaluateWith(s *sessionSolver, sc *Scenario, rev int) (snap *Snapshot) {
	start := time.Now()
	snap = &Snapshot{Rev: rev, Scenario: sc, At: start}
	defer func() {
		if r := recover(); r != nil {
			snap.Result = nil
			snap.Err = fmt.Errorf("internal fault while solving: %v", r)
		}
		snap.Took = time.Since(start)
	}()
	cat, spec := sc.Effective()
	lo, hi := chartTemps(spec)
	// The solve reports SFC on the chart's 1 °C grid (plus the spec's own
	// temperatures), so the chart shows exactly what the optimiser saw,
	// including a reactor step's predicted SFC.
	grid := gridTemps(spec, lo, hi)
	res, err := s.solve(cat, spec, optimise.Options{Temps: grid, Model: sc.Model})
	if err != nil {
		snap.Err = err
		return snap
	}
	snap.Result = res
	if !hasBlend(res) {
		return snap
	}
	parts := blendParts(cat, res)
	snap.Curve, snap.CurveGaps = resultCurve(res)
	snap.TAG = tagView(parts, grid, sc.Model)
	return snap
}

// blendParts turns the optimal blend into blend.Parts of the catalogue.
func blendParts(cat *catalogue.Catalogue, res *optimise.Result) []blend.Part {
	var parts []blend.Part
	for _, l := range res.Blend {
		if l.Pct <= 0 {
			continue
		}
		if st, ok := cat.Find(l.Stock); ok {
			parts = append(parts, blend.Part{Stock: st, Pct: l.Pct})
		}
	}
	return parts
}

// chartTemps spans the default SFC temperatures and the spec's, whole degrees.
func chartTemps(spec *catalogue.Spec) (lo, hi float64) {
	lo, hi = catalogue.DefaultTemps[0], catalogue.DefaultTemps[len(catalogue.DefaultTemps)-1]
	for _, l := range spec.SFC {
		lo = math.Min(lo, math.Floor(l.Temp))
		hi = math.Max(hi, math.Ceil(l.Temp))
	}
	return lo, hi
}

// gridTemps is every whole degree from lo to hi and the spec's temperatures.
func gridTemps(spec *catalogue.Spec, lo, hi float64) []float64 {
	var temps []float64
	for t := lo; t <= hi+1e-9; t++ {
		temps = append(temps, t)
	}
	for _, l := range spec.SFC {
		if l.Temp != math.Trunc(l.Temp) {
			temps = append(temps, l.Temp)
		}
	}
	sort.Float64s(temps)
	return temps
}

// resultCurve is the optimal blend's SFC as the solve reported it, sorted by
// temperature, with the temperatures it could not report.
func resultCurve(res *optimise.Result) ([]catalogue.Point, map[float64][]string) {
	return pointsOf(res.Properties.SFC), res.Properties.SFCMissing
}

// pointsOf turns SFC values by temperature into a curve sorted by temperature.
func pointsOf(vals map[float64]float64) []catalogue.Point {
	out := make([]catalogue.Point, 0, len(vals))
	for t, v := range vals {
		out = append(out, catalogue.Point{Temp: t, Solid: v})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Temp < out[j].Temp })
	return out
}

// sessionSolver is a workspace's own optimise.Solver: the edit after
// edit of one session re-solves the same model warm, from the basis the
// last solve ended with (a few dual or primal simplex pivots after a price
// or limit edit, instead of a solve from scratch). A solve takes the
// Solver out for its duration (take) and hands it back (give), so that one
// solve at a time has it (another solves fresh), and the session's end
// (close) never waits for a solve still running: leaving the workspace is
// at once, and that solve frees the Solver when it ends.
type sessionSolver struct {
	mu     sync.Mutex
	s      *optimise.Solver // nil while a solve has it, and after close
	closed bool
}

func newSessionSolver() *sessionSolver { return &sessionSolver{s: optimise.NewSolver()} }

// solve is optimise.Solve through the session's Solver; after close, while
// another solve has it, or on a nil sessionSolver, a fresh solve.
func (ss *sessionSolver) solve(cat *catalogue.Catalogue, spec *catalogue.Spec, opt optimise.Options) (*optimise.Result, error) {
	s := ss.take()
	if s == nil {
		return optimise.Solve(cat, spec, opt)
	}
	defer func() {
		if r := recover(); r != nil {
			// A fault left its state unknown: it is not handed back (the
			// session solves afresh from now on), and what it holds is
			// freed if that can be done (its C memory in the coin build).
			func() {
				defer func() { _ = recover() }()
				s.Close()
			}()
			panic(r)
		}
		ss.give(s)
	}()
	return s.Solve(cat, spec, opt)
}

// take hands the Solver to one solve, nil when it has none to hand.
func (ss *sessionSolver) take() *optimise.Solver {
	if ss == nil {
		return nil
	}
	ss.mu.Lock()
	defer ss.mu.Unlock()
	s := ss.s
	ss.s = nil
	return s
}

// give takes back the Solver a solve had, or frees it when the session
// has closed meanwhile.
func (ss *sessionSolver) give(s *optimise.Solver) {
	ss.mu.Lock()
	defer ss.mu.Unlock()
	if ss.closed {
		s.Close()
		return
	}
	ss.s = s
}

// close frees the Solver, or leaves that to the solve that has it; later
// solves are fresh ones.
func (ss *sessionSolver) close() {
	if ss == nil {
		return
	}
	ss.mu.Lock()
	defer ss.mu.Unlock()
	ss.closed = true
	if ss.s != nil {
		ss.s.Close()
		ss.s = nil
	}
}
