package optimise

import (
	"fmt"
	"math"
	"strconv"
)

// words writes shadow prices in plain trade words: what moving a limit by
// one unit saves (or costs) per tonne of product.
type words struct {
	cur  string  // currency code for display; may be empty
	tiny float64 // shadow prices below this count as zero
}

// money writes an amount per tonne of product, e.g. "3.10 EUR/t".
func (w words) money(v float64) string {
	if w.cur == "" {
		return strconv.FormatFloat(v, 'f', 2, 64) + " per t"
	}
	return strconv.FormatFloat(v, 'f', 2, 64) + " " + w.cur + "/t"
}

func (w words) batch(v float64) string {
	if w.cur == "" {
		return fmt.Sprintf("%.2f per batch", v)
	}
	return fmt.Sprintf("%.2f %s per batch", v, w.cur)
}

// move phrases the effect of moving a bound: s is the shadow price (+ =
// raising the bound saves), loosen says which way relaxes the limit.
func (w words) move(what string, s float64, loosenUp bool) string {
	dir, saving := "lowering", -s
	if loosenUp {
		dir, saving = "raising", s
	}
	if math.Abs(s) <= w.tiny {
		return "binding, but " + dir + " " + what + " saves nothing at the margin"
	}
	if saving > 0 {
		return dir + " " + what + " saves " + w.money(saving)
	}
	return dir + " " + what + " costs " + w.money(-saving)
}

func slack(lr LimitReport, unit string) string {
	return "not binding: " + strconv.FormatFloat(math.Abs(lr.Value-lr.Bound), 'g', 4, 64) + unit + " inside the bound"
}

// limit explains a property, fatty-acid or SFC limit, e.g. "raising the IV
// maximum by 1 saves 3.10 EUR/t".
func (w words) limit(lr LimitReport, label, unit string, isMax bool) string {
	if !lr.Binding {
		return slack(lr, unit)
	}
	side := "minimum"
	if isMax {
		side = "maximum"
	}
	return w.move("the "+label+" "+side+" by 1"+unit, lr.ShadowPrice, isMax)
}

// useLimit explains a [use] bound of one stock.
func (w words) useLimit(lr LimitReport, id string, isMax bool) string {
	if !lr.Binding {
		return slack(lr, " %")
	}
	if isMax {
		return w.move(fmt.Sprintf("the cap on %s by 1 %% of the batch", id), lr.ShadowPrice, true)
	}
	return w.move(fmt.Sprintf("the minimum of %s by 1 %% of the batch", id), lr.ShadowPrice, false)
}

// avail explains an availability limit; its shadow price is per tonne of
// stock on hand.
func (w words) avail(lr LimitReport, id string, batch float64) string {
	if !lr.Binding {
		return "not binding: " + strconv.FormatFloat(math.Max(lr.Bound-lr.Value, 0), 'g', 4, 64) + " t of " + id + " left over"
	}
	if lr.ShadowPrice <= w.tiny {
		return fmt.Sprintf("all %s on hand is used, but more of it would save nothing", id)
	}
	return fmt.Sprintf("each extra tonne of %s on hand saves %s (%s)", id, w.money(lr.ShadowPrice), w.batch(lr.ShadowPrice*batch))
}

func (w words) minIfUsed(lr LimitReport) string {
	if !lr.Binding {
		return slack(lr, " %")
	}
	return w.move("the minimum dose of a stock in use by 1 %", lr.ShadowPrice, false)
}

func (w words) maxStocks(lr LimitReport) string {
	if !lr.Binding {
		return fmt.Sprintf("not binding: %d stocks in the blend, %d allowed", int(lr.Value), int(lr.Bound))
	}
	if lr.ShadowPrice <= w.tiny {
		return "binding, but allowing one more stock saves nothing"
	}
	return fmt.Sprintf("allowing one more stock saves %s", w.money(lr.ShadowPrice))
}
