package optimise

import (
	"lipoplan/blend"
	"lipoplan/catalogue"
)

// scratch holds the working buffers of one solve that a Solver hands on to
// its next solve: the base model's arrays, its layout and the report's
// texts, parts and ranging arrays. Nothing in a Result points into them,
// and one solve is done with them before the next begins. Reusing them
// keeps a solve from streaming some 20 kB of fresh memory through the
// cache, which otherwise slows the solve that follows. Every method on
// a nil scratch allocates afresh (Solve, Plan's orders).
type scratch struct {
	fl    []float64
	str   []string
	cols  []colInfo
	rows  []rowInfo
	prof  []*blend.Properties
	share [][]float64
	lims  []catalogue.Limit
	ints  []int
	index map[string]int
	model model
	lay   layout
	// report
	text  []byte
	at    []int
	parts []blend.Part
	idx   []int
}

// reuse returns s[:n] cleared, or a new slice when s is too short.
func reuse[T any](s *[]T, n int) []T {
	if cap(*s) < n {
		*s = make([]T, n)
	}
	b := (*s)[:n]
	clear(b)
	return b
}

func (s *scratch) floats(n int) []float64 {
	if s == nil {
		return make([]float64, n)
	}
	return reuse(&s.fl, n)
}

func (s *scratch) strings(n int) []string {
	if s == nil {
		return make([]string, n)
	}
	return reuse(&s.str, n)
}

func (s *scratch) colInfos(n int) []colInfo {
	if s == nil {
		return make([]colInfo, n)
	}
	return reuse(&s.cols, n)
}

// rowInfos has length 0 and capacity n.
func (s *scratch) rowInfos(n int) []rowInfo {
	if s == nil {
		return make([]rowInfo, 0, n)
	}
	return reuse(&s.rows, n)[:0]
}

func (s *scratch) profiles(n int) ([]*blend.Properties, [][]float64) {
	if s == nil {
		return make([]*blend.Properties, n), make([][]float64, n)
	}
	return reuse(&s.prof, n), reuse(&s.share, n)
}

// limits has length 0 and capacity n.
func (s *scratch) limits(n int) []catalogue.Limit {
	if s == nil {
		return make([]catalogue.Limit, 0, n)
	}
	return reuse(&s.lims, n)[:0]
}

func (s *scratch) intSlice(n int) []int {
	if s == nil {
		return make([]int, n)
	}
	return reuse(&s.ints, n)
}

func (s *scratch) stockIndex(n int) map[string]int {
	if s == nil {
		return make(map[string]int, n)
	}
	if s.index == nil {
		s.index = make(map[string]int, n)
	}
	clear(s.index)
	return s.index
}

func (s *scratch) newModel() *model {
	if s == nil {
		return &model{}
	}
	s.model = model{}
	return &s.model
}

func (s *scratch) newLayout() *layout {
	if s == nil {
		return &layout{}
	}
	s.lay = layout{}
	return &s.lay
}

// texts is an empty limitTexts with room for n limits.
func (s *scratch) texts(n int) limitTexts {
	if s == nil {
		return limitTexts{b: make([]byte, 0, 48*n), at: make([]int, 0, 2*n)}
	}
	if cap(s.text) < 48*n {
		s.text = make([]byte, 0, 48*n)
	}
	if cap(s.at) < 2*n {
		s.at = make([]int, 0, 2*n)
	}
	return limitTexts{b: s.text[:0], at: s.at[:0]}
}

// keepTexts hands a report's (possibly grown) text buffers back.
func (s *scratch) keepTexts(t limitTexts) {
	if s != nil {
		s.text, s.at = t.b[:0], t.at[:0]
	}
}

// blendParts has length 0 and capacity n, with the stock indices beside.
func (s *scratch) blendParts(n int) ([]blend.Part, []int) {
	if s == nil {
		return make([]blend.Part, 0, n), make([]int, 0, n)
	}
	return reuse(&s.parts, n)[:0], reuse(&s.idx, n)[:0]
}
