package catalogue

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// Calibration is an SFC-model calibration file: the solid-phase model and
// polymorph it was fitted with, the melting-point shift per TAG class, and
// what the fit was measured on (lipoplan's own schema; README, "SFC model
// calibration"). The names of model, polymorph and classes are checked by
// the model package (blend/sle), which owns them; here the file's shape and
// numbers are checked.
type Calibration struct {
	File      string
	Model     string             // solid-phase model, e.g. "pure"
	Polymorph string             // e.g. "beta"
	Shift     map[string]float64 // K per TAG class (S3, SUS, SSU, SU2, U3)
	Fit       CalibrationFit
}

// CalibrationFit records what a calibration was fitted on; informational.
type CalibrationFit struct {
	Catalogue        string
	Stocks           []string
	Points           int
	RMSBefore        float64
	RMSAfter         float64
	HeldOutRMS       float64 // NaN when not measured
	HeldOutRMSBefore float64 // NaN when not measured
}

type rawCalibration struct {
	Model     val     `toml:"model"`
	Polymorph val     `toml:"polymorph"`
	Shift     leafMap `toml:"shift"`
	Fit       *struct {
		Catalogue        val `toml:"catalogue"`
		Stocks           val `toml:"stocks"`
		Points           val `toml:"points"`
		RMSBefore        val `toml:"rms_before"`
		RMSAfter         val `toml:"rms_after"`
		HeldOutRMS       val `toml:"held_out_rms"`
		HeldOutRMSBefore val `toml:"held_out_rms_before"`
	} `toml:"fit"`
}

var (
	keysCalibrationTop = []string{"model", "polymorph", "shift", "fit"}
	keysCalibrationFit = []string{"catalogue", "stocks", "points", "rms_before", "rms_after", "held_out_rms", "held_out_rms_before"}
)

// maxCalibrationShift is the largest melting-point shift a calibration file
// may carry, K; the fit itself stays within the model's own, smaller bound.
const maxCalibrationShift = 50.0

// ParseCalibration decodes and checks an SFC-model calibration file. name is
// the file name used in messages.
func ParseCalibration(name string, data []byte) (*Calibration, Problems) {
	c := &collector{file: name}
	var raw rawCalibration
	md, ok := c.decode(data, &raw)
	if !ok {
		return nil, c.problems()
	}
	c.unknownKeys(md,
		func(parent toml.Key) ([]string, bool) {
			switch {
			case len(parent) == 0:
				return keysCalibrationTop, true
			case len(parent) == 1 && parent[0] == "fit":
				return keysCalibrationFit, true
			}
			return nil, false
		},
		func(int, toml.Key) string { return "" })
	cal := &Calibration{File: name, Shift: map[string]float64{}}
	if s, ok := c.str("", "model", raw.Model); ok {
		cal.Model = s
	} else if !raw.Model.set {
		c.errf("", `model is missing; write model = "pure" (the solid-phase model the shifts were fitted with)`)
	}
	if s, ok := c.str("", "polymorph", raw.Polymorph); ok {
		cal.Polymorph = s
	} else if !raw.Polymorph.set {
		c.errf("", `polymorph is missing; write polymorph = "beta"`)
	}
	switch {
	case !raw.Shift.set:
		c.errf("", "the [shift] table is missing; give the melting-point shift in K of each TAG class, e.g. S3 = -1.3")
	case raw.Shift.m == nil:
		c.errf("", "shift must be a table: write [shift] on its own line and one class = K per line below it")
	default:
		for _, k := range sortedKeys(raw.Shift.m) {
			v, ok := c.num("table [shift]", "shift "+k, val{v: raw.Shift.m[k], set: true})
			if !ok {
				continue
			}
			if math.Abs(v) > maxCalibrationShift {
				c.errf("table [shift]", "shift %s = %v K is outside -%v..%v K; a calibration moves melting points by a few K", k, v, maxCalibrationShift, maxCalibrationShift)
				continue
			}
			cal.Shift[k] = v
		}
	}
	cal.Fit.HeldOutRMS, cal.Fit.HeldOutRMSBefore = math.NaN(), math.NaN()
	if f := raw.Fit; f != nil {
		where := "table [fit]"
		if s, ok := c.str(where, "catalogue", f.Catalogue); ok {
			cal.Fit.Catalogue = s
		}
		if f.Stocks.set {
			list, ok := f.Stocks.v.([]any)
			if !ok {
				c.errf(where, "stocks must be a list of stock ids in square brackets, not %s", describe(f.Stocks.v))
			}
			for _, x := range list {
				s, ok := x.(string)
				if !ok {
					c.errf(where, "stocks must list stock ids as strings, not %s", describe(x))
					continue
				}
				cal.Fit.Stocks = append(cal.Fit.Stocks, s)
			}
		}
		if v, ok := c.num(where, "points", f.Points); ok {
			cal.Fit.Points = int(v)
		}
		for _, x := range []struct {
			label string
			v     val
			dst   *float64
		}{
			{"rms_before", f.RMSBefore, &cal.Fit.RMSBefore}, {"rms_after", f.RMSAfter, &cal.Fit.RMSAfter},
			{"held_out_rms", f.HeldOutRMS, &cal.Fit.HeldOutRMS}, {"held_out_rms_before", f.HeldOutRMSBefore, &cal.Fit.HeldOutRMSBefore},
		} {
			if v, ok := c.num(where, x.label, x.v); ok {
				if v < 0 || v > 100 {
					c.errf(where, "%s = %v is not an error in %% solid (0..100)", x.label, v)
					continue
				}
				*x.dst = v
			}
		}
	}
	if c.failed() {
		return nil, c.problems()
	}
	return cal, c.problems()
}

