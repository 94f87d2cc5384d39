package optimise

import (
	"lipoplan/blend"
)

// mix computes the properties of the blend parts (parts[k] is stock
// idx[k]) with blend.MixProfiles from the stocks' profiles that build
// already holds (lay.prof), profiling here only a stock build did not need
// to; the result is blend.Mix(parts, temps) without profiling every stock
// again (mix_test.go checks every field).
func (l *layout) mix(parts []blend.Part, idx []int, temps []float64) (blend.Properties, error) {
	profiles := make([]*blend.Properties, len(parts))
	for k, j := range idx {
		if l.prof[j] == nil { // build needed no profile of this stock
			p := blend.Profile(parts[k].Stock.FattyAcids)
			l.prof[j] = &p
		}
		profiles[k] = l.prof[j]
	}
	return blend.MixProfiles(parts, profiles, temps)
}
