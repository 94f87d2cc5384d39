// Package tui is lipoplan's terminal what-if workspace (bubbletea, lipgloss,
// bubbles key/help). The same model is served to a team over SSH by package
// tui/serve.
//
// # Design
//
// A Model holds one Scenario: the stock catalogue, the product spec and the
// stocks left out of the blend. Every edit makes a new Scenario (copy on
// write); the old one goes on the undo stack. An edit starts Evaluate in the
// background as a tea.Cmd, at most one at a time; Evaluate solves the LP
// (optimise.Solve) and derives the SFC curve and the TAG classes into a
// Snapshot. Panels render the latest Snapshot only, so keys that do not edit
// never solve. A later stage (predicted SFC from TAGs, a reactor step) is one
// more step in Evaluate and one more field of Snapshot.
//
// Beside it the Model keeps a bench for comparison: the base and up to three
// variants, each an unchanging Scenario with its own Snapshot, evaluated in
// the background like an edit. R's relaxation is evaluated the same way as a
// preview before it becomes an edit.
//
// # Screen
//
// Header (spec, batch, cost per tonne or "spec cannot be met"), the panel
// tabs, the panel, a status line (last edit and its change in cost, or the
// reason the spec cannot be met), a caution line and a one-line key help.
//
//	1 Blend       the cheapest blend, its properties and SFC, what binds and
//	              what moving each binding bound is worth; for an impossible
//	              spec the smallest relaxation, which R applies
//	2 Stocks      price, amount on hand, allowed or left out, share in the
//	              blend and the price range over which the blend stays optimal
//	3 Limits      batch, every limit (min and max), SFC limits, stock use and
//	              the integer rules, with the blend's value, the binding side
//	              and the saving per unit of relaxing it
//	4 SFC curve   the blend's SFC over temperature (linear in measured curves)
//	              against the spec band
//	5 TAG classes S3, S2U (SUS, SSU), SU2, U3 of the blend as mixed and after
//	              full chemical or enzymatic (sn-1,3) interesterification
//	6 Compare     the base, the variants and the scenario being edited side by
//	              side: cost and its change, blend, IV, SAFA, trans, SFC at the
//	              spec temperatures and notes; or their SFC curves
//
// # Keys
//
//	1-6 tab shift+tab   panels          ↑↓ k j pgup pgdn g G  move
//	← → h l             column          enter e               edit (empty = none)
//	[ ]                 nudge           space x               allow / leave out
//	n +                 add a limit     d delete              drop a limit
//	R                   cost the relaxation, then enter applies it, esc keeps the spec
//	v / b               keep as variant / make it the base    a  note
//	6: ← → enter d c    pick, work on, drop a column; figures or curves
//	u ctrl+z / U ctrl+y undo / redo     s / o                 save / open scenario
//	W                   write stocks and spec back to their files
//	?                   all keys        q ctrl+c              quit
//
// # Files
//
// A scenario is one TOML file (see EncodeScenario) with [scenario] (its
// note), [result] (the solve when it was saved, see Solved), [stocks] and
// [spec] sections, written atomically. A local workspace takes any path;
// a served one (Files.Confined) takes plain names inside the server's
// scenario folder and, unless the server was started writable
// (Files.ReadOnly false), refuses to save or write back at all.
package tui
