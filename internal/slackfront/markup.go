package slackfront

import "strings"

// zwsp is the zero-width space (U+200B) set on both sides of a mrkdwn
// markup character in text people typed. Slack's mrkdwn has no escape
// character (only &, < and > have entities, in its message formatting
// rules); a markup character opens or closes a span only next to a word
// boundary, and a zero-width space on each side takes that away while the
// reader still sees the character (common practice for Slack bots).
const zwsp = "\u200b"

// escapeText makes text that people typed (athlete names, groups, notes,
// the team's name; table cells and field values) inert in Slack's mrkdwn,
// in running text and inside a ``` table alike: &, < and > become entities
// (so no <!channel> or link), each backtick, *, _ and ~ is fenced by zero-
// width spaces (so ``` cannot end a table's code block and *x* is not
// bold), and a leading > cannot start a quote. It is the one place the
// Slack front end escapes typed text; the terminal shows it as typed.
func escapeText(s string) string {
	if !strings.ContainsAny(s, "&<>`*_~") {
		return s
	}
	var b strings.Builder
	for i, r := range s {
		switch {
		case r == '>' && i == 0:
			b.WriteString(zwsp + "&gt;")
		case writeEntity(&b, r):
		case strings.ContainsRune("`*_~", r):
			b.WriteString(zwsp)
			b.WriteRune(r)
			b.WriteString(zwsp)
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// breakFences keeps our own running text (which may hold `code` spans on
// purpose) from opening a code block: a run of three backticks, which only
// typed text brings in, gets zero-width spaces between them.
func breakFences(s string) string {
	if !strings.Contains(s, "```") {
		return s
	}
	return strings.ReplaceAll(s, "`", "`"+zwsp)
}

// writeEntity writes &, < or > as its entity (Slack's message formatting
// rules) and reports whether r was one of them.
func writeEntity(b *strings.Builder, r rune) bool {
	switch r {
	case '&':
		b.WriteString("&amp;")
	case '<':
		b.WriteString("&lt;")
	case '>':
		b.WriteString("&gt;")
	default:
		return false
	}
	return true
}
