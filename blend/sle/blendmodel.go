package sle

import (
	"fmt"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// BlendModel predicts the SFC of final blends made from a fixed list of
// stocks at fixed temperatures: some stocks blended as they are (native
// TAGs) and some fed to one reactor (chemical or enzymatic
// interesterification to equilibrium), the TAGs of the whole final blend
// going through one solid-liquid equilibrium. Solid fat is not additive
// over the components of a mix (eutectic and dilution effects), which is
// why the whole blend is predicted rather than its parts summed. It holds
// its working memory: not safe for concurrent use; make one per goroutine.
type BlendModel struct {
	blender *randomise.Blender
	prep    *Prepared
	method  randomise.Method
	mol     []float64
	work    Work
}

// NewBlendModel prepares the stocks' TAGs over one acid set and the TAG
// table at temps. method is the reactor's (Chemical or Enzymatic; it is not
// used when no stock is fed). A stock whose composition the model cannot
// use is bad input naming it.
func NewBlendModel(stocks []*catalogue.Stock, method randomise.Method, temps []float64, opt Options) (*BlendModel, error) {
	b, err := randomise.NewBlender(stocks)
	if err != nil {
		return nil, fmt.Errorf("predicted SFC: %w", err)
	}
	p, err := NewSet(b.Acids, opt).Prepare(temps)
	if err != nil {
		return nil, fmt.Errorf("predicted SFC: %w", err)
	}
	return &BlendModel{blender: b, prep: p, method: method, mol: make([]float64, b.Len())}, nil
}

// SFC writes the predicted SFC (% solid) of the blend with direct[j] % by
// mass of stock j blended as it is and feed[j] % of stock j through the
// reactor into out, one value per prepared temperature.
func (m *BlendModel) SFC(direct, feed []float64, out []float64) error {
	if err := m.blender.Mix(direct, feed, m.method, m.mol); err != nil {
		return fmt.Errorf("predicted SFC: %w", err)
	}
	if err := m.prep.Curve(m.mol, out, &m.work); err != nil {
		return fmt.Errorf("predicted SFC: %w", err)
	}
	return nil
}

// Temps are the temperatures SFC predicts at (deg C).
func (m *BlendModel) Temps() []float64 { return m.prep.Temps() }

// Notes are the TAG model's assumptions about the stocks (e.g. a stock
// without sn-2 data taken as random).
func (m *BlendModel) Notes() []string { return m.blender.Notes }
