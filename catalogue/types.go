package catalogue

import (
	"math"
	"sort"
)

// Point is one measured SFC value: percent solid at a temperature in deg C.
type Point struct {
	Temp  float64
	Solid float64
}

// Curve is a measured SFC curve sorted by temperature.
type Curve []Point

// At interpolates the curve linearly at temperature t. It reports false when t
// lies outside the measured range (no extrapolation) or the curve is empty.
func (c Curve) At(t float64) (float64, bool) {
	if len(c) == 0 {
		return 0, false
	}
	const eps = 1e-9
	if t < c[0].Temp-eps || t > c[len(c)-1].Temp+eps {
		return 0, false
	}
	for i, p := range c {
		if math.Abs(p.Temp-t) <= eps {
			return p.Solid, true
		}
		if i > 0 && t < p.Temp {
			q := c[i-1]
			f := (t - q.Temp) / (p.Temp - q.Temp)
			return q.Solid + f*(p.Solid-q.Solid), true
		}
	}
	return 0, false
}

// Stock is one oil or fat the plant holds or can buy.
type Stock struct {
	ID         string
	Name       string
	Price      float64            // currency per tonne
	Available  float64            // tonnes on hand; +Inf when unlimited
	FattyAcids map[string]float64 // wt% as FAME, keys are shorthand
	SN2        map[string]float64 // mol% of each FA found at sn-2; nil when unknown
	SFC        Curve              // measured SFC; nil when unknown
	TAGs       map[string]float64 // measured TAG profile, mol% by letter code; nil when unknown
}

// Limited reports whether the stock has a finite availability.
func (s Stock) Limited() bool { return !math.IsInf(s.Available, 1) }

// Catalogue is a loaded stock catalogue.
type Catalogue struct {
	File     string // where it came from, for messages
	Currency string
	Stocks   []Stock
}

// Find returns the stock with the given id.
func (c *Catalogue) Find(id string) (*Stock, bool) {
	for i := range c.Stocks {
		if c.Stocks[i].ID == id {
			return &c.Stocks[i], true
		}
	}
	return nil, false
}

// Clone returns a deep copy, so that what-if edits never touch the original.
func (c *Catalogue) Clone() *Catalogue {
	out := &Catalogue{File: c.File, Currency: c.Currency, Stocks: make([]Stock, len(c.Stocks))}
	for i, s := range c.Stocks {
		s.FattyAcids = cloneMap(s.FattyAcids)
		s.SN2 = cloneMap(s.SN2)
		s.TAGs = cloneMap(s.TAGs)
		s.SFC = append(Curve(nil), s.SFC...)
		out.Stocks[i] = s
	}
	return out
}

func cloneMap(m map[string]float64) map[string]float64 {
	if m == nil {
		return nil
	}
	out := make(map[string]float64, len(m))
	for k, v := range m {
		out[k] = v
	}
	return out
}

// Bound is a closed interval; an absent side is -Inf or +Inf.
type Bound struct {
	Min float64
	Max float64
}

// Free is a bound with neither side set.
func Free() Bound { return Bound{Min: math.Inf(-1), Max: math.Inf(1)} }

// HasMin reports whether the lower side is set.
func (b Bound) HasMin() bool { return !math.IsInf(b.Min, -1) }

// HasMax reports whether the upper side is set.
func (b Bound) HasMax() bool { return !math.IsInf(b.Max, 1) }

// Property names a spec limit may use besides fatty-acid keys.
var Properties = []string{"iv", "sv", "safa", "mufa", "pufa", "trans", "cox", "omega3"}

// IsProperty reports whether name is one of Properties.
func IsProperty(name string) bool {
	for _, p := range Properties {
		if p == name {
			return true
		}
	}
	return false
}

// Limit is a bound on a property ("iv", "safa", ...) or a fatty acid ("C18:2").
type Limit struct {
	Name string
	Bound
}

// SFCLimit bounds the solid fat content at one temperature.
type SFCLimit struct {
	Temp float64
	Bound
}

// Use bounds the inclusion of one stock, % of batch.
type Use struct {
	Stock string
	Bound
}

// Rules are the integer rules that need the MILP engine. Zero means unset.
type Rules struct {
	MaxStocks int     // at most this many stocks in the blend
	MinIfUsed float64 // a stock used at all is used at no less than this % of batch
}

// Active reports whether any integer rule is set.
func (r Rules) Active() bool { return r.MaxStocks > 0 || r.MinIfUsed > 0 }

// Process is the optional interesterification before final blending.
type Process struct {
	Interesterify []string // stocks that pass through the reactor together
	Method        string   // "chemical" or "enzymatic"
	Cost          float64  // currency per tonne processed
	SFC           string   // "measured" or "predicted"
}

// Spec is a product specification.
type Spec struct {
	File    string
	ID      string // short id: the file's base name without extension ("laminating")
	Name    string
	Batch   float64    // tonnes
	Limits  []Limit    // sorted by name
	SFC     []SFCLimit // sorted by temperature
	Use     []Use      // sorted by stock id
	Rules   Rules
	Process *Process // nil when the spec has no process step
}

// Clone returns a deep copy of the spec.
func (s *Spec) Clone() *Spec {
	out := *s
	out.Limits = append([]Limit(nil), s.Limits...)
	out.SFC = append([]SFCLimit(nil), s.SFC...)
	out.Use = append([]Use(nil), s.Use...)
	if s.Process != nil {
		p := *s.Process
		p.Interesterify = append([]string(nil), s.Process.Interesterify...)
		out.Process = &p
	}
	return &out
}

// SortLimits puts limits, SFC limits and use bounds in their canonical order.
func (s *Spec) SortLimits() {
	sort.SliceStable(s.Limits, func(i, j int) bool { return s.Limits[i].Name < s.Limits[j].Name })
	sort.SliceStable(s.SFC, func(i, j int) bool { return s.SFC[i].Temp < s.SFC[j].Temp })
	sort.SliceStable(s.Use, func(i, j int) bool { return s.Use[i].Stock < s.Use[j].Stock })
}

// DefaultTemps are the SFC temperatures reported when none are asked for.
var DefaultTemps = []float64{10, 15, 20, 25, 30, 35, 40, 45}

// Order is one line of a multi-product plan.
type Order struct {
	Spec   *Spec
	Path   string
	Tonnes float64
}

// Orders is a loaded orders file.
type Orders struct {
	File     string
	Orders   []Order
	Purchase map[string]float64 // price per tonne for buying beyond `available`
}
