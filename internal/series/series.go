package series

import (
	"fmt"
	"math"

	"github.com/lathmark-team/lathmark/internal/record"
)

// MaxFailures is the number of consecutive failures that ends a competition
// (TR 26.2).
const MaxFailures = 3

// MinRiseM is the least rise of the bar between heights while more than one
// athlete remains in a high-jump competition (TR 26.4 (a)), in metres.
const MinRiseM = 0.02

// Attempt is one jump of the series.
type Attempt struct {
	BarM    float64
	Outcome record.Outcome
	// Alone: the athlete was the only one left in the competition when this
	// height was set, so the 2 cm minimum rise does not bind.
	Alone bool
	// JumpOff: the attempt belongs to a jump-off for first place.
	JumpOff bool
}

// Rule names one rule of the series.
type Rule int

// The rules a series can break. NoRule means the series is valid.
const (
	NoRule Rule = iota
	// ThreeFailures: the athlete's competition had already ended after
	// three consecutive failures (passes do not break the run).
	ThreeFailures
	// BarDown: the height is below the previous height jumped.
	BarDown
	// HeightDone: the height was already cleared or passed.
	HeightDone
	// SmallRise: the bar rose by less than 2 cm while other athletes remained.
	SmallRise
	// AfterJumpOff: an ordinary attempt after a jump-off had begun.
	AfterJumpOff
	// JumpOffPass: a pass in a jump-off.
	JumpOffPass
	// JumpOffTwice: a second attempt at one jump-off height.
	JumpOffTwice
	// JumpOffDirection: in a jump-off the bar goes up after a clearance and
	// down after a failure; it went the other way (or stayed).
	JumpOffDirection
	// BadOutcome: the attempt is not o, x or -.
	BadOutcome
)

// String names the rule in a few words.
func (r Rule) String() string {
	switch r {
	case NoRule:
		return "valid"
	case ThreeFailures:
		return "out after three consecutive failures"
	case BarDown:
		return "the bar never goes down"
	case HeightDone:
		return "nothing more at a height cleared or passed"
	case SmallRise:
		return "the bar rises at least 2 cm"
	case AfterJumpOff:
		return "only jump-off attempts after a jump-off begins"
	case JumpOffPass:
		return "no passing in a jump-off"
	case JumpOffTwice:
		return "one attempt at each jump-off height"
	case JumpOffDirection:
		return "in a jump-off the bar goes up after a clearance, down after a failure"
	case BadOutcome:
		return "an attempt is o, x or -"
	}
	return fmt.Sprintf("rule(%d)", int(r))
}

// Breach is the first attempt that breaks a rule.
type Breach struct {
	Rule  Rule
	Index int     // index of the attempt in the series given
	BarM  float64 // its bar
	// PrevBarM is the previous height jumped (BarDown, SmallRise,
	// JumpOffDirection), 0 if none.
	PrevBarM float64
	// FailureBarsM are the bars of the failures that ended the competition
	// (ThreeFailures), oldest first.
	FailureBarsM []float64
	// LeftAtBar is how many attempts remained at BarM when the athlete
	// came to it (ThreeFailures): fewer than three when failures carried
	// over a pass or from the same height.
	LeftAtBar int
}

// Verdict is the answer for a series.
type Verdict struct {
	Breach *Breach // nil when the series keeps every rule
	// Remaining is how many attempts the athlete has left at the next
	// height she jumps (the current one if she has not finished it): 3
	// minus the consecutive failures, 1 in a jump-off, 0 when out. It
	// describes the valid attempts before any breach.
	Remaining int
	// Out reports that the valid attempts end in three consecutive failures.
	Out bool
	// BestM is the highest bar cleared among the valid attempts (0 none).
	BestM float64
}

// Valid reports whether the series keeps every rule.
func (v Verdict) Valid() bool { return v.Breach == nil }

func mm(m float64) int64 { return int64(math.Round(m * 1000)) }

// State follows a series attempt by attempt. Its zero value is the state
// before the first attempt. State is a value: copying it forks the series.
type State struct {
	n         int     // attempts accepted
	started   bool    // a height was jumped
	barMM     int64   // current height, mm
	done      bool    // the current height was cleared or passed
	triesHere int     // attempts at the current height
	fails     []int64 // bars (mm) of the current run of consecutive failures
	jumpOff   bool    // a jump-off has begun
	lastJOMM  int64   // last jump-off bar, mm
	lastJO    record.Outcome
	bestMM    int64
}

