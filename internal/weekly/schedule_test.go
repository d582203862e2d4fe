package weekly

import (
	"errors"
	"testing"
	"time"

	_ "time/tzdata" // tests run without a system zone database too

	"github.com/robfig/cron/v3"

	"github.com/lathmark-team/lathmark/internal/digest"
)

// Daylight-saving dates used below, from the IANA tz database as shipped
// with Go (checked in TestZoneFacts): Europe/Madrid goes to summer time on
// Sunday 2026-03-29 at 01:00 UTC (02:00 → 03:00 local) and back on Sunday
// 2026-10-25 at 01:00 UTC (03:00 → 02:00), the EU rule of Directive
// 2000/84/EC (last Sunday of March and October); America/New_York changes
// on Sunday 2026-03-08 (02:00 → 03:00) and Sunday 2026-11-01 (02:00 → 01:00),
// the US rule since the Energy Policy Act of 2005 (second Sunday of March,
// first Sunday of November). The rules are quoted from memory; the dates are
// what the tz database gives, checked in TestZoneFacts.

func mustLoc(t testing.TB, name string) *time.Location {
	t.Helper()
	loc, err := time.LoadLocation(name)
	if err != nil {
		t.Fatalf("load %s: %v", name, err)
	}
	return loc
}

func utc(t testing.TB, s string) time.Time {
	t.Helper()
	tm, err := time.Parse("2006-01-02 15:04", s)
	if err != nil {
		t.Fatal(err)
	}
	return tm
}

func TestZoneFacts(t *testing.T) {
	tests := []struct {
		zone, date string
		hours      float64
	}{
		{"Europe/Madrid", "2026-03-29", 23},
		{"Europe/Madrid", "2026-10-25", 25},
		{"America/New_York", "2026-03-08", 23},
		{"America/New_York", "2026-11-01", 25},
		{"Europe/Madrid", "2026-03-30", 24},
	}
	for _, tt := range tests {
		loc := mustLoc(t, tt.zone)
		day, err := time.ParseInLocation(time.DateOnly, tt.date, loc)
		if err != nil {
			t.Fatal(err)
		}
		if got := day.AddDate(0, 0, 1).Sub(day).Hours(); got != tt.hours {
			t.Errorf("%s %s lasts %v h, want %v h", tt.zone, tt.date, got, tt.hours)
		}
	}
}

func TestSpec(t *testing.T) {
	if s, err := Spec(time.Monday, 7*60); err != nil || s != "0 7 * * 1" {
		t.Errorf("Spec(Monday, 07:00) = %q, %v", s, err)
	}
	if s, err := Spec(time.Sunday, 20*60+30); err != nil || s != "30 20 * * 0" {
		t.Errorf("Spec(Sunday, 20:30) = %q, %v", s, err)
	}
	if s, err := DailySpec(3*60 + 5); err != nil || s != "5 3 * * *" {
		t.Errorf("DailySpec(03:05) = %q, %v", s, err)
	}
	for _, bad := range []struct {
		d time.Weekday
		m int
	}{{time.Monday, -1}, {time.Monday, 1440}, {7, 0}, {-1, 0}} {
		if _, err := Spec(bad.d, bad.m); !errors.Is(err, ErrSchedule) {
			t.Errorf("Spec(%d, %d) err = %v", bad.d, bad.m, err)
		}
	}
}

func TestSlotOn(t *testing.T) {
	madrid, ny := mustLoc(t, "Europe/Madrid"), mustLoc(t, "America/New_York")
	tests := []struct {
		name   string
		date   string
		minute int
		loc    *time.Location
		want   string // UTC
	}{
		{"ordinary winter", "2026-03-23", 7 * 60, madrid, "2026-03-23 06:00"},
		{"ordinary summer", "2026-03-30", 7 * 60, madrid, "2026-03-30 05:00"},
		{"skipped hour moves to the jump", "2026-03-29", 2*60 + 30, madrid, "2026-03-29 01:00"},
		{"skipped hour, on the hour", "2026-03-29", 2 * 60, madrid, "2026-03-29 01:00"},
		{"repeated hour takes the first", "2026-10-25", 2*60 + 30, madrid, "2026-10-25 00:30"},
		{"after the repeated hour", "2026-10-25", 3 * 60, madrid, "2026-10-25 02:00"},
		{"New York skipped hour", "2026-03-08", 2*60 + 30, ny, "2026-03-08 07:00"},
		{"New York repeated hour", "2026-11-01", 60 + 30, ny, "2026-11-01 05:30"},
		{"UTC", "2026-03-29", 2*60 + 30, nil, "2026-03-29 02:30"},
	}
	for _, tt := range tests {
		d, err := time.Parse(time.DateOnly, tt.date)
		if err != nil {
			t.Fatal(err)
		}
		got := SlotOn(d.Year(), d.Month(), d.Day(), tt.minute, tt.loc)
		if want := utc(t, tt.want); !got.Equal(want) {
			t.Errorf("%s: SlotOn = %v (%v UTC), want %v UTC", tt.name, got, got.UTC(), want)
		}
	}
}

