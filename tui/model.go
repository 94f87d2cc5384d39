package tui

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"charm.land/bubbles/v2/help"
	"charm.land/bubbles/v2/key"
	tea "charm.land/bubbletea/v2"

	"lipoplan/catalogue"
)

// panel is one screen of the workspace.
type panel int

const (
	panelBlend panel = iota
	panelStocks
	panelLimits
	panelSFC
	panelTAG
	panelCompare
	numPanels
)

func (p panel) title() string {
	return [...]string{"Blend", "Stocks", "Limits", "SFC curve", "TAG classes", "Compare"}[p]
}

// Default size before the terminal reports its own.
const (
	defaultWidth  = 80
	defaultHeight = 24
	undoDepth     = 200
)

// promptKind says what the input line is asking for.
type promptKind int

const (
	promptNone promptKind = iota
	promptStock
	promptBound
	promptNewLimit
	promptSave
	promptOpen
	promptMatch
	promptVariant // the name of a variant to keep
	promptNote    // the scenario's note
	promptRelax   // the relaxation's preview: enter applies, esc cancels
	promptWrite   // W: write the stocks and spec back? y or enter writes, n or esc cancels
)

type prompt struct {
	kind  promptKind
	stock string
	field StockField
	row   Row
	side  Side
}

// snapshotMsg carries a finished evaluation back to Update.
type snapshotMsg struct{ snap *Snapshot }

// Model is the workspace: one Scenario with its undo history, the latest
// Snapshot and what the user is looking at. Keys that do not edit never
// solve; an edit starts one evaluation in the background (a tea.Cmd) and the
// panels keep drawing the previous snapshot until it arrives.
type Model struct {
	files  Files
	source string // where the scenario came from, for the header

	sc         *Scenario
	undo, redo []*Scenario
	rev        int // revision of sc; bumped by every edit
	snap       *Snapshot
	dirty      bool      // edits since the last save or load
	flying     *Scenario // the scenario an evaluation running is of; nil when none runs
	queued     bool      // edits arrived while it ran

	width, height int
	panel         panel
	cursor        [numPanels]int
	offset        [numPanels]int
	col           int // stocks: price|available; limits: min|max

	prompt   prompt
	input    lineEdit
	message  string
	msgError bool
	lastPath string
	quitArm  bool // q pressed once with unsaved edits
	editNote bool // the message describes an edit still to be costed
	showKeys bool // the full key list is open
	overlay  int  // SFC curve: 0 off, else 1 + index into overlayMethods

	bench    []kept        // bench[0] is the base, then up to maxVariants variants
	benchID  int           // the last id given to a kept scenario
	benchCol int           // 6 Compare: the column under the cursor
	curves   bool          // 6 Compare: SFC curves instead of figures
	relax    *relaxPreview // R: the relaxed scenario waiting for enter or esc
	writing  *writePlan    // W: what would be written, waiting for y or n
	sheet    []string      // lines shown over the panel until the next key (what W wrote)

	keys   keyMap
	help   help.Model
	styles styles

	solver *sessionSolver // the session's warm-starting solver (main evaluations only)
}

// New makes a workspace on copies of cat and spec. source names where they
// came from (shown in the header); files says where it may read and write.
func New(cat *catalogue.Catalogue, spec *catalogue.Spec, source string, files Files) *Model {
	return NewWithScenario(NewScenario(cat, spec), source, files)
}

// NewWithScenario makes a workspace on sc (which it then owns).
func NewWithScenario(sc *Scenario, source string, files Files) *Model {
	h := help.New()
	h.ShortSeparator = "  "
	m := &Model{
		files:  files,
		source: source,
		sc:     sc,
		width:  defaultWidth,
		height: defaultHeight,
		keys:   newKeyMap(),
		help:   h,
		styles: newStyles(),
		solver: newSessionSolver(),
	}
	m.input = lineEdit{limit: 200, cursor: m.styles.cell, label: m.styles.key}
	m.bench = []kept{m.newKept("base", sc, nil)}
	m.help.Styles.ShortKey = m.styles.key
	m.help.Styles.ShortDesc = m.styles.muted
	m.help.Styles.Ellipsis = m.styles.muted
	return m
}

