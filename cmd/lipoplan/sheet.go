package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"html/template"
	"image/color"
	"math"
	"strings"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/optimise"
	"lipoplan/randomise"
)

// A blend sheet (solve --sheet FILE) is one printable HTML page for a solved
// blend: the spec, the blend with its lots, the properties with the method
// behind each, the SFC against the spec's bands as an embedded SVG chart
// (drawn with gonum/plot), the TAG classes, the cautions, the date and the
// SHA-256 checksums of the inputs. Every string from a file goes through
// html/template, which escapes it.

// sheetInput is one input of the run with its checksum.
type sheetInput struct {
	What, Source, SHA256 string
}

// sheetRow is one row of a table: cells already formatted.
type sheetRow struct {
	Cells []string
	Mark  bool // the row holds the blend (a binding limit), or is a total
	// Span: the last cell spans this many rows (> 1), or is spanned by a
	// row above (-1).
	Span int
}

// sheetData is what the page template shows.
type sheetData struct {
	Title, Spec, SpecFile, Status, Engine, Date, Currency string
	NotProven                                             bool
	Batch, Cost, BatchCost                                string
	Blend                                                 []sheetRow
	Reactor                                               []string
	Limits, Properties, SFC, TAGs, FattyAcids             []sheetRow
	Rules                                                 string
	SFCMethod, TAGMethod                                  string
	Chart                                                 template.HTML
	Notes, TAGNotes, Cautions                             []string
	Inputs                                                []sheetInput
}

