package catalogue

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// FormatCalibration writes what ParseCalibration reads back (round trip).
func TestCalibrationRoundTrip(t *testing.T) {
	in := &Calibration{Model: "pure", Polymorph: "beta'",
		Shift: map[string]float64{"S3": -1.25, "SUS": 0.5, "SSU": 0, "SU2": 2.125, "U3": -3},
		Fit: CalibrationFit{Catalogue: "stocks.toml", Stocks: []string{"palm", "coconut"}, Points: 16,
			RMSBefore: 7.5, RMSAfter: 4.25, HeldOutRMS: math.NaN(), HeldOutRMSBefore: math.NaN()}}
	out, ps := ParseCalibration("cal.toml", FormatCalibration(in))
	require.Empty(t, ps, "%v", ps)
	assert.Equal(t, in.Model, out.Model)
	assert.Equal(t, in.Polymorph, out.Polymorph)
	assert.Equal(t, in.Shift, out.Shift)
	assert.Equal(t, in.Fit.Stocks, out.Fit.Stocks)
	assert.Equal(t, 16, out.Fit.Points)
	assert.Equal(t, 4.25, out.Fit.RMSAfter)
	assert.True(t, math.IsNaN(out.Fit.HeldOutRMS), "no held-out figure written, none read")

	in.Fit.HeldOutRMS, in.Fit.HeldOutRMSBefore = 5.5, 7.5
	out, ps = ParseCalibration("cal.toml", FormatCalibration(in))
	require.Empty(t, ps)
	assert.Equal(t, 5.5, out.Fit.HeldOutRMS)
	assert.Equal(t, 7.5, out.Fit.HeldOutRMSBefore)
}
