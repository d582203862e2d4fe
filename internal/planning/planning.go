// Package planning suggests the bars for a practice or a meet from an
// athlete's log: an opening height, a progression, the expected number of
// jumps and a one-line reason for each choice. It is pure: attempts in,
// a Plan out; no clock, no storage. A plan is a suggestion for the coach,
// never a prescription.
package planning

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Kind is what the day is: practice or meet.
type Kind int

// Kinds of day.
const (
	Practice Kind = iota
	Meet
)

// MinRiseM is the smallest rise of the bar between rounds at a meet
// (World Athletics Technical Rules, TR 26).
const MinRiseM = 0.02

// barTolM treats bars within half a centimetre as the same bar.
const barTolM = 0.005

// Input is what a plan is made from.
type Input struct {
	Kind     Kind
	Attempts []record.Attempt // the recent window, time order (passes are ignored)
	PBM      float64          // personal best; 0 = not known
	// StepsM are the meet's announced bars, ascending; empty when not known.
	StepsM []float64
	// BudgetJumps caps a practice's expected jumps (0 = no budget).
	BudgetJumps int
	Loc         *time.Location // sessions are local days
}

// Height is one bar of the plan.
type Height struct {
	BarM          float64
	MakeRate      float64 // estimated chance of a clearance on one attempt
	ReachChance   float64 // chance the athlete is still jumping when this bar goes up
	ExpectedJumps float64 // expected attempts at this bar, weighted by ReachChance
	AttemptsLeft  int     // attempts available at this bar when it is reached cleanly (meets)
	Reason        string
}

// Plan is the suggestion.
type Plan struct {
	Kind          Kind
	CeilingM      float64 // highest bar made on at least half its tries
	CeilingMade   int
	CeilingTried  int
	TrendMPerWeek float64 // least-squares slope of the session bests
	Sessions      int     // sessions of this kind the opening was read from
	Heights       []Height
	ExpectedJumps float64
	Reasons       []string // one line each: opening, top, steps, budget
}

// ErrNoJumps means the window holds no attempt to plan from.
var ErrNoJumps = errors.New("planning: no jumps in the window")

// ErrSteps means the meet's bars are not a valid progression.
type ErrSteps struct{ Msg string }

func (e ErrSteps) Error() string { return "planning: " + e.Msg }

// CheckSteps checks a meet's announced bars: ascending, each rise at least
// MinRiseM, and no rise larger than the one before it (TR 26: the rise
// never grows while more than one athlete remains).
func CheckSteps(stepsM []float64) error {
	for i := 1; i < len(stepsM); i++ {
		rise := stepsM[i] - stepsM[i-1]
		if rise < MinRiseM-1e-9 {
			return ErrSteps{fmt.Sprintf("the rise from %.2f to %.2f m is under 2 cm", stepsM[i-1], stepsM[i])}
		}
		if i >= 2 && rise > stepsM[i-1]-stepsM[i-2]+1e-9 {
			return ErrSteps{fmt.Sprintf("the rise to %.2f m is larger than the rise before it", stepsM[i])}
		}
	}
	return nil
}

// ExpectedAttempts is the expected number of attempts at one bar for a
// jumper who clears each attempt with chance p and has up to three:
// E = 1 + (1−p) + (1−p)², since the second attempt is taken only after a
// first failure and the third only after two.
func ExpectedAttempts(p float64) float64 { q := 1 - p; return 1 + q + q*q }

// ClearChance is the chance of clearing a bar within three attempts:
// 1 − (1−p)³.
func ClearChance(p float64) float64 { q := 1 - p; return 1 - q*q*q }

