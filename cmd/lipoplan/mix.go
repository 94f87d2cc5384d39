package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

func (a *app) mix(args []string) error {
	fs := a.newFlags("mix", `--use "id=40,id2=60" [--stocks F] [--temps "10,20,35"] [--process native|chemical|enzymatic] [--predict] [--format text|json]`,
		"Properties of a physical mix (% by mass): fatty-acid profile, calculated IV (AOCS Cd 1c-85),\n"+
			"SV, SAFA/MUFA/PUFA, trans, omega-3, Cox value and SFC weighted from the stocks' measured curves.\n"+
			"--predict adds the SFC predicted from the TAGs (solid-liquid equilibrium) after --process.")
	use := fs.String("use", "", `shares by stock id, % by mass, e.g. "pko-r=40,ps-h=60"`)
	temps := fs.String("temps", "", `SFC temperatures in deg C (default 10,15,...,45)`)
	in := a.inputFlags(fs, noSpec, "", "text", "json")
	process := fs.String("process", "native", "for --predict: native, chemical or enzymatic interesterification of the whole mix")
	predict := fs.Bool("predict", false, "add the SFC predicted from the TAG composition")
	calPath := fs.String("calibration", "", calibrationFlagHelp)
	if err := a.parse(fs, args); err != nil {
		return err
	}
	opt, err := a.sfcModel(*calPath)
	if err != nil {
		return err
	}
	if err := in.check(); err != nil {
		return err
	}
	method, perr := randomise.ParseMethod(*process)
	if perr != nil {
		return catalogue.Badf("--process %q is not known; use native, chemical or enzymatic", *process)
	}
	if method != randomise.Native && !*predict {
		return catalogue.Badf("--process %s changes only the predicted SFC; add --predict", method)
	}
	cat, _, err := in.load(a)
	if err != nil {
		return err
	}
	parts, err := parseUse(*use, cat)
	if err != nil {
		return err
	}
	ts, err := parseTemps(*temps)
	if err != nil {
		return err
	}
	if ts == nil {
		ts = blend.Temps()
	}
	p, err := blend.Mix(parts, ts)
	if err != nil {
		return catalogue.Badf("--use: %w", err)
	}
	var pred *predicted
	if *predict {
		if pred, err = predictMix(parts, method, ts, opt); err != nil {
			return err
		}
	}
	note := shareNote(parts)
	if in.json() {
		out := propertiesJSON(p)
		out["caution"] = cautionJSON
		if note != "" {
			out["notes"] = []string{note}
		}
		if pred != nil {
			pred.addJSON(out)
		}
		return writeJSON(a.stdout, out)
	}
	fmt.Fprintf(a.stdout, "Mix of %s\n", describeParts(parts))
	if note != "" {
		fmt.Fprintf(a.stdout, "Note: %s\n", note)
	}
	fmt.Fprintln(a.stdout)
	writeProperties(a.stdout, p, ts)
	if pred != nil {
		pred.writeText(a.stdout, ts)
	}
	fmt.Fprintln(a.stdout)
	fmt.Fprintln(a.stdout, cautionLine)
	if method != randomise.Native {
		fmt.Fprintln(a.stdout, processCaution)
	}
	return nil
}

// cautionLine is printed under every report that could reach production
// (README, Cautions).
const cautionLine = "Caution: calculated values are estimates; confirm by lab analysis (GC FAME, pulsed-NMR SFC) before use.\n" +
	"Trans-fat, labelling and contaminant limits (e.g. 3-MCPD and glycidyl esters in refined palm products)\n" +
	"are set by local food law; follow it and your licensed practice."

// cautionJSON is the caution carried in JSON output, in one line.
const cautionJSON = "Calculated values are estimates: confirm by lab analysis (GC FAME, pulsed-NMR SFC) before use. " +
	"Trans-fat, labelling and contaminant limits are set by local food law."

