//go:build !coin

package lp_test

import (
	"testing"

	"lipoplan/optimise/lp"
)

// coinEngines are the COIN-OR engines of the coin build; none here.
func coinEngines() []lp.Engine { return nil }

// coinMIP is CBC in the coin build; nil here.
func coinMIP() lp.MIPSolver { return nil }

// TestAgainstCOINOR says where the CLP and CBC comparisons went: the
// reference suite and the branch-and-bound tests compare against them in
// the coin build only.
func TestAgainstCOINOR(t *testing.T) {
	t.Skip("COIN-OR CLP/CBC comparisons need the coin build: go test -tags coin ./optimise/... (.ci/run runs it)")
}