// Make builds a plan.
func Make(in Input) (Plan, error) {
	if in.Loc == nil {
		in.Loc = time.UTC
	}
	if err := CheckSteps(in.StepsM); err != nil {
		return Plan{}, err
	}
	var jumps []record.Attempt
	for _, a := range in.Attempts {
		if a.Outcome != record.Passed {
			jumps = append(jumps, a)
		}
	}
	if len(jumps) == 0 {
		return Plan{}, ErrNoJumps
	}
	p := Plan{Kind: in.Kind}
	p.CeilingM, p.CeilingMade, p.CeilingTried = Ceiling(jumps)
	if p.CeilingM == 0 { // nothing made on half its tries: the lowest bar tried
		p.CeilingM = lowestBar(jumps)
	}
	sessions := sessionsOf(jumps, in.Loc)
	p.TrendMPerWeek = trend(sessions)

	openGap, nSame := usualOpeningGap(sessions, p.CeilingM, in.Kind == Meet)
	p.Sessions = nSame
	open := roundCM(p.CeilingM - openGap)
	if open > p.CeilingM-MinRiseM {
		open = roundCM(p.CeilingM - MinRiseM)
	}
	top := p.CeilingM
	topWhy := "top at the ceiling: the trend is flat"
	if p.TrendMPerWeek >= 0.005 {
		top = roundCM(p.CeilingM + MinRiseM)
		topWhy = fmt.Sprintf("top 2 cm over the ceiling: session bests rise %.1f cm a week", 100*p.TrendMPerWeek)
	} else if p.TrendMPerWeek <= -0.005 {
		topWhy = fmt.Sprintf("top at the ceiling, not above: session bests fall %.1f cm a week", -100*p.TrendMPerWeek)
	}
	bars := progression(in, open, top)
	openWhy := fmt.Sprintf("opens %.0f cm under the ceiling, as the last %d %s did (median)", 100*(p.CeilingM-bars[0]), nSame, kindWord(in.Kind, nSame))
	if nSame == 0 {
		openWhy = fmt.Sprintf("opens %.0f cm under the ceiling (no %s logged yet: a usual gap, common practice)", 100*(p.CeilingM-bars[0]), kindWord(in.Kind, 2))
	}
	p.Heights = expect(bars, jumps, in)
	if in.Kind == Practice && in.BudgetJumps > 0 {
		for len(p.Heights) > 2 && total(p.Heights) > float64(in.BudgetJumps) {
			bars = bars[1:] // start higher rather than stop short of the top
			p.Heights = expect(bars, jumps, in)
		}
	}
	p.ExpectedJumps = total(p.Heights)
	p.Heights[0].Reason = openWhy
	p.Heights[len(p.Heights)-1].Reason = topWhy
	for i := 1; i < len(p.Heights)-1; i++ {
		p.Heights[i].Reason = fmt.Sprintf("+%.0f cm; made %.0f%% of tries near this bar", 100*(p.Heights[i].BarM-p.Heights[i-1].BarM), 100*p.Heights[i].MakeRate)
	}
	p.Reasons = append(p.Reasons, fmt.Sprintf("ceiling %.2f m: highest bar made on at least half its tries (%d of %d)", p.CeilingM, p.CeilingMade, p.CeilingTried))
	if in.PBM > 0 {
		p.Reasons = append(p.Reasons, ceilingVsPB(p.CeilingM, in.PBM))
	}
	switch {
	case in.Kind == Meet && len(in.StepsM) > 0:
		p.Reasons = append(p.Reasons, "bars from the meet's announced steps; passing the others")
	case in.Kind == Meet:
		p.Reasons = append(p.Reasons, "steps unknown: 3 cm, then 2 cm near the top (at least 2 cm, TR 26)")
	}
	if in.Kind == Meet {
		p.Reasons = append(p.Reasons, "3 attempts at each bar if every bar is cleared or failed out; a miss carried by passing leaves fewer (three consecutive failures end the competition, TR 26)")
	}
	if in.Kind == Practice && in.BudgetJumps > 0 {
		if p.ExpectedJumps > float64(in.BudgetJumps) {
			p.Reasons = append(p.Reasons, fmt.Sprintf("even two bars may exceed the budget of %d jumps", in.BudgetJumps))
		} else {
			p.Reasons = append(p.Reasons, fmt.Sprintf("within the budget of %d jumps", in.BudgetJumps))
		}
	}
	return p, nil
}

func kindWord(k Kind, n int) string {
	w := "practice"
	if k == Meet {
		w = "meet"
	}
	if n != 1 {
		w += "s"
	}
	return w
}

func total(hs []Height) float64 {
	s := 0.0
	for _, h := range hs {
		s += h.ExpectedJumps
	}
	return s
}

