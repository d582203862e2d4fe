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

// bestCleared returns the first attempt that cleared the highest bar,
// leaving out attempts stored as breaking the competition rules.
func bestCleared(as []record.Attempt) (record.Attempt, bool) {
	var (
		best  record.Attempt
		found bool
	)
	for _, a := range as {
		if a.Outcome == record.Cleared && a.RuleBreach == "" && (!found || higherBar(a.BarM, best.BarM)) {
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

// jumpCounts counts jumps (attempts made: o and x) and passes apart.
func jumpCounts(as []record.Attempt) (jumps, passes int) {
	for _, a := range as {
		if a.Outcome == record.Passed {
			passes++
		} else {
			jumps++
		}
	}
	return jumps, passes
}

// jumpPassText is the one way replies count attempts: "3 jumps and 1 pass",
// "2 jumps"; a pass is never a jump.
func jumpPassText(as []record.Attempt) string {
	return countsText(jumpCounts(as))
}

// countsText writes jumps and passes: "3 jumps and 1 pass", "2 jumps".
func countsText(jumps, passes int) string {
	if passes == 0 {
		return plural(jumps, "jump")
	}
	return plural(jumps, "jump") + " and " + plural(passes, "pass")
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

// splitSessions groups attempts (time order) by local day and kind: a
// day's meet and its practice are two sessions, the earlier kind first.
func splitSessions(as []record.Attempt, loc *time.Location) []jumpSession {
	var out []jumpSession
	start := 0 // first session of the current day
	for _, a := range as {
		day := localDay(a.Time, loc)
		if n := len(out); n > 0 && !out[n-1].Day.Equal(day) {
			start = n
		}
		placed := false
		for i := start; i < len(out); i++ {
			if out[i].Attempts[0].Meet == a.Meet {
				out[i].Attempts = append(out[i].Attempts, a)
				placed = true
				break
			}
		}
		if !placed {
			out = append(out, jumpSession{Day: day, Attempts: []record.Attempt{a}})
		}
	}
	return out
}

// linesText writes a session's attempts line by line with each line's
// number: "#12 1.70 o, 1.75 xo; #13 1.78 xxx" (lines stored before lines
// were numbered show no number).
func linesText(as []record.Attempt, imp bool) string {
	var parts []string
	for i := 0; i < len(as); {
		j := i + 1
		for j < len(as) && as[j].LineNo == as[i].LineNo && as[j].LineID == as[i].LineID {
			j++
		}
		p := runsText(heightRuns(as[i:j]), imp)
		if as[i].LineNo > 0 {
			p = fmt.Sprintf("#%d %s", as[i].LineNo, p)
		}
		if as[i].RuleBreach != "" {
			p += " (breaks the rules)"
		}
		parts = append(parts, p)
		i = j
	}
	return strings.Join(parts, "; ")
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