// Scenario returns the current scenario (do not modify it).
func (m *Model) Scenario() *Scenario { return m.sc }

// Snapshot returns the latest evaluation, or nil before the first arrives.
func (m *Model) Snapshot() *Snapshot { return m.snap }

// Pending reports whether an edit is still being evaluated.
func (m *Model) Pending() bool { return m.snap == nil || m.snap.Rev < m.rev }

// Message returns the status line text.
func (m *Model) Message() string { return m.message }

// Init starts the first evaluation.
func (m *Model) Init() tea.Cmd { return m.evaluate() }

// evaluate starts evaluating the current scenario in the background. At
// most one evaluation runs at a time: edits made meanwhile are folded into
// one more evaluation of the newest scenario when it returns, so a burst of
// nudges never queues a solve per key.
func (m *Model) evaluate() tea.Cmd {
	if m.flying != nil {
		m.queued = true
		return nil
	}
	sc, rev := m.sc, m.rev
	m.flying = sc
	s := m.solver
	return func() tea.Msg { return snapshotMsg{evaluateWith(s, sc, rev)} }
}

// Close frees the workspace's solver at the end of its session; the
// workspace stays usable, solving afresh.
func (m *Model) Close() { m.solver.close() }

// apply makes next the current scenario, keeps the old one for undo and
// starts its evaluation.
func (m *Model) apply(next *Scenario, note string) tea.Cmd { return m.applySolved(next, note, nil) }

// applySolved is apply for a scenario whose evaluation may be in already
// (ready, R's preview of a relaxation): that one is shown as the new
// scenario's instead of solving the same scenario again, unless another
// evaluation is still running (whose result would then arrive after it).
func (m *Model) applySolved(next *Scenario, note string, ready *Snapshot) tea.Cmd {
	m.undo = append(m.undo, m.sc)
	if len(m.undo) > undoDepth {
		m.undo = m.undo[len(m.undo)-undoDepth:]
	}
	m.redo = nil
	m.sc = next
	m.rev++
	m.dirty = true
	m.info(note)
	m.editNote = true
	if ready == nil || ready.Scenario != next || m.flying != nil {
		return m.evaluate()
	}
	snap := *ready
	snap.Rev = m.rev
	m.flying = next // as evaluate: the snapshot arrives as its message
	return func() tea.Msg { return snapshotMsg{&snap} }
}

// noteOutcome finishes the status line of an edit once its snapshot is in:
// the change in cost, or (for an impossible spec or a failed solve) the
// standing explanation of the status line instead.
func (m *Model) noteOutcome(prev *Snapshot) {
	if !m.editNote || m.Pending() {
		return
	}
	m.editNote = false
	switch {
	case !m.snap.Feasible():
		m.message = ""
	case prev.Feasible():
		d := m.snap.Result.CostPerTonne - prev.Result.CostPerTonne
		m.message = strings.TrimSpace(fmt.Sprintf("%s Cost %.2f → %.2f %s/t (%+.2f).", m.message,
			prev.Result.CostPerTonne, m.snap.Result.CostPerTonne, m.currency(), d))
	default:
		m.message = strings.TrimSpace(fmt.Sprintf("%s Cost now %.2f %s/t.", m.message, m.snap.Result.CostPerTonne, m.currency()))
	}
}

func (m *Model) info(s string)            { m.message, m.msgError, m.editNote = s, false, false }
func (m *Model) fail(err error)           { m.message, m.msgError, m.editNote = err.Error(), true, false }
func (m *Model) failf(f string, a ...any) { m.fail(fmt.Errorf(f, a...)) }