// inputSums are the checksums of the run's inputs: the catalogue and the
// spec as read from their files again after the solve, or the embedded demo
// files; the calibration file when one was given.
func inputSums(stocksPath, specPath, scenarioPath, calPath string, spec *catalogue.Spec) ([]sheetInput, error) {
	demo := catalogue.DemoFiles()
	sum := func(b []byte) string { h := sha256.Sum256(b); return hex.EncodeToString(h[:]) }
	var out []sheetInput
	add := func(what, path, demoName string) error {
		if path == "" {
			out = append(out, sheetInput{What: what, Source: "embedded demo data (" + demoName + ")", SHA256: sum(demo[demoName])})
			return nil
		}
		b, err := catalogue.ReadInput(path)
		if err != nil {
			return fmt.Errorf("--sheet: the checksum of %s: %w", path, err)
		}
		out = append(out, sheetInput{What: what, Source: path, SHA256: sum(b)})
		return nil
	}
	if scenarioPath != "" {
		// a scenario file holds the stocks and the spec both
		if err := add("scenario (stocks and spec)", scenarioPath, ""); err != nil {
			return nil, err
		}
	} else {
		if err := add("stock catalogue", stocksPath, "stocks.toml"); err != nil {
			return nil, err
		}
		if err := add("product spec", specPath, spec.ID+".toml"); err != nil {
			return nil, err
		}
	}
	if calPath != "" {
		if err := add("SFC-model calibration", calPath, ""); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// writeSheet writes the blend sheet of res to o, by the one output policy
// (never over the run's inputs).
func (a *app) writeSheet(o output, res *optimise.Result, spec *catalogue.Spec, cat *catalogue.Catalogue, temps []float64, model sle.Options, in *inputs, calPath string) error {
	ins, err := inputSums(*in.stocks, *in.spec, in.scenarioPath(), calPath, spec)
	if err != nil {
		return err
	}
	page, err := blendSheet(res, spec, cat, temps, model, ins, a.now()())
	if err != nil {
		return err
	}
	return a.write(o, page, append(in.files(), calPath)...)
}

// blendSheet renders the sheet of a solved blend.
func blendSheet(r *optimise.Result, spec *catalogue.Spec, cat *catalogue.Catalogue, temps []float64, model sle.Options, inputs []sheetInput, now time.Time) ([]byte, error) {
	d := sheetData{
		Title: spec.Name, Spec: spec.Name, SpecFile: spec.File, Status: string(r.Status), Engine: r.Engine,
		Date: now.UTC().Format("2006-01-02 15:04 UTC"), Currency: r.Currency, NotProven: r.Status == optimise.NotProven,
		Batch: fmt.Sprintf("%g t", r.Batch), Cost: money(r.CostPerTonne, r.Currency), BatchCost: money(r.BatchCost, r.Currency),
		Notes: r.Notes, Inputs: inputs,
	}
	if d.Title == "" {
		d.Title = spec.File
	}
	prices := map[string]float64{}
	for _, g := range r.Ranging {
		prices[g.Stock] = g.Price
	}
	var pct, tonnes float64
	for _, l := range r.Blend {
		d.Blend = append(d.Blend, sheetRow{Cells: []string{l.Stock, l.Name, f2(l.Pct), f3(l.Tonnes), f2(prices[l.Stock])}})
		pct += l.Pct
		tonnes += l.Tonnes
	}
	d.Blend = append(d.Blend, sheetRow{Cells: []string{"total", "", f2(pct), f3(tonnes), ""}, Mark: true})
	if p := r.Process; p != nil {
		if len(p.Feed) == 0 {
			d.Reactor = []string{fmt.Sprintf("The %s interesterification step is not used: blending the stocks as they are is cheaper.", p.Method)}
		} else {
			var feed []string
			for _, l := range p.Feed {
				feed = append(feed, fmt.Sprintf("%s %.2f %% (%.3f t)", l.Stock, l.Pct, l.Tonnes))
			}
			d.Reactor = []string{
				fmt.Sprintf("%s interesterification of %.3f t per batch: %s.", titleCase(p.Method), p.Tonnes, strings.Join(feed, ", ")),
				fmt.Sprintf("Processing %s per batch, included in the cost.", money(p.Cost, r.Currency)),
			}
		}
	}
	for _, l := range r.Limits {
		if l.Excluded || strings.HasPrefix(l.Name, "avail.") && !l.Binding {
			continue // left out by the spec, or an amount on hand with room
		}
		state := "room " + quantity(l.Room(), l.Unit) + l.Unit
		if l.Binding {
			state = "holds the blend"
		}
		d.Limits = append(d.Limits, sheetRow{Cells: []string{l.Label, quantity(l.Bound, l.Unit) + l.Unit, quantity(l.Value, l.Unit) + l.Unit, state}, Mark: l.Binding})
	}
	if spec.Rules.Active() {
		var rs []string
		if spec.Rules.MaxStocks > 0 {
			rs = append(rs, fmt.Sprintf("at most %d stocks", spec.Rules.MaxStocks))
		}
		if spec.Rules.SmallestShare > 0 {
			rs = append(rs, fmt.Sprintf("smallest share of a stock used %g %% of batch", spec.Rules.SmallestShare))
		}
		d.Rules = strings.Join(rs, "; ")
	}
	d.Properties = propertyRows(r.Properties)
	for _, k := range catalogue.SortedKeys(r.Properties.FattyAcids) {
		d.FattyAcids = append(d.FattyAcids, sheetRow{Cells: []string{k, f2(r.Properties.FattyAcids[k])}})
	}
	d.SFCMethod = "Linear in the stocks' measured curves (pulsed NMR, AOCS Cd 16b-93 / ISO 8292-1), mass-weighted and interpolated between measured temperatures."
	if r.Process != nil && r.Process.SFCModel == "predicted" {
		d.SFCMethod = "Predicted by the TAG model for the whole blend (solid-liquid equilibrium, ideal liquid, Wesdorp's melting points). " + modelErrorNote(model)
	}
	d.SFC = sfcRows(r.Properties, spec, temps)
	chart, err := sheetChart(r.Properties.SFC, spec)
	if err != nil {
		return nil, err
	}
	d.Chart = template.HTML(chart) // drawn by gonum/plot from numbers only; its text is escaped by svgo
	d.TAGs, d.TAGMethod, d.TAGNotes = tagRows(r, cat)
	d.Cautions = []string{strings.ReplaceAll(cautionLine, "\n", " ")}
	if spec.Process != nil {
		d.Cautions = append(d.Cautions, strings.ReplaceAll(processCaution, "\n", " "))
	}
	var b bytes.Buffer
	// The template is parsed here, when a sheet is asked for, rather than
	// at start-up, where every command would pay for it.
	t, err := template.New("sheet").Parse(sheetTemplate)
	if err != nil {
		return nil, fmt.Errorf("--sheet: %w", err)
	}
	if err := t.Execute(&b, d); err != nil {
		return nil, fmt.Errorf("--sheet: %w", err)
	}
	return b.Bytes(), nil
}

func f2(v float64) string { return strconv2(v, 2) }
func f3(v float64) string { return strconv2(v, 3) }

// strconv2 prints v to digits decimals, NaN (no value) as "n/a".
func strconv2(v float64, digits int) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return fmt.Sprintf("%.*f", digits, v)
}

func titleCase(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// propertyRows are the blend's properties, each with the method behind it:
// the calculation lipoplan makes (README, Methods) and, for the fatty-acid
// sums, the lab method that gives the profile it starts from (GC of the
// methyl esters, AOCS Ce 1h-05 / ISO 12966; method numbers from memory).
func propertyRows(p blend.Properties) []sheetRow {
	fame := "from the fatty-acid profile (wt% as FAME, GC per AOCS Ce 1h-05 / ISO 12966)"
	rows := []sheetRow{
		{Cells: []string{"Iodine value (IV)", fmt.Sprintf("%.1f", p.IV), "g I2/100 g", "calculated from the FAME profile, AOCS Official Method Cd 1c-85"}},
		{Cells: []string{"Saponification value (SV)", fmt.Sprintf("%.1f", p.SV), "mg KOH/g", "calculated: 3 × 56 106 / mean TAG molar mass (IUPAC atomic weights)"}},
		{Cells: []string{"Saturates (SAFA)", f2(p.SAFA), "%", fame}, Span: 5},
		{Cells: []string{"cis monounsaturates (MUFA)", f2(p.MUFA), "%", ""}, Span: -1},
		{Cells: []string{"cis polyunsaturates (PUFA)", f2(p.PUFA), "%", ""}, Span: -1},
		{Cells: []string{"trans fatty acids", f2(p.Trans), "%", ""}, Span: -1},
		{Cells: []string{"omega-3", f2(p.Omega3), "%", ""}, Span: -1},
		{Cells: []string{"Oxidisability (Cox value)", f2(p.Cox), "", "Fatemi & Hammond (1980), Lipids 15:379"}},
	}
	if len(p.SFCMissing) == 0 {
		if mp := blend.CurveMeltingPoints(p.SFC); mp.SlipFound {
			rows = append(rows, sheetRow{Cells: []string{"Slip melting point, about", fmt.Sprintf("%.1f", mp.Slip), "°C",
				fmt.Sprintf("where the SFC curve falls to %.0f %% solid (common practice); an estimate, not AOCS Cc 3-25", blend.SlipThreshold)}})
		}
	}
	return rows
}

// sheetSFCTol is how far the blend's SFC may pass a band and still be
// within it: the tolerance to which the successive LP of a [process] step
// meets SFC limits with the TAG model (README, Methods), far above an LP's.
const sheetSFCTol = 0.05 // % solid

// sfcRows are the blend's SFC at each temperature against the spec's band
// there.
func sfcRows(p blend.Properties, spec *catalogue.Spec, temps []float64) []sheetRow {
	bands := map[float64]catalogue.SFCLimit{}
	for _, l := range spec.SFC {
		bands[l.Temp] = l
	}
	var rows []sheetRow
	for _, t := range temps {
		v, ok := p.SFC[t]
		val := "n/a"
		if ok {
			val = fmt.Sprintf("%.1f", v)
		} else if ids := p.SFCMissing[t]; len(ids) > 0 {
			val = "n/a (no measured SFC for " + strings.Join(ids, ", ") + ")"
		}
		lo, hi, in := "", "", ""
		if l, limited := bands[t]; limited {
			if l.HasMin() {
				lo = fmt.Sprintf("%g", l.Min)
			}
			if l.HasMax() {
				hi = fmt.Sprintf("%g", l.Max)
			}
			if ok {
				in = "within"
				if l.HasMin() && v < l.Min-sheetSFCTol || l.HasMax() && v > l.Max+sheetSFCTol {
					in = "OUTSIDE"
				}
			}
		}
		rows = append(rows, sheetRow{Cells: []string{catalogue.TempKey(t), val, lo, hi, in}, Mark: lo != "" || hi != ""})
	}
	return rows
}

// tagRows are the TAG saturation classes of the blend (mol %), as
// blendClasses gives them, as rows of the sheet.
func tagRows(r *optimise.Result, cat *catalogue.Catalogue) ([]sheetRow, string, []string) {
	c, method, notes, err := blendClasses(r, cat)
	if err != nil {
		return nil, "", []string{"TAG classes not computed: " + err.Error()}
	}
	rows := []sheetRow{
		{Cells: []string{"S3 (trisaturated)", f2(c.S3)}},
		{Cells: []string{"S2U (disaturated)", f2(c.S2U)}},
		{Cells: []string{"   of which SUS (symmetric)", f2(c.SUS)}},
		{Cells: []string{"   of which SSU (asymmetric)", f2(c.SSU)}},
		{Cells: []string{"SU2 (monosaturated)", f2(c.SU2)}},
		{Cells: []string{"U3 (triunsaturated)", f2(c.U3)}},
	}
	return rows, method, notes
}

// blendClasses are the TAG saturation classes of a solved blend (mol %):
// the stocks' native TAGs (1,3-random-2-random from each stock's sn-2
// profile, or its measured TAG profile), with the reactor's product in
// place of its feed when a [process] step is used (randomise.Blender);
// method says which, notes are the Blender's.
func blendClasses(r *optimise.Result, cat *catalogue.Catalogue) (randomise.Shares, string, []string, error) {
	d, err := optimise.BlendTAGs(cat, r)
	if err != nil {
		return randomise.Shares{}, "", nil, err
	}
	method := "Native TAGs of the stocks as blended: 1,3-random-2-random distribution from each stock's sn-2 profile (Vander Wal 1960; Coleman 1961), or the stock's measured TAG profile."
	if d.Method != randomise.Native {
		method = fmt.Sprintf("The stocks blended as they are (native TAGs) and the reactor's product (%s interesterification to equilibrium) together.", r.Process.Method)
	}
	return d.Classes().Mol, method, d.Notes, nil
}

// sheetChart draws the blend's SFC against temperature with the spec's
// limits as bands (min to max at each limited temperature) as SVG, by
// gonum/plot, without the XML prologue so that it sits inside the page.
func sheetChart(sfc map[float64]float64, spec *catalogue.Spec) (string, error) {
	p := plot.New()
	sans := font.Font{Typeface: "Liberation", Variant: "Sans"}
	for _, st := range []struct {
		f    *font.Font
		size vg.Length
	}{{&p.X.Label.TextStyle.Font, 11}, {&p.Y.Label.TextStyle.Font, 11}, {&p.X.Tick.Label.Font, 10},
		{&p.Y.Tick.Label.Font, 10}, {&p.Legend.TextStyle.Font, 10}} {
		*st.f = sans
		st.f.Size = st.size
	}
	p.X.Label.Text = "temperature, °C"
	p.Y.Label.Text = "solid fat, %"
	p.Add(plotter.NewGrid())
	temps, x0, x1, top := sfcAxes(sfc, spec)
	band := color.NRGBA{R: 0x5c, G: 0x7a, B: 0x8c, A: 0x60}
	var bandShown bool
	for _, l := range spec.SFC {
		lo, hi := bandEnds(l, top)
		w := (x1 - x0) / 80
		poly, err := plotter.NewPolygon(plotter.XYs{{X: l.Temp - w, Y: lo}, {X: l.Temp + w, Y: lo}, {X: l.Temp + w, Y: hi}, {X: l.Temp - w, Y: hi}})
		if err != nil {
			return "", fmt.Errorf("--sheet: SFC band at %g °C: %w", l.Temp, err)
		}
		poly.Color = band
		poly.LineStyle.Width = 0
		p.Add(poly)
		if !bandShown {
			p.Legend.Add("spec limits", poly)
			bandShown = true
		}
	}
	if len(temps) > 0 {
		pts := make(plotter.XYs, len(temps))
		for i, t := range temps {
			pts[i] = plotter.XY{X: t, Y: sfc[t]}
		}
		line, points, err := plotter.NewLinePoints(pts)
		if err != nil {
			return "", fmt.Errorf("--sheet: SFC curve: %w", err)
		}
		orange := color.RGBA{R: 0xc0, G: 0x89, B: 0x2a, A: 0xff}
		line.Color, line.Width = orange, vg.Points(2)
		points.Color, points.Shape, points.Radius = orange, draw.CircleGlyph{}, vg.Points(2.5)
		p.Add(line, points)
		p.Legend.Add("blend", line, points)
	}
	p.X.Min, p.X.Max = x0, x1
	p.Y.Min, p.Y.Max = 0, top
	p.Legend.Top = true
	wt, err := p.WriterTo(14*vg.Centimeter, 8*vg.Centimeter, "svg")
	if err != nil {
		return "", fmt.Errorf("--sheet: drawing the SFC chart: %w", err)
	}
	var b bytes.Buffer
	if _, err := wt.WriteTo(&b); err != nil {
		return "", fmt.Errorf("--sheet: drawing the SFC chart: %w", err)
	}
	svg := b.String()
	if i := strings.Index(svg, "<svg"); i > 0 {
		svg = svg[i:] // the XML prologue and comment belong to a file, not to a page
	}
	return svg, nil
}

const sheetTemplate = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>Blend sheet: {{.Title}}</title>
<style>
@page { size: A4; margin: 12mm 12mm; }
body { font: 10pt/1.3 "Liberation Sans", Arial, Helvetica, sans-serif; color: #111; max-width: 186mm; margin: 1em auto; padding: 0 1em; }
h1 { font-size: 15pt; margin: 0 0 2pt; }
h2 { font-size: 11pt; margin: 10pt 0 3pt; border-bottom: 1px solid #888; }
p { margin: 3pt 0; }
table { border-collapse: collapse; width: 100%; }
th, td { text-align: left; padding: 1pt 4pt; border-bottom: 1px solid #ddd; vertical-align: top; }
th { font-weight: bold; border-bottom: 1px solid #888; }
td.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.mark td { font-weight: bold; }
.meta { color: #444; }
.warn { font-weight: bold; border: 1px solid #111; padding: 3pt 5pt; }
.method { color: #444; font-size: 0.9em; }
.cols { display: flex; gap: 10pt; align-items: flex-start; }
.cols > div { flex: 1; min-width: 0; }
.cols > div.wide { flex: 1.6; }
figure { margin: 0; }
figure svg { width: 100%; height: auto; }
code { font-size: 0.85em; word-break: break-all; }
@media print {
  body { font-size: 7.5pt; margin: 0; padding: 0; max-width: none; }
  h1 { font-size: 12pt; }
  h2 { font-size: 9pt; margin: 6pt 0 2pt; break-after: avoid; page-break-after: avoid; }
  th, td { padding: 0.3pt 3pt; }
  tr, figure { break-inside: avoid; page-break-inside: avoid; }
  figure svg { width: auto; max-width: 100%; height: 50mm; }
}
</style>
</head>
<body>
<header>
<h1>Blend sheet: {{.Title}}</h1>
<p class="meta">Solved {{.Date}} by lipoplan ({{.Engine}}); status {{.Status}}.</p>
{{if .NotProven}}<p class="warn">NOT PROVEN the cheapest: branch and bound stopped at its limit (see the notes).</p>{{end}}
</header>

<h2>Spec</h2>
<p>{{.Spec}}{{if .SpecFile}} ({{.SpecFile}}){{end}}; batch {{.Batch}}.{{if .Rules}} Rules: {{.Rules}}.{{end}}</p>
<table>
<tr><th>limit</th><th>bound</th><th>blend</th><th></th></tr>
{{range .Limits}}<tr{{if .Mark}} class="mark"{{end}}><td>{{index .Cells 0}}</td><td class="n">{{index .Cells 1}}</td><td class="n">{{index .Cells 2}}</td><td>{{index .Cells 3}}</td></tr>
{{end}}</table>

<h2>Blend and lots</h2>
<table>
<tr><th>stock</th><th>name</th><th>% of batch</th><th>tonnes</th><th>price/t ({{.Currency}})</th></tr>
{{range .Blend}}<tr{{if .Mark}} class="mark"{{end}}><td>{{index .Cells 0}}</td><td>{{index .Cells 1}}</td><td class="n">{{index .Cells 2}}</td><td class="n">{{index .Cells 3}}</td><td class="n">{{index .Cells 4}}</td></tr>
{{end}}</table>
<p>Cost: <b>{{.Cost}}</b> per tonne, {{.BatchCost}} per batch.</p>
{{range .Reactor}}<p>{{.}}</p>
{{end}}{{range .Notes}}<p class="method">Note: {{.}}</p>
{{end}}
<h2>Properties</h2>
<table>
<tr><th>property</th><th>value</th><th>unit</th><th>method</th></tr>
{{range .Properties}}<tr><td>{{index .Cells 0}}</td><td class="n">{{index .Cells 1}}</td><td>{{index .Cells 2}}</td>{{if gt .Span 1}}<td class="method" rowspan="{{.Span}}">{{index .Cells 3}}</td>{{else if eq .Span 0}}<td class="method">{{index .Cells 3}}</td>{{end}}</tr>
{{end}}</table>
<p class="method">Fatty acids, wt% as FAME:{{range .FattyAcids}} {{index .Cells 0}} {{index .Cells 1}};{{end}}</p>

<h2>Solid fat content against the spec</h2>
<div class="cols">
<div class="wide"><figure>{{.Chart}}</figure></div>
<div>
<table>
<tr><th>°C</th><th>% solid</th><th>min</th><th>max</th><th></th></tr>
{{range .SFC}}<tr><td class="n">{{index .Cells 0}}</td><td class="n">{{index .Cells 1}}</td><td class="n">{{index .Cells 2}}</td><td class="n">{{index .Cells 3}}</td><td>{{index .Cells 4}}</td></tr>
{{end}}</table>
<p class="method">{{.SFCMethod}}</p>
</div>
</div>

<div class="cols">
<div>
<h2>TAG classes (mol %)</h2>
<table>
{{range .TAGs}}<tr><td>{{index .Cells 0}}</td><td class="n">{{index .Cells 1}}</td></tr>
{{end}}</table>
<p class="method">{{.TAGMethod}} S = saturated, U = unsaturated acid; SUS has the unsaturated acid at sn-2.</p>
{{range .TAGNotes}}<p class="method">{{.}}</p>
{{end}}</div>
<div>
<h2>Cautions</h2>
{{range .Cautions}}<p>{{.}}</p>
{{end}}
<h2>Inputs</h2>
<table>
<tr><th>input</th><th>source and SHA-256</th></tr>
{{range .Inputs}}<tr><td>{{.What}}</td><td>{{.Source}}<br><code>{{.SHA256}}</code></td></tr>
{{end}}</table>
</div>
</div>
</body>
</html>
`
