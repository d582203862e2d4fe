// Package digest computes the weekly clearance-trend digest of a team:
// per athlete, what happened in one ISO week (sessions, attempts, O/X/-
// counts, make rate, best bar, clearance margins) and how it has moved over
// the trend window of the last few weeks (least-squares slopes of the weekly
// best bar and of the weekly median margin, and the "ceiling": the highest
// bar made on at least half its attempts). It also draws the trend chart.
//
// The package is pure: no clock, no storage, no chat. The caller asks a
// Builder which time range to scan (Window), streams the attempts of that
// range in any order, and reads the Digest. The Builder keeps per-athlete,
// per-week aggregates, so its memory grows with athletes × weeks (plus the
// margins of the window's attempts that carry one, kept exactly for the
// medians), never with the whole history.
//
// Lengths are metres inside; trends are reported in centimetres per week
// because that is the size of a week's change at the bar.
package digest

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"math/bits"
	"slices"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
)

// Trend window bounds, in weeks (the digest week included).
const (
	DefaultTrendWeeks = 8
	MinTrendWeeks     = 6
	MaxTrendWeeks     = 104
)

// Errors of the Builder.
var (
	ErrConfig        = errors.New("digest: bad configuration")
	ErrOutsideWindow = errors.New("digest: attempt outside the digest window")
	ErrBadAttempt    = errors.New("digest: attempt has no valid outcome")
)

// Config chooses the digest week and the trend window.
type Config struct {
	Week       Week           // the ISO week the digest reports
	Loc        *time.Location // team time zone for weeks and days; nil means UTC
	TrendWeeks int            // weeks in the trend window including Week; 0 means DefaultTrendWeeks; MinTrendWeeks..MaxTrendWeeks
}

// Builder accumulates attempts into per-athlete, per-week aggregates. Feed it
// with AddAthlete and Add in any order, then call Result. A Builder is not
// safe for concurrent use.
//
// Memory: one fixed-size aggregate per athlete per trend week, one counter
// pair per distinct bar height per athlete (for the ceiling), and the
// margins of attempts that carry one (coach estimate or model), kept exactly
// because a median needs them; a week holds a few dozen at most, and only
// window attempts are kept, so the total is bounded by the window, not the
// history.
type Builder struct {
	week     Week
	loc      *time.Location
	n        int       // trend weeks
	first    Week      // oldest week of the window
	from, to time.Time // window [from, to)
	fromDay  int64     // local day number of from (a Monday)

	athletes map[uint64]record.Athlete
	aggs     map[uint64]*athleteAgg
}

type athleteAgg struct {
	weeks []weekAgg
	bars  map[int64]barCount // bar height in mm → counts over the whole window
	// meet holds the window's meet attempts (every outcome), so that the
	// meet bests can be read from valid series only (series.Counting) once
	// all attempts are in, whatever order they came in.
	meet []record.Attempt
}

type barCount struct{ cleared, failed int }

type weekAgg struct {
	attempts, cleared, failed, passed int
	days                              uint8 // bit d: attempts on local weekday d (Monday = 0)
	hasBest                           bool
	bestM                             float64 // highest bar cleared
	hasMeetBest                       bool
	meetBestM                         float64 // highest bar cleared at a meet
	hasPracticeBest                   bool
	practiceBestM                     float64 // highest bar cleared in practice
	coach, model                      []float64
}

// NewBuilder checks cfg and returns an empty Builder for it.
func NewBuilder(cfg Config) (*Builder, error) {
	if !cfg.Week.Valid() {
		return nil, fmt.Errorf("%w: week %v does not exist", ErrConfig, cfg.Week)
	}
	n := cfg.TrendWeeks
	if n == 0 {
		n = DefaultTrendWeeks
	}
	if n < MinTrendWeeks || n > MaxTrendWeeks {
		return nil, fmt.Errorf("%w: trend window of %d weeks (want %d to %d)", ErrConfig, cfg.TrendWeeks, MinTrendWeeks, MaxTrendWeeks)
	}
	loc := orUTC(cfg.Loc)
	first := cfg.Week.Add(-(n - 1))
	b := &Builder{
		week: cfg.Week, loc: loc, n: n, first: first,
		from: first.Start(loc), to: cfg.Week.End(loc),
		athletes: make(map[uint64]record.Athlete),
		aggs:     make(map[uint64]*athleteAgg),
	}
	b.fromDay = dayNumber(b.from.In(loc))
	return b, nil
}

