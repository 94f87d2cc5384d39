package tui

import (
	"bytes"
	"fmt"
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
//	format = 2
//	excluded = ["shea-st"]         # stocks left out of the blend
//	note = "palm up 10 %"          # optional: the user's own words
//
//	[result]                       # optional: what lipoplan found when it saved
//	solved = 2025-06-02T09:14:00Z  # TOML date-time, UTC
//	status = "optimal"             # optimal | infeasible | not_proven
//	engine = "lipoplan-simplex"
//	cost_per_tonne = 1043.2156     # absent when no blend was found
//	currency = "EUR"
//	[[result.blend]]
//	stock = "palm"
//	pct = 41.25                    # % of batch
//	tonnes = 8.25
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
//
// Format 1 files (before notes and results) are read as they are; they may
// not hold a note or a [result].

const scenarioFormat = 2

// nest moves every table header of a TOML document under section: "[[stock]]"
// becomes "[[stocks.stock]]"; the document's top-level keys follow a new
// "[section]" header.
func nest(section string, doc []byte) string {
	// headerLine matches a TOML table or array-of-tables header line;
	// compiled here, not at start-up, as nest runs only when a scenario is
	// saved.
	headerLine := regexp.MustCompile(`^(\s*)(\[\[?)\s*([^\[\]]+?)\s*(\]\]?)(.*)$`)
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

// EncodeScenario writes sc in the scenario file format, with its note and,
// when sc.Saved is set, that result.
func EncodeScenario(sc *Scenario) ([]byte, error) {
	var stocks, spec bytes.Buffer
	if err := catalogue.WriteStocks(&stocks, sc.Catalogue); err != nil {
		return nil, fmt.Errorf("scenario: %w", err)
	}
	if err := catalogue.WriteSpec(&spec, sc.Spec); err != nil {
		return nil, fmt.Errorf("scenario: %w", err)
	}
	head := fileHead{Scenario: fileMeta{Format: scenarioFormat, Excluded: append([]string{}, sc.ExcludedIDs()...), Note: sc.Note}}
	if sc.Saved != nil {
		head.Result = sc.Saved.file()
	}
	var b bytes.Buffer
	b.WriteString("# lipoplan scenario: the stocks, the spec and the stocks left out of one what-if session.\n")
	b.WriteString("# Predictions from it are estimates to be confirmed by lab analysis (GC FAME, pulsed-NMR SFC).\n")
	enc := toml.NewEncoder(&b)
	enc.Indent = ""
	if err := enc.Encode(head); err != nil {
		return nil, fmt.Errorf("scenario: %w", err)
	}
	b.WriteString("\n")
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

// fileMeta is the [scenario] table.
type fileMeta struct {
	Format   int      `toml:"format"`
	Excluded []string `toml:"excluded"`
	Note     string   `toml:"note,omitempty"`
}

// fileHead is what the scenario file holds above [stocks] and [spec].
type fileHead struct {
	Scenario fileMeta    `toml:"scenario"`
	Result   *fileResult `toml:"result,omitempty"`
}

type rawScenario struct {
	fileHead
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
		return nil, catalogue.Badf("%s: unknown key %s (a scenario has [scenario] format/excluded/note, [result], [stocks] and [spec])", name, strings.Join(keys, ", "))
	}
	switch {
	case raw.Scenario.Format != 1 && raw.Scenario.Format != scenarioFormat:
		return nil, catalogue.Badf("%s: [scenario] format = %d is not one this lipoplan reads (1 or %d); is this a scenario file?", name, raw.Scenario.Format, scenarioFormat)
	case raw.Scenario.Format == 1 && (raw.Scenario.Note != "" || raw.Result != nil):
		return nil, catalogue.Badf("%s: a format 1 scenario holds no note or [result]; set [scenario] format = %d", name, scenarioFormat)
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
	sc.Note = raw.Scenario.Note
	if raw.Result != nil {
		if sc.Saved, err = raw.Result.solved(name, cat); err != nil {
			return nil, err
		}
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
		return nil, catalogue.Badf("cannot read scenario %s: %v", path, catalogue.UnwrapPath(err))
	}
	return DecodeScenario(path, data)
}
