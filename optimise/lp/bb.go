package lp

import (
	"container/heap"
	"fmt"
	"math"
	"time"
)

// Limits bound a branch and bound search.
type Limits struct {
	MaxNodes int           // LPs solved at most; 0 means 100 000
	MaxTime  time.Duration // wall time at most; 0 means 60 s
	// Progress, when set, is told the share of the search tree closed, in
	// parts per ProgressTotal: each node at depth d stands for 2^-d of the
	// tree, and a node pruned, infeasible or integer closes its share (the
	// tree weight of Anderson, Hendel, Le Bodic & Viernickel, Clairvoyant
	// restarts in branch-and-bound search using online tree-size
	// estimation, AAAI 2019, from memory). It is called at the start with
	// 0, whenever the share grows by a part, and with ProgressTotal when
	// the search is complete; never when a limit stops it. An engine that
	// cannot follow its search (CBC) reports the start and the end only.
	Progress func(done, total int)
}

// ProgressTotal is the total that Limits.Progress reports against.
const ProgressTotal = 1000

func (l Limits) orDefault() Limits {
	if l.MaxNodes <= 0 {
		l.MaxNodes = 100000
	}
	if l.MaxTime <= 0 {
		l.MaxTime = 60 * time.Second
	}
	return l
}

// MIPSolution is the answer to a mixed integer programme.
type MIPSolution struct {
	// Status: Optimal (proven), Infeasible (proven), Unbounded (the LP
	// relaxation is), NotProven (a limit stopped the search; X is the
	// best integer point found, not proven optimal) or NoSolution (a limit
	// stopped the search before any integer point was found).
	Status Status
	Obj    float64   // objective of X
	X      []float64 // nil unless Optimal or NotProven
	// Bound is a proven lower bound on the optimum: equal to Obj when
	// Optimal, the least bound of the nodes left open when a limit hit.
	Bound   float64
	Nodes   int           // LPs solved
	Elapsed time.Duration // time spent
	Limit   string        // "nodes" or "time" when a limit stopped the search
}

// MIPSolver solves mixed integer programmes.
type MIPSolver interface {
	Name() string
	SolveMIP(p *Problem, integer []int, lim Limits) (*MIPSolution, error)
}

// BranchAndBound is lipoplan's MIP engine: LP-based branch and bound over
// its own simplex (Land & Doig, Econometrica 28 (1960) 497; the LP-based
// form as in Nemhauser & Wolsey, Integer and Combinatorial Optimization
// (1988), ch. II.4, and Achterberg, Constraint Integer Programming, PhD
// thesis, TU Berlin (2007), ch. 5-7, for the choices below).
//
//   - Node selection: best bound (the open node of least LP bound next),
//     with plunging: after a node is branched, its up child (the column
//     rounded up) is solved at once and the down child queued; the plunge
//     ends when a child is pruned, integral or infeasible. Plunging finds
//     integer points early and solves each child right after its parent,
//     so the dual simplex starts from the parent's final basis and factors
//     without any work (a bound change keeps the basis dual feasible); a
//     node taken from the queue starts from its parent's basis, kept with
//     it. Up first suits the 0/1 columns of lipoplan's rules: fixing a
//     stock in leaves the relaxation as it was, and once N are in the
//     cardinality row fixes every other out, so an integer point comes
//     within about N+1 LPs.
//   - Branching: on the most fractional integer column.
//   - Bound tightening at every node before its LP (Savelsbergh, ORSA J.
//     Computing 6 (1994) 445): each row's least and greatest activity over
//     the current bounds bounds every integer column in it, rounded
//     inwards. On a cardinality row Σ used_j <= N with N columns fixed at
//     1 it fixes every other used_j at 0; on a link row x_j - U·used_j <= 0
//     with x_j >= m > 0 it fixes used_j at 1.
//   - Pruning: a node whose bound is not below the incumbent by more than
//     1e-9 relative is closed; an integer point is within 1e-6 of
//     integers.
//
// The search is exact: Status is Optimal only when every open node has
// been closed. A limit (Limits) ends it with NotProven (and the best point
// found) or NoSolution, never with a silent heuristic answer.
type BranchAndBound struct {
	opt Options
}

