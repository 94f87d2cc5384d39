package optimise

import (
	"math"
	"strconv"
)

// phrasing writes shadow prices in plain trade words: what moving a limit by
// one unit saves (or costs) per tonne of product. Every phrase is appended
// to a byte buffer, so that a report writes all its texts into one buffer
// (see limitTexts) rather than allocating a string or two per limit.
type phrasing struct {
	cur  string  // currency code for display; may be empty
	tiny float64 // shadow prices below this count as zero
}

// money appends an amount per tonne of product, e.g. "3.10 EUR/t".
func (w phrasing) money(b []byte, v float64) []byte {
	b = strconv.AppendFloat(b, v, 'f', 2, 64)
	if w.cur == "" {
		return append(b, " per t"...)
	}
	return append(append(append(b, ' '), w.cur...), "/t"...)
}

// batch appends an amount per batch, e.g. "62.00 EUR per batch".
func (w phrasing) batch(b []byte, v float64) []byte {
	b = strconv.AppendFloat(b, v, 'f', 2, 64)
	if w.cur == "" {
		return append(b, " per batch"...)
	}
	return append(append(append(b, ' '), w.cur...), " per batch"...)
}

// move phrases the effect of moving a bound: s is the shadow price (+ =
// raising the bound saves), loosenUp says which way relaxes the limit, per
// is the unit step ("1 % solid"), and lr's HoldsFrom/HoldsTo how far the
// price holds; what is appended by the caller's func so it needs no string
// of its own. E.g. "lowering the SFC at 35 °C minimum saves 13.20 EUR/t per
// 1 % solid, down to 11.93; past that the blend changes".
func (w phrasing) move(b []byte, lr LimitReport, what func([]byte) []byte, per string, loosenUp bool) []byte {
	s := lr.ShadowPrice
	dir, saving := "lowering ", -s
	if loosenUp {
		dir, saving = "raising ", s
	}
	if math.Abs(s) <= w.tiny {
		b = append(append(b, "holds the blend, but "...), dir...)
		return append(what(b), " saves nothing at the margin"...)
	}
	b = what(append(b, dir...))
	if saving > 0 {
		b = w.money(append(b, " saves "...), saving)
	} else {
		b = w.money(append(b, " costs "...), -saving)
	}
	b = append(append(b, " per "...), per...)
	end, way := lr.HoldsFrom, ", down to "
	if loosenUp {
		end, way = lr.HoldsTo, ", up to "
	}
	switch {
	case math.IsNaN(end):
		return b
	case math.IsInf(end, 0):
		return append(b, " however far it moves"...)
	}
	b = strconv.AppendFloat(append(b, way...), end, 'f', 2, 64)
	if !loosenUp && end <= 0 {
		return b // a limit cannot go below nothing
	}
	return append(b, "; past that the blend changes"...)
}

// holding limits' shadow prices apply per one unit of the limit.
func perUnit(unit string) string {
	if unit == "" {
		return "1"
	}
	return "1" + unit
}

func slack(b []byte, lr LimitReport, unit string) []byte {
	b = append(b, "room left: "...)
	b = strconv.AppendFloat(b, lr.Room(), 'g', 4, 64)
	return append(b, unit...)
}

// limit explains a property, fatty-acid or SFC limit, e.g. "raising the IV
// maximum saves 3.10 EUR/t per 1, up to 52.50; past that the blend changes".
func (w phrasing) limit(b []byte, lr LimitReport, label, unit string, isMax bool) []byte {
	if !lr.Binding {
		return slack(b, lr, unit)
	}
	side := " minimum"
	if isMax {
		side = " maximum"
	}
	return w.move(b, lr, func(b []byte) []byte {
		return append(append(append(b, "the "...), label...), side...)
	}, perUnit(unit), isMax)
}

// useLimit explains a [use] bound of one stock.
func (w phrasing) useLimit(b []byte, lr LimitReport, id string, isMax bool) []byte {
	if lr.Excluded {
		return append(append(b, id...), " is left out by the spec"...)
	}
	if !lr.Binding {
		return slack(b, lr, " % of the batch")
	}
	if isMax {
		return w.move(b, lr, func(b []byte) []byte {
			return append(append(b, "the cap on "...), id...)
		}, "1 % of the batch", true)
	}
	return w.move(b, lr, func(b []byte) []byte {
		return append(append(b, "the minimum of "...), id...)
	}, "1 % of the batch", false)
}

// avail explains an availability limit; its shadow price is per tonne of
// stock on hand.
func (w phrasing) avail(b []byte, lr LimitReport, id string, batch float64) []byte {
	if !lr.Binding {
		b = append(b, "room left: "...)
		b = strconv.AppendFloat(b, math.Max(lr.Bound-lr.Value, 0), 'g', 4, 64)
		return append(append(append(b, " t of "...), id...), " not used"...)
	}
	if lr.ShadowPrice <= w.tiny {
		return append(append(append(b, "all "...), id...), " on hand is used, but more of it would save nothing"...)
	}
	b = append(append(append(b, "each extra tonne of "...), id...), " on hand saves "...)
	b = w.money(b, lr.ShadowPrice)
	b = w.batch(append(b, " ("...), lr.ShadowPrice*batch)
	b = append(b, ')')
	if !math.IsNaN(lr.HoldsTo) && !math.IsInf(lr.HoldsTo, 0) {
		b = strconv.AppendFloat(append(b, ", up to "...), lr.HoldsTo, 'f', 2, 64)
		b = append(b, " t on hand; past that the blend changes"...)
	}
	return b
}

func (w phrasing) smallestShare(b []byte, lr LimitReport) []byte {
	if !lr.Binding {
		return slack(b, lr, " % of the batch")
	}
	return w.move(b, lr, func(b []byte) []byte {
		return append(b, "the smallest share of a stock in use"...)
	}, "1 % of the batch", false)
}

func (w phrasing) maxStocks(b []byte, lr LimitReport) []byte {
	if !lr.Binding {
		b = append(b, "room left: "...)
		b = strconv.AppendInt(b, int64(lr.Value), 10)
		b = append(b, " stocks used of "...)
		b = strconv.AppendInt(b, int64(lr.Bound), 10)
		return append(b, " allowed"...)
	}
	if lr.ShadowPrice <= w.tiny {
		return append(b, "holds the blend, but allowing one more stock saves nothing"...)
	}
	return w.money(append(b, "allowing one more stock saves "...), lr.ShadowPrice)
}

// limitTexts gathers the names and explanations of a report's limits in one
// buffer; done turns the buffer into one string and hands each limit its
// two substrings, so a report of forty limits costs one string allocation
// instead of eighty.
type limitTexts struct {
	b  []byte
	at []int // end of each name, then of its explanation, limit by limit
}

// endName and endExplanation close the current limit's name and explanation; the
// caller appends each to t.b first.
func (t *limitTexts) endName()        { t.at = append(t.at, len(t.b)) }
func (t *limitTexts) endExplanation() { t.at = append(t.at, len(t.b)) }

// done sets Name and Explain of limits[k] for every limit written.
func (t *limitTexts) done(limits []LimitReport) {
	s := string(t.b)
	prev := 0
	for k := 0; 2*k+1 < len(t.at); k++ {
		a, b := t.at[2*k], t.at[2*k+1]
		limits[k].Name, limits[k].Explain = s[prev:a], s[a:b]
		prev = b
	}
}
