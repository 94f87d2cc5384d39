package main

import (
	"encoding/json"
	"fmt"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

func TestMixPredictJSON(t *testing.T) {
	// The CLI's sfc_predicted is blend/sle's prediction after the process,
	// keyed by whole degrees (README, JSON output).
	cat := catalogue.DemoStocks()
	fh, _ := cat.Find("fh-rapeseed")
	oil, _ := cat.Find("rapeseed")
	for _, process := range []string{"native", "chemical", "enzymatic"} {
		code, out, errs := run(t, "mix", "--use", "fh-rapeseed=30,rapeseed=70", "--predict", "--process", process, "--temps", "20,37.5", "--format", "json")
		require.Equal(t, 0, code, errs)
		var got struct {
			SFC       map[string]float64 `json:"sfc"`
			Predicted map[string]float64 `json:"sfc_predicted"`
			Process   string             `json:"process"`
			Model     struct {
				Method string `json:"method"`
				Error  []struct {
					Stock  string  `json:"stock"`
					MAE    float64 `json:"mae"`
					Max    float64 `json:"max"`
					Points int     `json:"points"`
				} `json:"error_vs_measured"`
			} `json:"sfc_model"`
		}
		require.NoError(t, json.Unmarshal([]byte(out), &got), out)
		assert.Equal(t, process, got.Process)
		want, _, err := sle.PredictParts([]blend.Part{{Stock: fh, Pct: 30}, {Stock: oil, Pct: 70}}, randomise.Method(process), 1, []float64{20, 37.5}, sle.DefaultOptions())
		require.NoError(t, err)
		require.Contains(t, got.Predicted, "20")
		require.Contains(t, got.Predicted, "37.5")
		assert.InDelta(t, want[20], got.Predicted["20"], 1e-3)
		assert.InDelta(t, want[37.5], got.Predicted["37.5"], 1e-3)
		assert.Contains(t, got.Model.Method, "Hildebrand")
		require.Len(t, got.Model.Error, 2, "both stocks have measured curves")
		f, err := sle.FitStock(fh, sle.DefaultOptions())
		require.NoError(t, err)
		assert.Equal(t, "fh-rapeseed", got.Model.Error[0].Stock)
		assert.InDelta(t, f.MAE, got.Model.Error[0].MAE, 0.01)
		assert.Equal(t, len(fh.SFC), got.Model.Error[0].Points)
	}
}

func TestMixWithoutPredictHasNoPrediction(t *testing.T) {
	code, out, errs := run(t, "mix", "--use", "palm=100", "--format", "json")
	require.Equal(t, 0, code, errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.NotContains(t, got, "sfc_predicted")
}

func TestMixPredictText(t *testing.T) {
	code, out, errs := run(t, "mix", "--use", "palm=60,pko=40", "--predict", "--process", "chemical")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "predicted by the TAG model, after chemical (random) interesterification")
	assert.Contains(t, out, "Model error against each stock's own measured curve")
	assert.Contains(t, out, "palm ")
	assert.Contains(t, out, "sodium methoxide", "the process caution (README, Cautions)")
	assert.Contains(t, out, "Caution: calculated values are estimates")
}

func TestMixPredictBadInput(t *testing.T) {
	code, _, errs := run(t, "mix", "--use", "palm=100", "--process", "chemical")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "add --predict")
	code, _, errs = run(t, "mix", "--use", "palm=100", "--predict", "--process", "boiled")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, `--process "boiled" is not known`)
}

// mix reports the slip-point estimate read off the measured-linear curve
// (blend.CurveMeltingPoints, checked by hand there) in text and JSON, and
// the predicted one with --predict.
func TestMixSlipPoint(t *testing.T) {
	code, out, errs := run(t, "mix", "--use", "palm=60,pko=40", "--format", "json", "--predict", "--temps", "10,20,30,35,40,45")
	require.Equal(t, 0, code, errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	sfc := map[float64]float64{}
	for k, v := range got["sfc"].(map[string]any) {
		var tc float64
		_, err := fmt.Sscan(k, &tc)
		require.NoError(t, err)
		sfc[tc] = v.(float64)
	}
	mp := blend.CurveMeltingPoints(sfc)
	require.True(t, mp.SlipFound)
	assert.InDelta(t, mp.Slip, got["slip_point"].(float64), 0.051)
	assert.Contains(t, got, "slip_point_predicted")
	code, out, _ = run(t, "mix", "--use", "palm=60,pko=40")
	require.Equal(t, 0, code)
	assert.Contains(t, out, "Slip melting point about")
	assert.Contains(t, out, "common practice")
}

// mix says when the --use shares do not add up to 100 and it scales them.
func TestMixSaysWhenItScales(t *testing.T) {
	code, out, _ := run(t, "mix", "--use", "palm=30,pko=20")
	require.Equal(t, 0, code)
	assert.Contains(t, out, "add up to 50 %")
	code, out, _ = run(t, "mix", "--use", "palm=30,pko=20", "--format", "json", "--predict")
	require.Equal(t, 0, code)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	notes := fmt.Sprint(got["notes"])
	assert.Contains(t, notes, "scaled to 100 %")
	code, out, _ = run(t, "mix", "--use", "palm=60,pko=40")
	require.Equal(t, 0, code)
	assert.NotContains(t, out, "scaled to 100")
}
