package main

import (
	"flag"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/optimise"
	"lipoplan/tui"
)

// Scenarios compare takes, at least and at most.
const (
	compareMin = 2
	compareMax = 4
)

func (a *app) compare(args []string) error {
	fs := a.newFlags("compare", "F1 F2 [F3 F4] [--format text|json] [--calibration F]",
		"Solve two to four scenario files saved by the workspace (s) and set them side by side: cost per\n"+
			"tonne and its change against the first, the blend, IV, SAFA, trans and the SFC at the specs'\n"+
			"temperatures, each file's note, and the result saved in it, flagged where today's solve differs.\n"+
			"Exit 3 when any of them cannot be met.")
	format := fs.String("format", "text", "text or json")
	calPath := fs.String("calibration", "", calibrationFlagHelp)
	files, err := a.parseWithFiles(fs, args)
	if err != nil {
		return err
	}
	if len(files) < compareMin || len(files) > compareMax {
		return catalogue.Badf("compare takes %d to %d scenario files (got %d); save them from the workspace with s", compareMin, compareMax, len(files))
	}
	if err := checkFormat(*format, "text", "json"); err != nil {
		return err
	}
	model, err := a.sfcModel(*calPath)
	if err != nil {
		return err
	}
	var cols []compared
	for _, f := range files {
		sc, err := tui.LoadScenario(f)
		if err != nil {
			return err
		}
		cols = append(cols, compared{file: f, sc: sc})
	}
	temps := compareTemps(cols)
	for i := range cols {
		cat, spec := cols[i].sc.Effective()
		cols[i].spec = spec
		if cols[i].res, err = optimise.Solve(cat, spec, optimise.Options{Temps: temps, Model: model}); err != nil {
			return fmt.Errorf("%s: %w", cols[i].file, err)
		}
	}
	if *format == "json" {
		err = writeJSON(a.stdout, compareJSON(cols))
	} else {
		writeCompareText(a.stdout, cols)
	}
	if err != nil {
		return err
	}
	for _, c := range cols {
		if !c.found() {
			return errInfeasible
		}
	}
	return nil
}

// parseWithFiles parses flags that may come before, between or after the
// file names, and returns the file names in order.
func (a *app) parseWithFiles(fs *flag.FlagSet, args []string) ([]string, error) {
	var files []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, a.parse(fs, args) // says what is wrong as every command does
		}
		if fs.NArg() == 0 {
			return files, nil
		}
		files = append(files, fs.Arg(0))
		args = fs.Args()[1:]
	}
}

// compared is one scenario file and today's solve of it.
type compared struct {
	file string
	sc   *tui.Scenario
	spec *catalogue.Spec // as the optimiser saw it
	res  *optimise.Result
}

func (c compared) found() bool { return len(c.res.Blend) > 0 }

// compareTemps is every temperature one of the specs reports SFC at (the
// defaults and each spec's own), so every column has a value in every row.
func compareTemps(cols []compared) []float64 {
	var ts []float64
	for _, c := range cols {
		ts = append(ts, blend.SpecTemps(c.sc.Spec)...)
	}
	sort.Float64s(ts)
	return dedupe(ts)
}

// limitTemps are the temperatures the specs set SFC limits at: the rows
// compare shows.
func limitTemps(cols []compared) []float64 {
	var ts []float64
	for _, c := range cols {
		for _, l := range c.sc.Spec.SFC {
			ts = append(ts, l.Temp)
		}
	}
	sort.Float64s(ts)
	return dedupe(ts)
}

// savedDiff is how the saved result of a file stands against today's solve:
// nil when the file holds none.
func (c compared) savedDiff() []string {
	if c.sc.Saved == nil {
		return nil
	}
	return c.sc.Saved.Differences(c.res)
}

// blendJSON is a blend in JSON: each stock's share (%) and tonnes.
func blendJSON(lines []optimise.Line) []map[string]any {
	out := []map[string]any{}
	for _, l := range lines {
		out = append(out, map[string]any{"stock": l.Stock, "pct": round(l.Pct, 6), "tonnes": round(l.Tonnes, 6)})
	}
	return out
}