// LoadCalibration reads and checks an SFC-model calibration file.
func LoadCalibration(path string) (*Calibration, Problems) {
	data, err := ReadInput(path)
	if err != nil {
		return nil, readProblem(path, err, "SFC-model calibration")
	}
	return ParseCalibration(path, data)
}

// FormatCalibration writes a calibration as a commented TOML file that
// ParseCalibration reads back.
func FormatCalibration(cal *Calibration) []byte {
	var b strings.Builder
	b.WriteString("# SFC-model calibration for lipoplan: melting-point shifts per TAG class fitted to\n")
	b.WriteString("# measured SFC curves. Pass it back with --calibration FILE. Refit when the\n")
	b.WriteString("# catalogue's curves change; confirm predictions by pulsed-NMR SFC before use.\n")
	fmt.Fprintf(&b, "model = %q          # solid-phase model the shifts were fitted with\n", cal.Model)
	fmt.Fprintf(&b, "polymorph = %q       # pure-TAG melting properties of this form\n", cal.Polymorph)
	b.WriteString("\n[shift]                 # K added to the melting point of every TAG of the class\n")
	for _, k := range sortedKeys(cal.Shift) {
		fmt.Fprintf(&b, "%s = %s\n", k, strconv.FormatFloat(cal.Shift[k], 'f', 3, 64))
	}
	f := cal.Fit
	b.WriteString("\n[fit]                   # what the fit was measured on (% solid, pooled RMS)\n")
	if f.Catalogue != "" {
		fmt.Fprintf(&b, "catalogue = %q\n", f.Catalogue)
	}
	quoted := make([]string, len(f.Stocks))
	for i, s := range f.Stocks {
		quoted[i] = strconv.Quote(s)
	}
	fmt.Fprintf(&b, "stocks = [%s]\n", strings.Join(quoted, ", "))
	fmt.Fprintf(&b, "points = %d\n", f.Points)
	fmt.Fprintf(&b, "rms_before = %.3f\n", f.RMSBefore)
	fmt.Fprintf(&b, "rms_after = %.3f\n", f.RMSAfter)
	if !math.IsNaN(f.HeldOutRMS) {
		fmt.Fprintf(&b, "held_out_rms = %.3f          # leave-one-stock-out: each stock predicted with shifts fitted on the others\n", f.HeldOutRMS)
		fmt.Fprintf(&b, "held_out_rms_before = %.3f   # the same points uncalibrated\n", f.HeldOutRMSBefore)
	}
	return []byte(b.String())
}
