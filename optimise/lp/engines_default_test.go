//go:build !coin

package lp_test

import "lipoplan/optimise/lp"

// coinEngines are the COIN-OR engines of the coin build; none here.
func coinEngines() []lp.Engine { return nil }

// coinMIP is CBC in the coin build; nil here.
func coinMIP() lp.MIPSolver { return nil }