// relaxJSON is a smallest relaxation in JSON: each limit's name and how far
// it moves.
func relaxJSON(rs []optimise.Relax) []map[string]any {
	out := []map[string]any{}
	for _, x := range rs {
		out = append(out, map[string]any{"name": x.Name, "by": round(x.By, 6)})
	}
	return out
}

// compareJSON is the JSON shape of compare (README, JSON output).
func compareJSON(cols []compared) map[string]any {
	var list []map[string]any
	base := cols[0].res
	for i, c := range cols {
		r := c.res
		s := map[string]any{
			"file": c.file, "spec": c.sc.Spec.Name, "note": c.sc.Note, "status": string(r.Status), "engine": r.Engine,
			"currency": r.Currency, "batch": round(r.Batch, 6), "blend": blendJSON(r.Blend),
			"cost_per_tonne": nil, "cost_change": nil, "properties": nil, "saved": nil,
		}
		if c.found() {
			s["cost_per_tonne"] = round(r.CostPerTonne, 4)
			s["properties"] = propertiesJSON(r.Properties)
			if i > 0 && len(base.Blend) > 0 {
				s["cost_change"] = round(r.CostPerTonne-base.CostPerTonne, 4)
			}
		} else {
			s["relaxation"] = relaxJSON(r.Relaxation)
		}
		if sv := c.sc.Saved; sv != nil {
			diff := c.savedDiff()
			saved := map[string]any{
				"solved": sv.At.Format(time.RFC3339), "status": string(sv.Status), "engine": sv.Engine,
				"cost_per_tonne": nil, "blend": blendJSON(sv.Blend), "same": len(diff) == 0, "differences": append([]string{}, diff...),
			}
			if sv.HasBlend() {
				saved["cost_per_tonne"] = round(sv.CostPerTonne, 4)
			}
			s["saved"] = saved
		}
		list = append(list, s)
	}
	temps := []float64{}
	temps = append(temps, limitTemps(cols)...)
	return map[string]any{"scenarios": list, "sfc_temps": temps, "caution": cautionJSON}
}