// Update handles one message.
func (m *Model) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		if msg.Width <= 0 || msg.Height <= 0 {
			return m, nil // size unknown (e.g. no terminal on the client): keep 80x24
		}
		m.width, m.height = msg.Width, msg.Height
		m.help.SetWidth(m.width - 1)
		return m, nil
	case snapshotMsg:
		m.flying = nil
		if m.snap == nil || msg.snap.Rev > m.snap.Rev {
			prev := m.snap
			m.snap = msg.snap
			m.noteOutcome(prev)
		}
		m.fillKept(msg.snap)
		if m.queued || m.snap.Rev < m.rev {
			m.queued = false
			return m, m.evaluate()
		}
		return m, nil
	case keptMsg:
		m.keptArrived(msg)
		return m, nil
	case relaxMsg:
		m.relaxArrived(msg)
		return m, nil
	case tea.PasteMsg:
		if m.prompt.kind != promptNone && m.prompt.kind != promptRelax && m.prompt.kind != promptWrite {
			m.input.insert(msg.Content)
		}
		return m, nil
	case tea.KeyPressMsg:
		if m.prompt.kind != promptNone {
			return m, m.promptKey(msg)
		}
		return m, m.key(msg)
	}
	return m, nil
}

func (m *Model) key(k tea.KeyPressMsg) tea.Cmd {
	ks := m.keys
	quitArm := m.quitArm
	m.quitArm = false
	if m.showKeys || m.sheet != nil {
		m.showKeys, m.sheet = false, nil // any key closes the key list or the sheet
		return nil
	}
	if m.panel == panelCompare {
		if cmd, ok := m.compareKey(k); ok {
			return cmd
		}
	}
	switch {
	case key.Matches(k, ks.Keys):
		m.showKeys = true
	case key.Matches(k, ks.Quit):
		if m.dirty && !quitArm && k.String() != "ctrl+c" {
			m.quitArm = true
			m.info("Unsaved edits: press q again to quit, or s to save the scenario first.")
			return nil
		}
		return tea.Quit
	case key.Matches(k, ks.Next):
		m.panel = (m.panel + 1) % numPanels
		m.col = 0
	case key.Matches(k, ks.Prev):
		m.panel = (m.panel + numPanels - 1) % numPanels
		m.col = 0
	case key.Matches(k, ks.Up):
		m.move(-1)
	case key.Matches(k, ks.Down):
		m.move(1)
	case key.Matches(k, ks.PageUp):
		m.move(-10)
	case key.Matches(k, ks.PageDown):
		m.move(10)
	case key.Matches(k, ks.Top):
		m.move(-1 << 20)
	case key.Matches(k, ks.Bottom):
		m.move(1 << 20)
	case key.Matches(k, ks.Left):
		m.col = 0
	case key.Matches(k, ks.Right):
		m.col = 1
	case key.Matches(k, ks.Edit):
		return m.startEdit()
	case key.Matches(k, ks.Raise):
		return m.nudge(1)
	case key.Matches(k, ks.Lower):
		return m.nudge(-1)
	case key.Matches(k, ks.Allow):
		return m.toggleAllowed()
	case key.Matches(k, ks.NewLimit):
		if m.panel != panelLimits {
			m.panel = panelLimits
		}
		return m.ask(prompt{kind: promptNewLimit}, "new limit (iv, trans, C18:2, sfc 30, use <stock>): ", "")
	case key.Matches(k, ks.DropLimit):
		return m.dropRow()
	case key.Matches(k, ks.Relax):
		return m.applyRelaxation()
	case key.Matches(k, ks.Predict):
		m.panel = panelSFC
		m.overlay = (m.overlay + 1) % (len(overlayMethods) + 1)
		if m.overlay == 0 {
			m.info("Predicted SFC overlay off.")
		} else {
			m.info("Overlay: SFC predicted by the TAG model, " + overlayTitle(overlayMethods[m.overlay-1]) + ".")
		}
	case key.Matches(k, ks.Undo):
		return m.undoEdit()
	case key.Matches(k, ks.Redo):
		return m.redoEdit()
	case key.Matches(k, ks.Save):
		if m.files.ReadOnly {
			m.fail(ErrReadOnly)
			return nil
		}
		return m.ask(prompt{kind: promptSave}, "save scenario as: ", m.suggestPath())
	case key.Matches(k, ks.Open):
		return m.ask(prompt{kind: promptOpen}, "open scenario: ", m.lastPath)
	case key.Matches(k, ks.Match):
		return m.ask(prompt{kind: promptMatch}, "match which fat (id and tolerance in % solid, e.g. ph-soy 3): ", m.matchGuess())
	case key.Matches(k, ks.WriteBack):
		return m.writeBack()
	case key.Matches(k, ks.Keep):
		if len(m.bench) > maxVariants {
			m.failf("%d variants are kept already: drop one on 6 Compare (d) first", maxVariants)
			return nil
		}
		return m.ask(prompt{kind: promptVariant}, "keep as variant, name: ", m.variantName())
	case key.Matches(k, ks.Base):
		return m.makeBase()
	case key.Matches(k, ks.Note):
		return m.ask(prompt{kind: promptNote}, "note (saved with the scenario): ", OneLine(m.sc.Note))
	default:
		for i, b := range ks.Panel {
			if key.Matches(k, b) {
				m.panel = panel(i)
				m.col = 0
			}
		}
	}
	return nil
}

