package catalogue

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"unicode/utf8"
)

// WriteStocks writes a catalogue as stocks.toml (README, "File formats") that
// ParseStocks reads back to the same values. Unlimited availability (+Inf)
// is written by leaving `available` out. Non-finite numbers are refused.
func WriteStocks(w io.Writer, c *Catalogue) error {
	bw := bufio.NewWriter(w)
	tw := &tomlWriter{w: bw}
	cur := c.Currency
	if cur == "" {
		cur = "EUR"
	}
	tw.line("currency = %s", tomlString(cur))
	for _, s := range c.Stocks {
		where := fmt.Sprintf("stock %q", s.ID)
		tw.line("")
		tw.line("[[stock]]")
		tw.line("id = %s", tomlString(s.ID))
		tw.line("name = %s", tomlString(s.Name))
		tw.line("price = %s", tw.float(where+" price", s.Price))
		if !math.IsInf(s.Available, 1) {
			tw.line("available = %s", tw.float(where+" available", s.Available))
		}
		tw.table("stock.fatty_acids", where, s.FattyAcids, SortedKeys(s.FattyAcids))
		if len(s.SN2) > 0 {
			tw.table("stock.sn2", where, s.SN2, SortedKeys(s.SN2))
		}
		if len(s.SFC) > 0 {
			tw.line("")
			tw.line("[stock.sfc]")
			for _, p := range s.SFC {
				tw.line("%s = %s", tomlKey(TempKey(p.Temp)), tw.float(where+" sfc", p.Solid))
			}
		}
		if len(s.TAGs) > 0 {
			tw.table("stock.tags", where, s.TAGs, sortedKeys(s.TAGs))
		}
	}
	if tw.err != nil {
		return fmt.Errorf("writing stock catalogue: %w", tw.err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing stock catalogue: %w", err)
	}
	return nil
}

// WriteSpec writes a product spec as spec.toml (README, "File formats") that
// ParseSpec reads back to the same values (File and ID come from the file
// name and are not written).
func WriteSpec(w io.Writer, s *Spec) error {
	bw := bufio.NewWriter(w)
	tw := &tomlWriter{w: bw}
	tw.line("name = %s", tomlString(s.Name))
	tw.line("batch = %s", tw.float("batch", s.Batch))
	if len(s.Limits) > 0 {
		tw.line("")
		tw.line("[limits]")
		for _, l := range s.Limits {
			tw.line("%s = %s", tomlKey(l.Name), tw.bound(fmt.Sprintf("limit %q", l.Name), l.Bound))
		}
	}
	if len(s.SFC) > 0 {
		tw.line("")
		tw.line("[limits.sfc]")
		for _, l := range s.SFC {
			k := TempKey(l.Temp)
			tw.line("%s = %s", tomlKey(k), tw.bound("limit \"sfc."+k+"\"", l.Bound))
		}
	}
	if len(s.Use) > 0 {
		tw.line("")
		tw.line("[use]")
		for _, u := range s.Use {
			tw.line("%s = %s", tomlKey(u.Stock), tw.bound(fmt.Sprintf("use %q", u.Stock), u.Bound))
		}
	}
	if s.Rules.Active() {
		tw.line("")
		tw.line("[rules]")
		if s.Rules.MaxStocks > 0 {
			tw.line("max_stocks = %d", s.Rules.MaxStocks)
		}
		if s.Rules.SmallestShare > 0 {
			tw.line("smallest_share = %s", tw.float("smallest_share", s.Rules.SmallestShare))
		}
	}
	if p := s.Process; p != nil {
		tw.line("")
		tw.line("[process]")
		ids := make([]string, len(p.Interesterify))
		for i, id := range p.Interesterify {
			ids[i] = tomlString(id)
		}
		tw.line("interesterify = [%s]", strings.Join(ids, ", "))
		if p.Method != "" {
			tw.line("method = %s", tomlString(p.Method))
		}
		tw.line("cost = %s", tw.float("process cost", p.Cost))
		if p.SFC != "" {
			tw.line("sfc = %s", tomlString(p.SFC))
		}
		if p.Through != nil {
			tw.line("through = %s", tw.bound("process through", *p.Through))
		}
		if len(p.FeedRatio) > 0 {
			parts := make([]string, len(p.FeedRatio))
			for i, f := range p.FeedRatio {
				parts[i] = tomlKey(f.Stock) + " = " + tw.float("feed_ratio "+f.Stock, f.Parts)
			}
			tw.line("feed_ratio = { %s }", strings.Join(parts, ", "))
		}
	}
	if tw.err != nil {
		return fmt.Errorf("writing spec %q: %w", s.Name, tw.err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing spec %q: %w", s.Name, err)
	}
	return nil
}

// tomlWriter writes lines and keeps the first error.
type tomlWriter struct {
	w   io.Writer
	err error
}

func (t *tomlWriter) line(format string, args ...any) {
	if t.err != nil {
		return
	}
	_, t.err = fmt.Fprintf(t.w, format+"\n", args...)
}

func (t *tomlWriter) float(label string, v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		if t.err == nil {
			t.err = fmt.Errorf("%s = %v is not a finite number", label, v)
		}
		return "0.0"
	}
	return tomlFloat(v)
}

func (t *tomlWriter) table(header, where string, m map[string]float64, keys []string) {
	t.line("")
	t.line("[%s]", header)
	for _, k := range keys {
		t.line("%s = %s", tomlKey(k), t.float(where+" "+k, m[k]))
	}
}

func (t *tomlWriter) bound(label string, b Bound) string {
	var parts []string
	if b.HasMin() {
		parts = append(parts, "min = "+t.float(label+" min", b.Min))
	}
	if b.HasMax() {
		parts = append(parts, "max = "+t.float(label+" max", b.Max))
	}
	if len(parts) == 0 && t.err == nil {
		t.err = fmt.Errorf("%s has neither min nor max", label)
	}
	return "{ " + strings.Join(parts, ", ") + " }"
}

// tomlFloat writes the shortest decimal that reads back to exactly v, always
// as a TOML float (with a decimal point or exponent).
func tomlFloat(v float64) string {
	s := strconv.FormatFloat(v, 'g', -1, 64)
	if !strings.ContainsAny(s, ".eE") {
		s += ".0"
	}
	return s
}

// tomlKey writes a key bare when TOML allows it (A-Za-z0-9_-) and quoted
// otherwise ("C18:1", "37.5").
func tomlKey(k string) string {
	if k == "" {
		return `""`
	}
	for _, r := range k {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '_' || r == '-') {
			return tomlString(k)
		}
	}
	return k
}

