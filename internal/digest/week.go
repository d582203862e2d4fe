package digest

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"time"
)

// Week is an ISO 8601 week: weeks run Monday to Sunday and week 1 of a year
// is the week that holds that year's first Thursday (equivalently, 4 January),
// so a week's Year can differ from the calendar year of some of its days:
// 2026-12-31 lies in 2026-W53 and 2027-01-04 starts 2027-W01.
type Week struct {
	Year int // ISO week-numbering year
	Num  int // week of that year, 1..52 or 53
}

// ErrBadWeek reports a week that does not exist or cannot be parsed.
var ErrBadWeek = errors.New("digest: bad ISO week")

// WeekOf returns the ISO week that holds t's local date in loc
// (nil loc means UTC). It is time.Time.ISOWeek on t.In(loc).
func WeekOf(t time.Time, loc *time.Location) Week {
	y, w := t.In(orUTC(loc)).ISOWeek()
	return Week{Year: y, Num: w}
}

// WeeksIn returns how many ISO weeks the ISO year has: 53 when 28 December
// (always in the year's last week) falls in week 53, else 52.
func WeeksIn(year int) int {
	_, w := time.Date(year, time.December, 28, 12, 0, 0, 0, time.UTC).ISOWeek()
	return w
}

// ParseWeek reads an ISO 8601 week date without the day: the extended form
// "2026-W49" or the basic form "2026W49"; the W may be lower case. The week
// must exist in that year (W53 only in 53-week years).
func ParseWeek(s string) (Week, error) {
	t := strings.ToUpper(strings.TrimSpace(s))
	ys, ws, ok := strings.Cut(t, "W")
	ys = strings.TrimSuffix(ys, "-")
	if !ok || len(ys) != 4 || len(ws) != 2 {
		return Week{}, fmt.Errorf("%w: %q (want YYYY-Www, e.g. 2026-W49)", ErrBadWeek, s)
	}
	y, err1 := strconv.Atoi(ys)
	n, err2 := strconv.Atoi(ws)
	if err1 != nil || err2 != nil || y < 1 {
		return Week{}, fmt.Errorf("%w: %q (want YYYY-Www, e.g. 2026-W49)", ErrBadWeek, s)
	}
	w := Week{Year: y, Num: n}
	if !w.Valid() {
		return Week{}, fmt.Errorf("%w: %q: %d has %d weeks", ErrBadWeek, s, y, WeeksIn(y))
	}
	return w, nil
}

// Valid reports whether the week exists: 1 ≤ Num ≤ WeeksIn(Year).
func (w Week) Valid() bool {
	return w.Year >= 1 && w.Num >= 1 && w.Num <= WeeksIn(w.Year)
}

// String formats the week in the ISO 8601 extended form, e.g. "2026-W49".
func (w Week) String() string { return fmt.Sprintf("%04d-W%02d", w.Year, w.Num) }

// Start returns Monday 00:00 of the week in loc (nil loc means UTC). Where
// local midnight does not exist (a zone that changes clocks at midnight),
// the instant is the one Go's time.Date gives for that wall time.
func (w Week) Start(loc *time.Location) time.Time {
	y, m, d := w.monday()
	return time.Date(y, m, d, 0, 0, 0, 0, orUTC(loc))
}

// End returns the start of the following week: the week is the half-open
// range [Start, End). It is 7 × 24 h after Start except across a
// daylight-saving change.
func (w Week) End(loc *time.Location) time.Time { return w.Add(1).Start(loc) }

// Prev returns the week before w.
func (w Week) Prev() Week { return w.Add(-1) }

// Add returns the week n weeks after w (n may be negative).
func (w Week) Add(n int) Week {
	y, m, d := w.monday()
	return WeekOf(time.Date(y, m, d+7*n, 12, 0, 0, 0, time.UTC), time.UTC)
}

// Before reports whether w comes before o.
func (w Week) Before(o Week) bool {
	return w.Year < o.Year || (w.Year == o.Year && w.Num < o.Num)
}

// monday returns the calendar date of the week's Monday: 4 January is always
// in week 1, so week 1's Monday is 4 January minus its weekday offset.
func (w Week) monday() (int, time.Month, int) {
	jan4 := time.Date(w.Year, time.January, 4, 12, 0, 0, 0, time.UTC)
	offset := (int(jan4.Weekday()) + 6) % 7 // Monday = 0 ... Sunday = 6
	t := time.Date(w.Year, time.January, 4-offset+7*(w.Num-1), 12, 0, 0, 0, time.UTC)
	return t.Date()
}

func orUTC(loc *time.Location) *time.Location {
	if loc == nil {
		return time.UTC
	}
	return loc
}