// NewBranchAndBound makes lipoplan's MIP engine.
func NewBranchAndBound() *BranchAndBound { return &BranchAndBound{} }

// Name is "lipoplan-bb".
func (*BranchAndBound) Name() string { return "lipoplan-bb" }

const (
	intTol   = 1e-6 // a value within this of an integer is integral
	pruneRel = 1e-9 // a node within this (relative) of the incumbent is closed
)

// bbNode is an open node: bounds of the integer columns and the basis of
// the parent's optimum.
type bbNode struct {
	lo, up []float64 // per integer column
	bound  float64   // the parent's LP objective
	depth  int
	basis  []VarStatus
}

type nodeHeap []*bbNode

func (h nodeHeap) Len() int { return len(h) }
func (h nodeHeap) Less(a, b int) bool {
	if h[a].bound != h[b].bound {
		return h[a].bound < h[b].bound
	}
	return h[a].depth > h[b].depth
}
func (h nodeHeap) Swap(a, b int) { h[a], h[b] = h[b], h[a] }
func (h *nodeHeap) Push(x any)   { *h = append(*h, x.(*bbNode)) }
func (h *nodeHeap) Pop() any {
	old := *h
	n := old[len(old)-1]
	*h = old[:len(old)-1]
	return n
}

// bbRun is one search.
type bbRun struct {
	p       *Problem
	ints    []int // integer columns
	isInt   []int // index in ints of each column, -1
	s       *Simplex
	rStart  []int // p by rows
	rIdx    []int
	rVal    []float64
	curLo   []float64 // integer columns' bounds now in the engine
	curUp   []float64
	best    float64
	bestX   []float64
	nodes   int
	lim     Limits
	start   time.Time
	open    nodeHeap
	limitBy string
	closed  float64 // share of the tree closed (tree weight)
	told    int     // the last share reported, parts per ProgressTotal
}

// closeNode adds node n's share of the tree to the closed weight and tells
// Progress when it has grown by a part.
func (r *bbRun) closeNode(n *bbNode) {
	r.closed += math.Ldexp(1, -n.depth)
	if r.lim.Progress == nil {
		return
	}
	if d := min(ProgressTotal, int(r.closed*ProgressTotal)); d > r.told {
		r.told = d
		r.lim.Progress(d, ProgressTotal)
	}
}

// SolveMIP solves p with the columns in integer restricted to integers.
func (b *BranchAndBound) SolveMIP(p *Problem, integer []int, lim Limits) (sol *MIPSolution, err error) {
	defer func() {
		if r := recover(); r != nil {
			sol, err = nil, fmt.Errorf("branch and bound: internal fault: %v", r)
		}
	}()
	if err := p.Check(); err != nil {
		return nil, err
	}
	run := &bbRun{p: p.Clone(), lim: lim.orDefault(), start: time.Now(), best: math.Inf(1), s: NewWith(b.opt)}
	run.isInt = make([]int, p.Cols)
	for j := range run.isInt {
		run.isInt[j] = -1
	}
	for _, j := range integer {
		if j < 0 || j >= p.Cols {
			return nil, fmt.Errorf("%w: integer column %d outside 0..%d", ErrBadProblem, j, p.Cols-1)
		}
		if run.isInt[j] < 0 {
			run.isInt[j] = len(run.ints)
			run.ints = append(run.ints, j)
		}
	}
	run.rStart, run.rIdx, run.rVal = byRows(p.Rows, p.Start, p.Index, p.Value, nil, nil, nil)
	if lim.Progress != nil {
		lim.Progress(0, ProgressTotal)
	}
	st, err := run.search()
	if err != nil {
		return nil, err
	}
	if (st == Optimal || st == Infeasible) && lim.Progress != nil && run.told < ProgressTotal {
		lim.Progress(ProgressTotal, ProgressTotal) // complete, whatever rounding left
	}
	sol = &MIPSolution{Status: st, Nodes: run.nodes, Elapsed: time.Since(run.start), Limit: run.limitBy}
	switch st {
	case Optimal, NotProven:
		sol.X, sol.Obj = run.bestX, p.Objective(run.bestX)
		sol.Bound = sol.Obj
		if st == NotProven {
			sol.Bound = min(sol.Obj, run.openBound())
		}
	case NoSolution:
		sol.Bound = run.openBound()
	case Infeasible:
		sol.Bound = math.Inf(1)
	}
	return sol, nil
}

