package sle

import (
	"encoding/binary"
	"math"
	"testing"
)

// FuzzLiquidFraction feeds arbitrary compositions and solubilities to the
// phase split and checks the equilibrium conditions that define it (see
// TestEquilibriumMassBalance): 0 <= L <= 1, sum of liquid mole fractions 1
// when there is liquid, no component above its solubility, and agreement
// with plain bisection.
func FuzzLiquidFraction(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16})
	f.Add(make([]byte, 64))
	f.Fuzz(func(t *testing.T, data []byte) {
		var z, xs []float64
		var sum float64
		for len(data) >= 4 && len(z) < 64 {
			a := float64(binary.LittleEndian.Uint16(data)) / 65535
			b := float64(binary.LittleEndian.Uint16(data[2:])) / 65535
			data = data[4:]
			z = append(z, a)
			xs = append(xs, b)
			sum += a
		}
		if sum == 0 {
			return
		}
		for i := range z {
			z[i] /= sum
		}
		L := LiquidFraction(z, xs)
		if math.IsNaN(L) || L < 0 || L > 1 {
			t.Fatalf("L = %v", L)
		}
		if L == 0 {
			return
		}
		var sumX float64
		for i := range z {
			x := math.Min(z[i]/L, xs[i])
			sumX += x
		}
		if math.Abs(sumX-1) > 1e-9 && L < 1 {
			t.Fatalf("liquid mole fractions sum to %v at L = %v", sumX, L)
		}
		if L < 1 {
			if b := bisectLiquid(z, xs); math.Abs(b-L) > 1e-9 {
				t.Fatalf("L = %v, bisection %v", L, b)
			}
		}
	})
}
