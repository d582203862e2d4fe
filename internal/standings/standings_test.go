package standings

import (
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
)

// comp builds a competitor from "1.70 o 1.75 xo 1.78 xxx" through the
// series engine; a bar written "j1.80" is a jump-off height.
func comp(t *testing.T, name, marks string) Competitor {
	t.Helper()
	var atts []series.Attempt
	var bar float64
	jo := false
	for _, w := range strings.Fields(marks) {
		if w[0] == 'j' || w[0] >= '0' && w[0] <= '9' {
			jo = w[0] == 'j'
			cm := 0
			for _, r := range strings.TrimPrefix(w, "j") {
				if r >= '0' && r <= '9' {
					cm = cm*10 + int(r-'0')
				}
			}
			bar = float64(cm) / 100
			continue
		}
		for _, r := range w {
			atts = append(atts, series.Attempt{BarM: bar, Outcome: record.Outcome(r), JumpOff: jo})
		}
	}
	c := Of(name, atts)
	if !c.Series.Verdict.Valid() {
		t.Fatalf("%s %q breaks %v", name, marks, c.Series.Verdict.Breach.Rule)
	}
	return c
}

// WorkedExample is the four-competitor example of World Athletics
// Technical Rule 26.8 (rule numbers from memory), placed by hand from the
// rule text; the terminal test in cmd/lathmark and the README use the same
// marks:
//
//	Bea   1.70 o   1.75 o   1.78 xxx   best 1.75, 1 jump at 1.75
//	Ada   1.70 o   1.75 xo  1.78 xxx   best 1.75, 2 jumps, 1 failure to 1.75
//	Cleo  1.70 xo  1.75 xo  1.78 xxx   best 1.75, 2 jumps, 2 failures to 1.75
//	Dora  1.70 xo  1.75 xo  1.78 xx-   best 1.75, 2 jumps, 2 failures to 1.75
//
// All four tie at 1.75. TR 26.8.1 (fewest jumps at the height of the tie)
// puts Bea first. TR 26.8.2 (fewest failures up to and including the last
// height cleared) puts Ada (1) ahead of Cleo and Dora (2 each). Their
// failures at 1.78 come after the last height cleared and do not count, so
// Cleo and Dora are still tied and share third (TR 26.8.3); nobody is
// fourth.
var WorkedExample = [][2]string{
	{"Ada", "1.70 o 1.75 xo 1.78 xxx"},
	{"Cleo", "1.70 xo 1.75 xo 1.78 xxx"},
	{"Dora", "1.70 xo 1.75 xo 1.78 xx-"},
	{"Bea", "1.70 o 1.75 o 1.78 xxx"},
}

func TestWorkedExampleTR26(t *testing.T) {
	var cs []Competitor
	for _, w := range WorkedExample {
		cs = append(cs, comp(t, w[0], w[1]))
	}
	got := Place(cs, 0, true)
	want := []struct {
		name   string
		place  int
		rule   string
		behind string
		why    string
	}{
		{"Bea", 1, RuleAttempts, "Ada", "TR 26.8.1: 1 jump at 1.75 against Ada's 2"},
		{"Ada", 2, RuleFailures, "Cleo", "TR 26.8.2: 1 failure to 1.75 against 2"},
		{"Cleo", 3, RuleEqual, "", "TR 26.8.3: equal with Dora"},
		{"Dora", 3, RuleEqual, "", "TR 26.8.3: equal with Cleo"},
	}
	for i, w := range want {
		g := got[i]
		if g.Name != w.name || g.Place != w.place || g.Rule != w.rule || g.Behind != w.behind {
			t.Errorf("row %d (%s): got %+v, want %s place %d by %q behind %q", i, w.why, g, w.name, w.place, w.rule, w.behind)
		}
	}
	if !got[2].Shared || !got[3].Shared || got[0].Shared || got[0].JumpOff {
		t.Errorf("only third is shared, no jump-off for an outright winner (TR 26.8.3): %+v", got)
	}
	// The counts the rules compared, from the series engine.
	if got[1].AttemptsAtBest != 2 || got[1].FailuresToBest != 1 || got[2].FailuresToBest != 2 {
		t.Errorf("counts: %+v", got)
	}
}

// TR 26.8.2 counts failures only up to and including the last height
// cleared: failures above it do not separate two athletes.
func TestFailuresAboveBestDoNotCount(t *testing.T) {
	got := Place([]Competitor{
		comp(t, "P", "1.70 xo 1.75 o 1.78 xxx"),
		comp(t, "Q", "1.70 xo 1.75 o 1.78 x-"),
	}, 0, false)
	if got[0].Place != 1 || got[1].Place != 1 || got[0].Rule != RuleEqual {
		t.Errorf("TR 26.8.2/26.8.3: %+v", got)
	}
}

