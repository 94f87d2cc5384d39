package tui

import (
	"bytes"
	"fmt"
	"os"
	"regexp"
	"sort"
	"strings"

	"github.com/BurntSushi/toml"

	"lipoplan/catalogue"
)

// Scenario file (our own format): one TOML holding a whole what-if session.
//
//	# lipoplan scenario
//	[scenario]
//	format = 1
//	excluded = ["shea-st"]         # stocks left out of the blend
//
//	[stocks]                       # exactly a stocks.toml, one level down
//	currency = "EUR"
//	[[stocks.stock]]
//	id = "pko"
//	...
//
//	[spec]                         # exactly a spec.toml, one level down
//	name = "Laminating fat"
//	batch = 20.0
//	[spec.limits]
//	...
//
// The [stocks] and [spec] sections are written by catalogue.WriteStocks and
// catalogue.WriteSpec with their table headers moved under the section, and
// read back by catalogue.ParseStocks and catalogue.ParseSpec, so they obey
// the same strict rules (unknown keys are errors). The file is written by the
// rules of every output (catalogue.Output): atomically, keeping a backup.

const scenarioFormat = 1

// headerLine matches a TOML table or array-of-tables header line.
var headerLine = regexp.MustCompile(`^(\s*)(\[\[?)\s*([^\[\]]+?)\s*(\]\]?)(.*)$`)

// nest moves every table header of a TOML document under section: "[[stock]]"
// becomes "[[stocks.stock]]"; the document's top-level keys follow a new
// "[section]" header.
func nest(section string, doc []byte) string {
	var b strings.Builder
	b.WriteString("[" + section + "]\n")
	for _, line := range strings.Split(strings.TrimRight(string(doc), "\n"), "\n") {
		if m := headerLine.FindStringSubmatch(line); m != nil && !strings.Contains(line, "=") {
			line = m[1] + m[2] + section + "." + m[3] + m[4] + m[5]
		}
		b.WriteString(line)
		b.WriteByte('\n')
	}
	return b.String()
}

// EncodeScenario writes sc in the scenario file format.
func EncodeScenario(sc *Scenario) ([]byte, error) {
	var stocks, spec bytes.Buffer
	if err := catalogue.WriteStocks(&stocks, sc.Catalogue); err != nil {
		return nil, fmt.Errorf("scenario: %w", err)
	}
	if err := catalogue.WriteSpec(&spec, sc.Spec); err != nil {
		return nil, fmt.Errorf("scenario: %w", err)
	}
	ex := make([]string, 0, len(sc.Excluded))
	for _, id := range sc.ExcludedIDs() {
		ex = append(ex, fmt.Sprintf("%q", id))
	}
	var b bytes.Buffer
	b.WriteString("# lipoplan scenario: the stocks, the spec and the stocks left out of one what-if session.\n")
	b.WriteString("# Predictions from it are estimates to be confirmed by lab analysis (GC FAME, pulsed-NMR SFC).\n")
	b.WriteString("[scenario]\n")
	fmt.Fprintf(&b, "format = %d\n", scenarioFormat)
	fmt.Fprintf(&b, "excluded = [%s]\n\n", strings.Join(ex, ", "))
	b.WriteString(nest("stocks", stocks.Bytes()))
	b.WriteString("\n")
	b.WriteString(nest("spec", spec.Bytes()))
	return b.Bytes(), nil
}

// SaveScenario writes sc to path by the rules of every output
// (catalogue.Output): atomically, keeping a file it replaces as a backup.
func SaveScenario(path string, sc *Scenario) error {
	data, err := EncodeScenario(sc)
	if err != nil {
		return err
	}
	if _, err := (catalogue.Output{Path: path}).Write(data); err != nil {
		return fmt.Errorf("saving scenario: %w", err)
	}
	return nil
}

