package optimise

import (
	"math"
	"sort"
	"time"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
)

// Status of a solve.
type Status string

// Statuses reported in text and JSON.
const (
	Optimal    Status = "optimal"
	Infeasible Status = "infeasible"
	// NotProven: branch and bound for the integer rules stopped at its
	// node or time limit. Blend, when set, is the best blend found, not
	// proven the cheapest; Notes say how far from proven it is.
	NotProven Status = "not_proven"
)

// Options tune a solve. The zero value is ready to use.
type Options struct {
	Temps []float64 // SFC temperatures to report; nil means blend.Temps(spec temps...)
	// Limits of branch and bound for the integer rules: LPs solved at most
	// (0: 100 000) and wall time at most (0: 60 s). A search stopped by a
	// limit gives Status NotProven.
	MaxNodes int
	MaxTime  time.Duration
	// Progress, when set, is told how far long work has come, done of
	// total (done never falls and ends at total when the work runs to its
	// end; total may grow once, when the work learns its size): the steps
	// of a sweep, or for the integer rules the share of branch and bound's
	// search tree closed, in parts per 1000 (lp.Limits.Progress). It is
	// called on the solving goroutine and must return quickly. Nothing in
	// this package prints.
	Progress func(done, total int)
	// Model is the TAG model for predicted SFC (a [process] step with
	// sfc = "predicted"); the zero value is sle's default, uncalibrated.
	Model sle.Options
}

// EngineInfo names the engines of this build, for lipoplan --version.
func EngineInfo() string { return engineInfo() }

// Line is one stock in the optimal blend.
type Line struct {
	Stock  string
	Name   string
	Pct    float64 // % of batch
	Tonnes float64
}

// LimitReport is one row of the model as the user wrote it.
type LimitReport struct {
	Name        string  // "iv.max", "sfc.20.min", "use.pko-r.max", "avail.pko-r", ...
	Stock       string  // the stock a use.<id> or avail.<id> limit is about; "" for the others
	Label       string  // the limit in words, e.g. "SFC at 20 °C, at least", "pko-r on hand"
	Unit        string  // of Value and Bound, e.g. " % solid", " t", "" (IV)
	Value       float64 // the blend's value of the limited quantity
	Bound       float64 // the bound written in the spec
	Binding     bool    // the limit holds the blend: the LP sits at this bound
	ShadowPrice float64 // currency per tonne of product per unit of the limit (+ = raising the bound saves)
	// HoldsFrom and HoldsTo are the values of the bound between which
	// ShadowPrice prices every change (right-hand-side ranging on the final
	// basis; the blend's make-up changes beyond them, and with it the
	// price of a further move); NaN when the limit does not hold the blend.
	HoldsFrom, HoldsTo float64
	// Excluded marks a [use] cap of 0: a stock left out by the spec, which
	// reports list once as such rather than as a cost.
	Excluded bool
	Explain  string // plain trade words, e.g. "raising the IV maximum by 1 saves 3.10 EUR/t, up to 52.5"
}

// Holding are the limits that hold the blend, dearest first (by the size
// of their shadow price; equal ones in report order), stocks left out by
// the spec not among them.
func (r *Result) Holding() []LimitReport {
	var out []LimitReport
	for _, l := range r.Limits {
		if l.Binding && !l.Excluded {
			out = append(out, l)
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return math.Abs(out[i].ShadowPrice) > math.Abs(out[j].ShadowPrice) })
	return out
}

// LeftOut are the stocks the spec leaves out (a [use] cap of 0), in
// report order.
func (r *Result) LeftOut() []string {
	var out []string
	for _, l := range r.Limits {
		if l.Excluded {
			out = append(out, l.Stock)
		}
	}
	return out
}

// Room is how far the blend is from the bound, in the limit's own unit (0
// when the limit holds the blend).
func (l LimitReport) Room() float64 {
	if l.Binding {
		return 0
	}
	return math.Abs(l.Bound - l.Value)
}

// Range is the price range over which the blend stays optimal for one stock.
type Range struct {
	Stock     string
	InBlend   bool
	Price     float64 // current price
	PriceLow  float64 // -Inf when unbounded
	PriceHigh float64 // +Inf when unbounded
}

// Relax is one limit to move to make an impossible spec feasible.
type Relax struct {
	Name string  // as LimitReport.Name
	By   float64 // amount to move the bound, in the limit's own unit (positive)
}

// Result of a solve.
type Result struct {
	Status       Status
	Engine       string // the engines that solved: "lipoplan-simplex", "lipoplan-bb+lipoplan-simplex"; "clp", "cbc+clp" in the coin build
	Currency     string
	Spec         string
	Batch        float64
	CostPerTonne float64
	BatchCost    float64
	Blend        []Line
	Properties   blend.Properties
	Limits       []LimitReport
	Ranging      []Range
	Relaxation   []Relax        // when Infeasible: smallest relaxation that would make the spec feasible
	Notes        []string       // what the answer leaves out, in plain words (e.g. an unmodelled [process] step)
	Process      *ProcessReport // the [process] step as solved; nil when the spec has none
}

// Solve finds the cheapest blend of cat's stocks that meets spec.
// Errors caused by the inputs are catalogue.BadInput (the CLI exits 2); an
// impossible spec is not an error: Status is Infeasible and Relaxation is set.
func Solve(cat *catalogue.Catalogue, spec *catalogue.Spec, opt Options) (*Result, error) {
	if spec != nil && spec.Process != nil {
		return solveProcess(cat, spec, opt)
	}
	return solve(cat, spec, opt)
}
