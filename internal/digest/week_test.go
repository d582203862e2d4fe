package digest

import (
	"errors"
	"testing"
	"time"
)

// ISO 8601 week dates: weeks start on Monday and week 1 holds the year's
// first Thursday (ISO 8601-1:2019, week dates). Each expectation is
// also checked against Go's time.Time.ISOWeek, an independent implementation.
func TestWeekOfAcrossYearBoundary(t *testing.T) {
	tests := []struct {
		date string
		want Week
	}{
		{"2026-12-28", Week{2026, 53}}, // Monday of the last week of 2026
		{"2026-12-31", Week{2026, 53}}, // Thursday: 2026 has 53 weeks (it starts on a Thursday)
		{"2027-01-01", Week{2026, 53}}, // Friday 1 January still belongs to 2026-W53
		{"2027-01-03", Week{2026, 53}}, // Sunday
		{"2027-01-04", Week{2027, 1}},  // Monday: 4 January is always in week 1
		{"2025-12-29", Week{2026, 1}},  // Monday 29 Dec 2025 starts 2026-W01 (1 Jan 2026 is a Thursday)
		{"2026-03-29", Week{2026, 13}},
	}
	for _, tt := range tests {
		day, err := time.Parse(time.DateOnly, tt.date)
		if err != nil {
			t.Fatal(err)
		}
		noon := day.Add(12 * time.Hour)
		if got := WeekOf(noon, time.UTC); got != tt.want {
			t.Errorf("WeekOf(%s) = %v, want %v", tt.date, got, tt.want)
		}
		y, w := noon.ISOWeek()
		if (Week{y, w}) != tt.want {
			t.Errorf("time.ISOWeek(%s) = %d-W%02d disagrees with the table's %v", tt.date, y, w, tt.want)
		}
	}
}

func TestWeekOfUsesLocalDate(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	// Monday 2027-01-04 00:30 in Madrid is Sunday 23:30 UTC.
	at := time.Date(2027, 1, 4, 0, 30, 0, 0, madrid)
	if got := WeekOf(at, madrid); got != (Week{2027, 1}) {
		t.Errorf("local week = %v, want 2027-W01", got)
	}
	if got := WeekOf(at, time.UTC); got != (Week{2026, 53}) {
		t.Errorf("UTC week = %v, want 2026-W53", got)
	}
	if got := WeekOf(at, nil); got != (Week{2026, 53}) {
		t.Errorf("nil location week = %v, want the UTC week 2026-W53", got)
	}
}

func TestWeekStartEndAdd(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	tests := []struct {
		w          Week
		loc        *time.Location
		start      string // local wall clock of Start
		lengthH    float64
		prev, next Week
	}{
		{Week{2026, 53}, time.UTC, "2026-12-28 00:00", 168, Week{2026, 52}, Week{2027, 1}},
		{Week{2027, 1}, time.UTC, "2027-01-04 00:00", 168, Week{2026, 53}, Week{2027, 2}},
		{Week{2026, 1}, time.UTC, "2025-12-29 00:00", 168, Week{2025, 52}, Week{2026, 2}},
		// Europe/Madrid moves to summer time on Sunday 2026-03-29 (a 23 h day)
		// and back on Sunday 2026-10-25 (a 25 h day): EU Directive 2000/84/EC,
		// last Sunday of March and of October at 01:00 UTC (rule from memory; the
		// hours are what the tz database in Go gives).
		{Week{2026, 13}, madrid, "2026-03-23 00:00", 167, Week{2026, 12}, Week{2026, 14}},
		{Week{2026, 43}, madrid, "2026-10-19 00:00", 169, Week{2026, 42}, Week{2026, 44}},
	}
	for _, tt := range tests {
		s, e := tt.w.Start(tt.loc), tt.w.End(tt.loc)
		if got := s.Format("2006-01-02 15:04"); got != tt.start || s.Weekday() != time.Monday {
			t.Errorf("%v.Start = %s (%v), want %s Monday", tt.w, got, s.Weekday(), tt.start)
		}
		if got := e.Sub(s).Hours(); got != tt.lengthH {
			t.Errorf("%v lasts %v h, want %v h", tt.w, got, tt.lengthH)
		}
		if got := tt.w.Prev(); got != tt.prev {
			t.Errorf("%v.Prev = %v, want %v", tt.w, got, tt.prev)
		}
		if got := tt.w.Add(1); got != tt.next {
			t.Errorf("%v.Add(1) = %v, want %v", tt.w, got, tt.next)
		}
		if got := WeekOf(s, tt.loc); got != tt.w {
			t.Errorf("WeekOf(%v.Start) = %v", tt.w, got)
		}
		if got := WeekOf(e.Add(-time.Nanosecond), tt.loc); got != tt.w {
			t.Errorf("WeekOf(just before %v.End) = %v", tt.w, got)
		}
	}
}

