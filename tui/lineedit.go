package tui

import (
	"strings"

	tea "charm.land/bubbletea/v2"
	"charm.land/lipgloss/v2"
)

// lineEdit is the one-line input of the prompt. It is our own small editor
// rather than bubbles/textinput, whose paste key reads the clipboard of the
// machine the program runs on: on a served workspace that is the server's.
// Paste still works through the terminal (bracketed paste, tea.PasteMsg).
type lineEdit struct {
	prompt string
	value  []rune
	pos    int
	limit  int
	cursor lipgloss.Style
	label  lipgloss.Style
}

func (e *lineEdit) set(prompt, value string) {
	e.prompt = prompt
	e.value = []rune(value)
	e.pos = len(e.value)
}

func (e *lineEdit) text() string { return string(e.value) }

func (e *lineEdit) insert(s string) {
	s = strings.Map(func(r rune) rune {
		if r < ' ' || r == 0x7f {
			return -1
		}
		return r
	}, s)
	rs := []rune(s)
	if e.limit > 0 && len(e.value)+len(rs) > e.limit {
		rs = rs[:max(0, e.limit-len(e.value))]
	}
	v := make([]rune, 0, len(e.value)+len(rs))
	v = append(v, e.value[:e.pos]...)
	v = append(v, rs...)
	e.value = append(v, e.value[e.pos:]...)
	e.pos += len(rs)
}

// key applies an editing key; it reports whether the key was used.
func (e *lineEdit) key(k tea.KeyPressMsg) bool {
	switch k.String() {
	case "left", "ctrl+b":
		e.pos = max(0, e.pos-1)
	case "right", "ctrl+f":
		e.pos = min(len(e.value), e.pos+1)
	case "home", "ctrl+a":
		e.pos = 0
	case "end", "ctrl+e":
		e.pos = len(e.value)
	case "backspace", "ctrl+h":
		if e.pos > 0 {
			e.value = append(e.value[:e.pos-1], e.value[e.pos:]...)
			e.pos--
		}
	case "delete", "ctrl+d":
		if e.pos < len(e.value) {
			e.value = append(e.value[:e.pos], e.value[e.pos+1:]...)
		}
	case "ctrl+u":
		e.value = e.value[e.pos:]
		e.pos = 0
	case "ctrl+k":
		e.value = e.value[:e.pos]
	default:
		if k.Text == "" || k.Mod&(tea.ModCtrl|tea.ModAlt) != 0 {
			return false
		}
		e.insert(k.Text)
	}
	return true
}

// view draws the prompt with a block cursor.
func (e *lineEdit) view() string {
	before := string(e.value[:e.pos])
	at, after := " ", ""
	if e.pos < len(e.value) {
		at, after = string(e.value[e.pos]), string(e.value[e.pos+1:])
	}
	return e.label.Render(e.prompt) + before + e.cursor.Render(at) + after
}