// openBound is the least bound among the open nodes.
func (r *bbRun) openBound() float64 {
	b := math.Inf(1)
	for _, n := range r.open {
		b = min(b, n.bound)
	}
	return b
}

func (r *bbRun) search() (Status, error) {
	p := r.p
	K := len(r.ints)
	root := &bbNode{lo: make([]float64, K), up: make([]float64, K), bound: math.Inf(-1)}
	for t, j := range r.ints {
		root.lo[t], root.up[t] = math.Ceil(p.ColLo[j]-intTol), math.Floor(p.ColUp[j]+intTol)
	}
	r.curLo = append([]float64(nil), root.lo...)
	r.curUp = append([]float64(nil), root.up...)
	for t, j := range r.ints {
		p.ColLo[j], p.ColUp[j] = root.lo[t], root.up[t]
	}
	if err := r.s.Load(p); err != nil {
		return 0, err
	}
	first := true
	heap.Push(&r.open, root)
	for r.open.Len() > 0 {
		n := heap.Pop(&r.open).(*bbNode)
		if n.bound >= r.cutoff() {
			r.closeNode(n)
			continue
		}
		// Plunge from n.
		for n != nil {
			if r.nodes >= r.lim.MaxNodes || time.Since(r.start) > r.lim.MaxTime {
				heap.Push(&r.open, n) // still open
				r.limitBy = "nodes"
				if r.nodes < r.lim.MaxNodes {
					r.limitBy = "time"
				}
				if r.bestX == nil {
					return NoSolution, nil
				}
				return NotProven, nil
			}
			child, st, err := r.node(n)
			if err != nil {
				return 0, err
			}
			if first {
				first = false
				if st == Unbounded {
					return Unbounded, nil
				}
			}
			if child == nil {
				r.closeNode(n) // no children: its part of the tree is done
			}
			n = child
		}
	}
	if r.bestX == nil {
		return Infeasible, nil
	}
	return Optimal, nil
}

// cutoff is the bound at or above which a node cannot improve on the
// incumbent.
func (r *bbRun) cutoff() float64 {
	if math.IsInf(r.best, 1) {
		return r.best
	}
	return r.best - pruneRel*max(1, math.Abs(r.best))
}

// node solves node n's LP and branches: the child to plunge into is
// returned, the other queued. st is the LP's status.
func (r *bbRun) node(n *bbNode) (plunge *bbNode, st Status, err error) {
	if !r.tighten(n) {
		return nil, Infeasible, nil
	}
	s := r.s
	for t, j := range r.ints {
		if n.lo[t] != r.curLo[t] || n.up[t] != r.curUp[t] {
			s.SetColBounds(j, n.lo[t], n.up[t])
			r.curLo[t], r.curUp[t] = n.lo[t], n.up[t]
		}
	}
	if n.basis != nil {
		if err := s.SetBasis(n.basis); err != nil {
			return nil, 0, err
		}
	}
	r.nodes++
	st, err = s.solveStatus()
	if err != nil {
		return nil, 0, fmt.Errorf("branch and bound, node %d: %w", r.nodes, err)
	}
	if st != Optimal {
		return nil, st, nil
	}
	obj := s.objective()
	if obj >= r.cutoff() {
		return nil, st, nil
	}
	// The most fractional integer column.
	br, brVal, frac := -1, 0.0, 0.0
	for t, j := range r.ints {
		v := s.value(j)
		f := v - math.Floor(v)
		if f <= intTol || f >= 1-intTol {
			continue
		}
		if d := min(f, 1-f); d > frac {
			br, brVal, frac = t, v, d
		}
	}
	if br < 0 {
		r.best = obj
		r.bestX = s.values(r.bestX)
		return nil, st, nil
	}
	basis := s.basisInto(nil)
	down := &bbNode{lo: append([]float64(nil), n.lo...), up: append([]float64(nil), n.up...), bound: obj, depth: n.depth + 1, basis: basis}
	up := &bbNode{lo: append([]float64(nil), n.lo...), up: append([]float64(nil), n.up...), bound: obj, depth: n.depth + 1, basis: basis}
	down.up[br] = math.Floor(brVal)
	up.lo[br] = math.Ceil(brVal)
	// Plunge into the up branch; the child solved next needs no basis of
	// its own (the engine holds this node's).
	heap.Push(&r.open, down)
	up.basis = nil
	return up, st, nil
}