type rawScenario struct {
	Scenario struct {
		Format   int      `toml:"format"`
		Excluded []string `toml:"excluded"`
	} `toml:"scenario"`
	Stocks map[string]any `toml:"stocks"`
	Spec   map[string]any `toml:"spec"`
}

// DecodeScenario reads a scenario file's bytes; name is used in messages.
// Every problem is a catalogue.BadInput naming the file and the section.
func DecodeScenario(name string, data []byte) (*Scenario, error) {
	if err := catalogue.CheckTOMLDepth(data); err != nil {
		return nil, catalogue.Badf("%s: %v", name, err)
	}
	var raw rawScenario
	md, err := toml.Decode(string(data), &raw)
	if err != nil {
		return nil, catalogue.Badf("%s: not a readable TOML scenario: %v", name, err)
	}
	// keys inside [stocks] and [spec] are checked by their own parsers
	var keys []string
	for _, k := range md.Undecoded() {
		if k[0] != "stocks" && k[0] != "spec" {
			keys = append(keys, k.String())
		}
	}
	if len(keys) > 0 {
		sort.Strings(keys)
		return nil, catalogue.Badf("%s: unknown key %s (a scenario has [scenario] format/excluded, [stocks] and [spec])", name, strings.Join(keys, ", "))
	}
	switch {
	case raw.Scenario.Format != scenarioFormat:
		return nil, catalogue.Badf("%s: [scenario] format = %d is not one this lipoplan reads (want %d); is this a scenario file?", name, raw.Scenario.Format, scenarioFormat)
	case raw.Stocks == nil:
		return nil, catalogue.Badf("%s: no [stocks] section; a scenario holds the stocks and the spec", name)
	case raw.Spec == nil:
		return nil, catalogue.Badf("%s: no [spec] section; a scenario holds the stocks and the spec", name)
	}
	stocks, err := reencode(raw.Stocks)
	if err != nil {
		return nil, catalogue.Badf("%s: [stocks]: %v", name, err)
	}
	cat, ps := catalogue.ParseStocks(name+" [stocks]", stocks)
	if len(ps.Errors()) > 0 || cat == nil {
		return nil, &catalogue.BadInput{Err: ps.Errors()}
	}
	spec, err := reencode(raw.Spec)
	if err != nil {
		return nil, catalogue.Badf("%s: [spec]: %v", name, err)
	}
	sp, ps := catalogue.ParseSpec(name+" [spec]", spec, cat)
	if len(ps.Errors()) > 0 || sp == nil {
		return nil, &catalogue.BadInput{Err: ps.Errors()}
	}
	sc := &Scenario{Catalogue: cat, Spec: sp, Excluded: map[string]bool{}}
	for _, id := range raw.Scenario.Excluded {
		if _, ok := cat.Find(id); !ok {
			return nil, catalogue.Badf("%s: [scenario] excluded names stock %q, which is not in [stocks]; remove it from the list", name, id)
		}
		sc.Excluded[id] = true
	}
	return sc, nil
}

func reencode(m map[string]any) ([]byte, error) {
	var b bytes.Buffer
	if err := toml.NewEncoder(&b).Encode(m); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// LoadScenario reads a scenario file.
func LoadScenario(path string) (*Scenario, error) {
	data, err := catalogue.ReadInput(path)
	if err != nil {
		return nil, catalogue.Badf("cannot read scenario %s: %v", path, unwrapPathErr(err))
	}
	return DecodeScenario(path, data)
}

func unwrapPathErr(err error) error {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err
	}
	return err
}

// encodeStocks and encodeSpec give the bytes write-back puts in the files.
func encodeStocks(cat *catalogue.Catalogue) ([]byte, error) {
	var b bytes.Buffer
	err := catalogue.WriteStocks(&b, cat)
	return b.Bytes(), err
}

func encodeSpec(spec *catalogue.Spec) ([]byte, error) {
	var b bytes.Buffer
	err := catalogue.WriteSpec(&b, spec)
	return b.Bytes(), err
}
