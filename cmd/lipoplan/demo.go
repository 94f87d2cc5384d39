package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"sort"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/optimise"
)

func (a *app) demo(args []string) error {
	fs := a.newFlags("demo", "[--write DIR] [--no-stocks-table]",
		"Solve the embedded demo scenario (an invented plant and its stocks) and print the report, after\n"+
			"the property table of the demo stocks (--no-stocks-table, or --stocks-table=false, leaves it out).\n"+
			"--write saves the demo stock catalogue and specs as TOML files to start your own.")
	write := fs.String("write", "", "save the demo files into this folder instead of solving")
	table := fs.Bool("stocks-table", true, "print the property table of the demo stocks first (the default; --stocks-table=false leaves it out)")
	noTable := fs.Bool("no-stocks-table", false, "leave out the property table of the demo stocks")
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if *noTable {
		asked := false
		fs.Visit(func(f *flag.Flag) { asked = asked || (f.Name == "stocks-table" && *table) })
		if asked {
			return catalogue.Badf("--stocks-table and --no-stocks-table contradict each other; give one of them")
		}
		*table = false
	}
	if *write != "" {
		return a.writeDemo(*write)
	}
	cat := catalogue.DemoStocks()
	if *table {
		fmt.Fprintln(a.stdout, "Demo stocks (invented plant; typical compositions, invented prices)")
		fmt.Fprintln(a.stdout)
		a.stockTable(cat)
		fmt.Fprintln(a.stdout)
	}
	return a.demoSolve(cat)
}

// stockTable prints one line per stock: price, stock on hand and the main
// calculated properties.
func (a *app) stockTable(cat *catalogue.Catalogue) {
	w := a.stdout
	fmt.Fprintf(w, "  %-12s %-30s %8s %8s %6s %5s %5s %5s %6s %6s\n",
		"id", "name", cat.Currency+"/t", "on hand", "IV", "SAFA", "trans", "Cox", "SFC20", "SFC35")
	for i := range cat.Stocks {
		s := &cat.Stocks[i]
		p := blend.Profile(s.FattyAcids)
		avail := "any"
		if s.Limited() {
			avail = fmt.Sprintf("%.0f t", s.Available)
		}
		fmt.Fprintf(w, "  %-12s %-30s %8.0f %8s %6.1f %5.1f %5.1f %5.2f %6s %6s\n",
			s.ID, clip(s.Name, 30), s.Price, avail, p.IV, p.SAFA, p.Trans, p.Cox, sfcCell(s, 20), sfcCell(s, 35))
	}
}

func sfcCell(s *catalogue.Stock, t float64) string {
	v, ok := s.SFC.At(t)
	if !ok {
		return "n/a"
	}
	return fmt.Sprintf("%.1f", v)
}

func clip(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}

// writeDemo saves the embedded demo files into dir by the rules of every
// output (catalogue.Output), refusing a folder that already holds one of them:
// the demo files are a start, never mixed into someone's own.
func (a *app) writeDemo(dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return catalogue.Badf("--write %s: cannot create the folder: %v", dir, err)
	}
	files := catalogue.DemoFiles()
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		path := filepath.Join(dir, n)
		if _, err := os.Stat(path); err == nil {
			return catalogue.Badf("--write: %s already exists; choose an empty folder or remove the file", path)
		}
	}
	for _, n := range names {
		path := filepath.Join(dir, n)
		if err := a.write(output{"--write", path}, files[n]); err != nil {
			return err
		}
		fmt.Fprintf(a.stdout, "wrote %s\n", path)
	}
	return nil
}

// demoIncumbent is the demo's partially hardened fat to replace.
const demoIncumbent = "ph-soy"

// demoSolve solves every embedded demo spec and prints its full report, as
// `lipoplan solve` would for that spec, then the replacement of the demo's
// partially hardened fat, as `lipoplan replace` would.
func (a *app) demoSolve(cat *catalogue.Catalogue) error {
	infeasible := false
	for i, spec := range catalogue.DemoSpecs() {
		ts := blend.SpecTemps(spec)
		res, err := optimise.Solve(cat, spec, optimise.Options{Temps: ts})
		if err != nil {
			return fmt.Errorf("demo spec %q: %w", spec.Name, err)
		}
		if i > 0 {
			fmt.Fprintln(a.stdout)
		}
		fmt.Fprintf(a.stdout, "=== Demo spec %d of %d: %s ===\n\n",
			i+1, len(catalogue.DemoSpecs()), spec.ID)
		writeSolveText(a.stdout, res, spec, ts)
		infeasible = infeasible || res.Status != optimise.Optimal
	}
	// The third job: replace the incumbent partially hardened base.
	rep, err := optimise.Replace(cat, optimise.Replacement{Incumbent: demoIncumbent, Tolerance: 3, TransMax: 1, Batch: 20}, optimise.Options{})
	if err != nil {
		return fmt.Errorf("demo replacement of %q: %w", demoIncumbent, err)
	}
	fmt.Fprintf(a.stdout, "\n=== Demo replacement: the partially hardened %s, trans-free (lipoplan replace --incumbent %s) ===\n\n", demoIncumbent, demoIncumbent)
	writeReplace(a.stdout, rep, sle.DefaultOptions())
	infeasible = infeasible || rep.Status != optimise.Optimal
	if infeasible {
		return errInfeasible
	}
	return nil
}
