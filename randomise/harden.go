package randomise

import (
	"fmt"
	"slices"
	"strings"

	"lipoplan/catalogue"
)

// Saturated returns the acid that full hydrogenation makes of f: the
// saturated acid with the same chain length (C18:1, C18:1t, C18:2, C18:3 ->
// C18:0; C16:1 -> C16:0; C20:1 -> C20:0; C22:1 -> C22:0; C14:1 -> C14:0).
// Hydrogenation adds H2 across each C=C and leaves the carbon chain as it is
// (common practice: structural rule).
func Saturated(f catalogue.FattyAcid) (catalogue.FattyAcid, error) {
	if f.DoubleBonds == 0 {
		return f, nil
	}
	s, ok := catalogue.Lookup(fmt.Sprintf("C%d:0", f.Carbons))
	if !ok {
		return catalogue.FattyAcid{}, fmt.Errorf("no saturated C%d acid in the reference table to harden %s into", f.Carbons, f.Key)
	}
	return s, nil
}

// Harden returns the fully hydrogenated hardstock made from s: every double
// bond, cis or trans, is saturated. The FA profile (wt% FAME) goes through
// moles: each acid's moles n = w / M(FAME) move to its saturated counterpart,
// whose FAME is heavier by the added hydrogen, and the result is renormalised
// to 100 wt%. The sn-2 profile (mol%) and a measured TAG profile (mol% by
// letter code) follow acid by acid, since hydrogenation does not move acids
// between positions. The measured SFC no longer applies and is dropped; the
// iodine value of the result is 0 (in practice below about 2). The hardstock's
// id gets the suffix "-fh" and its name ", fully hardened"; price and
// availability are those of the feed (processing cost is the caller's).
// Partially hydrogenated fats are not modelled: take them as catalogued.
func Harden(s catalogue.Stock) (catalogue.Stock, error) {
	if err := s.CheckProfiles().Err(); err != nil {
		return catalogue.Stock{}, err
	}
	out := s
	out.ID = s.ID + "-fh"
	out.Name = s.Name + ", fully hardened"
	out.SFC = nil
	if len(s.FattyAcids) > 0 {
		// in table order throughout: several acids harden to one (C18:1,
		// C18:2, C18:3 to C18:0), and sums in Go's random map order would
		// differ in the last bits from run to run
		moles := map[string]float64{}
		for _, k := range catalogue.SortedKeys(s.FattyAcids) {
			f, _ := catalogue.Lookup(k) // CheckProfiles: every key is in the table
			h, err := Saturated(f)
			if err != nil {
				return catalogue.Stock{}, fmt.Errorf("stock %q: %w", s.ID, err)
			}
			moles[h.Key] += s.FattyAcids[k] / f.EsterMolarMass()
		}
		var total float64
		fa := make(map[string]float64, len(moles))
		for _, k := range catalogue.SortedKeys(moles) {
			f, _ := catalogue.Lookup(k)
			fa[k] = moles[k] * f.EsterMolarMass()
			total += fa[k]
		}
		if total > 0 {
			for k := range fa {
				fa[k] *= 100 / total
			}
		}
		out.FattyAcids = fa
	}
	if s.SN2 != nil {
		sn2 := map[string]float64{}
		for _, k := range catalogue.SortedKeys(s.SN2) {
			v := s.SN2[k]
			f, _ := catalogue.Lookup(k)
			h, err := Saturated(f)
			if err != nil {
				return catalogue.Stock{}, fmt.Errorf("stock %q: %w", s.ID, err)
			}
			sn2[h.Key] += v
		}
		out.SN2 = sn2
	}
	if s.TAGs != nil {
		tags := map[string]float64{}
		codes := make([]string, 0, len(s.TAGs))
		for code := range s.TAGs {
			codes = append(codes, code)
		}
		slices.Sort(codes) // several codes harden to one: sum in a fixed order
		for _, code := range codes {
			v := s.TAGs[code]
			fs, err := catalogue.ParseTAGCode(code)
			if err != nil { // CheckProfiles refuses it first
				return catalogue.Stock{}, fmt.Errorf("randomise: stock %q: %w", s.ID, err)
			}
			var name strings.Builder
			for _, f := range fs {
				h, err := Saturated(f)
				if err != nil {
					return catalogue.Stock{}, fmt.Errorf("stock %q: %w", s.ID, err)
				}
				name.WriteString(h.Code)
			}
			tags[name.String()] += v
		}
		out.TAGs = tags
	}
	return out, nil
}
