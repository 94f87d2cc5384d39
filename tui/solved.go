package tui

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"time"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// Solved is a result kept in a scenario file: what lipoplan found when the
// file was saved, so that a later solve of the same file can be checked
// against it (lipoplan compare flags where they differ).
type Solved struct {
	At           time.Time // when the blend was solved, UTC
	Status       optimise.Status
	Engine       string
	CostPerTonne float64 // NaN when no blend was found
	Currency     string
	Blend        []optimise.Line // Name is not kept
}

// SolvedOf keeps what res found, solved at at.
func SolvedOf(res *optimise.Result, at time.Time) *Solved {
	s := &Solved{At: at.UTC().Truncate(time.Second), Status: res.Status, Engine: res.Engine, Currency: res.Currency, CostPerTonne: math.NaN()}
	if hasBlend(res) {
		s.CostPerTonne = res.CostPerTonne
		for _, l := range res.Blend {
			s.Blend = append(s.Blend, optimise.Line{Stock: l.Stock, Pct: l.Pct, Tonnes: l.Tonnes})
		}
	}
	return s
}

// HasBlend reports whether the saved result holds a blend.
func (s *Solved) HasBlend() bool { return !math.IsNaN(s.CostPerTonne) }

// Printed precision of a comparison: cost per tonne and shares are shown to
// two decimals, so a difference smaller than half the last digit is one the
// reader could not see and is not called a difference.
const (
	costTolerance  = 0.005 // currency per tonne
	shareTolerance = 0.005 // % of batch
)

// Differences lists, in words, where today's result res differs from the
// saved one: status, cost per tonne and each stock's share. None means the
// same answer to the printed precision.
func (s *Solved) Differences(res *optimise.Result) []string {
	var out []string
	if s.Status != res.Status {
		out = append(out, fmt.Sprintf("status %s when saved, %s now", s.Status, res.Status))
	}
	if !s.HasBlend() || !hasBlend(res) {
		if s.HasBlend() != hasBlend(res) && s.Status == res.Status {
			out = append(out, "a blend was found only once")
		}
		return out
	}
	if d := res.CostPerTonne - s.CostPerTonne; math.Abs(d) > costTolerance {
		out = append(out, fmt.Sprintf("cost %.2f when saved, %.2f now (%+.2f)", s.CostPerTonne, res.CostPerTonne, d))
	}
	was, now := map[string]float64{}, map[string]float64{}
	for _, l := range s.Blend {
		was[l.Stock] = l.Pct
	}
	for _, l := range res.Blend {
		now[l.Stock] = l.Pct
	}
	var ids []string
	for id := range was {
		ids = append(ids, id)
	}
	for id := range now {
		if _, ok := was[id]; !ok {
			ids = append(ids, id)
		}
	}
	sort.Strings(ids)
	var moved []string
	for _, id := range ids {
		if math.Abs(now[id]-was[id]) > shareTolerance {
			moved = append(moved, fmt.Sprintf("%s %.2f → %.2f %%", id, was[id], now[id]))
		}
	}
	if len(moved) > 0 {
		out = append(out, "blend "+strings.Join(moved, ", "))
	}
	return out
}

// fileResult is the [result] table of a scenario file.
type fileResult struct {
	Solved       time.Time  `toml:"solved"`
	Status       string     `toml:"status"`
	Engine       string     `toml:"engine,omitempty"`
	CostPerTonne *float64   `toml:"cost_per_tonne,omitempty"`
	Currency     string     `toml:"currency,omitempty"`
	Blend        []fileLine `toml:"blend,omitempty"`
}

type fileLine struct {
	Stock  string  `toml:"stock"`
	Pct    float64 `toml:"pct"`
	Tonnes float64 `toml:"tonnes"`
}

func (s *Solved) file() *fileResult {
	r := &fileResult{Solved: s.At, Status: string(s.Status), Engine: s.Engine, Currency: s.Currency}
	if s.HasBlend() {
		c := s.CostPerTonne
		r.CostPerTonne = &c
	}
	for _, l := range s.Blend {
		r.Blend = append(r.Blend, fileLine{Stock: l.Stock, Pct: l.Pct, Tonnes: l.Tonnes})
	}
	return r
}

// solved checks a [result] table against the file's stocks: a known status,
// a date, a cost within the accepted magnitudes exactly when there is a
// blend, and blend lines naming stocks of [stocks] with shares of 0-100 %.
func (r *fileResult) solved(name string, cat *catalogue.Catalogue) (*Solved, error) {
	bad := func(f string, a ...any) error {
		return catalogue.Badf("%s: [result] %s", name, fmt.Sprintf(f, a...))
	}
	st := optimise.Status(r.Status)
	switch st {
	case optimise.Optimal, optimise.Infeasible, optimise.NotProven:
	default:
		return nil, bad("status = %q is not one lipoplan writes (optimal, infeasible, not_proven)", r.Status)
	}
	if r.Solved.IsZero() {
		return nil, bad("has no solved = <date-time>; add when it was solved, e.g. solved = 2025-06-02T09:14:00Z, or remove [result]")
	}
	s := &Solved{At: r.Solved.UTC(), Status: st, Engine: r.Engine, Currency: r.Currency, CostPerTonne: math.NaN()}
	switch {
	case r.CostPerTonne == nil && len(r.Blend) > 0:
		return nil, bad("has a blend but no cost_per_tonne; add it or remove [result]")
	case r.CostPerTonne != nil && len(r.Blend) == 0:
		return nil, bad("has a cost_per_tonne but no [[result.blend]] lines; add them or remove [result]")
	case r.CostPerTonne != nil:
		if err := catalogue.QtyPrice.Check("[result] cost_per_tonne", *r.CostPerTonne); err != nil {
			return nil, catalogue.Badf("%s: %v", name, err)
		}
		s.CostPerTonne = *r.CostPerTonne
	}
	seen := map[string]bool{}
	for _, l := range r.Blend {
		if _, ok := cat.Find(l.Stock); !ok {
			return nil, bad("blend names stock %q, which is not in [stocks]", l.Stock)
		}
		if seen[l.Stock] {
			return nil, bad("blend names stock %q twice", l.Stock)
		}
		seen[l.Stock] = true
		if err := catalogue.QtyPercent.Check("[result] blend "+l.Stock+" pct", l.Pct); err != nil {
			return nil, catalogue.Badf("%s: %v", name, err)
		}
		if err := catalogue.QtyOnHand.Check("[result] blend "+l.Stock+" tonnes", l.Tonnes); err != nil {
			return nil, catalogue.Badf("%s: %v", name, err)
		}
		s.Blend = append(s.Blend, optimise.Line{Stock: l.Stock, Pct: l.Pct, Tonnes: l.Tonnes})
	}
	return s, nil
}
