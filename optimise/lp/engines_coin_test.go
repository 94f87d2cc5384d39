//go:build coin

package lp_test

import "lipoplan/optimise/lp"

// coinEngines are the COIN-OR engines of the coin build: CLP.
func coinEngines() []lp.Engine { return []lp.Engine{lp.NewCoin()} }

// coinMIP is CBC in the coin build.
func coinMIP() lp.MIPSolver { return lp.NewCBC() }
