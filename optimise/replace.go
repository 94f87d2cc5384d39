package optimise

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"sort"
	"strings"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// Replacement asks for the cheapest blend that melts like an incumbent fat
// (typically a partially hardened one) within a tolerance, with trans at or
// under a limit and the incumbent itself left out.
type Replacement struct {
	Incumbent string  // stock id; it must have a measured SFC curve
	Tolerance float64 // % solid either side of the incumbent's curve at every temperature
	// PerTemp overrides Tolerance at given temperatures (deg C -> % solid).
	PerTemp map[float64]float64
	// Temps are the temperatures to match (deg C); nil means every
	// temperature of the incumbent's measured curve.
	Temps    []float64
	TransMax float64 // % of fat; NaN means no trans limit
	Batch    float64 // tonnes; 0 means 1
	// Process, when not nil, lets Feed go through a reactor (chemical or
	// enzymatic) before blending; the SFC is then the TAG model's for the
	// whole blend. Without it the SFC is linear in the measured curves.
	Process *catalogue.Process
	// Base holds further limits and [use] bounds the new blend must meet
	// (nil: none besides the match and the trans limit).
	Base *catalogue.Spec
}

// ReplaceResult is a replacement's answer.
type ReplaceResult struct {
	Status    Status
	Incumbent *catalogue.Stock
	// Tolerance is the tolerance the blend was found at: the one asked for,
	// or, when no blend meets it, the smallest one that can be met
	// (Requested keeps the one asked for).
	Tolerance, Requested float64
	Spec                 *catalogue.Spec // the spec that was solved
	Result               *Result         // the solve at Tolerance; nil when no tolerance can be met
	Saving               float64         // incumbent price - cost per tonne (> 0: the new blend is cheaper)
	Points               []MatchPoint    // one per matched temperature
	MaxDeviation         MatchPoint      // the point furthest from the incumbent
	Incumbents           blend.Properties
	Before, After        randomise.Classes // TAG classes of the incumbent and of the new blend (after any reaction)
	BeforeErr, AfterErr  error             // when a TAG distribution could not be formed
	Notes                []string
}

// MatchPoint is the incumbent's measured SFC at one temperature beside the
// new blend's: linear in its stocks' measured curves (NaN where a stock
// has none) and predicted by the TAG model.
type MatchPoint struct {
	Temp                         float64
	Incumbent, Linear, Predicted float64
	By                           float64 // the deviation that the match is judged on: the constrained curve minus the incumbent
	Bound                        float64 // the tolerance at this temperature
}

// Replace finds the cheapest blend whose SFC stays within the tolerance of
// the incumbent's measured curve (the spec it solves has one SFC band per
// temperature, incumbent ± tolerance, clamped to 0..100 % solid; trans at
// or under TransMax; the incumbent excluded). When no blend meets the
// tolerance it finds the smallest uniform increase that can be met: an
// upper end from the elastic relaxation of the spec at the asked tolerance
// (raising every band by the largest SFC relaxation makes it feasible),
// then bisection to 0.05 % solid between the two, each step a full solve.
func Replace(cat *catalogue.Catalogue, r Replacement, opt Options) (*ReplaceResult, error) {
	inc, temps, curve, err := r.target(cat)
	if err != nil {
		return nil, err
	}
	res := &ReplaceResult{Incumbent: inc, Requested: r.Tolerance, Tolerance: r.Tolerance}
	return res, res.solve(cat, r, inc, temps, curve, opt)
}

// ReplacementSpec is the spec a replacement solves at its tolerance: one SFC
// band per temperature (the incumbent's measured curve ± tolerance), the
// trans limit, the incumbent left out, and Base's other limits. The
// workspace uses it for its matching mode.
func ReplacementSpec(cat *catalogue.Catalogue, r Replacement) (*catalogue.Spec, error) {
	inc, temps, curve, err := r.target(cat)
	if err != nil {
		return nil, err
	}
	return r.spec(inc, temps, curve, 0), nil
}

