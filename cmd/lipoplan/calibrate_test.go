package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
)

// calibrate writes a file that check and mix read back, and check with it
// reports the same error as calibrate measured after the fit (the file's
// shifts are the fitted ones to 3 decimals).
func TestCalibrateRoundTrip(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "cal.toml")
	code, out, errs := run(t, "calibrate", "--stocks", "../../testdata/sfc-typical.toml", "--write", file, "--format", "json")
	require.Equal(t, 0, code, out+errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.Equal(t, "pure", got["solids"])
	assert.Equal(t, "beta", got["polymorph"])
	after := got["rms_after"].(float64)
	assert.LessOrEqual(t, after, got["rms_before"].(float64))
	assert.Contains(t, got, "held_out_rms")

	cal, ps := catalogue.LoadCalibration(file)
	require.Empty(t, ps, "%v", ps)
	opt, err := sle.OptionsFrom(cal)
	require.NoError(t, err)
	assert.NotEqual(t, sle.Shifts{}, opt.Shift)

	code, out, errs = run(t, "check", "--stocks", "../../testdata/sfc-typical.toml", "--calibration", file, "--sfc-fit", "--format", "json")
	require.Equal(t, 0, code, out+errs)
	var chk map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &chk))
	fit := chk["sfc_fit"].(map[string]any)
	assert.InDelta(t, after, fit["rms"].(float64), 0.02, "the file reproduces the fit")
	assert.Contains(t, fit["model"], "calibrated")

	code, out, errs = run(t, "mix", "--use", "palm=100", "--predict", "--calibration", file)
	require.Equal(t, 0, code, out+errs)
	assert.Contains(t, out, "calibrated (S3")
}

// A calibration naming a model or class the TAG model does not know is bad
// input naming the file, in check (listed with the problems) and in mix.
func TestCalibrationWithUnknownNames(t *testing.T) {
	dir := t.TempDir()
	for name, body := range map[string]string{
		"model.toml": "model = \"crystal\"\npolymorph = \"beta\"\n[shift]\nS3 = 1\n",
		"class.toml": "model = \"pure\"\npolymorph = \"beta\"\n[shift]\nS9 = 1\n",
		"bound.toml": "model = \"pure\"\npolymorph = \"beta\"\n[shift]\nS3 = 20\n",
	} {
		file := filepath.Join(dir, name)
		require.NoError(t, os.WriteFile(file, []byte(body), 0o644))
		code, out, errs := run(t, "check", "--calibration", file)
		assert.Equal(t, 2, code, name)
		assert.Contains(t, out, file, name)
		code, _, errs = run(t, "mix", "--use", "palm=100", "--predict", "--calibration", file)
		assert.Equal(t, 2, code, name)
		assert.Contains(t, errs, file, name)
	}
}

// check prints the model's fit under a valid catalogue: every demo stock
// with a curve, measured and model rows, and the pooled RMS.
func TestCheckPrintsModelFit(t *testing.T) {
	code, out, _ := run(t, "check")
	require.Equal(t, 0, code)
	assert.Contains(t, out, "SFC model against the measured curves")
	for _, id := range []string{"palm", "coconut", "shea-st", "fh-rapeseed"} {
		assert.Contains(t, out, id)
	}
	assert.Contains(t, out, "measured")
	assert.Contains(t, out, "RMS")
	assert.Contains(t, out, "all 14 stocks: RMS")
}