func TestLastScheduled(t *testing.T) {
	madrid, ny := mustLoc(t, "Europe/Madrid"), mustLoc(t, "America/New_York")
	mon7 := 7 * 60
	tests := []struct {
		name   string
		now    string // UTC
		day    time.Weekday
		minute int
		loc    *time.Location
		want   string // UTC
	}{
		// Madrid, spring: Monday 07:00 is 06:00 UTC before the change, 05:00 after.
		{"at the slot after the spring change", "2026-03-30 05:00", time.Monday, mon7, madrid, "2026-03-30 05:00"},
		{"a minute before it", "2026-03-30 04:59", time.Monday, mon7, madrid, "2026-03-23 06:00"},
		{"mid-week", "2026-04-01 12:00", time.Monday, mon7, madrid, "2026-03-30 05:00"},
		// Madrid, autumn: back to 06:00 UTC on Monday 2026-10-26.
		{"at the slot after the autumn change", "2026-10-26 06:00", time.Monday, mon7, madrid, "2026-10-26 06:00"},
		{"an hour before it (07:00 CEST would have been)", "2026-10-26 05:00", time.Monday, mon7, madrid, "2026-10-19 05:00"},
		// A slot inside the skipped hour fires at the jump.
		{"Sunday 02:30 on the spring day", "2026-03-29 12:00", time.Sunday, 2*60 + 30, madrid, "2026-03-29 01:00"},
		{"Sunday 02:30 on the autumn day", "2026-10-25 12:00", time.Sunday, 2*60 + 30, madrid, "2026-10-25 00:30"},
		// New York: Monday 07:00 is 12:00 UTC in winter, 11:00 in summer.
		{"New York after the spring change", "2026-03-09 11:00", time.Monday, mon7, ny, "2026-03-09 11:00"},
		{"New York before it", "2026-03-09 10:59", time.Monday, mon7, ny, "2026-03-02 12:00"},
		{"New York after the autumn change", "2026-11-02 13:00", time.Monday, mon7, ny, "2026-11-02 12:00"},
		{"New York Sunday 02:30 on the spring day", "2026-03-08 12:00", time.Sunday, 2*60 + 30, ny, "2026-03-08 07:00"},
		// Local weekday, not UTC weekday: Monday 00:30 in Madrid is Sunday 22:30 UTC.
		{"just after local midnight", "2026-03-29 22:30", time.Monday, 30, madrid, "2026-03-29 22:30"},
	}
	for _, tt := range tests {
		got := LastScheduled(utc(t, tt.now), tt.day, tt.minute, tt.loc)
		if want := utc(t, tt.want); !got.Equal(want) {
			t.Errorf("%s: LastScheduled = %v (%v UTC), want %v UTC", tt.name, got, got.UTC(), want)
		}
		if got.After(utc(t, tt.now)) {
			t.Errorf("%s: slot %v is after now", tt.name, got)
		}
	}
}

