package sle

import (
	"math"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// Fit is the model's error against one stock's measured SFC curve (pulsed
// NMR, AOCS Cd 16b-93 / ISO 8292-1), in % solid, over the curve's points.
type Fit struct {
	Stock  string
	Points []FitPoint
	RMS    float64 // root mean square of predicted - measured
	MAE    float64 // mean absolute deviation
	Max    float64 // largest absolute deviation
	MaxAt  float64 // temperature (deg C) of the largest deviation
	Bias   float64 // mean signed deviation (> 0: the model predicts too much solid)
}

// FitPoint is one measured point with the model's prediction.
type FitPoint struct {
	Temp, Measured, Predicted float64
}

// FitStock compares the predicted SFC of a stock on its own (native TAGs:
// its measured TAG profile, else 1,3-random-2-random from its sn-2 profile,
// else random) with its measured curve at the measured temperatures.
func FitStock(s *catalogue.Stock, opt Options) (Fit, error) {
	if len(s.SFC) == 0 {
		return Fit{}, catalogue.Badf("stock %q has no measured SFC curve to compare the model with; add [stock.sfc]", s.ID)
	}
	temps := make([]float64, len(s.SFC))
	for i, p := range s.SFC {
		temps[i] = p.Temp
	}
	pred, _, err := PredictParts([]catalogue.Part{{Stock: s, Pct: 100}}, randomise.Native, 0, temps, opt)
	if err != nil {
		return Fit{}, err
	}
	f := Fit{Stock: s.ID}
	for _, p := range s.SFC {
		f.Points = append(f.Points, FitPoint{Temp: p.Temp, Measured: p.Solid, Predicted: pred[p.Temp]})
	}
	f.summarise()
	return f, nil
}

// summarise fills the error statistics from the points.
func (f *Fit) summarise() {
	f.RMS, f.MAE, f.Max, f.MaxAt, f.Bias = 0, 0, 0, 0, 0
	for _, p := range f.Points {
		d := p.Predicted - p.Measured
		f.RMS += d * d
		f.MAE += math.Abs(d)
		f.Bias += d
		if math.Abs(d) > f.Max {
			f.Max, f.MaxAt = math.Abs(d), p.Temp
		}
	}
	if n := float64(len(f.Points)); n > 0 {
		f.RMS = math.Sqrt(f.RMS / n)
		f.MAE /= n
		f.Bias /= n
	}
}

// FitCatalogue is FitStock for every stock of the catalogue that has a
// measured curve, in catalogue order.
func FitCatalogue(cat *catalogue.Catalogue, opt Options) ([]Fit, error) {
	var out []Fit
	for i := range cat.Stocks {
		if len(cat.Stocks[i].SFC) == 0 {
			continue
		}
		f, err := FitStock(&cat.Stocks[i], opt)
		if err != nil {
			return nil, err
		}
		out = append(out, f)
	}
	return out, nil
}

// PooledRMS is the root mean square deviation over every point of fits.
func PooledRMS(fits []Fit) float64 {
	var se float64
	var n int
	for _, f := range fits {
		for _, p := range f.Points {
			d := p.Predicted - p.Measured
			se += d * d
			n++
		}
	}
	if n == 0 {
		return 0
	}
	return math.Sqrt(se / float64(n))
}

// MeasuredError says how far the default model (DefaultOptions) has been
// measured off: its error on the typical curves of seven natural fats in
// testdata/sfc-typical.toml, which TestErrorOnTypicalCurves recomputes.
// Reports that use predicted SFC print it.
const MeasuredError = "the TAG model's error measured on typical pulsed-NMR curves of 7 natural fats " +
	"(palm oil, olein and stearin, coconut, palm kernel oil, shea stearin, hardened soybean oil; typical values " +
	"recalled from handbook tables, not read in a published table) is RMS 7.9 % solid, worst 19 % solid " +
	"(palm olein at 20 °C): treat predicted SFC as a direction, not a number, until lab-confirmed"
