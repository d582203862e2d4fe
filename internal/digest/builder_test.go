package digest

import (
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// at builds an attempt at a UTC wall time "2006-01-02 15:04".
func at(t testing.TB, id uint64, when string, barM float64, o record.Outcome) record.Attempt {
	t.Helper()
	tm, err := time.Parse("2006-01-02 15:04", when)
	if err != nil {
		t.Fatal(err)
	}
	return record.Attempt{AthleteID: id, Time: tm, BarM: barM, Outcome: o}
}

// meet marks attempts as competition jumps, which alone make bests.
func meet(as ...record.Attempt) []record.Attempt {
	for i := range as {
		as[i].Meet = true
	}
	return as
}

func withCoach(a record.Attempt, m float64) record.Attempt {
	a.HasCoachMargin, a.CoachMarginM = true, m
	return a
}

func withModel(a record.Attempt, m float64) record.Attempt {
	a.HasModelMargin, a.ModelMarginM = true, m
	return a
}

func seq(t testing.TB, id uint64, when string, barM float64, outcomes string) []record.Attempt {
	var as []record.Attempt
	for i, c := range outcomes {
		a := at(t, id, when, barM, record.Outcome(c))
		a.Seq, a.Number = uint32(i), i+1
		a.Time = a.Time.Add(time.Duration(i) * time.Minute)
		as = append(as, a)
	}
	return as
}

// handWeek is a small team for 2026-W49 (Monday 30 Nov to Sunday 6 Dec 2026)
// with a six-week window from 2026-W44; the expectations in TestDigestByHand
// are counted by hand from the definitions in the package documentation.
func handWeek(t testing.TB) ([]record.Athlete, []record.Attempt) {
	athletes := []record.Athlete{
		{ID: 1, Name: "Ava", PersonalBestM: 1.80},
		{ID: 2, Name: "ben", PersonalBestM: 1.95},
		{ID: 3, Name: "Cy"},
		{ID: 4, Name: "Dee", Private: true},
		{ID: 5, Name: "eli"},
	}
	var as []record.Attempt
	// Ava, Monday: 1.70 o, 1.75 xo, 1.80 xx- (a pass after two misses).
	as = append(as, seq(t, 1, "2026-11-30 18:00", 1.70, "o")...)
	as = append(as, seq(t, 1, "2026-11-30 18:10", 1.75, "xo")...)
	as = append(as, seq(t, 1, "2026-11-30 18:20", 1.80, "xx-")...)
	// Ava, Thursday: 1.75 o, 1.80 o (coach +2 cm), 1.83 xxx (model −1 and −2 cm, coach −3 cm).
	as = append(as, seq(t, 1, "2026-12-03 18:00", 1.75, "o")...)
	as = append(as, withCoach(at(t, 1, "2026-12-03 18:10", 1.80, record.Cleared), 0.02))
	x := seq(t, 1, "2026-12-03 18:20", 1.83, "xxx")
	x[0], x[1] = withModel(x[0], -0.01), withModel(withCoach(x[1], -0.03), -0.02)
	as = append(as, x...)
	// Ava, 2026-W47: 1.80 o, 1.83 x.
	as = append(as, at(t, 1, "2026-11-18 18:00", 1.80, record.Cleared), at(t, 1, "2026-11-18 18:10", 1.83, record.Failed))
	// ben, Tuesday, a meet: 1.90 o, 1.96 xo; 2026-W45, a meet: 1.92 o.
	as = append(as, meet(seq(t, 2, "2026-12-01 17:00", 1.90, "o")...)...)
	as = append(as, meet(seq(t, 2, "2026-12-01 17:10", 1.96, "xo")...)...)
	as = append(as, meet(at(t, 2, "2026-11-04 17:00", 1.92, record.Cleared))...)
	// Cy jumped only in 2026-W46.
	as = append(as, at(t, 3, "2026-11-11 17:00", 1.50, record.Cleared))
	// Dee (private) jumped this week.
	as = append(as, at(t, 4, "2026-12-02 17:00", 1.60, record.Cleared))
	// An attempt of an athlete nobody added.
	as = append(as, at(t, 99, "2026-12-02 17:00", 1.60, record.Cleared))
	return athletes, as
}

func build(t testing.TB, cfg Config, athletes []record.Athlete, as []record.Attempt) Digest {
	t.Helper()
	b, err := NewBuilder(cfg)
	if err != nil {
		t.Fatal(err)
	}
	for _, a := range athletes {
		b.AddAthlete(a)
	}
	for _, a := range as {
		if err := b.Add(a); err != nil {
			t.Fatalf("Add(%+v): %v", a, err)
		}
	}
	return b.Result()
}

func TestDigestByHand(t *testing.T) {
	athletes, as := handWeek(t)
	d := build(t, Config{Week: Week{2026, 49}, TrendWeeks: 6}, athletes, as)

	if got := names(d.Athletes); !slices.Equal(got, []string{"Ava", "ben", "Dee"}) {
		t.Fatalf("athletes %v, want Ava, ben, Dee (case-insensitive order)", got)
	}
	if !slices.Equal(d.Idle, []string{"Cy", "eli"}) {
		t.Errorf("idle %v, want [Cy eli]", d.Idle)
	}
	if d.Unmatched != 1 {
		t.Errorf("unmatched %d, want 1", d.Unmatched)
	}
	if d.TrendWeeks[0] != (Week{2026, 44}) || len(d.TrendWeeks) != 6 {
		t.Errorf("trend weeks %v", d.TrendWeeks)
	}

	ava := d.Athletes[0]
	// 11 attempts: O = 1.70, 1.75, 1.75, 1.80 = 4; X = 1.75, 1.80, 1.80, 1.83 ×3 = 6; - = 1.
	if ava.Sessions != 2 || ava.Attempts != 11 || ava.Clearances != 4 || ava.Failures != 6 || ava.Passes != 1 {
		t.Errorf("Ava counts %+v", ava)
	}
	// Make rate 4 / (4 + 6) = 40 %: the pass is not in the denominator.
	if r, ok := ava.MakeRate.Value(); !ok || r != 0.4 {
		t.Errorf("Ava make rate %v %v, want 0.4", r, ok)
	}
	if !ava.HasBest || ava.BestM != 1.80 || ava.PersonalBest || ava.SeasonBest {
		t.Errorf("Ava best %v (PB %v, SB %v), want 1.80, no PB (equals profile), no SB (equals W47)", ava.BestM, ava.PersonalBest, ava.SeasonBest)
	}
	// Coach: +0.02 and −0.03, median −0.005. Model: −0.01 and −0.02, median −0.015.
	if ava.CoachMargin.N != 2 || math.Abs(ava.CoachMargin.MedianM+0.005) > 1e-12 {
		t.Errorf("Ava coach margin %+v, want 2 at −0.005", ava.CoachMargin)
	}
	if ava.ModelMargin.N != 2 || math.Abs(ava.ModelMargin.MedianM+0.015) > 1e-12 {
		t.Errorf("Ava model margin %+v, want 2 at −0.015", ava.ModelMargin)
	}
	// Window tallies: 1.70 O1; 1.75 O2 X1; 1.80 O2 X2 (exactly half: qualifies); 1.83 X4.
	if want := (Ceiling{OK: true, BarM: 1.80, Cleared: 2, Failed: 2}); ava.Ceiling != want {
		t.Errorf("Ava ceiling %+v, want %+v", ava.Ceiling, want)
	}
	// Best bar weeks: W47 1.80 and W49 1.80: two points, no reading.
	if ava.BestTrend.Points != 2 || ava.BestTrend.Reading != NotEnoughData || ava.BestTrend.SlopeCMPerWeek != 0 {
		t.Errorf("Ava trend %+v", ava.BestTrend)
	}

	ben := d.Athletes[1]
	if !ben.HasBest || ben.BestM != 1.96 || !ben.PersonalBest || !ben.SeasonBest || ben.SeasonFrom != (Week{2026, 44}) {
		t.Errorf("ben best %v PB %v SB %v from %v, want 1.96 PB SB from 2026-W44", ben.BestM, ben.PersonalBest, ben.SeasonBest, ben.SeasonFrom)
	}
	if r, _ := ben.MakeRate.Value(); ben.Sessions != 1 || math.Abs(r-2.0/3) > 1e-15 {
		t.Errorf("ben sessions %d make rate %v", ben.Sessions, r)
	}

	dee := d.Athletes[2]
	if !dee.Private || dee.Attempts != 1 {
		t.Errorf("Dee %+v", dee)
	}
	// Team: Ava and ben only (Dee is private): 14 attempts, O 6, X 7, - 1.
	wantTeam := TeamTotals{Jumped: 2, Attempts: 14, Clearances: 6, Failures: 7, Passes: 1,
		MakeRate: Rate{Cleared: 6, Tried: 13}, PrivateExcluded: 1}
	if d.Team != wantTeam {
		t.Errorf("team %+v, want %+v", d.Team, wantTeam)
	}
}

func TestRedactedAndPrivateSummaries(t *testing.T) {
	athletes, as := handWeek(t)
	d := build(t, Config{Week: Week{2026, 49}, TrendWeeks: 6}, athletes, as)
	r := d.Redacted()
	if !reflect.DeepEqual(r.Athletes[0], d.Athletes[0]) {
		t.Error("Redacted changed a public entry")
	}
	dee := r.Athletes[2]
	if !dee.Private || dee.Name != "Dee" || dee.Attempts != 0 || dee.HasBest || dee.Weeks != nil {
		t.Errorf("redacted private entry still carries details: %+v", dee)
	}
	if d.Athletes[2].Attempts != 1 {
		t.Error("Redacted modified the original digest")
	}
	ps := d.PrivateSummaries()
	if len(ps) != 1 || ps[0].Entry.Name != "Dee" || ps[0].Week != d.Week {
		t.Fatalf("private summaries %+v", ps)
	}
	// A private athlete who did not jump still gets an entry, never an idle listing.
	athletes[3].Private, athletes[4].Private = false, true
	d = build(t, Config{Week: Week{2026, 49}, TrendWeeks: 6}, athletes, as)
	if slices.Contains(d.Idle, "eli") || !slices.Contains(names(d.Athletes), "eli") {
		t.Errorf("private idle athlete: idle %v athletes %v", d.Idle, names(d.Athletes))
	}
}

func TestAddRejects(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	b, err := NewBuilder(Config{Week: Week{2026, 13}, Loc: madrid})
	if err != nil {
		t.Fatal(err)
	}
	from, to := b.Window()
	// Eight weeks ending with 2026-W13: Monday 2026-02-02 00:00 CET to Monday 2026-03-30 00:00 CEST.
	if want := time.Date(2026, 2, 2, 0, 0, 0, 0, madrid); !from.Equal(want) {
		t.Errorf("from %v, want %v", from, want)
	}
	if want := time.Date(2026, 3, 30, 0, 0, 0, 0, madrid); !to.Equal(want) {
		t.Errorf("to %v, want %v", to, want)
	}
	b.AddAthlete(record.Athlete{ID: 1, Name: "Ava"})
	ok := []time.Time{
		from,
		time.Date(2026, 3, 23, 0, 10, 0, 0, madrid),  // Monday of W13 local, still Sunday 23:10 UTC
		time.Date(2026, 3, 29, 23, 30, 0, 0, madrid), // Sunday night local, after the clocks went forward
	}
	for _, tm := range ok {
		if err := b.Add(record.Attempt{AthleteID: 1, Time: tm, BarM: 1.7, Outcome: record.Cleared}); err != nil {
			t.Errorf("Add at %v: %v", tm, err)
		}
	}
	out := []time.Time{
		from.Add(-time.Nanosecond),
		to,
		time.Date(2026, 3, 30, 0, 30, 0, 0, madrid), // Monday of W14 local, Sunday 22:30 UTC
	}
	for _, tm := range out {
		if err := b.Add(record.Attempt{AthleteID: 1, Time: tm, BarM: 1.7, Outcome: record.Cleared}); !errors.Is(err, ErrOutsideWindow) {
			t.Errorf("Add at %v: err %v, want ErrOutsideWindow", tm, err)
		}
	}
	if err := b.Add(record.Attempt{AthleteID: 1, Time: from, Outcome: 'q'}); !errors.Is(err, ErrBadAttempt) {
		t.Errorf("bad outcome: %v", err)
	}
	d := b.Result()
	ava := d.Athletes[0]
	// W13 holds the Monday and Sunday attempts: two local days.
	if ava.Attempts != 2 || ava.Sessions != 2 || ava.Weeks[0].Attempts != 1 {
		t.Errorf("Ava attempts %d sessions %d first week %d, want 2, 2, 1", ava.Attempts, ava.Sessions, ava.Weeks[0].Attempts)
	}
}

func TestNewBuilderConfig(t *testing.T) {
	for _, cfg := range []Config{
		{Week: Week{2026, 54}},
		{Week: Week{2026, 10}, TrendWeeks: 5},
		{Week: Week{2026, 10}, TrendWeeks: -1},
		{Week: Week{2026, 10}, TrendWeeks: MaxTrendWeeks + 1},
	} {
		if _, err := NewBuilder(cfg); !errors.Is(err, ErrConfig) {
			t.Errorf("NewBuilder(%+v) err = %v, want ErrConfig", cfg, err)
		}
	}
	b, err := NewBuilder(Config{Week: Week{2026, 10}})
	if err != nil || len(b.Weeks()) != DefaultTrendWeeks {
		t.Errorf("default window: %v, %v", b, err)
	}
}

// The season is the ISO year of the digest week: a higher jump in 2026-W52
// does not stop a 2027-W02 best from being the 2027 season best.
func TestSeasonBestAcrossYear(t *testing.T) {
	athletes := []record.Athlete{{ID: 1, Name: "Ava"}}
	as := meet(
		at(t, 1, "2026-12-22 17:00", 2.00, record.Cleared), // 2026-W52
		at(t, 1, "2027-01-05 17:00", 1.85, record.Cleared), // 2027-W01
		at(t, 1, "2027-01-12 17:00", 1.90, record.Cleared), // 2027-W02
	)
	d := build(t, Config{Week: Week{2027, 2}, TrendWeeks: 6}, athletes, as)
	a := d.Athletes[0]
	if !a.SeasonBest || a.SeasonFrom != (Week{2027, 1}) || a.PersonalBest {
		t.Errorf("SB %v from %v PB %v, want SB from 2027-W01, no PB (no profile PB)", a.SeasonBest, a.SeasonFrom, a.PersonalBest)
	}
	if a.Ceiling.BarM != 2.00 {
		t.Errorf("ceiling %+v, want 2.00 over the whole window", a.Ceiling)
	}
}

// A steady rise of 1 cm a week over six weeks, margins falling 0.5 cm a
// week: slopes exactly +1 and −0.5 with zero standard error.
func TestDigestTrend(t *testing.T) {
	w := Week{2026, 20}
	var as []record.Attempt
	for i := range 6 {
		day := w.Add(i - 5).Start(time.UTC).Add(40 * time.Hour)
		a := record.Attempt{AthleteID: 1, Time: day, BarM: 1.80 + float64(i)/100, Outcome: record.Cleared}
		as = append(as, withModel(a, 0.04-0.005*float64(i)))
	}
	d := build(t, Config{Week: w, TrendWeeks: 6}, []record.Athlete{{ID: 1, Name: "Ava"}}, as)
	a := d.Athletes[0]
	if a.BestTrend.Reading != Rising || a.BestTrend.Points != 6 || math.Abs(a.BestTrend.SlopeCMPerWeek-1) > 1e-9 {
		t.Errorf("best trend %+v, want rising 1 cm/week on 6 points", a.BestTrend)
	}
	if a.ModelMarginTrend.Reading != Falling || math.Abs(a.ModelMarginTrend.SlopeCMPerWeek+0.5) > 1e-9 {
		t.Errorf("model margin trend %+v, want falling −0.5 cm/week", a.ModelMarginTrend)
	}
	if a.CoachMarginTrend.Points != 0 || a.CoachMarginTrend.Reading != NotEnoughData {
		t.Errorf("coach trend %+v, want no points", a.CoachMarginTrend)
	}
}

// The digest does not depend on the order of the stream: attempts shuffled
// and athletes added last give the same Digest as time order.
func TestDigestOrderIndependent(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	cfg := Config{Week: Week{2026, 13}, Loc: madrid}
	b0, err := NewBuilder(cfg)
	if err != nil {
		t.Fatal(err)
	}
	from, _ := b0.Window()
	athletes := squad(25)
	athletes[3].Private = true
	var as []record.Attempt
	synthWeeks(athletes[:20], from, madrid, DefaultTrendWeeks, 7, func(a record.Attempt) { as = append(as, a) })
	slices.SortFunc(as, func(x, y record.Attempt) int { return x.Time.Compare(y.Time) })
	want := build(t, cfg, athletes, as)

	rng := rand.New(rand.NewPCG(1, 2))
	for range 3 {
		rng.Shuffle(len(as), func(i, j int) { as[i], as[j] = as[j], as[i] })
		b, _ := NewBuilder(cfg)
		for _, a := range as {
			if err := b.Add(a); err != nil {
				t.Fatal(err)
			}
		}
		for i := len(athletes) - 1; i >= 0; i-- {
			b.AddAthlete(athletes[i])
		}
		if got := b.Result(); !reflect.DeepEqual(got, want) {
			t.Fatal("shuffled stream gives a different digest")
		}
	}
	if len(want.Athletes) != 20 || len(want.Idle) != 5 {
		t.Errorf("synthetic digest has %d athletes, %d idle", len(want.Athletes), len(want.Idle))
	}
}

func names(as []AthleteWeek) []string {
	var ns []string
	for _, a := range as {
		ns = append(ns, a.Name)
	}
	return ns
}

// Bests are competition clearances: a practice height above the profile's
// personal best is flagged as such, never as a personal or season best.
func TestPracticeIsNotABest(t *testing.T) {
	athletes := []record.Athlete{{ID: 1, Name: "Ava", PersonalBestM: 1.80}}
	as := []record.Attempt{at(t, 1, "2026-12-01 17:00", 1.83, record.Cleared)}
	d := build(t, Config{Week: Week{2026, 49}}, athletes, as)
	a := d.Athletes[0]
	if a.PersonalBest || a.SeasonBest || !a.PracticeAbovePB {
		t.Errorf("practice 1.83 over PB 1.80: PB %v SB %v practice-above %v; want only practice-above", a.PersonalBest, a.SeasonBest, a.PracticeAbovePB)
	}
}

// Meet bests come from valid series only (series.Counting; World
// Athletics TR 26.2: three consecutive failures end the competition): a
// clearance after the athlete was out, or one stored as breaking a rule,
// is no personal or season best, whatever order the attempts come in.
func TestMeetBestsOnlyFromValidSeries(t *testing.T) {
	athletes := []record.Athlete{{ID: 1, Name: "Ava", PersonalBestM: 1.75}}
	as := meet(
		at(t, 1, "2026-11-24 17:00", 1.70, record.Cleared),
		at(t, 1, "2026-11-24 17:05", 1.75, record.Failed),
		at(t, 1, "2026-11-24 17:06", 1.75, record.Passed),
		at(t, 1, "2026-11-24 17:10", 1.78, record.Failed),
		at(t, 1, "2026-11-24 17:11", 1.78, record.Failed),
		at(t, 1, "2026-11-24 17:20", 1.81, record.Cleared), // after out
	)
	flagged := at(t, 1, "2026-11-25 17:00", 1.90, record.Cleared)
	flagged.Meet, flagged.RuleBreach = true, "confirmed"
	as = append(as, flagged)
	for i, j := 0, len(as)-1; i < j; i, j = i+1, j-1 { // any order
		as[i], as[j] = as[j], as[i]
	}
	d := build(t, Config{Week: Week{2026, 48}, TrendWeeks: 6}, athletes, as)
	a := d.Athletes[0]
	ws := a.Weeks[len(a.Weeks)-1]
	if !ws.HasMeetBest || ws.MeetBestM != 1.70 || a.PersonalBest {
		t.Errorf("meet best %v %v, PB flag %v; want 1.70 and no PB", ws.HasMeetBest, ws.MeetBestM, a.PersonalBest)
	}
}