// writeCompareText prints the files side by side: a column each, the rows
// cost, change against the first, blend, IV, SAFA, trans and SFC at the
// specs' limit temperatures; then each file's note and saved result.
func writeCompareText(w io.Writer, cols []compared) {
	res := make([]*optimise.Result, len(cols))
	for i, c := range cols {
		res[i] = c.res
	}
	tb := sideTable{w: w, lw: 24, cw: 16, res: res}
	cur := cols[0].res.Currency
	for _, c := range cols[1:] {
		if c.res.Currency != cur {
			cur = "" // mixed currencies: each cost names its own
		}
	}
	fmt.Fprintln(w, "Scenarios side by side (solved now; the first is the base)")
	fmt.Fprintln(w)
	tb.row("", func(i int) string { return fmt.Sprint(i + 1) })
	tb.row("file", func(i int) string { return filepath.Base(cols[i].file) })
	costLabel := "cost per tonne"
	if cur != "" {
		costLabel += ", " + cur
	}
	tb.row(costLabel, func(i int) string {
		c := cols[i]
		if !c.found() {
			return "cannot be met"
		}
		if cur == "" {
			return money(c.res.CostPerTonne, c.res.Currency)
		}
		return fmt.Sprintf("%.2f", c.res.CostPerTonne)
	})
	tb.row("  change against 1", func(i int) string {
		c := cols[i]
		if i == 0 || !c.found() || !cols[0].found() {
			return ""
		}
		return costChange(c.res.CostPerTonne - cols[0].res.CostPerTonne)
	})
	tb.blendRows()
	for _, t := range limitTemps(cols) {
		tb.row("SFC "+catalogue.TempKey(t)+" C, % solid", tb.found(func(i int) string {
			if v, ok := res[i].Properties.SFC[t]; ok {
				return fmt.Sprintf("%.1f", v)
			}
			return "n/a"
		}))
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Notes and saved results")
	for i, c := range cols {
		// The note and the spec's name are shown as the workspace shows
		// them (tui.OneLine): a control character in a saved file would
		// otherwise act on the terminal instead of showing.
		fmt.Fprintf(w, "  %d %s: %s\n", i+1, c.file, tui.OneLine(c.sc.Spec.Name))
		if note := tui.OneLine(c.sc.Note); note != "" {
			fmt.Fprintf(w, "      note: %s\n", wrapText(note, 88, "            "))
		}
		sv := c.sc.Saved
		switch diff := c.savedDiff(); {
		case sv == nil:
			fmt.Fprintln(w, "      no saved result")
		case len(diff) == 0:
			fmt.Fprintf(w, "      saved %s: %s; today's solve is the same\n", sv.At.Format("2006-01-02 15:04 UTC"), savedWords(sv))
		default:
			fmt.Fprintf(w, "      saved %s: %s; DIFFERS from today's solve:\n", sv.At.Format("2006-01-02 15:04 UTC"), savedWords(sv))
			for _, d := range diff {
				fmt.Fprintf(w, "        %s\n", wrapText(d, 86, "          "))
			}
		}
		if !c.found() {
			fmt.Fprintf(w, "      today the spec cannot be met: 'lipoplan solve --scenario %s' gives the smallest relaxation\n", c.file)
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionLine)
}

// sideTable prints a side-by-side report (compare, routes): a label column
// lw wide, then a column cw wide for each result.
type sideTable struct {
	w      io.Writer
	lw, cw int
	res    []*optimise.Result
}

// row prints one labelled row, cell(i) in column i.
func (tb sideTable) row(label string, cell func(i int) string) {
	line := fmt.Sprintf("  %-*s", tb.lw, clip(label, tb.lw))
	for i := range tb.res {
		line += fmt.Sprintf("%*s", tb.cw, clip(cell(i), tb.cw-1))
	}
	fmt.Fprintln(tb.w, strings.TrimRight(line, " "))
}

// found is cell, with "-" in a column without a blend.
func (tb sideTable) found(cell func(i int) string) func(i int) string {
	return func(i int) string {
		if len(tb.res[i].Blend) == 0 {
			return "-"
		}
		return cell(i)
	}
}

// blendRows prints the rows side-by-side reports share: the blend (every
// stock any column uses, the largest shares first; "." where a column does
// not use it), IV, SAFA and trans; "-" in a column without a blend.
func (tb sideTable) blendRows() {
	fmt.Fprintln(tb.w, "  blend, % of batch")
	blends := make([][]optimise.Line, len(tb.res))
	for i, r := range tb.res {
		blends[i] = r.Blend
	}
	for _, id := range tui.StocksByShare(blends...) {
		tb.row("    "+id, tb.found(func(i int) string {
			for _, l := range tb.res[i].Blend {
				if l.Stock == id && l.Pct > 1e-9 {
					return fmt.Sprintf("%.2f", l.Pct)
				}
			}
			return "."
		}))
	}
	tb.row("IV", tb.found(func(i int) string { return fmt.Sprintf("%.1f", tb.res[i].Properties.IV) }))
	tb.row("SAFA, %", tb.found(func(i int) string { return fmt.Sprintf("%.1f", tb.res[i].Properties.SAFA) }))
	tb.row("trans, %", tb.found(func(i int) string { return fmt.Sprintf("%.2f", tb.res[i].Properties.Trans) }))
}

// savedWords is a saved result in a few words.
func savedWords(s *tui.Solved) string {
	if !s.HasBlend() {
		return string(s.Status) + ", no blend"
	}
	return money(s.CostPerTonne, s.Currency) + " per tonne (" + string(s.Status) + ")"
}

// costChange writes a change of cost per tonne with its sign, to the cent;
// a change that rounds to nothing is +0.00, never -0.00.
func costChange(d float64) string {
	if math.Abs(d) < 0.005 {
		d = 0
	}
	return fmt.Sprintf("%+.2f", d)
}
