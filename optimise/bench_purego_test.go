//go:build !cgo || purego

package optimise

import (
	"testing"

	"lipoplan/catalogue"
)

func benchBareCLP(b *testing.B, _ *catalogue.Catalogue, _ *catalogue.Spec) {
	b.Run("BareCLP", func(b *testing.B) { b.Skip("CLP needs the cgo build without -tags purego") })
}
