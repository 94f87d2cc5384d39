package main

import (
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// processCaution closes every TAG report where a process step was applied
// (README, Cautions).
const processCaution = "Caution: interesterification catalysts (sodium methoxide) and hydrogenation (hydrogen, nickel) are\n" +
	"hazardous plant operations for trained staff under local codes; predicted TAG compositions are\n" +
	"estimates to be confirmed by lab analysis before use."

func (a *app) tags(args []string) error {
	fs := a.newFlags("tags",
		`--use "id=40,id2=60" [--stocks F] [--process native|chemical|enzymatic] [--degree 0..1] [--harden id,...] [--isomers stereo|regio|combined] [--top N] [--format text|json]`,
		"TAG distribution of a mix (% by mass), native or after interesterification.\n"+
			"native: measured TAG profiles where catalogued, otherwise 1,3-random-2-random from the sn-2 profile;\n"+
			"chemical: fully random over the blend; enzymatic: sn-1,3 lipase, each stock's sn-2 kept.\n"+
			"--degree mixes start (0) and equilibrium (1). --harden fully hydrogenates the named stocks first.\n"+
			"Classes and sums always cover the full distribution; --top only limits the species list.")
	use := fs.String("use", "", `shares by stock id, % by mass, e.g. "palm=60,pko=40"`)
	process := fs.String("process", "native", "native, chemical or enzymatic")
	degree := fs.Float64("degree", 1, "extent of reaction 0..1 for chemical or enzymatic (1 = equilibrium)")
	harden := fs.String("harden", "", `stocks of --use to fully hydrogenate before blending, e.g. "soybean"`)
	isomers := fs.String("isomers", "stereo", "species list: stereo (sn-1, sn-2, sn-3 apart), regio (POP vs PPO, mirror images merged) or combined")
	top := fs.Int("top", 20, "species shown, most abundant first (0 = all)")
	in := a.inputFlags(fs, noSpec, "", "text", "json")
	if err := a.parse(fs, args); err != nil {
		return err
	}
	if err := in.check(); err != nil {
		return err
	}
	method, err := randomise.ParseMethod(*process)
	if err != nil {
		return catalogue.Badf("--process %q is not known; use native, chemical or enzymatic", *process)
	}
	degreeSet := false
	fs.Visit(func(f *flag.Flag) { degreeSet = degreeSet || f.Name == "degree" })
	if !(*degree >= 0 && *degree <= 1) {
		return catalogue.Badf("--degree %v is outside 0..1; give the extent of reaction, e.g. --degree 0.5 (1 = full equilibrium)", *degree)
	}
	if degreeSet && method == randomise.Native {
		return catalogue.Badf("--degree applies to --process chemical or enzymatic; drop it or choose a process")
	}
	level, err := randomise.ParseIsomers(*isomers)
	if err != nil {
		return catalogue.Badf("--isomers %q is not known; use stereo, regio or combined", *isomers)
	}
	if *top < 0 {
		return catalogue.Badf("--top %d is negative; give the number of species to show (0 = all)", *top)
	}
	cat, _, err := in.load(a)
	if err != nil {
		return err
	}
	parts, err := parseUse(*use, cat)
	if err != nil {
		return err
	}
	hardened, err := hardenParts(parts, *harden)
	if err != nil {
		return err
	}
	d, err := randomise.Distribute(parts, method, *degree)
	if err != nil {
		return err
	}
	rep := tagReport{
		parts: parts, dist: d, summary: d.Summarise(), species: d.SpeciesBy(level),
		level: level, top: *top, hardened: hardened,
	}
	if in.json() {
		return writeJSON(a.stdout, rep.json())
	}
	rep.text(a.stdout)
	return nil
}

// hardenParts replaces the named stocks of the mix by their fully
// hydrogenated form (randomise.Harden). The catalogue itself is not touched.
func hardenParts(parts []blend.Part, list string) ([]string, error) {
	if strings.TrimSpace(list) == "" {
		return nil, nil
	}
	var done []string
	for _, id := range strings.Split(list, ",") {
		id = strings.TrimSpace(id)
		if id == "" {
			continue
		}
		found := false
		for i := range parts {
			if parts[i].Stock.ID != id {
				continue
			}
			h, err := randomise.Harden(*parts[i].Stock)
			if err != nil {
				return nil, fmt.Errorf("--harden: %w", err)
			}
			parts[i].Stock = &h
			found = true
		}
		if !found {
			return nil, catalogue.Badf("--harden: stock %q is not in --use; name stocks of the mix, e.g. --use \"%s=20,...\" --harden %s", id, id, id)
		}
		done = append(done, id)
	}
	return done, nil
}

// tagReport is everything the tags command prints.
type tagReport struct {
	parts    []blend.Part
	dist     *randomise.Distribution
	summary  randomise.Summary
	species  []randomise.Species // full list at the chosen isomer level, sorted
	level    randomise.Isomers
	top      int
	hardened []string
}

func (r tagReport) shown() []randomise.Species {
	if r.top == 0 || r.top >= len(r.species) {
		return r.species
	}
	return r.species[:r.top]
}

func (r tagReport) processed() bool {
	return r.dist.Method != randomise.Native || len(r.hardened) > 0
}

// exact keeps JSON numbers short while sums of shares stay within 1e-9 of 100.
func exact(v float64) float64 { return round(v, 10) }

func (r tagReport) json() map[string]any {
	var total float64
	for _, p := range r.parts {
		total += p.Pct
	}
	mix := make([]map[string]any, 0, len(r.parts))
	for _, p := range r.parts {
		mix = append(mix, map[string]any{"stock": p.Stock.ID, "pct": exact(100 * p.Pct / total)})
	}
	species := make([]map[string]any, 0, len(r.shown()))
	for _, s := range r.shown() {
		species = append(species, map[string]any{
			"tag":        s.Tag,
			"positions":  s.Positions[:],
			"mol_pct":    exact(s.MolPct),
			"wt_pct":     exact(s.WtPct),
			"molar_mass": round(s.MolarMass, 3),
			"formula":    s.Formula.String(),
			"cn":         s.CN,
			"ecn":        s.ECN,
		})
	}
	c := r.summary.Classes
	byCN, byECN := map[string]float64{}, map[string]float64{}
	for _, g := range r.summary.CN {
		byCN[strconv.Itoa(g.Key)] = exact(g.MolPct)
	}
	for _, g := range r.summary.ECN {
		byECN[strconv.Itoa(g.Key)] = exact(g.MolPct)
	}
	notes := r.dist.Notes
	if notes == nil {
		notes = []string{}
	}
	hardened := r.hardened
	if hardened == nil {
		hardened = []string{}
	}
	return map[string]any{
		"caution":         cautionJSON,
		"process":         string(r.dist.Method),
		"degree":          r.dist.Degree,
		"hardened":        hardened,
		"mix":             mix,
		"isomers":         r.level.String(),
		"species":         species,
		"species_count":   len(r.species),
		"classes":         map[string]float64{"S3": exact(c.Mol.S3), "S2U": exact(c.Mol.S2U), "SU2": exact(c.Mol.SU2), "U3": exact(c.Mol.U3)},
		"classes_wt":      map[string]float64{"S3": exact(c.Wt.S3), "S2U": exact(c.Wt.S2U), "SU2": exact(c.Wt.SU2), "U3": exact(c.Wt.U3)},
		"sus":             exact(c.Mol.SUS),
		"ssu":             exact(c.Mol.SSU),
		"usu":             exact(c.Mol.USU),
		"uus":             exact(c.Mol.UUS),
		"by_cn":           byCN,
		"by_ecn":          byECN,
		"mean_molar_mass": round(r.summary.MeanMolarMass, 3),
		"notes":           notes,
	}
}

func (r tagReport) title() string {
	d := r.dist
	var what string
	switch d.Method {
	case randomise.Chemical:
		what = "after chemical (random) interesterification"
	case randomise.Enzymatic:
		what = "after sn-1,3 enzymatic interesterification"
	default:
		what = "native (1,3-random-2-random / measured)"
	}
	if d.Method != randomise.Native && d.Degree < 1 {
		what += fmt.Sprintf(", degree %.2f", d.Degree)
	}
	return "TAGs " + what
}

func (r tagReport) text(w io.Writer) {
	fmt.Fprintln(w, r.title())
	fmt.Fprintf(w, "Mix %s by mass", describeParts(r.parts))
	if len(r.hardened) > 0 {
		fmt.Fprintf(w, "; fully hardened first: %s", strings.Join(r.hardened, ", "))
	}
	fmt.Fprintf(w, "\n%d fatty acids, %d positional species; list by %s\n\n",
		len(r.dist.Acids), r.summary.Count, levelText(r.level))

	fmt.Fprintf(w, "  %-7s %-7s %-7s %-7s %7s %7s %7s %4s %4s\n", "TAG", "sn-1", "sn-2", "sn-3", "mol%", "wt%", "g/mol", "CN", "ECN")
	var shownMol, shownWt float64
	for _, s := range r.shown() {
		p := s.Positions
		if r.level == randomise.Combined {
			p = [3]string{"", "", ""}
		}
		fmt.Fprintf(w, "  %-7s %-7s %-7s %-7s %7.2f %7.2f %7.1f %4d %4d\n",
			s.Tag, p[0], p[1], p[2], s.MolPct, s.WtPct, s.MolarMass, s.CN, s.ECN)
		shownMol += s.MolPct
		shownWt += s.WtPct
	}
	if rest := len(r.species) - len(r.shown()); rest > 0 {
		fmt.Fprintf(w, "  %-31s %7.2f %7.2f\n", fmt.Sprintf("+ %d more", rest), 100-shownMol, 100-shownWt)
	}
	fmt.Fprintln(w)

	c := r.summary.Classes
	fmt.Fprintf(w, "  %-5s %-32s %6s %6s\n", "class", "", "mol%", "wt%")
	rows := []struct {
		name    string
		mol, wt float64
		isomers string
	}{
		{"S3", c.Mol.S3, c.Wt.S3, ""},
		{"S2U", c.Mol.S2U, c.Wt.S2U, fmt.Sprintf("SUS %.2f  SSU %.2f", c.Mol.SUS, c.Mol.SSU)},
		{"SU2", c.Mol.SU2, c.Wt.SU2, fmt.Sprintf("USU %.2f  UUS %.2f", c.Mol.USU, c.Mol.UUS)},
		{"U3", c.Mol.U3, c.Wt.U3, ""},
	}
	for _, row := range rows {
		line := fmt.Sprintf("  %-5s %-32s %6.2f %6.2f  %s", row.name, bar(row.mol, 32), row.mol, row.wt, row.isomers)
		fmt.Fprintln(w, strings.TrimRight(line, " "))
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "  CN  (mol%) "+groupLine(r.summary.CN))
	fmt.Fprintln(w, "  ECN (mol%) "+groupLine(r.summary.ECN))
	fmt.Fprintf(w, "  mean TAG molar mass %.1f g/mol; trans acids count as unsaturated (U)\n", r.summary.MeanMolarMass)
	if len(r.dist.Notes) > 0 {
		fmt.Fprintln(w)
		for _, n := range r.dist.Notes {
			fmt.Fprintln(w, "  note: "+n)
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, cautionLine)
	if r.processed() {
		fmt.Fprintln(w, processCaution)
	}
}

func levelText(l randomise.Isomers) string {
	switch l {
	case randomise.Regio:
		return "regio-isomer (mirror images sn-1/sn-3 merged, POP apart from PPO)"
	case randomise.Combined:
		return "acid combination (positional isomers merged)"
	}
	return "position (sn-1, sn-2, sn-3 apart)"
}

// bar draws v % of width cells with eighth-block resolution.
func bar(v float64, width int) string {
	if !(v > 0) {
		return ""
	}
	eighths := int(math.Round(math.Min(v, 100) / 100 * float64(width*8)))
	parts := []string{"", "▏", "▎", "▍", "▌", "▋", "▊", "▉"}
	return strings.Repeat("█", eighths/8) + parts[eighths%8]
}

func groupLine(gs []randomise.Group) string {
	var items []string
	for _, g := range gs {
		if g.MolPct < 0.005 {
			continue
		}
		items = append(items, fmt.Sprintf("%d:%.2f", g.Key, g.MolPct))
	}
	// wrap long lines under the label
	var b strings.Builder
	for i, it := range items {
		if i > 0 {
			if i%8 == 0 {
				b.WriteString("\n             ")
			} else {
				b.WriteString("  ")
			}
		}
		b.WriteString(it)
	}
	return b.String()
}