// target checks the replacement and returns the incumbent, the
// temperatures to match and its curve at them.
func (r Replacement) target(cat *catalogue.Catalogue) (*catalogue.Stock, []float64, map[float64]float64, error) {
	inc, ok := cat.Find(r.Incumbent)
	if !ok {
		return nil, nil, nil, catalogue.Badf("incumbent %q is not in the catalogue; give the id of the fat to replace (stock ids: %s)", r.Incumbent, catIDs(cat))
	}
	if len(inc.SFC) == 0 {
		return nil, nil, nil, catalogue.Badf("incumbent %q has no measured SFC curve to match; add [stock.sfc] to it", inc.ID)
	}
	if math.IsNaN(r.Tolerance) || r.Tolerance < 0 || r.Tolerance > 100 {
		return nil, nil, nil, catalogue.Badf("tolerance %v %% solid is outside 0..100; give e.g. 3", r.Tolerance)
	}
	for _, t := range slices.Sorted(maps.Keys(r.PerTemp)) { // the coldest bad one, every run
		if v := r.PerTemp[t]; math.IsNaN(v) || v < 0 || v > 100 {
			return nil, nil, nil, catalogue.Badf("tolerance at %s °C = %v %% solid is outside 0..100", catalogue.TempKey(t), v)
		}
	}
	temps := r.Temps
	if len(temps) == 0 {
		for _, p := range inc.SFC {
			temps = append(temps, p.Temp)
		}
	}
	curve := map[float64]float64{}
	for _, t := range temps {
		v, ok := inc.SFC.At(t)
		if !ok {
			return nil, nil, nil, catalogue.Badf("incumbent %q has no measured SFC at %s °C (its curve runs %s to %s °C); match within that range",
				inc.ID, catalogue.TempKey(t), catalogue.TempKey(inc.SFC[0].Temp), catalogue.TempKey(inc.SFC[len(inc.SFC)-1].Temp))
		}
		curve[t] = v
	}
	temps = append([]float64(nil), temps...)
	sort.Float64s(temps)
	return inc, temps, curve, nil
}

// solve finds the answer of Replace into res.
func (res *ReplaceResult) solve(cat *catalogue.Catalogue, r Replacement, inc *catalogue.Stock, temps []float64, curve map[float64]float64, opt Options) error {
	solveAt := func(extra float64) (*catalogue.Spec, *Result, error) {
		spec := r.spec(inc, temps, curve, extra)
		out, err := Solve(cat, spec, opt)
		return spec, out, err
	}
	spec, out, err := solveAt(0)
	if err != nil {
		return err
	}
	if out.Status != Optimal {
		// The smallest extra tolerance that can be met.
		hi := 0.0
		for _, x := range out.Relaxation {
			if strings.HasPrefix(x.Name, "sfc.") {
				hi = math.Max(hi, x.By)
			}
		}
		if len(out.Relaxation) > 0 && hi == 0 {
			// only non-SFC limits give way: no tolerance helps
			res.Status, res.Spec, res.Result = Infeasible, spec, out
			res.Notes = append(res.Notes, "no blend meets the other limits (trans, the spec's own) at any tolerance; see the relaxation")
			return nil
		}
		lo := 0.0
		hi = math.Max(hi, 0.1)
		var hiSpec *catalogue.Spec
		var hiRes *Result
		for k := 0; k < 8; k++ { // the relaxation is an estimate for predicted SFC: widen until met
			s, o, err := solveAt(hi)
			if err != nil {
				return err
			}
			if o.Status == Optimal {
				hiSpec, hiRes = s, o
				break
			}
			lo, hi = hi, math.Min(2*hi+1, 100)
		}
		if hiRes == nil {
			res.Status, res.Spec, res.Result = Infeasible, spec, out
			res.Notes = append(res.Notes, "no tolerance up to 100 % solid can be met: the stocks cannot make a blend near this curve")
			return nil
		}
		for hi-lo > 0.05 {
			mid := (lo + hi) / 2
			s, o, err := solveAt(mid)
			if err != nil {
				return err
			}
			if o.Status == Optimal {
				hi, hiSpec, hiRes = mid, s, o
			} else {
				lo = mid
			}
		}
		res.Status = Infeasible
		res.Tolerance = r.Tolerance + hi
		spec, out = hiSpec, hiRes
		res.Notes = append(res.Notes, fmt.Sprintf("no blend stays within ±%.1f %% solid of %s; the smallest tolerance that can be met is about ±%.1f (bisection to 0.05 %% solid), and the blend below is the cheapest at it",
			r.Tolerance, inc.ID, res.Tolerance))
	} else {
		res.Status = Optimal
	}
	res.Spec, res.Result = spec, out
	res.Saving = inc.Price - out.CostPerTonne
	return res.compare(cat, r, temps, curve, opt)
}

