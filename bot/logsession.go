package bot

import (
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// Sessions, heights and competition sense over stored attempts: pure
// functions of attempts in time order, no store and no clock.

// sameBar reports whether two bar heights are the same setting.
func sameBar(a, b float64) bool { return math.Abs(a-b) < logBarTolM }

// higherBar reports whether a is a higher setting than b.
func higherBar(a, b float64) bool { return a > b+logBarTolM }

// heightRun is a run of consecutive attempts at one bar.
type heightRun struct {
	BarM float64
	Outs []record.Outcome
}

// heightRuns groups attempts (in time order) into runs at one bar. A run
// also ends where the attempt number starts again (a second go at the same
// height in practice, see numberAttempts).
func heightRuns(as []record.Attempt) []heightRun {
	var (
		runs []heightRun
		prev record.Attempt
	)
	for i, a := range as {
		if n := len(runs); n > 0 && sameBar(runs[n-1].BarM, a.BarM) && (a.Number == 0 || a.Number > prev.Number) {
			runs[n-1].Outs = append(runs[n-1].Outs, a.Outcome)
		} else {
			runs = append(runs, heightRun{BarM: a.BarM, Outs: []record.Outcome{a.Outcome}})
		}
		prev = as[i]
	}
	return runs
}

// runsText writes runs in the trade's notation: "1.70 o, 1.75 xo, 1.78 xxx".
func runsText(runs []heightRun, imperial bool) string {
	parts := make([]string, len(runs))
	for i, r := range runs {
		parts[i] = units.Bar(r.BarM, imperial) + " " + notationString(r.Outs)
	}
	return strings.Join(parts, ", ")
}

// bestCleared returns the first attempt that cleared the highest bar.
func bestCleared(as []record.Attempt) (record.Attempt, bool) {
	var (
		best  record.Attempt
		found bool
	)
	for _, a := range as {
		if a.Outcome == record.Cleared && (!found || higherBar(a.BarM, best.BarM)) {
			best, found = a, true
		}
	}
	return best, found
}

// madeCount counts clearances and jumps taken (passes are not jumps).
func madeCount(as []record.Attempt) (made, tried int) {
	for _, a := range as {
		switch a.Outcome {
		case record.Cleared:
			made++
			tried++
		case record.Failed:
			tried++
		}
	}
	return made, tried
}

// madeText writes a make rate: "2/6 (33%)".
func madeText(made, tried int) string {
	if tried == 0 {
		return "0/0"
	}
	return fmt.Sprintf("%d/%d (%.0f%%)", made, tried, 100*float64(made)/float64(tried))
}

// localDay returns local midnight of the day holding t.
func localDay(t time.Time, loc *time.Location) time.Time {
	y, m, d := t.In(loc).Date()
	return time.Date(y, m, d, 0, 0, 0, 0, loc)
}

// jumpSession is one athlete's attempts on one local day.
type jumpSession struct {
	Day      time.Time // local midnight
	Attempts []record.Attempt
}

// kind names the session: meet, practice, or both on one day.
// short reports whether any attempt of the session came from a short approach.
func (s jumpSession) short() bool {
	for _, a := range s.Attempts {
		if a.Short {
			return true
		}
	}
	return false
}

// knocksText lists the logged knocks of a session by bar, in order:
// "2.00 calves, 2.00 hips". Empty when none was logged.
func knocksText(as []record.Attempt, imp bool) string {
	var parts []string
	for _, a := range as {
		if a.Outcome == record.Failed && a.Knock != "" {
			p := units.Bar(a.BarM, imp) + " " + a.Knock
			if a.HasPrediction {
				p += " (model: " + a.PredictedPart + " " + units.Small(a.PredictedClearanceM, imp) + ")"
			}
			parts = append(parts, p)
		}
	}
	return strings.Join(parts, ", ")
}

func (s jumpSession) kind() string {
	meet, practice := false, false
	for _, a := range s.Attempts {
		if a.Meet {
			meet = true
		} else {
			practice = true
		}
	}
	switch {
	case meet && practice:
		return "meet+practice"
	case meet:
		return "meet"
	default:
		return "practice"
	}
}

// splitSessions groups attempts (time order) by local day.
func splitSessions(as []record.Attempt, loc *time.Location) []jumpSession {
	var out []jumpSession
	for _, a := range as {
		day := localDay(a.Time, loc)
		if n := len(out); n > 0 && out[n-1].Day.Equal(day) {
			out[n-1].Attempts = append(out[n-1].Attempts, a)
			continue
		}
		out = append(out, jumpSession{Day: day, Attempts: []record.Attempt{a}})
	}
	return out
}

// numberAttempts sets each added attempt's number at its height, carrying on
// from the session's earlier attempts of the same kind. At a meet the count
// runs on while the bar stays (a fourth attempt is number 4, and warned
// about). In practice a height's count also starts again after a
// clearance, a pass or three attempts: the athlete is having another go.
func numberAttempts(prev []record.Attempt, add []record.Attempt, meet bool) {
	var last *record.Attempt
	if len(prev) > 0 {
		last = &prev[len(prev)-1]
	}
	for i := range add {
		add[i].Number = 1
		if last != nil && sameBar(last.BarM, add[i].BarM) {
			n := max(last.Number, 1)
			if meet || last.Outcome == record.Failed && n < logMaxTries {
				add[i].Number = n + 1
			}
		}
		last = &add[i]
	}
}

// seriesEndRun is how many consecutive failures end a competition series
// (World Athletics Technical Rules 26-27: three in a row, at any heights;
// passes neither count nor reset).
const seriesEndRun = 3

// meetReview checks new meet attempts against the same day's earlier meet
// attempts. It never refuses (the coach may be correcting an earlier line);
// it returns warnings for what a competition would not allow, and notes
// such as the end of the series.
func meetReview(prev, add []record.Attempt, athlete string, imperial bool) (warnings, notes []string) {
	type heightState struct {
		tries                 int
		cleared, passed       bool
		warnedMax, warnedDone bool
	}
	heights := map[int]*heightState{} // by bar in whole millimetres
	state := func(bar float64) *heightState {
		k := int(math.Round(bar * 1000))
		if heights[k] == nil {
			heights[k] = &heightState{}
		}
		return heights[k]
	}
	streak, ended := 0, false
	endedAt := 0.0
	topPrev := 0.0
	warnedEnded, warnedLower := false, false
	all := append(append([]record.Attempt(nil), prev...), add...)
	for i, a := range all {
		st := state(a.BarM)
		isNew := i >= len(prev)
		if isNew {
			bar := units.Length(a.BarM, imperial)
			if ended && !warnedEnded {
				warnedEnded = true
				warnings = append(warnings, fmt.Sprintf("%s's series had already ended after three consecutive failures (last at %s); a competition ends there. Stored as typed; `undo` removes this line if it was a slip.", athlete, units.Length(endedAt, imperial)))
			}
			if st.tries+1 > logMaxTries && !st.warnedMax {
				st.warnedMax = true
				warnings = append(warnings, fmt.Sprintf("this makes %d attempts at %s today; the rules allow three per height.", st.tries+1, bar))
			}
			if (st.cleared || st.passed) && !st.warnedDone {
				st.warnedDone = true
				what := "cleared"
				if !st.cleared {
					what = "passed"
				}
				warnings = append(warnings, fmt.Sprintf("%s was already %s earlier at this meet; nothing more is jumped at a height after that.", bar, what))
			}
			if len(prev) > 0 && higherBar(topPrev, a.BarM) && !warnedLower {
				warnedLower = true
				warnings = append(warnings, fmt.Sprintf("%s is below %s, jumped earlier at this meet; in a competition the bar only goes up.", bar, units.Length(topPrev, imperial)))
			}
		} else {
			topPrev = max(topPrev, a.BarM)
		}
		st.tries++
		switch a.Outcome {
		case record.Cleared:
			st.cleared = true
			streak = 0
		case record.Failed:
			streak++
		case record.Passed:
			st.passed = true
		}
		if streak >= seriesEndRun && !ended {
			ended, endedAt = true, a.BarM
			if isNew {
				notes = append(notes, fmt.Sprintf("Series over for %s: three consecutive failures, the last at %s.", athlete, units.Length(a.BarM, imperial)))
			}
		}
	}
	return warnings, notes
}
