package slackfront

import "unicode/utf8"

// maxQuotedRunes is the most of a person's input the front end quotes back
// (in a late answer, in a log line): enough to recognise it, never a whole
// pasted page.
const maxQuotedRunes = 40

// quoteInput keeps the first n runes of s, marking a cut with "…".
func quoteInput(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	for i := range s {
		if n == 0 {
			return s[:i] + "…"
		}
		n--
	}
	return s
}
