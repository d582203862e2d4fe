package bot

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// maxQuotedRunes is the most of a person's input a refusal quotes: enough
// to recognise the word, never a whole pasted page.
const maxQuotedRunes = 40

// shortQuoted shortens what a refusal quotes. Input is quoted with %q by
// convention (our own lists and numbers use %s), so every string argument
// bound to a %q verb is cut to maxQuotedRunes runes, with an ellipsis.
// Formats with explicit argument indexes are left alone.
func shortQuoted(format string, args []any) []any {
	out := args
	arg := 0
	for i := 0; i < len(format); i++ {
		if format[i] != '%' {
			continue
		}
		i++
		for i < len(format) && isVerbFlag(format[i]) {
			if format[i] == '*' {
				arg++
			}
			i++
		}
		if i >= len(format) {
			break
		}
		switch verb := format[i]; {
		case verb == '%':
			continue
		case verb == '[':
			return out
		case verb == 'q' && arg < len(args):
			if s, ok := args[arg].(string); ok && utf8.RuneCountInString(s) > maxQuotedRunes {
				if &out[0] == &args[0] {
					out = append([]any(nil), args...)
				}
				out[arg] = cutRunes(s, maxQuotedRunes)
			}
		}
		arg++
	}
	return out
}

func isVerbFlag(c byte) bool {
	switch c {
	case '+', '-', '#', ' ', '0', '.', '*', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		return true
	}
	return false
}

// cutRunes keeps the first n runes of s and marks the cut with "…".
func cutRunes(s string, n int) string {
	for i := range s {
		if n == 0 {
			return s[:i] + "…"
		}
		n--
	}
	return s
}

// userMsg formats a refusal with its quotes of input shortened.
func userMsg(format string, args []any) string {
	return fmt.Sprintf(format, shortQuoted(format, args)...)
}

// cutLongWords cuts every word (a run without spaces) longer than
// maxQuotedRunes: no word of ours is that long, so a long one is pasted
// input echoed back (a name, an example built from the line).
func cutLongWords(s string) string {
	if utf8.RuneCountInString(s) <= maxQuotedRunes {
		return s
	}
	var b strings.Builder
	start := -1
	flush := func(end int) {
		if start >= 0 {
			b.WriteString(cutRunes(s[start:end], maxQuotedRunes))
			start = -1
		}
	}
	for i, r := range s {
		if unicode.IsSpace(r) {
			flush(i)
			b.WriteRune(r)
			continue
		}
		if start < 0 {
			start = i
		}
	}
	flush(len(s))
	return b.String()
}