func checkFormat(f string, allowed ...string) error {
	for _, a := range allowed {
		if f == a {
			return nil
		}
	}
	return catalogue.Badf("--format %q is not known; use one of %s", f, strings.Join(allowed, ", "))
}

func describeParts(parts []blend.Part) string {
	var total float64
	for _, p := range parts {
		total += p.Pct
	}
	var items []string
	for _, p := range parts {
		items = append(items, fmt.Sprintf("%s %.1f %%", p.Stock.ID, 100*p.Pct/total))
	}
	return strings.Join(items, ", ")
}

// round keeps JSON numbers readable without losing meaningful precision.
func round(v float64, digits int) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	s := math.Pow(10, float64(digits))
	if r := math.Round(v*s) / s; r != 0 {
		return r
	}
	return 0 // not -0, which JSON writes as "-0"
}

// propertiesJSON is the stable JSON shape of mix properties (README, JSON output).
func propertiesJSON(p blend.Properties) map[string]any {
	fa := map[string]float64{}
	for k, v := range p.FattyAcids {
		fa[k] = round(v, 4)
	}
	sfc := map[string]float64{}
	for t, v := range p.SFC {
		sfc[catalogue.TempKey(t)] = round(v, 3)
	}
	out := map[string]any{
		"fatty_acids":     fa,
		"iv":              round(p.IV, 3),
		"sv":              round(p.SV, 3),
		"mean_molar_mass": round(p.MeanMolarMass, 2),
		"safa":            round(p.SAFA, 4),
		"mufa":            round(p.MUFA, 4),
		"pufa":            round(p.PUFA, 4),
		"trans":           round(p.Trans, 4),
		"omega3":          round(p.Omega3, 4),
		"cox":             round(p.Cox, 4),
		"sfc":             sfc,
	}
	if len(p.SFCMissing) > 0 {
		miss := map[string][]string{}
		for t, ids := range p.SFCMissing {
			miss[catalogue.TempKey(t)] = ids
		}
		out["sfc_missing"] = miss
	} else if mp := blend.CurveMeltingPoints(p.SFC); mp.SlipFound {
		out["slip_point"] = round(mp.Slip, 1)
		if mp.ClearFound {
			out["clear_point"] = round(mp.Clear, 1)
		}
	}
	return out
}

// writeMeltingPoints prints the slip and clear point estimates read off a
// curve, with the thresholds and their basis, or nothing when the curve
// does not fall through them in its range.
func writeMeltingPoints(w io.Writer, sfc map[float64]float64, indent string) {
	mp := blend.CurveMeltingPoints(sfc)
	if !mp.SlipFound {
		return
	}
	line := fmt.Sprintf("Slip melting point about %.1f C (where the SFC falls to %.0f %% solid)", mp.Slip, blend.SlipThreshold)
	if mp.ClearFound {
		line += fmt.Sprintf(", clear point about %.1f C (%.1f %%)", mp.Clear, blend.ClearThreshold)
	}
	line += "; estimates read off the curve (common practice), not AOCS Cc 3-25 measurements."
	lead := strings.Repeat(" ", len(indent)-len(strings.TrimLeft(indent, " ")))
	fmt.Fprintln(w, indent+wrapText(line, 96-len(indent), lead))
}

// writeJSON writes v as JSON indented by two spaces with a newline after,
// the bytes json.Encoder with SetIndent("", "  ") writes: json.Marshal's
// compact bytes laid out by indentJSON into one buffer made for twice
// their size (a report indents to about 1.5 times that).
func writeJSON(w io.Writer, v any) error {
	compact, err := json.Marshal(v)
	if err != nil {
		return fmt.Errorf("writing JSON: %w", err)
	}
	out := append(indentJSON(make([]byte, 0, 2*len(compact)+1), compact), '\n')
	if _, err := w.Write(out); err != nil {
		return fmt.Errorf("writing JSON: %w", err)
	}
	return nil
}

