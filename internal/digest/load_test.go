package digest

import (
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// TestTakeoffLoad: passes are not take-offs, short approaches are counted
// apart, and the acute:chronic ratio is this week over the mean of the four
// weeks before (the rule of Gabbett 2016, Br J Sports Med 50:273-280, as
// stated in LoadRatioFlag; values here computed by hand).
func TestTakeoffLoad(t *testing.T) {
	loc := time.UTC
	week, _ := ParseWeek("2026-W10")
	var as []record.Attempt
	add := func(w Week, n int, o record.Outcome, short bool) {
		for i := 0; i < n; i++ {
			as = append(as, record.Attempt{Time: w.Start(loc).Add(time.Duration(26+i) * time.Hour), BarM: 1.70, Outcome: o, Short: short})
		}
	}
	w := week
	for i := 0; i < 4; i++ { // the four weeks before: 10 jumps and 3 passes each
		w = w.Prev()
		add(w, 6, record.Cleared, false)
		add(w, 4, record.Failed, false)
		add(w, 3, record.Passed, false)
	}
	add(week, 10, record.Cleared, false)
	add(week, 6, record.Failed, true)
	add(week, 5, record.Passed, true)
	l := TakeoffLoad(as, week, loc)
	if got := l.Weeks[4]; got.Full != 10 || got.Short != 6 {
		t.Errorf("this week %+v, want 10 full and 6 short (passes not counted)", got)
	}
	if l.ChronicAvg != 10 || l.Ratio != 1.6 || !l.Flag {
		t.Errorf("chronic %v ratio %v flag %v, want 10, 16/10 = 1.6, flagged (> 1.5)", l.ChronicAvg, l.Ratio, l.Flag)
	}
	// 15 jumps against 10 a week is 1.5: not above the rule, not flagged.
	as = as[:0]
	w = week
	for i := 0; i < 4; i++ {
		w = w.Prev()
		add(w, 10, record.Cleared, false)
	}
	add(week, 15, record.Failed, false)
	if l := TakeoffLoad(as, week, loc); l.Ratio != 1.5 || l.Flag {
		t.Errorf("ratio %v flag %v, want 1.5 and no flag", l.Ratio, l.Flag)
	}
	// No history: no ratio, no flag.
	if l := TakeoffLoad(as[40:], week, loc); l.Ratio != 0 || l.Flag {
		t.Errorf("no history: %+v", l)
	}
}
