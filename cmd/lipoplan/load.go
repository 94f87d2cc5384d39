package main

import (
	"flag"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/tui"
)

// stocks loads the catalogue at path ("" = the embedded demo stocks). Warnings
// go to stderr; errors come back as catalogue.Problems (exit 2).
func (a *app) stocks(path string) (*catalogue.Catalogue, error) {
	if path == "" {
		return catalogue.DemoStocks(), nil
	}
	cat, ps := catalogue.LoadStocks(path)
	a.warn(ps)
	if len(ps.Errors()) > 0 {
		return nil, ps.Errors()
	}
	return cat, nil
}

// spec loads the spec at path ("" = the first embedded demo spec).
func (a *app) spec(path string, cat *catalogue.Catalogue) (*catalogue.Spec, error) {
	if path == "" {
		specs := catalogue.DemoSpecs()
		if len(specs) == 0 {
			return nil, fmt.Errorf("the embedded demo has no spec")
		}
		return specs[0], nil
	}
	s, ps := catalogue.LoadSpec(path, cat)
	a.warn(ps)
	if len(ps.Errors()) > 0 {
		return nil, ps.Errors()
	}
	return s, nil
}

func (a *app) warn(ps catalogue.Problems) {
	for _, p := range ps.Warnings() {
		fmt.Fprintln(a.stderr, "lipoplan: "+p.String())
	}
}

// parseUse reads --use "id=40,id2=60" (% by mass) against the catalogue.
func parseUse(s string, cat *catalogue.Catalogue) ([]blend.Part, error) {
	if strings.TrimSpace(s) == "" {
		return nil, catalogue.Badf("--use is required: give stock shares as \"id=40,id2=60\" (%% by mass); stock ids: %s", stockIDs(cat))
	}
	var parts []blend.Part
	seen := map[string]bool{}
	for _, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			continue
		}
		id, val, ok := strings.Cut(item, "=")
		id = strings.TrimSpace(id)
		if !ok {
			return nil, catalogue.Badf("--use: %q has no share; write it as %s=40", item, id)
		}
		st, found := cat.Find(id)
		if !found {
			return nil, catalogue.Badf("--use: no stock %q in %s; stock ids: %s", id, catName(cat), stockIDs(cat))
		}
		if seen[id] {
			return nil, catalogue.Badf("--use: stock %q is named twice; give each stock once", id)
		}
		seen[id] = true
		pct, err := strconv.ParseFloat(strings.TrimSpace(val), 64)
		if err != nil || pct < 0 || math.IsNaN(pct) || math.IsInf(pct, 0) {
			return nil, catalogue.Badf("--use: share of %q is %q; give a number >= 0 (%% by mass)", id, val)
		}
		parts = append(parts, blend.Part{Stock: st, Pct: pct})
	}
	var total float64
	for _, p := range parts {
		total += p.Pct
	}
	if total <= 0 {
		return nil, catalogue.Badf("--use: the shares add up to 0; give at least one stock a share above 0")
	}
	if math.IsInf(total, 0) {
		return nil, catalogue.Badf("--use: the shares are too large to add up; give %% by mass, e.g. \"id=40,id2=60\"")
	}
	return parts, nil
}

func catName(cat *catalogue.Catalogue) string {
	if cat.File == "" {
		return "the demo stocks"
	}
	return cat.File
}

func stockIDs(cat *catalogue.Catalogue) string {
	ids := make([]string, len(cat.Stocks))
	for i, s := range cat.Stocks {
		ids[i] = s.ID
	}
	return strings.Join(ids, ", ")
}

// parseTemps reads --temps "5,10,37"; "" gives nil (defaults apply).
func parseTemps(s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	var out []float64
	for _, f := range strings.Split(s, ",") {
		f = strings.TrimSpace(f)
		if f == "" {
			continue
		}
		t, err := strconv.ParseFloat(f, 64)
		if err != nil || math.IsNaN(t) || t < -40 || t > 100 {
			return nil, catalogue.Badf("--temps: %q is not a temperature in deg C between -40 and 100; write e.g. --temps \"5,10,37\"", f)
		}
		out = append(out, t)
	}
	sort.Float64s(out)
	return dedupe(out), nil
}

func dedupe(ts []float64) []float64 {
	var out []float64
	for i, t := range ts {
		if i == 0 || t != ts[i-1] {
			out = append(out, t)
		}
	}
	return out
}

// inputs are the flags every command that reads the catalogue shares:
// --stocks, --format and, where the command takes one, --spec and
// --scenario.
type inputs struct {
	stocks, spec, format *string
	scenario             *string // nil unless the command takes --scenario
	formats              []string
	specMode             specMode
}

