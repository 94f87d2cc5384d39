package main

import (
	"bytes"
	"fmt"
	"math"
	"sort"
	"strings"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// sfcSVG draws the optimal blend's SFC against temperature with the spec's
// limits as bands (min to max at each limited temperature). Plain SVG 1.1.
func sfcSVG(r *optimise.Result, spec *catalogue.Spec) []byte {
	const W, H, L, R, T, B = 640.0, 400.0, 60.0, 20.0, 50.0, 50.0
	temps, x0, x1, top := sfcAxes(r.Properties.SFC, spec)
	px := func(t float64) float64 { return L + (t-x0)/(x1-x0)*(W-L-R) }
	py := func(v float64) float64 { return H - B - v/top*(H-T-B) }
	var b bytes.Buffer
	fmt.Fprintf(&b, `<?xml version="1.0" encoding="UTF-8"?>`+"\n")
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%g" height="%g" viewBox="0 0 %g %g" font-family="sans-serif" font-size="12">`+"\n", W, H, W, H)
	fmt.Fprintf(&b, `<rect width="100%%" height="100%%" fill="white"/>`+"\n")
	svgTitle(&b, L, spec.Name, "SFC of the cheapest blend (line) against the spec's limits (bands)")
	fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="black"/>`+"\n", L, H-B, W-R, H-B)
	fmt.Fprintf(&b, `<line x1="%g" y1="%g" x2="%g" y2="%g" stroke="black"/>`+"\n", L, T, L, H-B)
	for v := 0.0; v <= top+1e-9; v += 10 {
		fmt.Fprintf(&b, `<text x="%g" y="%.1f" text-anchor="end">%.0f</text>`+"\n", L-6, py(v)+4, v)
		fmt.Fprintf(&b, `<line x1="%g" y1="%.1f" x2="%g" y2="%.1f" stroke="#dddddd"/>`+"\n", L, py(v), W-R, py(v))
	}
	for t := math.Ceil(x0/5) * 5; t <= x1+1e-9; t += 5 {
		fmt.Fprintf(&b, `<text x="%.1f" y="%g" text-anchor="middle">%s</text>`+"\n", px(t), H-B+18, catalogue.TempKey(t))
	}
	fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="middle">temperature, °C</text>`+"\n", (L+W-R)/2, H-12)
	fmt.Fprintf(&b, `<text x="16" y="%g" transform="rotate(-90 16 %g)" text-anchor="middle">solid fat, %%</text>`+"\n", (T+H-B)/2, (T+H-B)/2)
	for _, l := range spec.SFC {
		lo, hi := bandEnds(l, top)
		fmt.Fprintf(&b, `<rect x="%.1f" y="%.1f" width="10" height="%.1f" fill="#5c7a8c" fill-opacity="0.35"><title>SFC %s °C: %s</title></rect>`+"\n",
			px(l.Temp)-5, py(hi), py(lo)-py(hi), catalogue.TempKey(l.Temp), bandWords(l))
	}
	var pts []string
	for _, t := range temps {
		pts = append(pts, fmt.Sprintf("%.1f,%.1f", px(t), py(r.Properties.SFC[t])))
	}
	fmt.Fprintf(&b, `<polyline fill="none" stroke="#c0892a" stroke-width="2" points="%s"/>`+"\n", strings.Join(pts, " "))
	for _, t := range temps {
		fmt.Fprintf(&b, `<circle cx="%.1f" cy="%.1f" r="3" fill="#c0892a"><title>%s °C: %.1f %% solid</title></circle>`+"\n",
			px(t), py(r.Properties.SFC[t]), catalogue.TempKey(t), r.Properties.SFC[t])
	}
	b.WriteString("</svg>\n")
	return b.Bytes()
}

// sfcAxes are the axes of an SFC chart: the curve's temperatures in order,
// the temperature range (10 to 45 °C, wider when the curve is) and the top
// of the % solid axis (the next 10 above the curve and the spec's bands, at
// most 100).
func sfcAxes(sfc map[float64]float64, spec *catalogue.Spec) (temps []float64, x0, x1, top float64) {
	for t := range sfc {
		temps = append(temps, t)
	}
	sort.Float64s(temps)
	x0, x1 = 10.0, 45.0
	if len(temps) > 0 {
		x0, x1 = math.Min(x0, temps[0]), math.Max(x1, temps[len(temps)-1])
	}
	top = 10.0
	for _, t := range temps {
		top = math.Max(top, sfc[t])
	}
	for _, l := range spec.SFC {
		if l.HasMax() {
			top = math.Max(top, l.Max)
		} else if l.HasMin() {
			top = math.Max(top, l.Min)
		}
	}
	return temps, x0, x1, math.Min(100, math.Ceil(top/10)*10)
}

// bandEnds are the ends of an SFC limit's band on a chart whose axis ends
// at top: from its minimum (or 0) to its maximum (or top).
func bandEnds(l catalogue.SFCLimit, top float64) (lo, hi float64) {
	lo, hi = 0, top
	if l.HasMin() {
		lo = l.Min
	}
	if l.HasMax() {
		hi = math.Min(l.Max, top)
	}
	return lo, hi
}

func bandWords(l catalogue.SFCLimit) string {
	switch {
	case l.HasMin() && l.HasMax():
		return fmt.Sprintf("%g to %g %% solid", l.Min, l.Max)
	case l.HasMin():
		return fmt.Sprintf("at least %g %% solid", l.Min)
	default:
		return fmt.Sprintf("at most %g %% solid", l.Max)
	}
}

// svgTitle writes a chart title in two lines: the spec name (clipped to fit
// the width) and what the chart shows.
func svgTitle(b *bytes.Buffer, x float64, name, what string) {
	fmt.Fprintf(b, `<text x="%g" y="18" font-size="14" font-weight="bold">%s</text>`+"\n", x, xmlEscape(clip(name, 70)))
	fmt.Fprintf(b, `<text x="%g" y="34" fill="#555555">%s</text>`+"\n", x, xmlEscape(what))
}
