//go:build !coin

package optimise

import (
	"testing"

	"lipoplan/catalogue"
)

func benchBareCLP(b *testing.B, _ *catalogue.Catalogue, _ *catalogue.Spec) {
	for _, name := range []string{"BareCLP", "BareCLPReused"} {
		b.Run(name, func(b *testing.B) { b.Skip("CLP needs the coin build (-tags coin)") })
	}
}
