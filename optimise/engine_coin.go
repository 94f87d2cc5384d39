//go:build coin

package optimise

import "lipoplan/optimise/lp"

// defaultEngine is COIN-OR CLP for LPs and CBC for MILPs (the coin build),
// each seeing its models scaled (lp.Scaled, lp.ScaledMIP).
func defaultEngine() *engine { return coinEngine() }

// reusableEngine is COIN-OR CLP/CBC too; each CLP model is kept between
// solves (CLP starts every solve from its slack basis).
func reusableEngine() *engine { return coinEngine() }

func coinEngine() *engine {
	return &engine{lpName: "clp", mipName: "cbc", newLP: func() lp.Engine { return lp.Scaled(lp.NewCoin()) }, mip: lp.ScaledMIP(lp.NewCBC())}
}

// engineInfo names the engines of this build for lipoplan --version.
func engineInfo() string {
	return "clp (COIN-OR, " + lp.CoinVersion() + "); integer rules: cbc"
}