// TR 26.8.1 reads the height of the tie, not earlier heights: a clean
// first attempt at the best height beats a series clean everywhere else.
func TestAttemptsAtTieHeightOnly(t *testing.T) {
	got := Place([]Competitor{
		comp(t, "P", "1.70 o 1.75 o 1.80 xo"),
		comp(t, "Q", "1.70 xxo 1.75 xxo 1.80 o"),
	}, 0, false)
	if got[0].Name != "Q" || got[0].Rule != RuleAttempts {
		t.Errorf("TR 26.8.1: %+v", got)
	}
}

// TestJumpOffForFirst: two athletes identical to the end tie for first;
// with a jump-off they go to it (TR 26.9), without one they share first
// (TR 26.8.3). The jump-off's attempts then decide: at the height where one
// clears and the other fails, the one who clears wins.
func TestJumpOffForFirst(t *testing.T) {
	p, q := comp(t, "P", "1.80 xo 1.83 xxx"), comp(t, "Q", "1.80 xo 1.83 xxx")
	if s := Place([]Competitor{p, q}, 0, true); !s[0].JumpOff || !s[1].JumpOff || s[0].Rule != RuleJumpOff || s[1].Place != 1 {
		t.Errorf("jump-off due: %+v", s)
	}
	if s := Place([]Competitor{p, q}, 0, false); s[0].Place != 1 || s[1].Place != 1 || s[0].JumpOff {
		t.Errorf("no jump-off: %+v", s)
	}
	p2 := comp(t, "P", "1.80 xo 1.83 xxx j1.83 x j1.81 x j1.79 o")
	q2 := comp(t, "Q", "1.80 xo 1.83 xxx j1.83 x j1.81 x j1.79 x")
	s := Place([]Competitor{q2, p2}, 0, true)
	if s[0].Name != "P" || s[0].Place != 1 || s[1].Place != 2 || s[0].Rule != RuleWonOff || s[0].JumpOff || s[1].Shared {
		t.Errorf("jump-off decided at 1.79: %+v", s)
	}
	// One round short: still tied.
	q3 := comp(t, "Q", "1.80 xo 1.83 xxx j1.83 x j1.81 x")
	if s := Place([]Competitor{q3, p2}, 0, true); !s[0].JumpOff || s[0].Place != 1 || s[1].Place != 1 {
		t.Errorf("jump-off under way: %+v", s)
	}
}

// TestStillIn: three consecutive failures at any heights end the
// competition, and failures carry over a pass (TR 26.2, read through the
// series engine).
func TestStillIn(t *testing.T) {
	cs := []Competitor{
		comp(t, "E", "1.70 o 1.75 xx- 1.78 x"), // out: x x (pass) x
		comp(t, "F", "1.70 o 1.75 x-"),         // one failure carried: 2 left at 1.78
		comp(t, "G", "1.70 o 1.75 o 1.78 o"),   // done at 1.78
		comp(t, "H", "1.70 o"),                 // not yet jumped at 1.78: 3 left
	}
	by := map[string]Standing{}
	for _, x := range Place(cs, 1.78, false) {
		by[x.Name] = x
	}
	if !by["E"].Out || by["E"].AttemptsLeft != 0 || by["F"].Out || by["F"].AttemptsLeft != 2 || by["G"].AttemptsLeft != 0 || by["H"].AttemptsLeft != 3 {
		t.Errorf("still in: %+v", by)
	}
}

// A shared place is still separated from the competitor after it by the
// tie rules: A, E and I share second (TR 26.8.3) and are ahead of B by
// fewest failures (TR 26.8.2: 0 against 1).
func TestSharedGroupAheadOfNext(t *testing.T) {
	got := Place([]Competitor{
		comp(t, "B", "1.50 xo 1.55 xo"),
		comp(t, "A", "1.50 o 1.55 xo"),
		comp(t, "C", "1.50 o 1.55 o"),
		comp(t, "E", "1.50 o 1.55 xo"),
	}, 0, false)
	if got[0].Name != "C" || got[0].Rule != RuleAttempts || got[1].Place != 2 || got[2].Place != 2 || got[3].Place != 4 {
		t.Fatalf("places: %+v", got)
	}
	if g := got[2]; g.Rule != RuleEqual || g.NextRule != RuleFailures || g.Behind != "B" {
		t.Errorf("the group's last against B: %+v", g)
	}
	if g := got[1]; g.NextRule != "" || g.Behind != "" {
		t.Errorf("within the group no rule separates: %+v", g)
	}
}
