package bot

import (
	"strings"
	"unicode"
)

// token is one word of a command: as typed, and folded for matching.
type token struct {
	Raw   string // as typed, for names and notes
	Lower string // lower-cased, for keywords
}

// tokenize splits a command line on white space. Slack wraps mentions and
// channels in angle brackets (<@U123|kai>, <#C9|jumps>); those stay one token.
// Smart quotes from phone keyboards are folded to plain ones.
func tokenize(line string) []token {
	line = strings.NewReplacer("’", "'", "‘", "'", "“", `"`, "”", `"`, "\u00a0", " ").Replace(line)
	fields := strings.FieldsFunc(line, unicode.IsSpace)
	out := make([]token, 0, len(fields))
	for _, f := range fields {
		out = append(out, token{Raw: f, Lower: strings.ToLower(f)})
	}
	return out
}

// joinRaw rejoins tokens as typed.
func joinRaw(ts []token) string {
	parts := make([]string, len(ts))
	for i, t := range ts {
		parts[i] = t.Raw
	}
	return strings.Join(parts, " ")
}

// nearest returns the candidate closest to word by edit distance, if it is
// close enough to be a plausible typo (at most a third of the word's
// length, and at least one edit allowed).
func nearest(word string, candidates []string) (string, bool) {
	w := strings.ToLower(word)
	best, bestD := "", 1<<30
	for _, c := range candidates {
		d := editDistance(w, strings.ToLower(c))
		if d < bestD {
			best, bestD = c, d
		}
	}
	limit := len([]rune(w)) / 3
	if limit < 1 {
		limit = 1
	}
	if best == "" || bestD > limit {
		return "", false
	}
	return best, true
}

// editDistance is the Damerau (optimal string alignment) distance: insert,
// delete, substitute and swap two neighbours each cost one, so "Mria" is one
// edit from "Mira".
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	d := make([][]int, len(ra)+1)
	for i := range d {
		d[i] = make([]int, len(rb)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(ra); i++ {
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			d[i][j] = min(d[i-1][j]+1, d[i][j-1]+1, d[i-1][j-1]+cost)
			if i > 1 && j > 1 && ra[i-1] == rb[j-2] && ra[i-2] == rb[j-1] {
				d[i][j] = min(d[i][j], d[i-2][j-2]+1)
			}
		}
	}
	return d[len(ra)][len(rb)]
}