// Window returns the half-open time range [from, to) whose attempts the
// digest needs: Monday 00:00 local of the oldest trend week to Monday 00:00
// local after the digest week. Scanning only this range keeps the cost of a
// digest proportional to the window, not to the stored history.
func (b *Builder) Window() (from, to time.Time) { return b.from, b.to }

// Weeks returns the trend weeks, oldest first; the last is the digest week.
func (b *Builder) Weeks() []Week {
	ws := make([]Week, b.n)
	for i := range ws {
		ws[i] = b.first.Add(i)
	}
	return ws
}

// AddAthlete registers an athlete of the team. Athletes with no attempts in
// the digest week are listed as idle. Adding the same ID again replaces the
// profile.
func (b *Builder) AddAthlete(a record.Athlete) { b.athletes[a.ID] = a }

// Add counts one attempt. It returns ErrOutsideWindow for an attempt outside
// Window and ErrBadAttempt for an invalid outcome; such attempts are not
// counted. Attempts may come in any order and before or after their
// athlete's AddAthlete.
func (b *Builder) Add(a record.Attempt) error {
	if !a.Outcome.Valid() {
		return fmt.Errorf("%w: %q at %v", ErrBadAttempt, a.Outcome, a.Time)
	}
	if a.Time.Before(b.from) || !a.Time.Before(b.to) {
		return ErrOutsideWindow // unadorned: a caller scanning too wide pays no formatting per attempt
	}
	local := a.Time.In(b.loc)
	day := dayNumber(local) - b.fromDay
	wi := int(day / 7)
	if day < 0 || wi >= b.n { // cannot happen for an instant inside [from, to)
		return ErrOutsideWindow
	}
	ag := b.aggs[a.AthleteID]
	if ag == nil {
		ag = &athleteAgg{weeks: make([]weekAgg, b.n), bars: make(map[int64]barCount)}
		b.aggs[a.AthleteID] = ag
	}
	w := &ag.weeks[wi]
	w.attempts++
	w.days |= 1 << uint(day%7)
	if a.HasCoachMargin {
		w.coach = append(w.coach, a.CoachMarginM)
	}
	if a.HasModelMargin {
		w.model = append(w.model, a.ModelMarginM)
	}
	if a.Meet {
		ag.meet = append(ag.meet, a)
	}
	if a.Outcome == record.Passed {
		w.passed++
		return nil
	}
	key := mm(a.BarM)
	bc := ag.bars[key]
	if a.Outcome == record.Cleared {
		w.cleared++
		bc.cleared++
		if !w.hasBest || a.BarM > w.bestM {
			w.hasBest, w.bestM = true, a.BarM
		}
		if !a.Meet && (!w.hasPracticeBest || a.BarM > w.practiceBestM) {
			w.hasPracticeBest, w.practiceBestM = true, a.BarM
		}
	} else {
		w.failed++
		bc.failed++
	}
	ag.bars[key] = bc
	return nil
}

// Digest is the result for one week.
type Digest struct {
	Week       Week
	From, To   time.Time // the digest week, [From, To) local
	Zone       string    // the time-zone name weeks and days were counted in
	TrendWeeks []Week    // oldest first; the last is Week

	// Athletes holds every non-private athlete who jumped in Week and every
	// private athlete (jumped or not), sorted by name. Channel renderers
	// show private ones only as "details sent privately" (see Redacted).
	Athletes []AthleteWeek
	// Idle lists, by name, the non-private athletes with no attempts in Week.
	Idle []string
	// Resting holds the entries of the athletes in Idle, in the same order:
	// they may have jumped earlier in the trend window, and charts keep them
	// in the legend, greyed.
	Resting []AthleteWeek
	Team    TeamTotals
	// Unmatched counts window attempts whose athlete was never added.
	Unmatched int
}

