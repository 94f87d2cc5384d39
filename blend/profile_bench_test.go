package blend

import (
	"testing"

	"lipoplan/catalogue"
)

// BenchmarkProfile measures one stock's property calculation (the LP builds
// one per stock).
func BenchmarkProfile(b *testing.B) {
	s := catalogue.DemoStocks().Stocks[0]
	b.ReportAllocs()
	for b.Loop() {
		_ = Profile(s.FattyAcids)
	}
}
