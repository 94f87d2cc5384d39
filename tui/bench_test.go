package tui

import (
	"testing"
	"time"

	tea "charm.land/bubbletea/v2"
)

// frame is the budget of one redraw at 60 frames per second (DEVELOPERS.md,
// "Project decisions": a what-if edit re-solves and redraws within one
// 16 ms frame).
const frame = 16 * time.Millisecond

// BenchmarkEditSolveView is one what-if edit on the demo spec: a price nudge
// on the stocks panel, the evaluation it starts (solve, SFC curve, TAG
// classes), the snapshot coming back and the redraw. frame-fraction is the
// time per edit over the 16 ms frame: below 1 meets the target.
func BenchmarkEditSolveView(b *testing.B) {
	d := newDriver(b, demoModel(b, "laminating", Files{}), 80, 24)
	d.keys("2<down><down><down><down>")
	up := tea.KeyPressMsg{Code: ']', Text: "]"}
	down := tea.KeyPressMsg{Code: '[', Text: "["}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		k := up
		if i%2 == 1 {
			k = down
		}
		_, cmd := d.m.Update(k)
		d.m.Update(cmd())
		_ = d.m.View()
	}
	b.StopTimer()
	if d.m.Pending() || !d.m.Snapshot().Feasible() {
		b.Fatalf("edit did not solve: %v", d.m.Snapshot().Err)
	}
	b.ReportMetric(float64(b.Elapsed())/float64(b.N)/float64(frame), "frame-fraction")
}

// BenchmarkMoveView is the reference: a key that only moves the cursor and
// the redraw; no solve runs.
func BenchmarkMoveView(b *testing.B) {
	d := newDriver(b, demoModel(b, "laminating", Files{}), 80, 24)
	d.keys("2")
	keys := []tea.KeyPressMsg{{Code: tea.KeyDown}, {Code: tea.KeyUp}}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, cmd := d.m.Update(keys[i%2]); cmd != nil {
			b.Fatal("moving the cursor started a solve")
		}
		_ = d.m.View()
	}
	b.ReportMetric(float64(b.Elapsed())/float64(b.N)/float64(frame), "frame-fraction")
}

// BenchmarkEvaluate is the evaluation alone (solve, SFC curve, TAG classes).
func BenchmarkEvaluate(b *testing.B) {
	sc := demoModel(b, "laminating", Files{}).Scenario()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if s := Evaluate(sc, i); !s.Feasible() {
			b.Fatal(s.Err)
		}
	}
}