// TeamTotals sums the digest week over non-private athletes only, so that a
// private athlete's numbers cannot be worked out by subtraction.
type TeamTotals struct {
	Jumped          int // non-private athletes with at least one attempt
	Attempts        int
	Clearances      int // O
	Failures        int // X
	Passes          int // -
	MakeRate        Rate
	PrivateExcluded int // private athletes left out of these totals
}

// Rate is a make rate: clearances over clearances plus failures (passes are
// not attempts at the bar and are left out).
type Rate struct{ Cleared, Tried int }

// Value returns Cleared / Tried, and false when nothing was tried.
func (r Rate) Value() (float64, bool) {
	if r.Tried == 0 {
		return 0, false
	}
	return float64(r.Cleared) / float64(r.Tried), true
}

// MarginStat is the median of one kind of clearance margin.
type MarginStat struct {
	N       int     // attempts carrying this margin
	MedianM float64 // median margin, m (positive clears, negative knocks); 0 when N = 0
}

// Ceiling is the highest bar cleared on at least half its attempts,
// O / (O + X) ≥ 0.5, counted over the whole trend window (passes left out).
type Ceiling struct {
	OK      bool    // false when no height qualifies
	BarM    float64 // bar height, m (rounded to the millimetre)
	Cleared int     // O at that height in the window
	Failed  int     // X at that height in the window
}

// WeekStat is one athlete's week inside the trend window.
type WeekStat struct {
	Week                     Week
	Sessions                 int // distinct local days with attempts
	Attempts                 int
	Cleared, Failed, Passed  int
	HasBest                  bool
	BestM                    float64 // highest bar cleared, m
	HasMeetBest              bool
	MeetBestM                float64 // highest bar cleared at a meet, m
	HasPracticeBest          bool
	PracticeBestM            float64 // highest bar cleared in practice, m
	CoachMargin, ModelMargin MarginStat
	MakeRate                 Rate
}

// AthleteWeek is one athlete's digest entry.
type AthleteWeek struct {
	AthleteID uint64
	Name      string
	Private   bool // show only "details sent privately" in the channel
	// ChartStyle is the profile's fixed colour-and-marker slot
	// (record.Athlete.ChartStyle; 0 = none stored, charts fall back to the order drawn).
	ChartStyle int

	// The digest week.
	Sessions   int // distinct local days with attempts
	Attempts   int // all attempts, passes included
	Clearances int // O
	Failures   int // X
	Passes     int // -
	MakeRate   Rate
	HasBest    bool
	BestM      float64 // highest bar cleared this week, m

	// Bests count competition clearances only, as the trade does: a
	// height made in practice is not a personal or season best.
	//
	// PersonalBest: this week's best meet clearance is above the profile's
	// PersonalBestM (by at least 1 mm). False when the profile gives no
	// personal best, and false if the profile was already raised to this
	// week's height before the digest (logging a meet best raises it).
	PersonalBest bool
	// PracticeAbovePB: a practice clearance this week is above the
	// profile's personal best (and no meet clearance is): worth a mention,
	// not a record.
	PracticeAbovePB bool
	// SeasonBest: this week's best meet clearance is above (by at least
	// 1 mm) every meet clearance in the earlier weeks of the same season
	// inside the trend window. The season is
	// the calendar year, taken week by week as the ISO week-numbering year of
	// the digest week (the two differ by at most three days at New Year: the
	// days of 2026-W53 that fall in January 2027 count for 2026). SeasonFrom
	// is the earliest week compared; a jump earlier in the season but before
	// the trend window is not seen, so a flag late in the year means "best
	// since SeasonFrom". The first meet clearance of a season is its best so far.
	// The profile's PersonalBestM plays no part here.
	SeasonBest bool
	SeasonFrom Week

	// Margins of this week's attempts, the coach's visual estimates and the
	// mechanics model's values kept apart.
	CoachMargin MarginStat
	ModelMargin MarginStat

	// The trend window.
	Weeks            []WeekStat // one per trend week, oldest first
	BestTrend        Trend      // weekly best bar cleared, cm/week
	CoachMarginTrend Trend      // weekly median coach margin, cm/week
	ModelMarginTrend Trend      // weekly median model margin, cm/week
	Ceiling          Ceiling
}

