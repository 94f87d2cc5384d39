package main

import (
	"fmt"
	"io"
	"math"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// demoPlanTonnes is the amount of each demo spec in the demo plan.
const demoPlanTonnes = 100.0

func (a *app) plan(args []string) error {
	fs := a.newFlags("plan", `[--stocks F] [--orders F] [--format text|json] [--mps FILE] [--mps-format free|fixed]`,
		"Cheapest way to make every order of an orders file from one shared stock: each product meets\n"+
			"its spec, stock on hand is shared, and [purchase] prices buy beyond it. Prints each product's\n"+
			"blend and what one more tonne of each limited stock would save (exit 3 when impossible).")
	in := a.inputFlags(fs, noSpec, "", "text", "json")
	ordersPath := fs.String("orders", "", fmt.Sprintf("orders TOML (default: every demo spec, %g t each)", demoPlanTonnes))
	mps := fs.String("mps", "", "also write the joint model to this `file` in MPS format (- = standard output, the report then goes to standard error)")
	mpsLayout := fs.String("mps-format", "free", mpsFormatHelp)
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if err := in.check(); err != nil {
		return err
	}
	layout, err := mpsFormat(*mpsLayout)
	if err != nil {
		return err
	}
	mpsOut := output{"--mps", *mps}
	report, err := a.reportTo(mpsOut)
	if err != nil {
		return err
	}
	cat, _, err := in.load(a)
	if err != nil {
		return err
	}
	orders, err := a.orders(*ordersPath, cat)
	if err != nil {
		return err
	}
	if *mps != "" {
		model, err := optimise.PlanMPSIn(layout, cat, orders)
		if err != nil {
			return fmt.Errorf("--mps: %w", err)
		}
		inputs := append(in.files(), *ordersPath)
		for _, o := range orders.Orders {
			inputs = append(inputs, o.Path)
		}
		if err := a.write(mpsOut, model, inputs...); err != nil {
			return err
		}
	}
	res, err := optimise.Plan(cat, orders)
	if err != nil {
		return err
	}
	if in.json() {
		err = writeJSON(report, planJSON(res))
	} else {
		writePlanText(report, res)
	}
	if err != nil {
		return err
	}
	if res.Status == optimise.Infeasible {
		return errInfeasible
	}
	return nil
}

// orders loads the orders file ("" = every demo spec at demoPlanTonnes).
func (a *app) orders(path string, cat *catalogue.Catalogue) (*catalogue.Orders, error) {
	if path == "" {
		out := &catalogue.Orders{}
		for _, s := range catalogue.DemoSpecs() {
			out.Orders = append(out.Orders, catalogue.Order{Spec: s, Tonnes: demoPlanTonnes})
		}
		return out, nil
	}
	o, ps := catalogue.LoadOrders(path, cat)
	a.warn(ps)
	if len(ps.Errors()) > 0 {
		return nil, ps.Errors()
	}
	return o, nil
}

// planJSON is the stable JSON shape of a plan (README, JSON output).
func planJSON(r *optimise.PlanResult) map[string]any {
	out := map[string]any{"status": string(r.Status), "engine": r.Engine, "caution": cautionJSON}
	products := []map[string]any{}
	stocks := []map[string]any{}
	if r.Status == optimise.Optimal {
		out["total_cost"] = round(r.TotalCost, 2)
		for _, p := range r.Products {
			products = append(products, map[string]any{"spec": p.Spec, "tonnes": p.Tonnes, "cost_per_tonne": round(p.CostPerTonne, 4), "blend": blendJSON(p.Blend)})
		}
		for _, s := range r.Stocks {
			stocks = append(stocks, map[string]any{"stock": s.Stock, "used": round(s.Used, 6), "available": finiteOrNil(s.Available, 6),
				"buy": round(s.Buy, 6), "shadow_price": round(s.ShadowPrice, 6)})
		}
	} else {
		out["total_cost"] = nil
		out["relaxation"] = relaxJSON(r.Relaxation)
	}
	out["products"] = products
	out["stocks"] = stocks
	if len(r.Notes) > 0 {
		out["notes"] = r.Notes
	}
	return out
}

func writePlanText(w io.Writer, r *optimise.PlanResult) {
	for _, n := range r.Notes {
		fmt.Fprintln(w, wrapText("Note: "+n, 100, "      "))
	}
	if r.Status != optimise.Optimal {
		fmt.Fprintln(w, "The orders cannot all be met with these stocks.")
		if len(r.Relaxation) > 0 {
			fmt.Fprintln(w, "\nSmallest change that would make them feasible (\"<spec>:<limit>\" for a product that is")
			fmt.Fprintln(w, "impossible on its own; \"avail.<stock>\" for stock that is short across the orders):")
			for _, x := range r.Relaxation {
				fmt.Fprintf(w, "  %-26s %s\n", x.Name, relaxWords(x))
			}
		}
		fmt.Fprintln(w)
		fmt.Fprintln(w, cautionLine)
		return
	}
	fmt.Fprintf(w, "Plan for %d orders (%s): total %s\n", len(r.Products), r.Engine, money(r.TotalCost, r.Currency))
	for _, p := range r.Products {
		fmt.Fprintf(w, "\n  %s, %g t at %s per tonne\n", p.Spec, p.Tonnes, money(p.CostPerTonne, r.Currency))
		for _, l := range p.Blend {
			fmt.Fprintf(w, "    %-14s %8.2f %% %10.3f t\n", l.Stock, l.Pct, l.Tonnes)
		}
	}
	fmt.Fprintln(w, "\nStocks")
	fmt.Fprintf(w, "  %-14s %10s %10s %10s   %s\n", "stock", "used t", "on hand t", "buy t", "one more tonne on hand")
	for _, s := range r.Stocks {
		hand := "no limit"
		if !math.IsInf(s.Available, 1) {
			hand = fmt.Sprintf("%.3f", s.Available)
		}
		worth := "saves nothing"
		if s.ShadowPrice > 1e-9 {
			worth = "saves " + money(s.ShadowPrice, r.Currency)
		}
		fmt.Fprintf(w, "  %-14s %10.3f %10s %10.3f   %s\n", s.Stock, s.Used, hand, s.Buy, worth)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionLine)
}