// tighten narrows node n's integer bounds by the rows' activity bounds
// (three passes at most) and reports false when a row cannot be met.
func (r *bbRun) tighten(n *bbNode) bool {
	p := r.p
	lo := func(j int) float64 {
		if t := r.isInt[j]; t >= 0 {
			return n.lo[t]
		}
		return p.ColLo[j]
	}
	up := func(j int) float64 {
		if t := r.isInt[j]; t >= 0 {
			return n.up[t]
		}
		return p.ColUp[j]
	}
	for t := range n.lo {
		if n.lo[t] > n.up[t] {
			return false
		}
	}
	for pass, changed := 0, true; pass < 3 && changed; pass++ {
		changed = false
		for i := 0; i < p.Rows; i++ {
			rlo, rup := p.RowLo[i], p.RowUp[i]
			if math.IsInf(rlo, -1) && math.IsInf(rup, 1) {
				continue
			}
			// Least and greatest activity; infinite parts counted apart.
			var minA, maxA float64
			minInf, maxInf := 0, 0
			hasInt := false
			for q := r.rStart[i]; q < r.rStart[i+1]; q++ {
				j, a := r.rIdx[q], r.rVal[q]
				lj, uj := lo(j), up(j)
				if a < 0 {
					lj, uj = uj, lj
				}
				if math.IsInf(lj, 0) {
					minInf++
				} else {
					minA += a * lj
				}
				if math.IsInf(uj, 0) {
					maxInf++
				} else {
					maxA += a * uj
				}
				hasInt = hasInt || r.isInt[j] >= 0
			}
			if minInf == 0 && minA > rup+1e-9*(1+math.Abs(rup)) || maxInf == 0 && maxA < rlo-1e-9*(1+math.Abs(rlo)) {
				return false
			}
			if !hasInt {
				continue
			}
			for q := r.rStart[i]; q < r.rStart[i+1]; q++ {
				j, a := r.rIdx[q], r.rVal[q]
				t := r.isInt[j]
				if t < 0 {
					continue
				}
				lj, uj := n.lo[t], n.up[t]
				cmin, cmax := a*lj, a*uj
				if a < 0 {
					cmin, cmax = cmax, cmin
				}
				// Activity of the rest of the row.
				restMin, restMax := math.Inf(-1), math.Inf(1)
				if minInf == 0 {
					restMin = minA - cmin
				} else if minInf == 1 && math.IsInf(cmin, 0) {
					restMin = minA
				}
				if maxInf == 0 {
					restMax = maxA - cmax
				} else if maxInf == 1 && math.IsInf(cmax, 0) {
					restMax = maxA
				}
				newLo, newUp := lj, uj
				if !math.IsInf(rup, 1) && !math.IsInf(restMin, -1) {
					v := (rup - restMin) / a
					if a > 0 {
						newUp = min(newUp, math.Floor(v+intTol))
					} else {
						newLo = max(newLo, math.Ceil(v-intTol))
					}
				}
				if !math.IsInf(rlo, -1) && !math.IsInf(restMax, 1) {
					v := (rlo - restMax) / a
					if a > 0 {
						newLo = max(newLo, math.Ceil(v-intTol))
					} else {
						newUp = min(newUp, math.Floor(v+intTol))
					}
				}
				if newLo > newUp {
					return false
				}
				if newLo != lj || newUp != uj {
					n.lo[t], n.up[t] = newLo, newUp
					changed = true
				}
			}
		}
	}
	return true
}