// Result computes the digest from everything added so far. It may be called
// more than once.
func (b *Builder) Result() Digest {
	d := Digest{
		Week: b.week, From: b.week.Start(b.loc), To: b.to,
		Zone: b.loc.String(), TrendWeeks: b.Weeks(),
	}
	for id, ag := range b.aggs {
		if _, ok := b.athletes[id]; !ok {
			for _, w := range ag.weeks {
				d.Unmatched += w.attempts
			}
		}
	}
	last := b.n - 1
	for _, a := range b.athletes {
		ag := b.aggs[a.ID]
		jumped := ag != nil && ag.weeks[last].attempts > 0
		if a.Private {
			d.Team.PrivateExcluded++
		}
		if !jumped && !a.Private {
			d.Resting = append(d.Resting, b.athleteWeek(a, ag))
			continue
		}
		aw := b.athleteWeek(a, ag)
		d.Athletes = append(d.Athletes, aw)
		if a.Private {
			continue
		}
		d.Team.Jumped++
		d.Team.Attempts += aw.Attempts
		d.Team.Clearances += aw.Clearances
		d.Team.Failures += aw.Failures
		d.Team.Passes += aw.Passes
	}
	d.Team.MakeRate = Rate{Cleared: d.Team.Clearances, Tried: d.Team.Clearances + d.Team.Failures}
	slices.SortFunc(d.Athletes, func(x, y AthleteWeek) int {
		return cmp.Or(cmp.Compare(strings.ToLower(x.Name), strings.ToLower(y.Name)), cmp.Compare(x.AthleteID, y.AthleteID))
	})
	slices.SortFunc(d.Resting, func(x, y AthleteWeek) int {
		return cmp.Or(cmp.Compare(strings.ToLower(x.Name), strings.ToLower(y.Name)), cmp.Compare(x.Name, y.Name), cmp.Compare(x.AthleteID, y.AthleteID))
	})
	for _, a := range d.Resting {
		d.Idle = append(d.Idle, a.Name)
	}
	return d
}

