package series

import (
	"cmp"
	"slices"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// FromRecord is the series attempt of a stored attempt.
func FromRecord(a record.Attempt) Attempt {
	return Attempt{BarM: a.BarM, Outcome: a.Outcome}
}

// dayKey is one athlete's competition day in the team's zone.
type dayKey struct {
	athlete uint64
	y       int
	d       int
}

// Counting reports, for each stored attempt, whether it counts for a best:
// a meet clearance, not stored as breaking a rule, that keeps the rules
// within its athlete's meet series of that local day (the day's meet
// attempts in time order; attempts stored as breaking a rule are left out
// of the series). An attempt of a series that breaks a rule is skipped and
// does not change the series, so one bad line does not void the valid ones
// around it. atts may come in any order and mix athletes; loc is the
// team's zone (nil means UTC).
//
// This is the one definition of a best used by the profile, `best`, the
// log's announcements and the digest's personal- and season-best flags.
func Counting(atts []record.Attempt, loc *time.Location) []bool {
	if loc == nil {
		loc = time.UTC
	}
	counts := make([]bool, len(atts))
	idx := make([]int, 0, len(atts))
	for i, a := range atts {
		if a.Meet && a.RuleBreach == "" {
			idx = append(idx, i)
		}
	}
	slices.SortStableFunc(idx, func(i, j int) int {
		a, b := atts[i], atts[j]
		if c := cmp.Compare(a.AthleteID, b.AthleteID); c != 0 {
			return c
		}
		if c := a.Time.Compare(b.Time); c != 0 {
			return c
		}
		return cmp.Compare(a.Seq, b.Seq)
	})
	var (
		cur   dayKey
		state State
		first = true
	)
	for _, i := range idx {
		a := atts[i]
		t := a.Time.In(loc)
		k := dayKey{a.AthleteID, t.Year(), t.YearDay()}
		if first || k != cur {
			cur, state, first = k, State{}, false
		}
		if state.Add(FromRecord(a)) == nil && a.Outcome == record.Cleared {
			counts[i] = true
		}
	}
	return counts
}

// Best returns the highest attempt that counts for a best (see Counting);
// of equal bars the earliest. ok is false when none counts.
func Best(atts []record.Attempt, loc *time.Location) (best record.Attempt, ok bool) {
	for i, c := range Counting(atts, loc) {
		if !c {
			continue
		}
		a := atts[i]
		if !ok || mm(a.BarM) > mm(best.BarM) || mm(a.BarM) == mm(best.BarM) && a.Time.Before(best.Time) {
			best, ok = a, true
		}
	}
	return best, ok
}
