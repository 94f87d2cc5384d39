//go:build !coin

package optimise

import (
	"testing"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp"
)

func benchBareCLP(b *testing.B, _ *catalogue.Catalogue, _ *catalogue.Spec) {
	for _, name := range []string{"BareCLP", "BareCLPReused"} {
		b.Run(name, func(b *testing.B) { b.Skip("CLP needs the coin build (-tags coin)") })
	}
}

func benchCBC(b *testing.B, _ *lp.Problem, _ []int) {
	b.Run("CBC", func(b *testing.B) { b.Skip("CBC needs the coin build (-tags coin)") })
}

func benchInterleaved(b *testing.B, _ *lp.Problem) {
	b.Run("LPvsBareCLP", func(b *testing.B) { b.Skip("CLP needs the coin build (-tags coin)") })
}