// athleteWeek builds one entry; ag is nil for an athlete with no window attempts.
func (b *Builder) athleteWeek(a record.Athlete, ag *athleteAgg) AthleteWeek {
	aw := AthleteWeek{AthleteID: a.ID, Name: a.Name, Private: a.Private, ChartStyle: a.ChartStyle, SeasonFrom: b.week}
	aw.Weeks = make([]WeekStat, b.n)
	if ag != nil {
		b.meetBests(ag)
	}
	var bestX, bestY, coachX, coachY, modelX, modelY []float64
	for i := range aw.Weeks {
		ws := WeekStat{Week: b.first.Add(i)}
		if ag != nil {
			w := &ag.weeks[i]
			ws.Sessions = bits.OnesCount8(w.days)
			ws.Attempts, ws.Cleared, ws.Failed, ws.Passed = w.attempts, w.cleared, w.failed, w.passed
			ws.HasBest, ws.BestM = w.hasBest, w.bestM
			ws.HasMeetBest, ws.MeetBestM = w.hasMeetBest, w.meetBestM
			ws.HasPracticeBest, ws.PracticeBestM = w.hasPracticeBest, w.practiceBestM
			ws.CoachMargin = marginStat(w.coach)
			ws.ModelMargin = marginStat(w.model)
			ws.MakeRate = Rate{Cleared: w.cleared, Tried: w.cleared + w.failed}
		}
		x := float64(i)
		if ws.HasBest {
			bestX, bestY = append(bestX, x), append(bestY, ws.BestM*100)
		}
		if ws.CoachMargin.N > 0 {
			coachX, coachY = append(coachX, x), append(coachY, ws.CoachMargin.MedianM*100)
		}
		if ws.ModelMargin.N > 0 {
			modelX, modelY = append(modelX, x), append(modelY, ws.ModelMargin.MedianM*100)
		}
		aw.Weeks[i] = ws
	}
	cur := aw.Weeks[b.n-1]
	aw.Sessions, aw.Attempts = cur.Sessions, cur.Attempts
	aw.Clearances, aw.Failures, aw.Passes = cur.Cleared, cur.Failed, cur.Passed
	aw.MakeRate = cur.MakeRate
	aw.HasBest, aw.BestM = cur.HasBest, cur.BestM
	aw.CoachMargin, aw.ModelMargin = cur.CoachMargin, cur.ModelMargin
	aw.BestTrend = trendOf(bestX, bestY)
	aw.CoachMarginTrend = trendOf(coachX, coachY)
	aw.ModelMarginTrend = trendOf(modelX, modelY)
	if ag != nil {
		aw.Ceiling = ceilingOf(ag.bars)
	}
	if cur.HasMeetBest {
		aw.PersonalBest = a.PersonalBestM > 0 && mm(cur.MeetBestM) > mm(a.PersonalBestM)
		aw.SeasonBest = true
		for i := b.n - 2; i >= 0; i-- {
			ws := aw.Weeks[i]
			if ws.Week.Year != b.week.Year {
				break
			}
			aw.SeasonFrom = ws.Week
			if ws.HasMeetBest && mm(ws.MeetBestM) >= mm(cur.MeetBestM) {
				aw.SeasonBest = false
			}
		}
	}
	aw.PracticeAbovePB = !aw.PersonalBest && aw.HasBest && a.PersonalBestM > 0 && mm(aw.BestM) > mm(a.PersonalBestM)
	return aw
}

// meetBests sets each week's meet best from the clearances that count for
// a best: those of valid meet series only (series.Counting), so a line that
// broke the competition rules never makes a personal or season best.
func (b *Builder) meetBests(ag *athleteAgg) {
	for i := range ag.weeks {
		ag.weeks[i].hasMeetBest, ag.weeks[i].meetBestM = false, 0
	}
	for i, ok := range series.Counting(ag.meet, b.loc) {
		if !ok {
			continue
		}
		a := ag.meet[i]
		wi := int((dayNumber(a.Time.In(b.loc)) - b.fromDay) / 7)
		w := &ag.weeks[wi]
		if !w.hasMeetBest || a.BarM > w.meetBestM {
			w.hasMeetBest, w.meetBestM = true, a.BarM
		}
	}
}

func marginStat(ms []float64) MarginStat {
	if len(ms) == 0 {
		return MarginStat{}
	}
	return MarginStat{N: len(ms), MedianM: median(ms)}
}

// ceilingOf picks the highest bar with 2·O ≥ O + X (O / (O + X) ≥ 0.5, in
// integers so that exactly one half qualifies).
func ceilingOf(bars map[int64]barCount) Ceiling {
	var c Ceiling
	var best int64
	for key, bc := range bars {
		tried := bc.cleared + bc.failed
		if tried == 0 || 2*bc.cleared < tried {
			continue
		}
		if !c.OK || key > best {
			best = key
			c = Ceiling{OK: true, BarM: float64(key) / 1000, Cleared: bc.cleared, Failed: bc.failed}
		}
	}
	return c
}

// mm rounds a length in metres to whole millimetres, the resolution at
// which bar heights are compared.
func mm(m float64) int64 { return int64(math.Round(m * 1000)) }

// dayNumber counts days since 1970-01-01 for t's wall-clock date.
func dayNumber(t time.Time) int64 {
	y, m, d := t.Date()
	return time.Date(y, m, d, 0, 0, 0, 0, time.UTC).Unix() / 86400
}
