package bot

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"unicode/utf8"
)

// The phone budget of a calculation's default reply (issue 17; the numbers
// are stated in DEVELOPERS.md, "Reply budget", and enforced over the golden
// replies by TestReplyBudget): at most calcShortLines text lines and
// calcShortChars characters as the terminal renders it, title included.
const (
	calcShortLines = 5
	calcShortChars = 400
)

// shortLine is one body line of a short reply; lines with a larger drop
// number are left out first when the reply would not fit its budget.
type shortLine struct {
	text string
	drop int // 0: kept while anything else can go
}

// calcShort is what a calculation shows by default: the verdict, two or
// three numbers and flags, and one line naming what was assumed.
type calcShort struct {
	verdict string      // the first line: "Clears by 24 cm ± 7"
	body    []shortLine // in display order
	assumed []string    // short names of the assumed values: "h0", "arch"
	caution string      // a short caution, shown last when there is room
}

// reply builds the short reply with full as its Details: what `more` or
// the Slack Details button shows. Files, buttons and privacy carry over.
// Lines are left out, highest drop first, until the reply fits the budget;
// a single line still too long is cut with "…".
func (s calcShort) reply(full Reply) Reply {
	tail := "say `more` for the details"
	if len(s.assumed) > 0 {
		tail = "assumed " + strings.Join(s.assumed, ", ") + "; " + tail
	}
	body := slices.Clone(s.body)
	caution := s.caution
	fits := func() bool {
		lines, chars := 1+1, utf8.RuneCountInString(s.verdict)+2+utf8.RuneCountInString(tail)
		for _, l := range body {
			lines++
			chars += 2 + utf8.RuneCountInString(l.text)
		}
		if caution != "" {
			lines++
			chars += 4 + utf8.RuneCountInString(caution)
		}
		return lines <= calcShortLines && chars <= calcShortChars
	}
shrink:
	for !fits() {
		worst := -1
		for i, l := range body {
			if l.drop > 0 && (worst < 0 || l.drop >= body[worst].drop) {
				worst = i
			}
		}
		switch {
		case worst >= 0:
			body = slices.Delete(body, worst, worst+1)
		case caution != "":
			caution = ""
		case len(body) == 0:
			break shrink
		default:
			body = cutLongest(body)
		}
	}
	r := Reply{Title: s.verdict, Notes: []string{tail}, Caution: caution, Ephemeral: full.Ephemeral,
		Files: full.Files, Actions: full.Actions}
	for _, l := range body {
		r.Lines = append(r.Lines, l.text)
	}
	d := full
	r.Details = &d
	return r
}

// cutLongest shortens the longest body line by a fifth (ending it with
// "…"), or drops it when it is already short.
func cutLongest(body []shortLine) []shortLine {
	if len(body) == 0 {
		return body
	}
	i := 0
	for j, l := range body {
		if utf8.RuneCountInString(l.text) > utf8.RuneCountInString(body[i].text) {
			i = j
		}
	}
	rs := []rune(body[i].text)
	if len(rs) < 20 {
		return slices.Delete(body, i, i+1)
	}
	body[i].text = string(rs[:len(rs)*4/5]) + "…"
	return body
}

// shortCM prints a small length rounded to what a coach can act on: whole
// centimetres, or whole inches in imperial ("24 cm", "9 in").
func shortCM(m float64, imp bool) string {
	if imp {
		return fmt.Sprintf("%.0f in", math.Abs(m)/0.0254)
	}
	return fmt.Sprintf("%.0f cm", math.Abs(m)*100)
}

// shortSigma prints a ± without its unit when it shares the unit of the
// number before it: "7" for 6.6 cm; at least 1.
func shortSigma(m float64, imp bool) string {
	v := m * 100
	if imp {
		v = m / 0.0254
	}
	return fmt.Sprintf("%.0f", math.Max(1, math.Round(v)))
}