func (m *Model) suggestPath() string {
	if m.lastPath != "" {
		return m.lastPath
	}
	if m.files.Confined {
		return "scenario"
	}
	return "scenario.toml"
}

// rowCount is the number of selectable rows of the current panel.
func (m *Model) rowCount() int {
	switch m.panel {
	case panelStocks:
		return len(m.sc.Catalogue.Stocks)
	case panelLimits:
		return len(m.sc.Rows())
	}
	return 0
}

func (m *Model) move(d int) {
	n := m.rowCount()
	if n == 0 {
		return
	}
	c := m.cursor[m.panel] + d
	m.cursor[m.panel] = min(max(c, 0), n-1)
}

// selectedStock returns the stock under the cursor on the stocks panel.
func (m *Model) selectedStock() (*catalogue.Stock, bool) {
	if m.panel != panelStocks || len(m.sc.Catalogue.Stocks) == 0 {
		return nil, false
	}
	i := min(m.cursor[panelStocks], len(m.sc.Catalogue.Stocks)-1)
	return &m.sc.Catalogue.Stocks[i], true
}

func (m *Model) selectedRow() (Row, bool) {
	if m.panel != panelLimits {
		return Row{}, false
	}
	rows := m.sc.Rows()
	if len(rows) == 0 {
		return Row{}, false
	}
	return rows[min(m.cursor[panelLimits], len(rows)-1)], true
}

// ask opens the input line with a prompt and a starting value.
func (m *Model) ask(p prompt, label, value string) tea.Cmd {
	m.prompt = p
	m.input.set(label, value)
	return nil
}

func (m *Model) closePrompt() {
	m.prompt = prompt{}
	m.input.set("", "")
}

func (m *Model) promptKey(k tea.KeyPressMsg) tea.Cmd {
	switch m.prompt.kind {
	case promptRelax:
		return m.relaxKey(k)
	case promptWrite:
		return m.writeKey(k)
	}
	switch {
	case key.Matches(k, m.keys.Cancel):
		m.closePrompt()
		m.info("Edit cancelled.")
		return nil
	case key.Matches(k, m.keys.Accept):
		p, text := m.prompt, m.input.text()
		m.closePrompt()
		return m.finishPrompt(p, text)
	}
	m.input.key(k)
	return nil
}

