package main

import (
	"fmt"
	"strings"

	"lipoplan/catalogue"
)

func (a *app) check(args []string) error {
	fs := a.newFlags("check", "[--stocks F] [--spec F] [--orders F]",
		"Validate a stock catalogue and optionally a spec or an orders file. Every problem is printed,\n"+
			"each naming the file, the stock or limit and what to change; exit 2 if there is any error.")
	stocksPath := fs.String("stocks", "", "stock catalogue TOML (default: embedded demo stocks)")
	specPath := fs.String("spec", "", "product spec TOML to check against the stocks")
	ordersPath := fs.String("orders", "", "orders TOML (multi-product plan) to check against the stocks")
	if err := a.parse(fs, args); err != nil {
		return err
	}
	var all catalogue.Problems
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
	for _, p := range all {
		fmt.Fprintln(a.stdout, a.paint(p))
	}
	errs := all.Errors()
	if len(errs) > 0 {
		fmt.Fprintf(a.stdout, "%d error(s), %d warning(s): fix the errors above and run check again\n", len(errs), len(all)-len(errs))
		return errUsage
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
	fmt.Fprintf(a.stdout, " (%d warning(s))\n", len(all))
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