// specMode says whether a command takes --spec and what no --spec means.
type specMode int

const (
	noSpec       specMode = iota // the command takes no spec
	demoSpec                     // no --spec: the first embedded demo spec
	optionalSpec                 // no --spec: none
)

// inputFlags declares --stocks, --format (the first of formats is the
// default) and, unless sm is noSpec, --spec with help specHelp.
func (a *app) inputFlags(fs *flag.FlagSet, sm specMode, specHelp string, formats ...string) *inputs {
	in := &inputs{formats: formats, specMode: sm}
	in.stocks = fs.String("stocks", "", "stock catalogue TOML (default: embedded demo stocks)")
	if sm != noSpec {
		in.spec = fs.String("spec", "", specHelp)
	}
	in.format = fs.String("format", formats[0], strings.Join(formats, ", ")+" (default "+formats[0]+")")
	return in
}

// takeScenario adds --scenario: the stocks, spec and left-out stocks of a
// scenario file saved by the workspace, instead of --stocks and --spec, so
// that a workspace session is replayed as it was saved.
func (in *inputs) takeScenario(fs *flag.FlagSet) *inputs {
	in.scenario = fs.String("scenario", "", "a scenario `file` saved by the workspace (s), instead of --stocks and --spec")
	return in
}

// loadScenario reads the scenario file at path, refused beside --stocks or
// --spec (given as stocks and spec): one run reads one set of inputs.
func loadScenario(path, stocks, spec string) (*tui.Scenario, error) {
	if stocks != "" || spec != "" {
		return nil, catalogue.Badf("give either --scenario or --stocks/--spec, not both")
	}
	return tui.LoadScenario(path)
}

// check refuses a --format the command does not write.
func (in *inputs) check() error { return checkFormat(*in.format, in.formats...) }

// json reports whether --format json was asked for.
func (in *inputs) json() bool { return *in.format == "json" }

// load checks --format, then loads the catalogue and the spec (nil when the
// command takes none or an optional one is not given). From --scenario they
// are what the optimiser sees of it (tui.Scenario.Effective): a left-out
// stock comes with a [use] cap of 0.
func (in *inputs) load(a *app) (*catalogue.Catalogue, *catalogue.Spec, error) {
	if err := in.check(); err != nil {
		return nil, nil, err
	}
	if in.scenario != nil && *in.scenario != "" {
		specPath := ""
		if in.spec != nil {
			specPath = *in.spec
		}
		sc, err := loadScenario(*in.scenario, *in.stocks, specPath)
		if err != nil {
			return nil, nil, err
		}
		cat, spec := sc.Effective()
		return cat, spec, nil
	}
	cat, err := a.stocks(*in.stocks)
	if err != nil {
		return nil, nil, err
	}
	if in.specMode == noSpec || (in.specMode == optionalSpec && *in.spec == "") {
		return cat, nil, nil
	}
	spec, err := a.spec(*in.spec, cat)
	if err != nil {
		return nil, nil, err
	}
	return cat, spec, nil
}

// files are the input files named on the command line, which no output of
// the same run may overwrite.
// loadWithTemps is load and the report temperatures of a --temps flag
// (temps; "" gives the defaults plus the spec's, blend.SpecTemps).
func (in *inputs) loadWithTemps(a *app, temps string) (*catalogue.Catalogue, *catalogue.Spec, []float64, error) {
	cat, spec, err := in.load(a)
	if err != nil {
		return nil, nil, nil, err
	}
	ts, err := parseTemps(temps)
	if err != nil {
		return nil, nil, nil, err
	}
	if ts == nil {
		ts = blend.SpecTemps(spec)
	}
	return cat, spec, ts, nil
}

// scenarioPath is the --scenario file, "" when none was given or the
// command takes none.
func (in *inputs) scenarioPath() string {
	if in.scenario == nil {
		return ""
	}
	return *in.scenario
}

func (in *inputs) files() []string {
	out := []string{*in.stocks}
	if in.spec != nil {
		out = append(out, *in.spec)
	}
	if in.scenario != nil {
		out = append(out, *in.scenario)
	}
	return out
}

// shareNote says when the --use shares do not add up to 100 %: they are
// scaled to 100 (each stock keeps its proportion), and the report says so.
func shareNote(parts []blend.Part) string {
	var sum float64
	for _, p := range parts {
		sum += p.Pct
	}
	if math.Abs(sum-100) <= 1e-9 {
		return ""
	}
	return fmt.Sprintf("the --use shares add up to %s %%; they are scaled to 100 %% (each stock keeps its proportion)", strconv.FormatFloat(sum, 'f', -1, 64))
}
