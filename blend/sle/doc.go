// Package sle predicts the solid fat content (SFC) of a fat from its TAG
// composition by solid-liquid equilibrium (README, "Methods"; each method's
// source below):
//
//   - pure-TAG melting points and enthalpies of fusion for one polymorph
//     (alpha, beta' or beta) from the correlations of Wesdorp (1990), as
//     tabulated by Moorthy et al. (2016) (MeltingOf; sources there);
//   - solubility of each TAG in an ideal liquid from the Hildebrand equation
//     ln x = (dH/R)(1/Tm - 1/T) (Solubility);
//   - solid phases are the pure TAGs (no mixed crystals); the phase split at
//     each temperature solves x_i = min(z_i/L, x_sat_i), sum x_i = 1 for the
//     liquid fraction L (LiquidFraction);
//   - SFC is reported as mass % solid, as pulsed NMR measures it (AOCS Cd
//     16b-93, ISO 8292-1).
//
// Positional species from randomise are grouped into TAG identities with
// sn-1/sn-3 mirror images merged (they melt alike). Set precomputes every
// TAG's properties once per acid set so that a curve over 8 temperatures and
// ~500 TAGs takes microseconds.
//
// How good is it? FitStock reports the model's error against each stock's
// measured curve. The model is the textbook limit case and is weak in known
// ways: natural fats crystallise as mixed crystals and not to equilibrium in
// the tempering time of a direct SFC run, their liquid is not ideal, and the
// Wesdorp correlations carry errors of 1-2 K per TAG that the steep
// Hildebrand curve turns into large SFC errors near each TAG's melting
// point. On the demo curves (typical shapes, recalled, not measured) the
// beta model is within 2-9 % solid on average for palm and lauric stocks
// (worst single points 8-20 % solid), and poor for the partially hardened
// soybean oil (trans isomers modelled as elaidic only, no sn-2 data: about
// 17 % too little solid) and for shea stearin (SOS-rich: its stable beta
// form melts near 43 C, but a short-tempered sample is far softer at 35 C,
// about 50 % solid too much there). Use predicted SFC for directions (what
// interesterification does) and measured curves for specifications.
//
// This package sits beside blend rather than inside it: blend is the linear
// properties of a physical mix, while this model builds on randomise's TAG
// distributions (randomise depends on catalogue alone), and blend never
// imports it.
package sle