func (m *Model) startEdit() tea.Cmd {
	switch m.panel {
	case panelStocks:
		st, ok := m.selectedStock()
		if !ok {
			return nil
		}
		if m.col == 0 {
			return m.ask(prompt{kind: promptStock, stock: st.ID, field: FieldPrice},
				fmt.Sprintf("price of %s (%s/t): ", st.ID, m.sc.Catalogue.Currency), num(st.Price))
		}
		v := ""
		if st.Limited() {
			v = num(st.Available)
		}
		return m.ask(prompt{kind: promptStock, stock: st.ID, field: FieldAvailable},
			fmt.Sprintf("%s on hand, t (empty = unlimited): ", st.ID), v)
	case panelLimits:
		r, ok := m.selectedRow()
		if !ok {
			return nil
		}
		side := Side(m.col)
		if r.Single() {
			side = Max
			return m.ask(prompt{kind: promptBound, row: r, side: side}, fmt.Sprintf("%s (%s): ", r.Label, r.Unit), num(r.Bound.Max))
		}
		v := r.Bound.Min
		if side == Max {
			v = r.Bound.Max
		}
		cur := ""
		if !math.IsInf(v, 0) {
			cur = num(v)
		}
		return m.ask(prompt{kind: promptBound, row: r, side: side},
			fmt.Sprintf("%s %s, %s (empty = none): ", r.Label, side, r.Unit), cur)
	default:
		m.info("Values are edited on 2 Stocks and 3 Limits.")
	}
	return nil
}

// parseValue reads a number typed by the user; empty, "-" or "none" means
// no value (NaN).
func parseValue(s string) (float64, error) {
	s = strings.TrimSpace(strings.ReplaceAll(s, " ", ""))
	switch strings.ToLower(s) {
	case "", "-", "none", "unlimited", "inf":
		return math.NaN(), nil
	}
	if strings.Count(s, ",") == 1 && !strings.Contains(s, ".") {
		s = strings.Replace(s, ",", ".", 1) // decimal comma
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}

func (m *Model) finishPrompt(p prompt, text string) tea.Cmd {
	switch p.kind {
	case promptStock:
		v, err := parseValue(text)
		if err != nil {
			m.fail(err)
			return nil
		}
		if p.field == FieldPrice && math.IsNaN(v) {
			m.failf("price of %s needs a number", p.stock)
			return nil
		}
		next, err := m.sc.WithStock(p.stock, p.field, v)
		if err != nil {
			m.fail(err)
			return nil
		}
		what := "price"
		if p.field == FieldAvailable {
			what = "availability"
		}
		return m.apply(next, fmt.Sprintf("%s of %s set to %s.", what, p.stock, text))
	case promptBound:
		v, err := parseValue(text)
		if err != nil {
			m.fail(err)
			return nil
		}
		next, err := m.sc.WithBound(p.row, p.side, v)
		if err != nil {
			m.fail(err)
			return nil
		}
		return m.apply(next, fmt.Sprintf("%s %s set to %s.", p.row.Label, sideWord(p.row, p.side), showValue(v)))
	case promptNewLimit:
		next, k, err := m.sc.WithNewRow(text)
		if err != nil {
			m.fail(err)
			return nil
		}
		m.panel = panelLimits
		for i, r := range next.Rows() {
			if r.Key == k {
				m.cursor[panelLimits] = i
			}
		}
		m.col = 1
		return m.apply(next, fmt.Sprintf("Added limit %s with no bounds: press enter to set its maximum (← for minimum).", k))
	case promptVariant:
		return m.keep(text)
	case promptNote:
		next := m.sc.WithNote(text)
		kept := m.keptIndex()
		cmd := m.apply(next, "Note set (s saves it with the scenario).")
		if kept >= 0 {
			m.bench[kept].sc = next // the note is on the kept scenario too: its numbers are the same
		}
		if next.Note == "" {
			m.info("Note cleared.")
		}
		m.editNote = false // a note changes no cost
		return cmd
	case promptSave:
		return m.save(text)
	case promptOpen:
		return m.open(text)
	case promptMatch:
		id, tol, err := parseMatch(text)
		if err != nil {
			m.fail(err)
			return nil
		}
		next, err := m.sc.WithMatch(id, tol)
		if err != nil {
			m.fail(err)
			return nil
		}
		m.panel = panelSFC
		return m.apply(next, fmt.Sprintf("Matching %s: SFC bands are its measured curve ±%s %% solid, trans at most 1 %%, %s left out (u undoes).", id, showValue(tol), id))
	}
	return nil
}

// matchGuess offers the stock with the most trans fat (over 1 %) and a
// measured curve: a partially hardened fat is what one replaces.
func (m *Model) matchGuess() string {
	best, most := "", 1.0
	for _, st := range m.sc.Catalogue.Stocks {
		if tr := st.FattyAcids["C18:1t"] + st.FattyAcids["C18:2t"]; len(st.SFC) > 0 && tr > most {
			best, most = st.ID, tr
		}
	}
	if best == "" {
		return ""
	}
	return best + " 3"
}

// parseMatch reads "id" or "id tolerance" (default 3 % solid).
func parseMatch(text string) (string, float64, error) {
	f := strings.Fields(text)
	switch len(f) {
	case 1:
		return f[0], 3, nil
	case 2:
		v, err := strconv.ParseFloat(f[1], 64)
		if err != nil || math.IsNaN(v) || v < 0 || v > 100 {
			return "", 0, catalogue.Badf("tolerance %q is not %% solid within 0..100; write e.g. ph-soy 3", f[1])
		}
		return f[0], v, nil
	}
	return "", 0, catalogue.Badf("give the stock id of the fat to match and a tolerance, e.g. ph-soy 3")
}

func sideWord(r Row, s Side) string {
	if r.Single() {
		return ""
	}
	return s.String()
}

func showValue(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "none"
	}
	return num(v)
}

