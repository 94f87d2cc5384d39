package sle

import (
	"math"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// Fit is the model's error against one stock's measured SFC curve (pulsed
// NMR, AOCS Cd 16b-93 / ISO 8292-1), in % solid, over the curve's points.
type Fit struct {
	Stock  string
	MAE    float64 // mean absolute deviation, predicted - measured
	Max    float64 // largest absolute deviation
	Bias   float64 // mean signed deviation (> 0: the model predicts too much solid)
	MaxAt  float64 // temperature (deg C) of the largest deviation
	Points int
}

// FitStock compares the predicted SFC of a stock on its own (native TAGs:
// its measured TAG profile, else 1,3-random-2-random from its sn-2 profile)
// with its measured curve at the measured temperatures.
func FitStock(s *catalogue.Stock, opt Options) (Fit, error) {
	if len(s.SFC) == 0 {
		return Fit{}, catalogue.Badf("stock %q has no measured SFC curve to compare the model with; add [stock.sfc]", s.ID)
	}
	temps := make([]float64, len(s.SFC))
	for i, p := range s.SFC {
		temps[i] = p.Temp
	}
	pred, _, err := PredictParts([]blend.Part{{Stock: s, Pct: 100}}, randomise.Native, 0, temps, opt)
	if err != nil {
		return Fit{}, err
	}
	f := Fit{Stock: s.ID, Points: len(s.SFC)}
	for _, p := range s.SFC {
		d := pred[p.Temp] - p.Solid
		f.MAE += math.Abs(d)
		f.Bias += d
		if math.Abs(d) > f.Max {
			f.Max, f.MaxAt = math.Abs(d), p.Temp
		}
	}
	f.MAE /= float64(f.Points)
	f.Bias /= float64(f.Points)
	return f, nil
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