// spec is the replacement's spec at tolerance + extra.
func (r Replacement) spec(inc *catalogue.Stock, temps []float64, curve map[float64]float64, extra float64) *catalogue.Spec {
	var spec *catalogue.Spec
	if r.Base != nil {
		spec = r.Base.Clone()
	} else {
		spec = &catalogue.Spec{}
	}
	spec.Name = "replacement for " + inc.ID
	if spec.Batch <= 0 {
		spec.Batch = r.Batch
	}
	if spec.Batch <= 0 {
		spec.Batch = 1
	}
	spec.SFC = spec.SFC[:0]
	for _, t := range temps {
		tol := r.Tolerance
		if v, ok := r.PerTemp[t]; ok {
			tol = v
		}
		tol += extra
		spec.SFC = append(spec.SFC, catalogue.SFCLimit{Temp: t, Bound: catalogue.Bound{
			Min: math.Max(0, curve[t]-tol), Max: math.Min(100, curve[t]+tol)}})
	}
	if !math.IsNaN(r.TransMax) {
		spec.Limits = withLimit(spec.Limits, "trans", r.TransMax)
	}
	spec.Use = withUseMax(spec.Use, inc.ID, 0)
	if r.Process != nil {
		p := *r.Process
		p.Interesterify = append([]string(nil), r.Process.Interesterify...)
		p.SFC = "predicted"
		spec.Process = &p
	} else {
		spec.Process = nil
	}
	spec.SortLimits()
	return spec
}

func withLimit(ls []catalogue.Limit, name string, max float64) []catalogue.Limit {
	for i := range ls {
		if ls[i].Name == name {
			ls[i].Max = math.Min(ls[i].Max, max)
			return ls
		}
	}
	return append(ls, catalogue.Limit{Name: name, Bound: catalogue.Bound{Min: math.Inf(-1), Max: max}})
}

func withUseMax(us []catalogue.Use, id string, max float64) []catalogue.Use {
	for i := range us {
		if us[i].Stock == id {
			us[i].Max = max
			us[i].Min = math.Min(us[i].Min, max)
			return us
		}
	}
	return append(us, catalogue.Use{Stock: id, Bound: catalogue.Bound{Min: math.Inf(-1), Max: max}})
}

