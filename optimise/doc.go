// Package optimise turns stocks and a product spec into a linear (or mixed
// integer) programme, solves it through the engine layer
// (lipoplan/optimise/lp: lipoplan's own simplex and branch and bound, or
// COIN-OR CLP/CBC in the coin build), and reports the cheapest blend with
// shadow prices, cost ranging and, for an impossible spec, the smallest
// relaxation from an elastic LP.
//
// The model has one column per stock, its share in % of the batch, costing
// price/100 so that the objective is currency per tonne of product. Rows
// and limit names (LimitReport.Name, Relax.Name; MPS row names drop the
// side):
//
//	sum                shares add up to 100 % (MPS only, never relaxed)
//	iv.min, iv.max     a [limits] entry: iv, sv, safa, mufa, pufa, trans,
//	C18:2.max ...      cox, omega3 or a fatty-acid key; Σ x_j/100 · v_j
//	sfc.20.min ...     a [limits.sfc] entry, linear in measured curves
//	use.<id>.min/max   a [use] bound (column bound, % of batch)
//	avail.<id>         availability, x_j <= 100·available/batch (column
//	                   bound; value, bound and By in tonnes, shadow price
//	                   per tonne of stock on hand)
//	max_stocks         integer rule Σ used_j <= N (MPS rows "count",
//	                   "link.<id>", columns "used.<id>")
//	smallest_share        integer rule x_j >= m·used_j (MPS rows "share.<id>")
//
// A spec with a [process] step adds reactor columns and, with predicted
// SFC, the TAG model of the whole blend through a successive LP (procModel);
// Replace matches an incumbent fat's curve; Plan makes several orders from
// one shared stock; Sweep walks a stock's price. Solver keeps working
// memory (engines and their bases, stock profiles) between solves.
//
// Shadow prices are in currency per tonne of product per unit of the limit,
// positive when raising the bound saves money. Cost ranging is the textbook
// ratio test on the final basis; a stock out of the blend gets the price at
// which it would enter (its reduced cost). With integer rules the duals and
// ranges are those of the LP with the integer choices fixed, and max_stocks
// is priced by solving again with one stock more.
package optimise
