package bot

import (
	"math/rand/v2"
	"strings"
	"testing"
	"unicode/utf8"
)

// TestPropertyCalcShortFits: whatever the lines handed to it, a short
// calculation reply renders (as the terminal does: title, two-space
// indented lines and notes, "  ! " before the caution) in at most 5 lines
// and 400 characters, keeps its verdict first and ends with the `more`
// line; lines that must stay (drop 0) outlive the others.
func TestPropertyCalcShortFits(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	word := func() string { return strings.Repeat("x", 1+rng.IntN(12)) }
	sentence := func(n int) string {
		var ws []string
		for range n {
			ws = append(ws, word())
		}
		return strings.Join(ws, " ")
	}
	for i := range 2000 {
		s := calcShort{verdict: "Clears by " + sentence(1+rng.IntN(4))}
		for range rng.IntN(7) {
			s.body = append(s.body, shortLine{sentence(1 + rng.IntN(40)), rng.IntN(4)})
		}
		for range rng.IntN(4) {
			s.assumed = append(s.assumed, word())
		}
		if rng.IntN(2) == 0 {
			s.caution = sentence(1 + rng.IntN(8))
		}
		r := s.reply(Reply{Title: "full"})
		lines, chars := 1, utf8.RuneCountInString(r.Title)
		for _, l := range append(append([]string{}, r.Lines...), r.Notes...) {
			lines++
			chars += 2 + utf8.RuneCountInString(l)
		}
		if r.Caution != "" {
			lines++
			chars += 4 + utf8.RuneCountInString(r.Caution)
		}
		if lines > calcShortLines || chars > calcShortChars {
			t.Fatalf("case %d: %d lines, %d characters:\n%s\n%s", i, lines, chars, r.Title, strings.Join(r.Lines, "\n"))
		}
		if r.Title != s.verdict || len(r.Notes) != 1 || !strings.HasSuffix(r.Notes[0], "say `more` for the details") || r.Details == nil {
			t.Fatalf("case %d: verdict, more line or details lost: %+v", i, r)
		}
	}
}
