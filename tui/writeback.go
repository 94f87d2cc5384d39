package tui

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"path/filepath"
	"strings"

	"charm.land/bubbles/v2/key"
	tea "charm.land/bubbletea/v2"
	"github.com/charmbracelet/x/ansi"

	"lipoplan/catalogue"
)

// Writing the stocks and spec back to the files the session started from
// (W; README, "The workspace"): W works out what would change in each file
// and asks first, naming the files, how many values change in each, whether
// the user's comments and layout are kept (catalogue.PatchStocks and
// PatchSpec edit the changed values in place) and where the old files will
// be kept. y or enter writes, n or esc cancels; other keys are ignored
// while it asks. Afterwards the status line and a sheet give the full path
// of each backup.

// writeFile is one file W would write.
type writeFile struct {
	path  string // as the session was given it
	other string // the other input, never written over
	orig  []byte // what the file held when W was pressed; nil if unreadable
	patch catalogue.Patch
	what  string // what changes, e.g. "2 prices"
	// backup is where the old file will be kept, as the question shows it
	// (backupName): worked out once here rather than on every redraw,
	// where it would resolve symlinks each frame.
	backup string
}

// writePlan is what W asks about.
type writePlan struct {
	files     []writeFile
	unchanged []string // files that already hold the values (not written)
}

// writeBack works out what W would write and asks.
func (m *Model) writeBack() tea.Cmd {
	if err := m.files.CanWriteBack(); err != nil {
		m.fail(err)
		return nil
	}
	plan, err := m.planWrite()
	if err != nil {
		m.fail(err)
		return nil
	}
	if len(plan.files) == 0 {
		m.info("Nothing to write back: " + strings.Join(plan.unchanged, " and ") + " already hold these values.")
		return nil
	}
	m.writing = plan
	m.prompt = prompt{kind: promptWrite}
	var parts []string
	for _, f := range plan.files {
		parts = append(parts, filepath.Base(f.path)+": "+f.what)
	}
	m.info("Write " + strings.Join(parts, "; ") + "? " + m.keptWords(plan) + ".")
	return nil
}

// planWrite reads each file as it is now and works out its new text.
func (m *Model) planWrite() (*writePlan, error) {
	_, spec := m.sc.Effective()
	plan := &writePlan{}
	for _, f := range []struct {
		path, other string
		patch       func(orig []byte) (catalogue.Patch, error)
	}{
		{m.files.StocksPath, m.files.SpecPath, func(orig []byte) (catalogue.Patch, error) {
			return catalogue.PatchStocks(m.files.StocksPath, orig, m.sc.Catalogue)
		}},
		{m.files.SpecPath, m.files.StocksPath, func(orig []byte) (catalogue.Patch, error) {
			return catalogue.PatchSpec(m.files.SpecPath, orig, spec, m.sc.Catalogue)
		}},
	} {
		if f.path == "" {
			continue
		}
		orig, err := catalogue.ReadInput(f.path)
		if err != nil && !errors.Is(err, fs.ErrNotExist) {
			return nil, fmt.Errorf("cannot read %s to write it back: %w", m.shownPath(f.path), catalogue.UnwrapPath(err))
		}
		p, err := f.patch(orig)
		if err != nil {
			return nil, fmt.Errorf("writing back %s: %w", m.shownPath(f.path), err)
		}
		if p.Unchanged() {
			plan.unchanged = append(plan.unchanged, filepath.Base(f.path))
			continue
		}
		plan.files = append(plan.files, writeFile{path: f.path, other: f.other, orig: orig, patch: p,
			what: m.changeWords(p, f.path == m.files.SpecPath), backup: m.backupName(f.path)})
	}
	return plan, nil
}

// keptWords says whether the comments are kept, for the status line.
func (m *Model) keptWords(plan *writePlan) string {
	var lost []string
	for _, f := range plan.files {
		if !f.patch.InPlace {
			lost = append(lost, filepath.Base(f.path))
		}
	}
	if len(lost) == 0 {
		return "Comments kept; old files kept as .bak"
	}
	return "Comments in " + strings.Join(lost, " and ") + " cannot be kept; old files kept as .bak"
}

// changeWords counts what changes in a file: "2 prices", "1 limit, 1
// stock left out", or "written in full" when the file could not be read.
func (m *Model) changeWords(p catalogue.Patch, spec bool) string {
	if p.Changes == nil {
		return "written in full"
	}
	type count struct {
		one, many string
		items     map[string]bool
	}
	var order []string
	counts := map[string]*count{}
	add := func(one, many, item string) {
		c := counts[one]
		if c == nil {
			c = &count{one: one, many: many, items: map[string]bool{}}
			counts[one] = c
			order = append(order, one)
		}
		c.items[item] = true
	}
	for _, c := range p.Changes {
		switch {
		case !spec && c.Field == "price":
			add("price", "prices", c.Item)
		case !spec && c.Field == "available":
			add("amount on hand", "amounts on hand", c.Item)
		case !spec && c.Item == "currency":
			add("currency", "currency", "")
		case !spec:
			add("other value", "other values", c.Label())
		case c.Table == "limits" || c.Table == "limits.sfc":
			add("limit", "limits", c.Table+" "+c.Item)
		case c.Table == "use" && m.sc.Excluded[c.Item]:
			add("stock left out", "stocks left out", c.Item)
		case c.Table == "use":
			add("use bound", "use bounds", c.Item)
		case c.Table == "rules":
			add("rule", "rules", c.Item)
		case c.Table == "process":
			add("reactor step", "reactor step", "")
		default:
			add(c.Item, c.Item, "")
		}
	}
	var parts []string
	for _, k := range order {
		c := counts[k]
		switch n := len(c.items); {
		case c.one == c.many: // the batch, the name, the currency, the reactor step
			parts = append(parts, "the "+c.one)
		case n == 1:
			parts = append(parts, "1 "+c.one)
		default:
			parts = append(parts, fmt.Sprintf("%d %s", n, c.many))
		}
	}
	return strings.Join(parts, ", ")
}