// progression lays the bars from open to top: the meet's steps when known
// (the first step at or above open, up to the first step at or above top),
// otherwise 5 cm steps in practice and 3 cm at a meet; where a full step
// would overshoot the top or leave less than 2 cm under it, the last rises
// are shortened so that the progression ends on the top with a rise of at
// least 2 cm. Every rise is at least 2 cm (TR 26.4) once open is at least
// 2 cm under top.
func progression(in Input, open, top float64) []float64 {
	if in.Kind == Meet && len(in.StepsM) > 0 {
		var bars []float64
		for _, s := range in.StepsM {
			if s < open-barTolM {
				continue
			}
			bars = append(bars, s)
			if s >= top-barTolM {
				break
			}
		}
		if len(bars) == 0 {
			bars = []float64{in.StepsM[len(in.StepsM)-1]}
		}
		return bars
	}
	step := 0.05
	if in.Kind == Meet {
		step = 0.03
	}
	bars := []float64{open}
	for b := open; b < top-barTolM; {
		gap := top - b
		var next float64
		switch {
		case gap <= step+barTolM || gap < 2*MinRiseM-barTolM:
			next = top // the last rise lands on the top
		case gap < step+MinRiseM-barTolM:
			next = roundCM(top - MinRiseM) // leave a 2 cm last rise
		default:
			next = roundCM(b + step)
		}
		bars = append(bars, next)
		b = next
	}
	return bars
}

// expect fills the make rates and expected jumps of a progression. The
// athlete reaches bar i only after clearing every bar before it, so
// reach(i) = Π ClearChance(p_j), j < i, and the expected jumps at bar i
// are reach(i) · ExpectedAttempts(p_i).
func expect(bars []float64, jumps []record.Attempt, in Input) []Height {
	hs := make([]Height, len(bars))
	reach := 1.0
	for i, b := range bars {
		p := MakeRateNear(jumps, b)
		hs[i] = Height{BarM: b, MakeRate: p, ReachChance: reach, ExpectedJumps: reach * ExpectedAttempts(p)}
		if in.Kind == Meet {
			hs[i].AttemptsLeft = 3
		}
		reach *= ClearChance(p)
	}
	return hs
}

// MakeRateNear estimates the chance of clearing bar b on one attempt from
// the attempts within 1.5 cm of it, with one clearance and one failure
// added (Laplace's rule of succession): (O+1)/(O+X+2). With no attempt
// near b it uses the nearest bars tried, lowered by 10 percentage points
// per 2 cm above the highest bar tried.
func MakeRateNear(jumps []record.Attempt, b float64) float64 {
	o, x := 0, 0
	for _, a := range jumps {
		if math.Abs(a.BarM-b) <= 0.015+1e-9 {
			if a.Outcome == record.Cleared {
				o++
			} else if a.Outcome == record.Failed {
				x++
			}
		}
	}
	if o+x > 0 {
		return float64(o+1) / float64(o+x+2)
	}
	hi, lo := -1.0, math.Inf(1)
	for _, a := range jumps {
		hi, lo = max(hi, a.BarM), min(lo, a.BarM)
	}
	switch {
	case b > hi:
		return max(0.05, MakeRateNear(jumps, hi)-0.10*(b-hi)/0.02)
	case b < lo:
		return MakeRateNear(jumps, lo)
	}
	// between tried bars with a gap: the lower neighbour's rate.
	best := lo
	for _, a := range jumps {
		if a.BarM < b && a.BarM > best {
			best = a.BarM
		}
	}
	return MakeRateNear(jumps, best)
}

// Ceiling is the highest bar cleared on at least half its tries:
// O / (O + X) ≥ 0.5, passes not counted. It returns 0 when no bar
// qualifies.
func Ceiling(jumps []record.Attempt) (barM float64, made, tried int) {
	type count struct{ o, x int }
	bars := map[int64]*count{}
	for _, a := range jumps {
		k := int64(math.Round(a.BarM * 100))
		c := bars[k]
		if c == nil {
			c = &count{}
			bars[k] = c
		}
		switch a.Outcome {
		case record.Cleared:
			c.o++
		case record.Failed:
			c.x++
		}
	}
	var best int64 = -1
	for k, c := range bars {
		if c.o > 0 && 2*c.o >= c.o+c.x && k > best {
			best = k
		}
	}
	if best < 0 {
		return 0, 0, 0
	}
	c := bars[best]
	return float64(best) / 100, c.o, c.o + c.x
}

