package blend

import (
	"math"
	"sort"
)

// Thresholds of the melting-point estimates, % solid by pulsed NMR. The
// slip melting point (AOCS Cc 3-25, open capillary) of a plastic fat lies
// near the temperature where its SFC has fallen to about 4-5 %, and the
// clear point (capillary turns clear, AOCS Cc 1-25) near the last trace of
// solid: both are common practice for reading melting points off an SFC
// curve, not a standard's definition.
const (
	SlipThreshold  = 4.0
	ClearThreshold = 0.5
)

// MeltingPoints are melting points read off an SFC curve.
type MeltingPoints struct {
	Slip, Clear float64 // deg C; NaN when the curve does not reach the threshold in its range
	SlipFound   bool
	ClearFound  bool
}

// CurveMeltingPoints reads the slip and clear melting point estimates off
// the curve given as SFC (% solid) by temperature (deg C): the highest
// temperature at which the curve, interpolated linearly between its points,
// falls through SlipThreshold, and likewise ClearThreshold. A curve that is
// still above a threshold at its hottest point, or below it at its coldest,
// has no estimate for it (Found false, NaN).
func CurveMeltingPoints(sfc map[float64]float64) MeltingPoints {
	ts := make([]float64, 0, len(sfc))
	for t, v := range sfc {
		if !math.IsNaN(v) {
			ts = append(ts, t)
		}
	}
	sort.Float64s(ts)
	mp := MeltingPoints{Slip: math.NaN(), Clear: math.NaN()}
	mp.Slip, mp.SlipFound = crossing(ts, sfc, SlipThreshold)
	mp.Clear, mp.ClearFound = crossing(ts, sfc, ClearThreshold)
	return mp
}

// crossing is the highest temperature where the curve falls from above
// level to level or below, by linear interpolation.
func crossing(ts []float64, sfc map[float64]float64, level float64) (float64, bool) {
	for i := len(ts) - 1; i > 0; i-- {
		hi, lo := sfc[ts[i]], sfc[ts[i-1]]
		if hi > level {
			return math.NaN(), false // still above the level at the hot end
		}
		if lo > level {
			f := (lo - level) / (lo - hi)
			return ts[i-1] + f*(ts[i]-ts[i-1]), true
		}
	}
	return math.NaN(), false
}