// num writes a value with as few decimals as it needs (at most 3).
func num(v float64) string {
	return strconv.FormatFloat(math.Round(v*1000)/1000, 'f', -1, 64)
}

// nudgeStep is the step of [ and ] for a row or stock field.
func nudgeStep(r Row) float64 {
	switch r.Kind {
	case RowBatch, RowMaxStocks, RowSFC, RowUse, RowThrough:
		return 1
	case RowSmallestShare:
		return 0.5
	}
	switch r.Key {
	case "iv", "sv":
		return 1
	case "cox":
		return 0.1
	}
	return 0.5
}

func (m *Model) nudge(dir float64) tea.Cmd {
	switch m.panel {
	case panelStocks:
		st, ok := m.selectedStock()
		if !ok {
			return nil
		}
		if m.col == 0 {
			v := math.Max(0, st.Price+10*dir)
			next, err := m.sc.WithStock(st.ID, FieldPrice, v)
			if err != nil {
				m.fail(err)
				return nil
			}
			return m.apply(next, fmt.Sprintf("price of %s %s.", st.ID, num(v)))
		}
		if !st.Limited() {
			m.failf("%s is unlimited: press enter to type an amount on hand first", st.ID)
			return nil
		}
		v := math.Max(0, st.Available+5*dir)
		next, err := m.sc.WithStock(st.ID, FieldAvailable, v)
		if err != nil {
			m.fail(err)
			return nil
		}
		return m.apply(next, fmt.Sprintf("%s on hand %s t.", st.ID, num(v)))
	case panelLimits:
		r, ok := m.selectedRow()
		if !ok {
			return nil
		}
		side := Side(m.col)
		cur := r.Bound.Min
		if side == Max || r.Single() {
			side, cur = Max, r.Bound.Max
		}
		if math.IsInf(cur, 0) {
			m.failf("%s has no %s yet: press enter to type one", r.Label, side)
			return nil
		}
		v := cur + dir*nudgeStep(r)
		if r.Kind == RowUse || r.Kind == RowSFC || r.Kind == RowSmallestShare || r.Kind == RowMaxStocks || r.Kind == RowThrough {
			v = math.Max(0, v)
		}
		next, err := m.sc.WithBound(r, side, v)
		if err != nil {
			m.fail(err)
			return nil
		}
		return m.apply(next, fmt.Sprintf("%s %s %s.", r.Label, sideWord(r, side), num(v)))
	}
	m.info("[ and ] nudge values on 2 Stocks and 3 Limits.")
	return nil
}

func (m *Model) toggleAllowed() tea.Cmd {
	st, ok := m.selectedStock()
	if !ok {
		m.info("Stocks are allowed or left out on 2 Stocks (space).")
		return nil
	}
	allowed := m.sc.Excluded[st.ID]
	next, err := m.sc.WithAllowed(st.ID, allowed)
	if err != nil {
		m.fail(err)
		return nil
	}
	if allowed {
		return m.apply(next, st.ID+" allowed in the blend.")
	}
	return m.apply(next, st.ID+" left out of the blend.")
}