// Add agrees with calendar arithmetic over 20 years in both directions.
func TestWeekAddMatchesCalendar(t *testing.T) {
	base := Week{2026, 49}
	start := base.Start(time.UTC)
	for n := -520; n <= 520; n++ {
		want := WeekOf(start.AddDate(0, 0, 7*n), time.UTC)
		if got := base.Add(n); got != want {
			t.Fatalf("Add(%d) = %v, want %v", n, got, want)
		}
		if n != 0 && base.Add(n).Add(-n) != base {
			t.Fatalf("Add(%d).Add(%d) does not return", n, -n)
		}
	}
}

func TestParseWeek(t *testing.T) {
	tests := []struct {
		in   string
		want Week
		ok   bool
	}{
		{"2026-W49", Week{2026, 49}, true},
		{"2026W49", Week{2026, 49}, true},
		{" 2026-w01 ", Week{2026, 1}, true},
		{"2026-W53", Week{2026, 53}, true}, // 2026 starts on a Thursday: 53 weeks
		{"2025-W53", Week{}, false},        // 2025 starts on a Wednesday and is not a leap year: 52 weeks
		{"2020-W53", Week{2020, 53}, true}, // leap year starting on a Wednesday: 53 weeks
		{"2026-W00", Week{}, false},
		{"2026-W54", Week{}, false},
		{"2026-49", Week{}, false},
		{"26-W49", Week{}, false},
		{"2026-W4", Week{}, false},
		{"", Week{}, false},
	}
	for _, tt := range tests {
		got, err := ParseWeek(tt.in)
		if tt.ok != (err == nil) || got != tt.want {
			t.Errorf("ParseWeek(%q) = %v, %v; want %v ok=%v", tt.in, got, err, tt.want, tt.ok)
		}
		if err != nil && !errors.Is(err, ErrBadWeek) {
			t.Errorf("ParseWeek(%q) error %v is not ErrBadWeek", tt.in, err)
		}
		if err == nil {
			if back, err := ParseWeek(got.String()); err != nil || back != got {
				t.Errorf("round trip of %v: %v, %v", got, back, err)
			}
		}
	}
	// Weeks per year against time.ISOWeek of 28 December, 2000..2040.
	for y := 2000; y <= 2040; y++ {
		_, w := time.Date(y, 12, 28, 0, 0, 0, 0, time.UTC).ISOWeek()
		_, err := ParseWeek(Week{y, 53}.String())
		if (w == 53) != (err == nil) {
			t.Errorf("%d: ISOWeek says %d weeks, ParseWeek W53 err = %v", y, w, err)
		}
	}
}

func TestWeekString(t *testing.T) {
	if got := (Week{2026, 3}).String(); got != "2026-W03" {
		t.Errorf("String = %q", got)
	}
	if !(Week{2026, 53}).Before(Week{2027, 1}) || (Week{2027, 1}).Before(Week{2026, 53}) {
		t.Error("Before is wrong across the year boundary")
	}
}

func mustLoc(t testing.TB, name string) *time.Location {
	t.Helper()
	loc, err := time.LoadLocation(name)
	if err != nil {
		t.Fatalf("load %s: %v", name, err)
	}
	return loc
}
