package digest

import (
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// LoadRatioFlag is the acute:chronic ratio above which a week's take-off
// count is flagged: this week's jumps over the mean of the four weeks
// before. 1.5 follows Gabbett (2016), The training-injury prevention
// paradox, Br J Sports Med 50:273-280, where ratios above about 1.5 went
// with a higher injury risk in team sports (figures from memory). The flag
// is a prompt for the coach to talk with the athlete, not a limit.
const LoadRatioFlag = 1.5

// WeekLoad counts one week's take-offs: attempts made (o and x; passes are
// not jumps), split by full and short approach.
type WeekLoad struct {
	Week        Week
	Full, Short int
}

// Total is every take-off of the week.
func (w WeekLoad) Total() int { return w.Full + w.Short }

// Load is an athlete's take-off count for a week with its flag.
type Load struct {
	Weeks      []WeekLoad // the four weeks before, then the week itself
	ChronicAvg float64    // mean take-offs a week over the four weeks before
	Ratio      float64    // this week over ChronicAvg; 0 when there is no history
	Flag       bool       // Ratio > LoadRatioFlag
}

// TakeoffLoad counts the attempts of week and of the four weeks before it
// (attempts in any order; others are ignored) and flags a week far above
// the athlete's usual. Without jumps in the four weeks before, no ratio is
// given and nothing is flagged.
func TakeoffLoad(as []record.Attempt, week Week, loc *time.Location) Load {
	weeks := make([]WeekLoad, 5)
	w := week
	for i := 4; i >= 0; i-- {
		weeks[i].Week = w
		w = w.Prev()
	}
	from, to := weeks[0].Week.Start(loc), week.Start(loc).AddDate(0, 0, 7)
	for _, a := range as {
		if a.Outcome == record.Passed || a.Time.Before(from) || !a.Time.Before(to) {
			continue
		}
		i := int(a.Time.Sub(from) / (7 * 24 * time.Hour))
		// Week starts are local midnights; a daylight-saving change moves
		// them by an hour, so check the neighbour.
		for i < 4 && !a.Time.Before(weeks[i+1].Week.Start(loc)) {
			i++
		}
		for i > 0 && a.Time.Before(weeks[i].Week.Start(loc)) {
			i--
		}
		if a.Short {
			weeks[i].Short++
		} else {
			weeks[i].Full++
		}
	}
	l := Load{Weeks: weeks}
	sum := 0
	for _, wl := range weeks[:4] {
		sum += wl.Total()
	}
	if sum > 0 {
		l.ChronicAvg = float64(sum) / 4
		l.Ratio = float64(weeks[4].Total()) / l.ChronicAvg
		l.Flag = l.Ratio > LoadRatioFlag
	}
	return l
}