// tomlString writes a TOML basic string, escaping quotes, backslashes and
// control characters.
func tomlString(s string) string {
	var b strings.Builder
	b.WriteByte('"')
	for i := 0; i < len(s); {
		r, n := utf8.DecodeRuneInString(s[i:])
		i += n
		switch {
		case r == '"':
			b.WriteString(`\"`)
		case r == '\\':
			b.WriteString(`\\`)
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\t':
			b.WriteString(`\t`)
		case r == '\r':
			b.WriteString(`\r`)
		case r < 0x20 || r == 0x7f:
			fmt.Fprintf(&b, `\u%04X`, r)
		default:
			b.WriteRune(r)
		}
	}
	b.WriteByte('"')
	return b.String()
}

// WriteFileAtomic writes data to path through a temporary file in the same
// directory that is synced and then renamed over path, so a crash leaves
// either the old file or the new one, never half a file (README, "Files
// lipoplan writes").
func WriteFileAtomic(path string, data []byte, perm os.FileMode) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			_ = f.Close()
			_ = os.Remove(tmp)
		}
	}()
	if _, err = f.Write(data); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("writing %s: sync: %w", path, err)
	}
	if err = f.Chmod(perm); err != nil {
		return fmt.Errorf("writing %s: chmod: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("writing %s: close: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("writing %s: rename: %w", path, err)
	}
	// Make the rename itself durable; some systems cannot sync a directory.
	if d, derr := os.Open(dir); derr == nil {
		_ = d.Sync()
		_ = d.Close()
	}
	return nil
}