func (m *Model) dropRow() tea.Cmd {
	r, ok := m.selectedRow()
	if !ok {
		m.info("Limits are dropped on 3 Limits (d).")
		return nil
	}
	next, err := m.sc.WithoutRow(r)
	if err != nil {
		m.fail(err)
		return nil
	}
	cmd := m.apply(next, fmt.Sprintf("Dropped %s (u undoes).", r.Label))
	m.move(0)
	return cmd
}

// applyRelaxation costs the suggested relaxation before it is applied: the
// relaxed scenario is evaluated in the background and shown as a preview;
// enter then applies it, esc keeps the spec as it is (relaxKey).
func (m *Model) applyRelaxation() tea.Cmd {
	s := m.snap
	if s == nil || s.Result == nil || len(s.Result.Relaxation) == 0 || m.Pending() {
		m.info("There is no relaxation to apply: the spec can be met (or is still being solved).")
		return nil
	}
	next, skipped, err := m.sc.WithRelaxation(s.Result.Relaxation)
	if err != nil {
		m.fail(err)
		return nil
	}
	m.relax = &relaxPreview{sc: next, skipped: skipped}
	m.prompt = prompt{kind: promptRelax}
	m.info("Costing the relaxed limits…")
	return func() tea.Msg { return relaxMsg{sc: next, snap: Evaluate(next, 0)} }
}

// relaxPreview is the relaxed scenario R offers, and its evaluation once in.
type relaxPreview struct {
	sc      *Scenario
	skipped []string
	snap    *Snapshot
}

// relaxMsg carries the evaluation of a relaxation's preview.
type relaxMsg struct {
	sc   *Scenario
	snap *Snapshot
}

func (m *Model) relaxArrived(msg relaxMsg) {
	if m.relax == nil || m.relax.sc != msg.sc {
		return // cancelled, or an older preview
	}
	m.relax.snap = msg.snap
	m.info(m.relaxSummary())
}

// relaxSummary says what the relaxed limits give, for the status line.
func (m *Model) relaxSummary() string {
	p := m.relax
	switch {
	case p.snap == nil:
		return "Costing the relaxed limits…"
	case p.snap.Feasible():
		s := fmt.Sprintf("At the relaxed limits the blend costs %.2f %s/t.", p.snap.Result.CostPerTonne, m.currency())
		if len(p.skipped) > 0 {
			s += " Not applied: " + strings.Join(p.skipped, ", ") + "."
		}
		return s + " enter applies, esc keeps the spec."
	case p.snap.Err != nil:
		return "The relaxed limits do not solve: " + p.snap.Err.Error()
	}
	return "Even relaxed the spec cannot be met; enter applies it anyway, esc keeps the spec."
}

// relaxKey answers the preview: enter applies the relaxation, esc cancels;
// other keys are ignored while it is open.
func (m *Model) relaxKey(k tea.KeyPressMsg) tea.Cmd {
	p := m.relax
	switch {
	case key.Matches(k, m.keys.Cancel):
		m.relax = nil
		m.closePrompt()
		m.info("Relaxation not applied; the spec is as it was.")
	case key.Matches(k, m.keys.Accept):
		m.relax = nil
		m.closePrompt()
		note := "Applied the suggested relaxation (u undoes)."
		if len(p.skipped) > 0 {
			note = fmt.Sprintf("Applied the relaxation except %s (change those by hand).", strings.Join(p.skipped, ", "))
		}
		return m.applySolved(p.sc, note, p.snap)
	}
	return nil
}

func (m *Model) undoEdit() tea.Cmd {
	if len(m.undo) == 0 {
		m.info("Nothing to undo.")
		return nil
	}
	m.step(&m.undo, &m.redo, fmt.Sprintf("Undone (%d more to undo).", len(m.undo)-1))
	return m.evaluate()
}

