package catalogue

import (
	"fmt"
	"math"
)

// Part is one line of a recipe: a stock at a share of the mix.
type Part struct {
	Stock *Stock
	Pct   float64 // % by mass
}

// CheckParts checks the lines of a recipe and returns the sum of their
// shares, which need not be 100 (a mix is normalised). A mix of no line, a
// share that is not a finite number >= 0 and shares that add up to 0 are
// bad input; a line without a stock is a caller's fault.
func CheckParts(parts []Part) (total float64, err error) {
	if len(parts) == 0 {
		return 0, Badf("the mix names no stock; give at least one stock with a share above 0")
	}
	for i, p := range parts {
		if p.Stock == nil {
			return 0, fmt.Errorf("catalogue: line %d of the mix has no stock", i+1)
		}
		if !(p.Pct >= 0) || math.IsInf(p.Pct, 1) {
			return 0, Badf("stock %q: share %v %% is not a finite number >= 0", p.Stock.ID, p.Pct)
		}
		total += p.Pct
	}
	if total <= 0 {
		return 0, Badf("the shares of the mix add up to 0; give at least one stock a share above 0")
	}
	return total, nil
}