// writeKey answers the question: y or enter writes, n or esc cancels.
func (m *Model) writeKey(k tea.KeyPressMsg) tea.Cmd {
	switch {
	case k.String() == "y" || key.Matches(k, m.keys.Accept):
		plan := m.writing
		m.writing = nil
		m.closePrompt()
		m.write(plan)
	case k.String() == "n" || key.Matches(k, m.keys.Cancel):
		m.writing = nil
		m.closePrompt()
		m.info("Nothing written; the files are as they were.")
	}
	return nil
}

// written is one file W wrote.
type written struct {
	file   writeFile
	backup string
}

// write writes the plan's files, each through the output policy (a
// temporary file renamed over the old one, which is kept as a backup).
func (m *Model) write(plan *writePlan) {
	var done []written
	for _, f := range plan.files {
		now, err := catalogue.ReadInput(f.path)
		if err != nil && !errors.Is(err, fs.ErrNotExist) || !bytes.Equal(now, f.orig) {
			m.reportWrite(done, fmt.Errorf("%s changed on disk since W was pressed; press W again to see what would be written", m.shownPath(f.path)))
			return
		}
		w, err := m.output(f.path, f.other).Write(f.patch.Data)
		if err != nil {
			m.reportWrite(done, err)
			return
		}
		done = append(done, written{file: f, backup: w.Backup})
	}
	m.dirty = false
	m.reportWrite(done, nil)
}

// reportWrite says what was written and where the old files are: in the
// status line (the backups first: a narrow line cuts the end) and, in
// full, on a sheet that the next key closes.
func (m *Model) reportWrite(done []written, failed error) {
	var baks, wrote []string
	sheet := []string{" " + m.styles.head.Render("Written back") + m.styles.muted.Render("  (any key closes this)"), ""}
	for _, d := range done {
		how := "comments and layout kept"
		if !d.file.patch.InPlace {
			how = "written in full"
		}
		wrote = append(wrote, fmt.Sprintf("%s (%s, %s)", filepath.Base(d.file.path), d.file.what, how))
		sheet = append(sheet, pathLines(m.width, " ", m.fullPath(d.file.path))...)
		sheet = append(sheet, "   "+d.file.what+"; "+how)
		if d.backup != "" {
			baks = append(baks, m.fullPath(d.backup))
			sheet = append(sheet, "   old file kept as")
			sheet = append(sheet, pathLines(m.width, "     ", m.fullPath(d.backup))...)
		}
	}
	msg := ""
	if len(baks) > 0 {
		msg = "Old files kept as " + strings.Join(baks, " and ") + ". "
	}
	if len(wrote) > 0 {
		msg += "Wrote " + strings.Join(wrote, " and ") + "."
	}
	if failed != nil {
		m.fail(errors.New(strings.TrimSpace(msg + " " + failed.Error())))
	} else {
		m.info(msg)
	}
	if len(done) > 0 {
		m.sheet = sheet
	}
}

// writeSheet is the question W asks, drawn over the panel.
func (m *Model) writeSheet(w int) []string {
	st := m.styles
	plan := m.writing
	out := []string{" " + st.head.Render("Write back to the files the session started from?"), ""}
	left := false
	for _, f := range plan.files {
		for _, l := range pathLines(w, " ", m.fullPath(f.path)) {
			out = append(out, st.key.Render(l))
		}
		out = append(out, wrapped(w, "  ", f.what)...)
		for i, c := range f.patch.Changes {
			if i == 3 {
				out = append(out, st.muted.Render(fmt.Sprintf("     and %d more", len(f.patch.Changes)-i)))
				break
			}
			out = append(out, st.muted.Render("     "+c.String()))
		}
		if f.patch.InPlace {
			out = append(out, "   comments and layout kept: only the changed values are edited")
		} else {
			for _, l := range wrapped(w, "  ", "comments could not be kept: "+f.patch.Reason+"; the file is written in full") {
				out = append(out, st.warn.Render(l))
			}
		}
		out = append(out, "   old file kept as")
		out = append(out, pathLines(w, "     ", f.backup)...)
		left = left || strings.Contains(f.what, "left out")
	}
	for _, u := range plan.unchanged {
		out = append(out, st.muted.Render(" "+u+" already holds these values: not written"))
	}
	if left {
		out = append(out, st.muted.Render(" Stocks left out are written as [use] max 0."))
	}
	return out
}

// backupName is where the old file at path will be kept: beside the file
// written (the target of a symlink), named for the time of writing.
func (m *Model) backupName(path string) string {
	target := path
	if t, err := filepath.EvalSymlinks(path); err == nil {
		target = t
	}
	return m.fullPath(target) + ".<UTC-time>.bak"
}

// pathLines writes a path after indent, broken at the width when it is
// longer (a path has no spaces to wrap at, and its end matters most).
func pathLines(w int, indent, path string) []string {
	lines := strings.Split(ansi.Hardwrap(path, max(10, w-len(indent)-1), true), "\n")
	for i, l := range lines {
		lines[i] = indent + l
	}
	return lines
}

// fullPath writes a path in full for the user: absolute in a local
// workspace; in a confined (served) one, within the served folder, never
// the server's own folders (shownPath).
func (m *Model) fullPath(path string) string {
	if m.files.Confined {
		return m.shownPath(path)
	}
	if abs, err := filepath.Abs(path); err == nil {
		return abs
	}
	return path
}
