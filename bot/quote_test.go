package bot_test

import (
	"strings"
	"testing"
)

// quoteBound is bot's maxQuotedRunes: the most of the input a refusal quotes.
const quoteBound = 40

// A refusal quotes at most maxQuotedRunes runes of what was typed: a pasted
// page as a command word or an athlete name comes back cut, never whole.
func TestRefusalQuotesShort(t *testing.T) {
	e := newTestEngine(t)
	long := strings.Repeat("Zq", 2000)
	for _, line := range []string{long, "history " + long, "athlete add " + long + " height 1.80", "log Kai " + long} {
		r := e.run(line)
		if r.OK() {
			t.Fatalf("%.20q… was accepted", line)
		}
		for _, l := range append(r.Lines, r.Example) {
			if strings.Contains(l, strings.Repeat("Zq", quoteBound/2+1)) {
				t.Errorf("refusal of %.20q… quotes more than %d runes: %.120q", line, quoteBound, l)
			}
		}
	}
}