// Remaining is the attempts left at the next height (see Verdict.Remaining).
func (s State) Remaining() int {
	if s.jumpOff {
		return 1
	}
	if len(s.fails) >= MaxFailures {
		return 0
	}
	return MaxFailures - len(s.fails)
}

// Out reports three consecutive failures outside a jump-off.
func (s State) Out() bool { return !s.jumpOff && len(s.fails) >= MaxFailures }

// BestM is the highest bar cleared so far, metres (0 none).
func (s State) BestM() float64 { return float64(s.bestMM) / 1000 }

// Check says which rule the attempt a would break after the series so far,
// or NoRule. It does not change s.
func (s State) Check(a Attempt) (Rule, *Breach) {
	b := &Breach{BarM: a.BarM, Index: s.n}
	bar := mm(a.BarM)
	if !a.Outcome.Valid() {
		b.Rule = BadOutcome
		return b.Rule, b
	}
	if a.JumpOff {
		switch {
		case a.Outcome == record.Passed:
			b.Rule = JumpOffPass
		case s.jumpOff && bar == s.lastJOMM:
			b.Rule = JumpOffTwice
		case s.jumpOff && (s.lastJO == record.Cleared && bar <= s.lastJOMM || s.lastJO == record.Failed && bar >= s.lastJOMM):
			b.Rule, b.PrevBarM = JumpOffDirection, float64(s.lastJOMM)/1000
		default:
			return NoRule, nil
		}
		return b.Rule, b
	}
	switch {
	case s.jumpOff:
		b.Rule = AfterJumpOff
	case len(s.fails) >= MaxFailures:
		b.Rule = ThreeFailures
		b.FailureBarsM = make([]float64, len(s.fails))
		for i, f := range s.fails {
			b.FailureBarsM[i] = float64(f) / 1000
		}
		// attempts that remained when she came to this height
		here := 0
		if s.started && bar == s.barMM && !s.done {
			here = s.triesHere
		}
		b.LeftAtBar = MaxFailures - (len(s.fails) - here)
	case s.started && bar < s.barMM:
		b.Rule, b.PrevBarM = BarDown, float64(s.barMM)/1000
	case s.started && bar == s.barMM && s.done:
		b.Rule = HeightDone
	case s.started && bar > s.barMM && bar-s.barMM < mm(MinRiseM) && !a.Alone:
		b.Rule, b.PrevBarM = SmallRise, float64(s.barMM)/1000
	default:
		return NoRule, nil
	}
	return b.Rule, b
}

// Add applies the attempt when it keeps the rules and returns nil, or
// returns the breach and leaves s unchanged.
func (s *State) Add(a Attempt) *Breach {
	if r, b := s.Check(a); r != NoRule {
		return b
	}
	s.n++
	bar := mm(a.BarM)
	if a.JumpOff {
		s.jumpOff, s.lastJOMM, s.lastJO = true, bar, a.Outcome
	} else {
		if !s.started || bar != s.barMM {
			s.started, s.barMM, s.done, s.triesHere = true, bar, false, 0
		}
		s.triesHere++
		switch a.Outcome {
		case record.Cleared:
			s.done, s.fails = true, s.fails[:0:0]
		case record.Passed:
			s.done = true
		case record.Failed:
			s.fails = append(s.fails[:len(s.fails):len(s.fails)], bar)
		}
	}
	if a.Outcome == record.Cleared && bar > s.bestMM {
		s.bestMM = bar
	}
	return nil
}

// Validate checks a whole series and stops at the first breach.
func Validate(atts []Attempt) Verdict {
	var s State
	return s.extend(atts, 0)
}

// Extend checks new attempts after a prior series: the verdict for
// prior followed by next. A breach inside prior is reported with its index
// in prior and Breach.Index < 0 is never used; callers that trust prior
// (it was checked when stored) can read a breach as one in next at
// Index − len(prior).
func Extend(prior, next []Attempt) Verdict {
	var s State
	v := s.extend(prior, 0)
	if v.Breach != nil {
		return v
	}
	return s.extend(next, len(prior))
}

func (s *State) extend(atts []Attempt, offset int) Verdict {
	for i, a := range atts {
		if b := s.Add(a); b != nil {
			b.Index = offset + i
			return Verdict{Breach: b, Remaining: s.Remaining(), Out: s.Out(), BestM: s.BestM()}
		}
	}
	return Verdict{Remaining: s.Remaining(), Out: s.Out(), BestM: s.BestM()}
}