// Our weekly schedule agrees with robfig/cron's parser on the spec built by
// Spec for every week of 2026-2027 in both zones, for a slot that no clock
// change touches; and differs, as documented, for a slot inside the changes.
func TestNextScheduledMatchesCron(t *testing.T) {
	for _, zone := range []string{"Europe/Madrid", "America/New_York", "UTC"} {
		loc := mustLoc(t, zone)
		for _, slot := range []struct {
			day    time.Weekday
			minute int
		}{{time.Monday, 7 * 60}, {time.Sunday, 20*60 + 30}, {time.Saturday, 0}} {
			spec, err := Spec(slot.day, slot.minute)
			if err != nil {
				t.Fatal(err)
			}
			sched, err := cron.ParseStandard(spec)
			if err != nil {
				t.Fatal(err)
			}
			at := time.Date(2026, 1, 1, 0, 0, 0, 0, loc)
			for range 104 {
				ours := NextScheduled(at, slot.day, slot.minute, loc)
				theirs := sched.Next(at) // a spec without CRON_TZ reads in the zone of the time given
				if !ours.Equal(theirs) {
					t.Fatalf("%s %q after %v: ours %v, cron %v", zone, spec, at, ours, theirs)
				}
				if l := LastScheduled(ours, slot.day, slot.minute, loc); !l.Equal(ours) {
					t.Fatalf("LastScheduled(%v) = %v", ours, l)
				}
				at = ours
			}
		}
	}

	madrid := mustLoc(t, "Europe/Madrid")
	sat := time.Date(2026, 3, 28, 12, 0, 0, 0, madrid)
	spec, _ := Spec(time.Sunday, 2*60+30)
	sched, _ := cron.ParseStandard(spec)
	// robfig/cron skips the week whose slot falls in the skipped hour ...
	if got, want := sched.Next(sat), time.Date(2026, 4, 5, 2, 30, 0, 0, madrid); !got.Equal(want) {
		t.Errorf("cron: %v, expected it to skip to %v", got, want)
	}
	// ... we fire at the jump.
	if got, want := NextScheduled(sat, time.Sunday, 2*60+30, madrid), utc(t, "2026-03-29 01:00"); !got.Equal(want) {
		t.Errorf("ours: %v, want %v", got, want)
	}
	// In the repeated hour robfig/cron's daily spec fires twice; ours once.
	daily, _ := cron.ParseStandard("30 2 * * *")
	first := daily.Next(time.Date(2026, 10, 25, 0, 0, 0, 0, madrid))
	if again := daily.Next(first); again.Sub(first) != time.Hour {
		t.Errorf("cron: expected a second run an hour after %v, got %v", first, again)
	}
	ds := slotSchedule{daily: true, minute: 2*60 + 30, loc: madrid}
	first = ds.Next(time.Date(2026, 10, 25, 0, 0, 0, 0, madrid))
	if again := ds.Next(first); !first.Equal(utc(t, "2026-10-25 00:30")) || !again.Equal(utc(t, "2026-10-26 01:30")) {
		t.Errorf("ours: %v then %v, want 2026-10-25 00:30 UTC then 2026-10-26 01:30 UTC", first.UTC(), again.UTC())
	}
}

func TestDigestWeek(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	tests := []struct {
		at   time.Time
		want digest.Week
	}{
		{time.Date(2026, 12, 7, 7, 0, 0, 0, madrid), digest.Week{Year: 2026, Num: 49}},  // Monday of W50
		{time.Date(2026, 1, 5, 7, 0, 0, 0, madrid), digest.Week{Year: 2026, Num: 1}},    // W01 ran Mon 29 Dec 2025 to Sun 4 Jan 2026
		{time.Date(2027, 1, 4, 7, 0, 0, 0, madrid), digest.Week{Year: 2026, Num: 53}},   // ISO 8601: 2026 has 53 weeks
		{time.Date(2026, 12, 6, 20, 0, 0, 0, madrid), digest.Week{Year: 2026, Num: 48}}, // Sunday of W49: W49 not over
		{time.Date(2026, 3, 30, 0, 30, 0, 0, madrid), digest.Week{Year: 2026, Num: 13}}, // local Monday, UTC Sunday
	}
	for _, tt := range tests {
		if got := DigestWeek(tt.at, madrid); got != tt.want {
			t.Errorf("DigestWeek(%v) = %v, want %v", tt.at, got, tt.want)
		}
	}
}

func TestCatchUp(t *testing.T) {
	slot := utc(t, "2026-03-30 05:00")
	tests := []struct {
		age        time.Duration
		post, late bool
	}{
		{-EarlyTolerance - time.Second, false, false},
		{-30 * time.Second, true, false}, // a timer waking a little early by the wall clock
		{0, true, false},
		{30 * time.Second, true, false},
		{OnTimeGrace + time.Second, true, true},
		{3 * time.Hour, true, true},
		{48 * time.Hour, true, true},
		{48*time.Hour + time.Second, false, true},
		{7 * 24 * time.Hour, false, true},
	}
	for _, tt := range tests {
		c := CatchUp(slot.Add(tt.age), slot, 48*time.Hour)
		if c.Post != tt.post || c.Late != tt.late || c.Age != tt.age {
			t.Errorf("age %v: %+v, want post %v late %v", tt.age, c, tt.post, tt.late)
		}
	}
	if c := CatchUp(slot.Add(47*time.Hour), slot, 0); !c.Post {
		t.Error("zero window does not default to 48 h")
	}
}
