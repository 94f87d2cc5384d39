package tui

import "charm.land/lipgloss/v2"

// styles is the workspace palette: warm butter for headings, leaf green for a
// met spec, brick red for what binds or fails, slate for the spec band,
// heather for the TAG model's predicted curve.
type styles struct {
	title, tab, tabOn, head, muted, key   lipgloss.Style
	ok, bad, warn, sel, cell, band, curve lipgloss.Style
	caution, msg, msgErr, pred            lipgloss.Style
}

func newStyles() styles {
	butter := lipgloss.Color("#E9B949")
	leaf := lipgloss.Color("#86B86B")
	brick := lipgloss.Color("#D9603B")
	slate := lipgloss.Color("#5C7A8C")
	grey := lipgloss.Color("#8E8E8E")
	ink := lipgloss.Color("#1C1C1C")
	cream := lipgloss.Color("#F3E9D2")
	return styles{
		title:   lipgloss.NewStyle().Bold(true).Foreground(butter),
		tab:     lipgloss.NewStyle().Foreground(grey),
		tabOn:   lipgloss.NewStyle().Bold(true).Foreground(ink).Background(butter),
		head:    lipgloss.NewStyle().Bold(true).Foreground(cream),
		muted:   lipgloss.NewStyle().Foreground(grey),
		key:     lipgloss.NewStyle().Bold(true).Foreground(butter),
		ok:      lipgloss.NewStyle().Bold(true).Foreground(leaf),
		bad:     lipgloss.NewStyle().Bold(true).Foreground(brick),
		warn:    lipgloss.NewStyle().Foreground(butter),
		sel:     lipgloss.NewStyle().Bold(true).Foreground(cream),
		cell:    lipgloss.NewStyle().Bold(true).Foreground(ink).Background(cream),
		band:    lipgloss.NewStyle().Foreground(slate),
		curve:   lipgloss.NewStyle().Bold(true).Foreground(butter),
		caution: lipgloss.NewStyle().Italic(true).Foreground(grey),
		msg:     lipgloss.NewStyle().Foreground(cream),
		msgErr:  lipgloss.NewStyle().Bold(true).Foreground(brick),
		pred:    lipgloss.NewStyle().Foreground(lipgloss.Color("#B48EAD")), // heather, the model's overlay
	}
}