// indentJSON appends src, valid JSON without blanks outside its strings
// (what json.Marshal and json.Compact write), laid out as
// json.Indent(dst, src, "", "  ") lays it out: every element and member on
// a line of its own, two spaces deeper per level, ": " after a key, and an
// empty array or object kept as [] or {}. json.Indent runs its validating
// scanner over every byte, about half of writing a 300-stock report (its
// 74 kB); bytes already valid need only their strings told apart from the
// structure (FuzzIndentJSON holds the two to the same bytes).
func indentJSON(dst, src []byte) []byte {
	depth := 0
	for i := 0; i < len(src); i++ {
		b := src[i]
		switch b {
		case '"':
			j := i + 1
			for ; src[j] != '"'; j++ {
				if src[j] == '\\' {
					j++ // the escaped character, a quote included
				}
			}
			dst = append(dst, src[i:j+1]...)
			i = j
			continue
		case '{', '[':
			if i+1 < len(src) && (src[i+1] == '}' || src[i+1] == ']') {
				dst = append(dst, b, src[i+1])
				i++
				continue
			}
			depth++
			dst = append(dst, b)
		case '}', ']':
			depth--
		case ',':
			dst = append(dst, b)
		case ':':
			dst = append(dst, ':', ' ')
			continue
		default:
			dst = append(dst, b)
			continue
		}
		dst = append(dst, '\n')
		for range depth {
			dst = append(dst, ' ', ' ')
		}
		if b == '}' || b == ']' {
			dst = append(dst, b)
		}
	}
	return dst
}

// writeProperties prints the property block shared by mix, demo and solve.
func writeProperties(w io.Writer, p blend.Properties, temps []float64) {
	writePropertiesAs(w, p, temps, "SFC (% solid, linear in measured curves)")
}

// writePropertiesAs is writeProperties with the SFC row's heading given.
func writePropertiesAs(w io.Writer, p blend.Properties, temps []float64, sfcHeading string) {
	fmt.Fprintf(w, "  IV (calc., AOCS Cd 1c-85) %7.1f      SV %6.1f mg KOH/g\n", p.IV, p.SV)
	fmt.Fprintf(w, "  SAFA %5.1f %%   MUFA %5.1f %%   PUFA %5.1f %%   trans %4.1f %%   omega-3 %4.1f %%   Cox %5.2f\n",
		p.SAFA, p.MUFA, p.PUFA, p.Trans, p.Omega3, p.Cox)
	fmt.Fprintln(w)
	fmt.Fprint(w, "  Fatty acids (wt% FAME):")
	keys := catalogue.SortedKeys(p.FattyAcids)
	for i, k := range keys {
		if i%6 == 0 {
			fmt.Fprint(w, "\n   ")
		}
		fmt.Fprintf(w, " %-7s%5.1f", k, p.FattyAcids[k])
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w)
	writeSFCRow(w, "  "+sfcHeading, p.SFC, temps)
	if len(p.SFCMissing) == 0 {
		writeMeltingPoints(w, p.SFC, "    ")
	}
	if len(p.SFCMissing) > 0 {
		var ts []float64
		for t := range p.SFCMissing {
			ts = append(ts, t)
		}
		sort.Float64s(ts)
		for _, t := range ts {
			fmt.Fprintf(w, "    n/a at %s C: no measured SFC for %s\n", catalogue.TempKey(t), strings.Join(p.SFCMissing[t], ", "))
		}
	}
}

// writeSFCRow prints a heading, then the temperatures and the % solid at
// each ("n/a" where vals has none), as every report lays out an SFC curve.
func writeSFCRow(w io.Writer, heading string, vals map[float64]float64, temps []float64) {
	fmt.Fprint(w, heading+"\n   ")
	for _, t := range temps {
		fmt.Fprintf(w, " %5s C", catalogue.TempKey(t))
	}
	fmt.Fprint(w, "\n   ")
	for _, t := range temps {
		if v, ok := vals[t]; ok {
			fmt.Fprintf(w, " %7.1f", v)
		} else {
			fmt.Fprintf(w, " %7s", "n/a")
		}
	}
	fmt.Fprintln(w)
}
