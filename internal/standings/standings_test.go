package standings

import "testing"

// TestWorkedExampleTR26 is a worked example of World Athletics Technical
// Rule 26.8, placed by hand from the rule text:
//
//	B  1.70 o   1.75 o   1.78 xxx   best 1.75, 1 attempt at 1.75
//	A  1.70 o   1.75 xo  1.78 xxx   best 1.75, 2 attempts, 1 failure to 1.75
//	C  1.70 xo  1.75 xo  1.78 xxx   best 1.75, 2 attempts, 2 failures to 1.75
//	D  1.70 xo  1.75 xo  (retires)  best 1.75, 2 attempts, 2 failures to 1.75
//
// All four tie at 1.75. TR 26.8(a), fewest attempts at that height, puts B
// first. TR 26.8(b), fewest failures up to and including the last height
// cleared, puts A (1) ahead of C and D (2 each). C's three failures at 1.78
// come after her last height cleared and do not count, so C and D are still
// tied and share third (equal place, TR 26.8); nobody is placed fourth.
func TestWorkedExampleTR26(t *testing.T) {
	cs := []Competitor{
		{"A", []Mark{{1.70, "o"}, {1.75, "xo"}, {1.78, "xxx"}}},
		{"C", []Mark{{1.70, "xo"}, {1.75, "xo"}, {1.78, "xxx"}}},
		{"D", []Mark{{1.70, "xo"}, {1.75, "xo"}}},
		{"B", []Mark{{1.70, "o"}, {1.75, "o"}, {1.78, "xxx"}}},
	}
	got := Place(cs, 0, true)
	want := []struct {
		name  string
		place int
		rule  string
	}{
		{"B", 1, RuleAttempts}, // TR 26.8(a) decides first
		{"A", 2, RuleFailures}, // TR 26.8(b) decides second
		{"C", 3, RuleEqual},    // TR 26.8: equal place
		{"D", 3, RuleEqual},
	}
	for i, w := range want {
		if got[i].Name != w.name || got[i].Place != w.place || got[i].Rule != w.rule {
			t.Errorf("row %d: got %v, want %s place %d by %q", i, got[i], w.name, w.place, w.rule)
		}
	}
	if got[0].JumpOff {
		t.Errorf("B won outright: no jump-off")
	}
}

// TestJumpOffForFirst: two athletes identical to the end tie for first;
// with a jump-off they go to it (TR 26.9), without one they share first.
func TestJumpOffForFirst(t *testing.T) {
	cs := []Competitor{
		{"P", []Mark{{1.80, "xo"}, {1.83, "xxx"}}},
		{"Q", []Mark{{1.80, "xo"}, {1.83, "xxx"}}},
	}
	if s := Place(cs, 0, true); !s[0].JumpOff || !s[1].JumpOff || s[0].Rule != RuleJumpOff {
		t.Errorf("jump-off: %v", s)
	}
	if s := Place(cs, 0, false); s[0].Place != 1 || s[1].Place != 1 || s[0].JumpOff {
		t.Errorf("no jump-off: %v", s)
	}
}

// TestStillIn: three consecutive failures at any heights end the
// competition, and failures carry over a pass (TR 26, common practice
// reading of "consecutive").
func TestStillIn(t *testing.T) {
	cs := []Competitor{
		{"E", []Mark{{1.70, "o"}, {1.75, "xx-"}, {1.78, "x"}}}, // out: x x (pass) x
		{"F", []Mark{{1.70, "o"}, {1.75, "x-"}}},               // one failure carried: 2 left at 1.78
		{"G", []Mark{{1.70, "o"}, {1.75, "o"}, {1.78, "o"}}},   // done at 1.78
	}
	s := Place(cs, 1.78, false)
	by := map[string]Standing{}
	for _, x := range s {
		by[x.Name] = x
	}
	if !by["E"].Out || by["F"].Out || by["F"].AttemptsLeft != 2 || by["G"].AttemptsLeft != 0 {
		t.Errorf("still in: %+v", by)
	}
}
