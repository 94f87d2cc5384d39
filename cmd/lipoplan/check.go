package main

import (
	"fmt"
	"strings"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
)

func (a *app) check(args []string) error {
	fs := a.newFlags("check", "[--stocks F] [--spec F] [--orders F] [--calibration F] [--sfc-fit] [--format text|json]",
		"Validate a stock catalogue and optionally a spec or an orders file. Every problem is printed,\n"+
			"each naming the file, the stock or limit and what to change; exit 2 if there is any error.\n"+
			"A valid catalogue is followed by the TAG model's SFC against every measured curve and its RMS\n"+
			"error; --sfc-fit prints only that report.")
	stocksPath := fs.String("stocks", "", "stock catalogue TOML (default: embedded demo stocks)")
	specPath := fs.String("spec", "", "product spec TOML to check against the stocks")
	ordersPath := fs.String("orders", "", "orders TOML (multi-product plan) to check against the stocks")
	calPath := fs.String("calibration", "", calibrationFlagHelp)
	fitOnly := fs.Bool("sfc-fit", false, "print only the TAG model's error against the measured SFC curves")
	format := fs.String("format", "text", "text or json")
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if err := checkFormat(*format, "text", "json"); err != nil {
		return err
	}
	var all catalogue.Problems
	opt := sle.DefaultOptions()
	if *calPath != "" {
		cal, ps := catalogue.LoadCalibration(*calPath)
		all = append(all, ps...)
		if cal != nil {
			o, err := sle.OptionsFrom(cal)
			if err != nil {
				all = append(all, catalogue.Problem{File: *calPath, Msg: err.Error()})
			}
			opt = o
		}
	}
	var cat *catalogue.Catalogue
	if *stocksPath == "" {
		cat = catalogue.DemoStocks()
	} else {
		var ps catalogue.Problems
		cat, ps = catalogue.LoadStocks(*stocksPath)
		all = append(all, ps...)
	}
	nspecs := 0
	if *specPath != "" {
		_, ps := catalogue.LoadSpec(*specPath, cat)
		all = append(all, ps...)
		nspecs++
	}
	if *ordersPath != "" {
		_, ps := catalogue.LoadOrders(*ordersPath, cat)
		all = append(all, ps...)
	}
	errs := all.Errors()
	var fits []sle.Fit
	if cat != nil && len(errs) == 0 {
		var err error
		if fits, err = sle.FitCatalogue(cat, opt); err != nil {
			return err
		}
	}
	if *format == "json" {
		out := map[string]any{"status": "ok", "caution": cautionJSON}
		if len(errs) > 0 {
			out["status"] = "errors"
		}
		if !*fitOnly || len(errs) > 0 {
			ps := make([]map[string]any, 0, len(all))
			for _, p := range all {
				kind := "error"
				if p.Warning {
					kind = "warning"
				}
				ps = append(ps, map[string]any{"file": p.File, "where": p.Where, "message": p.Msg, "kind": kind})
			}
			out["problems"] = ps
		}
		if len(errs) == 0 {
			out["sfc_fit"] = fitJSON(fits, opt)
		}
		if err := writeJSON(a.stdout, out); err != nil {
			return err
		}
		if len(errs) > 0 {
			return errUsage
		}
		return nil
	}
	if !*fitOnly || len(errs) > 0 {
		for _, p := range all {
			fmt.Fprintln(a.stdout, a.paint(p))
		}
	}
	if len(errs) > 0 {
		fmt.Fprintf(a.stdout, "%d error(s), %d warning(s): fix the errors above and run check again\n", len(errs), len(all)-len(errs))
		return errUsage
	}
	if *fitOnly {
		writeFitText(a.stdout, fits, opt)
		return nil
	}
	src := "embedded demo stocks"
	if *stocksPath != "" {
		src = *stocksPath
	}
	fmt.Fprintf(a.stdout, "ok: %s: %d stocks", src, len(cat.Stocks))
	if nspecs > 0 {
		fmt.Fprintf(a.stdout, ", spec %s", *specPath)
	}
	if *ordersPath != "" {
		fmt.Fprintf(a.stdout, ", orders %s", *ordersPath)
	}
	fmt.Fprintf(a.stdout, " (%d warning(s))\n\n", len(all))
	writeFitText(a.stdout, fits, opt)
	return nil
}

// paint marks the kind of a problem in colour when colour is allowed (a
// terminal, NO_COLOR unset): errors red, warnings yellow.
func (a *app) paint(p catalogue.Problem) string {
	line := p.String()
	if !a.color {
		return line
	}
	kind, code := "error: ", "31"
	if p.Warning {
		kind, code = "warning: ", "33"
	}
	return strings.Replace(line, kind, "\x1b["+code+"m"+kind+"\x1b[0m", 1)
}
