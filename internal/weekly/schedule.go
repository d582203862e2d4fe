// Package weekly decides when the weekly digest is due and runs it on that
// schedule: which instant a "Monday 07:00 in the team's zone" schedule last
// fell on (across daylight-saving changes), which ISO week a digest posted
// then covers, whether a digest missed while the bot was down is still worth
// posting late, and a Scheduler that runs the digest (and other daily jobs,
// such as backups) with robfig/cron in the team's zone.
//
// The schedule maths are pure functions of the time they are given; the
// Scheduler reads the time from an injected Clock, so tests never wait for
// a schedule. Whether a week was already posted is the Ledger's business,
// and posting it exactly once is the Job's (it records the week in the same
// store transaction that marks it posted); this package only avoids asking
// twice.
package weekly

import (
	"errors"
	"fmt"
	"time"

	"github.com/lathmark-team/lathmark/internal/digest"
)

// MinutesPerDay bounds a schedule's minute of the day: 0 ≤ minute < 1440.
const MinutesPerDay = 24 * 60

// DefaultCatchUpWindow is how late a missed digest may still be posted.
const DefaultCatchUpWindow = 48 * time.Hour

// OnTimeGrace is how long after its scheduled instant a digest still counts
// as on time; later posts are marked late.
const OnTimeGrace = time.Minute

// EarlyTolerance is how far before its slot a run still counts as that
// slot's run: a timer that wakes a little early by the wall clock (after a
// clock adjustment) must not be taken for a run of the week before.
const EarlyTolerance = time.Minute

// ErrSchedule reports a day or minute outside the valid range.
var ErrSchedule = errors.New("weekly: bad schedule")

// Spec returns the standard five-field cron spec for a weekly slot, e.g.
// Spec(time.Monday, 7*60) = "0 7 * * 1" (minute hour day-of-month month
// day-of-week, Sunday = 0). The spec reads in the zone the cron runs in.
func Spec(day time.Weekday, minute int) (string, error) {
	if err := checkSlot(day, minute); err != nil {
		return "", err
	}
	return fmt.Sprintf("%d %d * * %d", minute%60, minute/60, int(day)), nil
}

// DailySpec returns the standard cron spec for a daily slot, e.g.
// DailySpec(3*60+30) = "30 3 * * *".
func DailySpec(minute int) (string, error) {
	if err := checkSlot(time.Sunday, minute); err != nil {
		return "", err
	}
	return fmt.Sprintf("%d %d * * *", minute%60, minute/60), nil
}

func checkSlot(day time.Weekday, minute int) error {
	if day < time.Sunday || day > time.Saturday {
		return fmt.Errorf("%w: weekday %d", ErrSchedule, int(day))
	}
	if minute < 0 || minute >= MinutesPerDay {
		return fmt.Errorf("%w: minute %d of the day (want 0 to %d)", ErrSchedule, minute, MinutesPerDay-1)
	}
	return nil
}

// SlotOn returns (in loc) the instant of the local wall-clock time minute (after
// midnight) on the calendar date y-m-d in loc (nil means UTC):
//   - a wall time that occurs once is that instant;
//   - a wall time repeated when clocks go back takes its first occurrence
//     (in Europe/Madrid 02:30 on 2026-10-25 is 02:30 CEST = 00:30 UTC);
//   - a wall time skipped when clocks go forward is moved to the first valid
//     instant after it, the moment the clocks jump (in Europe/Madrid 02:30 on
//     2026-03-29 is moved to 03:00 CEST = 01:00 UTC).
//
// robfig/cron's own spec schedule instead never fires in a skipped hour and
// fires twice in a repeated one; this package's schedules follow SlotOn.
func SlotOn(y int, m time.Month, d, minute int, loc *time.Location) time.Time {
	if loc == nil {
		loc = time.UTC
	}
	wall := time.Date(y, m, d, minute/60, minute%60, 0, 0, time.UTC) // the wall time read as if UTC
	// Offsets in force around that day; zones change at most a few hours at a time.
	var offs [3]int
	for i, probe := range []time.Time{wall.Add(-36 * time.Hour), wall, wall.Add(36 * time.Hour)} {
		_, offs[i] = probe.In(loc).Zone()
	}
	var first time.Time
	for _, off := range offs {
		u := wall.Add(-time.Duration(off) * time.Second)
		if sameWall(u.In(loc), wall) && (first.IsZero() || u.Before(first)) {
			first = u
		}
	}
	if !first.IsZero() {
		return first.In(loc)
	}
	// A gap: read with the offset in force before the jump, the wall time
	// lands after the jump; the zone period it lands in starts at the jump.
	earliest := offs[0]
	for _, off := range offs[1:] {
		earliest = min(earliest, off)
	}
	u := wall.Add(-time.Duration(earliest) * time.Second).In(loc)
	if start, _ := u.ZoneBounds(); !start.IsZero() && !start.After(u) {
		return start.In(loc)
	}
	return u
}

