package catalogue

import (
	"fmt"
	"math"
	"strconv"
)

// Quantity is a kind of number that a file or a workspace edit gives. Each
// has a range of magnitudes lipoplan accepts: values no plant has (a price of
// 1e25 per tonne, a batch of 1e-320 t) are bad input, refused with a message
// naming the value and the range, before any engine sees them. The ranges are
// a project decision, stated in README.md ("Accepted magnitudes").
type Quantity int

// The quantities with an accepted range.
const (
	QtyPrice   Quantity = iota // currency per tonne: stock and purchase prices, processing cost
	QtyOnHand                  // tonnes on hand (a stock's available)
	QtyTonnes                  // tonnes to make: a spec's batch, an order's tonnes
	QtyIV                      // iodine value limit, g I2/100 g
	QtySV                      // saponification value limit, mg KOH/g
	QtyCox                     // oxidisability (Cox value) limit
	QtyPercent                 // wt %, % solid, % of batch
)

// Range is the accepted magnitude of a Quantity: 0 (when ZeroOK) or a value
// from Least to Max. Nothing below zero is accepted.
type Range struct {
	Least  float64 // smallest value above zero
	Max    float64
	ZeroOK bool
	Unit   string
}

// Range returns the accepted range of q.
//
// Prices reach 1e9 per tonne so that currencies with many units to the
// dollar still fit; tonnages stop at a million tonnes and start at 1 kg
// (0.001 t). The property maxima lie above the largest value any fat of the
// reference acids can have (trilinolenin's IV is about 262, tributyrin's SV
// about 557, pure linolenic's Cox value 21.6; checked in magnitude_test.go).
func (q Quantity) Range() Range {
	switch q {
	case QtyPrice:
		return Range{Least: 0.001, Max: 1e9, ZeroOK: true, Unit: "per tonne"}
	case QtyOnHand:
		return Range{Least: 0.001, Max: 1e6, ZeroOK: true, Unit: "t"}
	case QtyTonnes:
		return Range{Least: 0.001, Max: 1e6, Unit: "t"}
	case QtyIV:
		return Range{Max: 300, ZeroOK: true, Unit: "g I2/100 g"}
	case QtySV:
		return Range{Max: 600, ZeroOK: true, Unit: "mg KOH/g"}
	case QtyCox:
		return Range{Max: 25, ZeroOK: true, Unit: "(Cox value)"}
	}
	return Range{Max: 100, ZeroOK: true, Unit: "%"}
}

// String writes the range for a message, e.g. "0, or 0.001 to 1e9 per tonne".
func (r Range) String() string {
	s := magText(r.Least) + " to " + magText(r.Max) + " " + r.Unit
	if r.ZeroOK && r.Least > 0 {
		s = "0, or " + s
	}
	return s
}

// Contains reports whether v is an accepted value.
func (r Range) Contains(v float64) bool {
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0) || v > r.Max || v < 0:
		return false
	case v == 0:
		return r.ZeroOK
	}
	return v >= r.Least
}

// Check returns nil when v is an accepted value of q, or a BadInput error
// "<label> = <v> is ...; accepted: <range>". The loaders and the checks of
// values built in code (Stock.Check, Spec.Check, which the workspace's edits
// call) use it, and so do the CLI's flags, so a value is refused with the
// same words wherever it is typed.
func (q Quantity) Check(label string, v float64) error {
	r := q.Range()
	switch {
	case r.Contains(v):
		return nil
	case math.IsNaN(v) || math.IsInf(v, 0):
		return Badf("%s = %v is not a finite number; accepted: %s", label, v, r)
	case v < 0:
		return Badf("%s = %g is negative; accepted: %s", label, v, r)
	}
	return Badf("%s = %g is outside the accepted range %s", label, v, r)
}

// LimitQuantity is the quantity of a spec limit's bounds: iv, sv and cox
// have their own units, every other limit is a percentage.
func LimitQuantity(name string) Quantity {
	switch name {
	case "iv":
		return QtyIV
	case "sv":
		return QtySV
	case "cox":
		return QtyCox
	}
	return QtyPercent
}

// magText writes a range end: powers of ten from 1e5 up as "1e6".
func magText(v float64) string {
	if v >= 1e5 {
		if e := math.Log10(v); e == math.Trunc(e) {
			return "1e" + strconv.Itoa(int(e))
		}
	}
	return fmt.Sprintf("%g", v)
}