func lowestBar(jumps []record.Attempt) float64 {
	lo := math.Inf(1)
	for _, a := range jumps {
		lo = min(lo, a.BarM)
	}
	return lo
}

type session struct {
	day   time.Time
	meet  bool
	first float64 // first bar jumped
	best  float64 // best clearance, 0 none
}

func sessionsOf(jumps []record.Attempt, loc *time.Location) []session {
	var out []session
	for _, a := range jumps {
		y, m, d := a.Time.In(loc).Date()
		day := time.Date(y, m, d, 0, 0, 0, 0, loc)
		n := len(out)
		if n == 0 || !out[n-1].day.Equal(day) || out[n-1].meet != a.Meet {
			out = append(out, session{day: day, meet: a.Meet, first: a.BarM})
			n++
		}
		s := &out[n-1]
		if a.Outcome == record.Cleared && a.BarM > s.best {
			s.best = a.BarM
		}
	}
	return out
}

// usualOpeningGap is the median of (ceiling − first bar) over the last four
// sessions of the kind; without any, 12 cm for practice and 9 cm for a
// meet (common practice: an opening well inside the athlete's range).
func usualOpeningGap(ss []session, ceilingM float64, meet bool) (gapM float64, n int) {
	var gaps []float64
	for i := len(ss) - 1; i >= 0 && len(gaps) < 4; i-- {
		if ss[i].meet == meet {
			gaps = append(gaps, ceilingM-ss[i].first)
		}
	}
	if len(gaps) == 0 {
		if meet {
			return 0.09, 0
		}
		return 0.12, 0
	}
	sort.Float64s(gaps)
	m := len(gaps) / 2
	if len(gaps)%2 == 1 {
		return gaps[m], len(gaps)
	}
	return (gaps[m-1] + gaps[m]) / 2, len(gaps)
}

// trend is the least-squares slope, in metres per week, of the session
// bests against time: Σ(t−t̄)(y−ȳ) / Σ(t−t̄)². Fewer than three sessions
// with a clearance give 0.
func trend(ss []session) float64 {
	var ts, ys []float64
	for _, s := range ss {
		if s.best > 0 {
			ts = append(ts, float64(s.day.Unix())/(7*24*3600))
			ys = append(ys, s.best)
		}
	}
	if len(ts) < 3 {
		return 0
	}
	var mt, my float64
	for i := range ts {
		mt += ts[i]
		my += ys[i]
	}
	mt /= float64(len(ts))
	my /= float64(len(ys))
	var sxy, sxx float64
	for i := range ts {
		sxy += (ts[i] - mt) * (ys[i] - my)
		sxx += (ts[i] - mt) * (ts[i] - mt)
	}
	if sxx == 0 {
		return 0
	}
	return sxy / sxx
}

func roundCM(m float64) float64 { return math.Round(m*100) / 100 }

// Rises returns the rises between consecutive bars of a plan, in metres.
func (p Plan) Rises() []float64 {
	var out []float64
	for i := 1; i < len(p.Heights); i++ {
		out = append(out, p.Heights[i].BarM-p.Heights[i-1].BarM)
	}
	return slices.Clip(out)
}

// ceilingVsPB words the ceiling against the personal best in whole
// centimetres: "ceiling 4 cm under the PB", "ceiling at the PB",
// "ceiling 1 cm over the PB (practice above the PB)".
func ceilingVsPB(ceilingM, pbM float64) string {
	cm := math.Round(100 * (pbM - ceilingM))
	switch {
	case cm > 0:
		return fmt.Sprintf("ceiling %.0f cm under the PB", cm)
	case cm < 0:
		return fmt.Sprintf("ceiling %.0f cm over the PB (practice bars above the PB)", -cm)
	}
	return "ceiling at the PB"
}
