package meetsheet

import (
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Filed is what closing the sheet adds to the log: the attempts of squad
// athletes entered on the sheet itself (`meet log`), as meet attempts.
// Entries that came from a log line are in the log already and are left
// out. Each attempt keeps its entry's time when that falls on the meet's
// date in loc; an entry typed on another day (results copied in later) is
// filed at noon of the meet's date, in entry order, so bests, the digest
// and history put it on the day of the meet. Number is the attempt's number
// at its height within the athlete's sheet series.
func (s *Sheet) Filed(loc *time.Location) []record.Attempt {
	if loc == nil {
		loc = time.UTC
	}
	day, err := time.ParseInLocation("2006-01-02", s.Date, loc)
	if err != nil {
		day = time.Time{}
	}
	ids := map[string]uint64{}
	for _, c := range s.Competitors {
		ids[c.Name] = c.AthleteID
	}
	type at struct {
		id  uint64
		bar int64
	}
	number := map[at]int{}
	var out []record.Attempt
	for i, e := range s.Entries {
		id := ids[e.Name]
		t := e.Time
		if !day.IsZero() && t.In(loc).Format("2006-01-02") != s.Date {
			t = day.Add(12*time.Hour + time.Duration(i)*time.Second)
		}
		for _, j := range e.Jumps {
			k := at{id, mm(j.BarM)}
			if j.JumpOff {
				k.bar = -k.bar
			}
			number[k]++
			if id == 0 || e.LineID != "" {
				continue
			}
			out = append(out, record.Attempt{
				AthleteID: id, Time: t, BarM: j.BarM, BarDecimals: j.Decimals, Outcome: j.Outcome,
				Number: number[k], Meet: true, LoggedBy: e.By, LineID: "meet:" + s.ID,
				Note: noteFor(s, j),
			})
		}
	}
	return out
}

// noteFor marks a jump-off attempt in the log, whose notation has no mark
// for one.
func noteFor(s *Sheet, j Jump) string {
	if j.JumpOff {
		return "jump-off, " + s.Name
	}
	return ""
}
