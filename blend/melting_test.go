package blend_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"

	"lipoplan/blend"
)

func TestCurveMeltingPointsByHand(t *testing.T) {
	// 30 % at 20 C, 10 % at 30 C, 2 % at 40 C, 0 at 45 C: the curve falls
	// through 4 % between 30 and 40 C at 30 + 10 (10-4)/(10-2) = 37.5 C and
	// through 0.5 % between 40 and 45 C at 40 + 5 (2-0.5)/2 = 43.75 C
	// (linear interpolation, worked by hand).
	mp := blend.CurveMeltingPoints(map[float64]float64{20: 30, 30: 10, 40: 2, 45: 0})
	assert.True(t, mp.SlipFound)
	assert.InDelta(t, 37.5, mp.Slip, 1e-12)
	assert.True(t, mp.ClearFound)
	assert.InDelta(t, 43.75, mp.Clear, 1e-12)

	// still 12 % solid at its hottest point: no estimate
	mp = blend.CurveMeltingPoints(map[float64]float64{20: 40, 40: 12})
	assert.False(t, mp.SlipFound)
	assert.True(t, math.IsNaN(mp.Slip))
	// below the thresholds from the start: no estimate either
	mp = blend.CurveMeltingPoints(map[float64]float64{10: 0.2, 20: 0})
	assert.False(t, mp.SlipFound)
	assert.False(t, mp.ClearFound)
}