func sameWall(t, wall time.Time) bool {
	y, m, d := t.Date()
	wy, wm, wd := wall.Date()
	return y == wy && m == wm && d == wd && t.Hour() == wall.Hour() && t.Minute() == wall.Minute() && t.Second() == 0
}

// LastScheduled returns the most recent weekly slot at or before now: the
// weekday day at minute past local midnight in loc, resolved by SlotOn (so
// "Monday 07:00" is 07:00 local on every Monday, whatever the clocks did on
// the Sunday before). The weekday is that of the local calendar date.
func LastScheduled(now time.Time, day time.Weekday, minute int, loc *time.Location) time.Time {
	return lastSlot(now, day, false, minute, loc)
}

// NextScheduled returns the first weekly slot strictly after t, resolved as
// in LastScheduled.
func NextScheduled(t time.Time, day time.Weekday, minute int, loc *time.Location) time.Time {
	return nextSlot(t, day, false, minute, loc)
}

func lastSlot(now time.Time, day time.Weekday, daily bool, minute int, loc *time.Location) time.Time {
	if loc == nil {
		loc = time.UTC
	}
	y, m, d := now.In(loc).Date()
	for k := 0; k <= 8; k++ {
		date := time.Date(y, m, d-k, 12, 0, 0, 0, time.UTC)
		if !daily && date.Weekday() != day {
			continue
		}
		if s := SlotOn(date.Year(), date.Month(), date.Day(), minute, loc); !s.After(now) {
			return s
		}
	}
	return time.Time{} // unreachable: a week back always holds a slot
}

func nextSlot(t time.Time, day time.Weekday, daily bool, minute int, loc *time.Location) time.Time {
	if loc == nil {
		loc = time.UTC
	}
	y, m, d := t.In(loc).Date()
	for k := -1; k <= 8; k++ {
		date := time.Date(y, m, d+k, 12, 0, 0, 0, time.UTC)
		if !daily && date.Weekday() != day {
			continue
		}
		if s := SlotOn(date.Year(), date.Month(), date.Day(), minute, loc); s.After(t) {
			return s
		}
	}
	return time.Time{} // unreachable
}

// DigestWeek returns the ISO week a digest scheduled at scheduledAt covers:
// the latest Monday-to-Sunday week (in loc) that has ended by then, i.e. the
// week before the one holding scheduledAt. Monday 07:00 of 2026-W50 covers
// 2026-W49; a Sunday 20:00 slot also covers the previous week, since its
// own week is not over yet.
func DigestWeek(scheduledAt time.Time, loc *time.Location) digest.Week {
	return digest.WeekOf(scheduledAt, loc).Prev()
}

// Catch is the catch-up decision for one scheduled instant.
type Catch struct {
	Post bool          // post it now
	Late bool          // it is more than OnTimeGrace past its slot
	Age  time.Duration // now − scheduled
}

// CatchUp decides whether the digest scheduled at lastScheduled (not yet
// posted) should be posted at now: yes when
// −EarlyTolerance ≤ now − lastScheduled ≤ window, marked late beyond
// OnTimeGrace; older misses are skipped (the caller logs them). Zero or
// negative window means DefaultCatchUpWindow.
func CatchUp(now, lastScheduled time.Time, window time.Duration) Catch {
	if window <= 0 {
		window = DefaultCatchUpWindow
	}
	age := now.Sub(lastScheduled)
	return Catch{Post: age >= -EarlyTolerance && age <= window, Late: age > OnTimeGrace, Age: age}
}

// slotSchedule is a cron.Schedule for a weekly (or daily) slot resolved by
// SlotOn.
type slotSchedule struct {
	day    time.Weekday
	daily  bool
	minute int
	loc    *time.Location
}

// Next implements cron.Schedule: the first slot strictly after t.
func (s slotSchedule) Next(t time.Time) time.Time {
	return nextSlot(t, s.day, s.daily, s.minute, s.loc)
}