// compare fills the curve side by side, the largest deviation and the TAG
// classes before and after.
func (res *ReplaceResult) compare(cat *catalogue.Catalogue, r Replacement, temps []float64, curve map[float64]float64, opt Options) error {
	out := res.Result
	var parts []blend.Part
	for _, l := range out.Blend {
		s, _ := cat.Find(l.Stock)
		parts = append(parts, blend.Part{Stock: s, Pct: l.Pct})
	}
	linear, _ := blend.SFC(parts, temps)
	predicted := map[float64]float64{}
	if out.Process != nil && out.Process.SFCModel == "predicted" {
		// the solve's own SFC is the whole blend's prediction
		for _, t := range temps {
			predicted[t] = out.Properties.SFC[t]
		}
	} else {
		p, _, err := sle.PredictParts(parts, randomise.Native, 0, temps, opt.Model)
		if err != nil {
			return fmt.Errorf("replacement: predicted SFC: %w", err)
		}
		predicted = p
	}
	res.MaxDeviation = MatchPoint{Temp: math.NaN()}
	for _, t := range temps {
		tol := r.Tolerance
		if v, ok := r.PerTemp[t]; ok {
			tol = v
		}
		mp := MatchPoint{Temp: t, Incumbent: curve[t], Linear: math.NaN(), Predicted: predicted[t], Bound: tol}
		if v, ok := linear[t]; ok {
			mp.Linear = v
		}
		mp.By = mp.Linear - mp.Incumbent
		if out.Process != nil {
			mp.By = mp.Predicted - mp.Incumbent
		}
		res.Points = append(res.Points, mp)
		if math.IsNaN(res.MaxDeviation.Temp) || math.Abs(mp.By) > math.Abs(res.MaxDeviation.By) {
			res.MaxDeviation = mp
		}
	}
	ip, err := blend.Mix([]blend.Part{{Stock: res.Incumbent, Pct: 100}}, temps)
	if err != nil {
		return fmt.Errorf("replacement: incumbent %q: %w", res.Incumbent.ID, err)
	}
	res.Incumbents = ip
	if d, err := randomise.Distribute([]blend.Part{{Stock: res.Incumbent, Pct: 100}}, randomise.Native, 0); err == nil {
		res.Before = d.Classes()
	} else {
		res.BeforeErr = err
	}
	res.After, res.AfterErr = blendClasses(cat, out)
	return nil
}

// blendClasses are the TAG classes of a solved blend (BlendTAGs).
func blendClasses(cat *catalogue.Catalogue, out *Result) (randomise.Classes, error) {
	d, err := BlendTAGs(cat, out)
	if err != nil {
		return randomise.Classes{}, err
	}
	return d.Classes(), nil
}

// BlendTAGs is the positional TAG distribution of a solved blend: the
// stocks blended as they are with their native TAGs (1,3-random-2-random
// from each stock's sn-2 profile, or its measured TAG profile) and the
// reactor's product (its feed interesterified to equilibrium by the
// report's method), mixed by TAG moles (randomise.Blender). Method is the
// reactor's method, Native when nothing goes through it; Notes are the
// Blender's.
func BlendTAGs(cat *catalogue.Catalogue, r *Result) (*randomise.Distribution, error) {
	var stocks []*catalogue.Stock
	var direct []float64
	for _, l := range r.Blend {
		s, ok := cat.Find(l.Stock)
		if !ok {
			return nil, fmt.Errorf("stock %s is not in the catalogue", l.Stock)
		}
		stocks = append(stocks, s)
		direct = append(direct, l.Pct)
	}
	var feed []float64
	reactor := randomise.Native
	if p := r.Process; p != nil && len(p.Feed) > 0 {
		reactor = randomise.Method(p.Method)
		feed = make([]float64, len(stocks))
		for _, f := range p.Feed {
			for j, s := range stocks {
				if s.ID == f.Stock {
					feed[j] += f.Pct
					direct[j] = math.Max(direct[j]-f.Pct, 0)
				}
			}
		}
	}
	b, err := randomise.NewBlender(stocks)
	if err != nil {
		return nil, err
	}
	mol := make([]float64, b.Len())
	if err := b.Mix(direct, feed, reactor, mol); err != nil {
		return nil, err
	}
	return &randomise.Distribution{Acids: b.Acids, Mol: mol, Method: reactor, Notes: b.Notes}, nil
}

func catIDs(cat *catalogue.Catalogue) string {
	ids := make([]string, len(cat.Stocks))
	for i, s := range cat.Stocks {
		ids[i] = s.ID
	}
	return strings.Join(ids, ", ")
}