func (m *Model) redoEdit() tea.Cmd {
	if len(m.redo) == 0 {
		m.info("Nothing to redo.")
		return nil
	}
	m.step(&m.redo, &m.undo, "Redone.")
	return m.evaluate()
}

// step makes the last scenario of from current, pushing the current one on
// to (undo and redo are the same move in opposite directions), and says
// note; the note is then costed when the re-solve lands.
func (m *Model) step(from, to *[]*Scenario, note string) {
	*to = append(*to, m.sc)
	m.sc = (*from)[len(*from)-1]
	*from = (*from)[:len(*from)-1]
	m.rev++
	m.dirty = true
	m.move(0)
	m.info(note)
	m.editNote = true
}

func (m *Model) save(name string) tea.Cmd {
	if m.files.ReadOnly {
		m.fail(ErrReadOnly)
		return nil
	}
	path, err := m.files.ScenarioPath(name)
	if err != nil {
		m.fail(err)
		return nil
	}
	// the result goes with the scenario once it is in; a save while the
	// edit is still being solved keeps the scenario alone
	file := *m.sc
	file.Saved = nil
	if !m.Pending() && m.snap.Result != nil {
		file.Saved = SolvedOf(m.snap.Result, m.snap.At)
	}
	data, err := EncodeScenario(&file)
	if err != nil {
		m.fail(err)
		return nil
	}
	// saving over an existing file keeps what was there as a backup; the
	// stocks and spec files the session started from are never saved over
	w, err := m.output(path, m.files.StocksPath, m.files.SpecPath).Write(data)
	if err != nil {
		m.fail(fmt.Errorf("saving scenario: %w", err))
		return nil
	}
	m.lastPath = strings.TrimSpace(name)
	m.dirty = false
	what := "the scenario and its result"
	if file.Saved == nil {
		what = "the scenario (still solving: without its result)"
	}
	msg := "Saved " + what + " to " + m.shownPath(path) + "."
	if w.Backup != "" {
		msg = "Old file kept as " + m.shownPath(w.Backup) + ". " + msg
	}
	m.info(msg)
	return nil
}

// output is a file the workspace writes, never over the given inputs.
func (m *Model) output(path string, inputs ...string) catalogue.Output {
	return catalogue.Output{Path: path, Inputs: inputs, Now: time.Now()}
}

func (m *Model) open(name string) tea.Cmd {
	path, err := m.files.ScenarioPath(name)
	if err != nil {
		m.fail(err)
		return nil
	}
	sc, err := LoadScenario(path)
	if err != nil {
		m.fail(firstLines(err, 2))
		return nil
	}
	sc.Model = m.sc.Model // the TAG model is the session's, not the file's
	m.lastPath = strings.TrimSpace(name)
	note := "Opened " + m.shownPath(path) + " (u goes back to what you had)."
	if sv := sc.Saved; sv != nil && sv.HasBlend() {
		note = fmt.Sprintf("Opened %s, saved at %.2f %s/t on %s (u goes back).", m.shownPath(path), sv.CostPerTonne, currencyOf(sc), sv.At.Format("2006-01-02"))
	}
	cmd := m.apply(sc, note)
	m.dirty = false
	m.cursor = [numPanels]int{}
	return cmd
}

// shownPath hides the server's folder from a confined (served) workspace:
// a path inside the served folder is shown from there, any other by its
// file name alone.
func (m *Model) shownPath(path string) string {
	if !m.files.Confined {
		return path
	}
	rel, err := filepath.Rel(m.files.Dir, path)
	if err != nil || rel == ".." || strings.HasPrefix(rel, "../") || filepath.IsAbs(rel) {
		return "…/" + filepath.Base(path)
	}
	return rel
}

// firstLines keeps the first n lines of a long error for the status line.
func firstLines(err error, n int) error {
	lines := strings.Split(err.Error(), "\n")
	if len(lines) <= n {
		return err
	}
	return errors.New(strings.Join(lines[:n], "; ") + fmt.Sprintf(" (and %d more problems)", len(lines)-n))
}
