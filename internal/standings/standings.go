// Package standings places the competitors of a vertical jump by World
// Athletics Technical Rule 26: the best height cleared, then the tie rules
// (fewest attempts at the height where the tie occurs; then fewest failures
// up to and including the last height cleared; then an equal place, or a
// jump-off for first place where the meet uses one). It also says who is
// still in and with how many attempts at the current height. It is pure:
// marks in, standings out.
//
// The series rules themselves (three consecutive failures, passes) are
// read here through the small Series view below; the logging work's series
// engine can supply the same marks.
package standings

import (
	"fmt"
	"math"
	"sort"
)

// Mark is one competitor's attempts at one height, in the trade's notation:
// "o", "xo", "xxo", "xxx", "-", "x-", "xx-".
type Mark struct {
	BarM     float64
	Attempts string
}

// Competitor is one line of the sheet.
type Competitor struct {
	Name  string
	Marks []Mark // ascending heights
}

// Standing is one competitor's place and why.
type Standing struct {
	Name           string
	Place          int // 0 = no height cleared
	BestM          float64
	AttemptsAtBest int
	FailuresToBest int    // failures up to and including the best height
	Rule           string // the rule that decided the place against the next competitor(s), "" if the height did
	Shared         bool   // an equal place
	JumpOff        bool   // tied for first and the meet uses a jump-off
	Out            bool   // three consecutive failures
	AttemptsLeft   int    // at the current height, if still in
}

// Rule names, as shown beside each decision.
const (
	RuleHeight   = "best height cleared (TR 26)"
	RuleAttempts = "fewest attempts at the height where the tie occurs (TR 26.8 a)"
	RuleFailures = "fewest failures up to and including the last height cleared (TR 26.8 b)"
	RuleEqual    = "still tied: equal place (TR 26.8)"
	RuleJumpOff  = "still tied for first: jump-off (TR 26.9)"
)

func sameBar(a, b float64) bool { return math.Abs(a-b) < 0.005 }

// summary reads one competitor's marks.
func summary(c Competitor, currentM float64) Standing {
	s := Standing{Name: c.Name}
	fails, consecutive := 0, 0
	for _, m := range c.Marks {
		for _, r := range m.Attempts {
			switch r {
			case 'o':
				s.BestM, consecutive = m.BarM, 0
				s.AttemptsAtBest = len(trimPasses(m.Attempts))
				s.FailuresToBest = fails
			case 'x':
				fails++
				consecutive++
			}
		}
	}
	s.Out = consecutive >= 3
	if !s.Out && currentM > 0 {
		s.AttemptsLeft = 3 - consecutive // failures carry over a pass (TR 26)
		for _, m := range c.Marks {
			if sameBar(m.BarM, currentM) && (containsRune(m.Attempts, 'o') || containsRune(m.Attempts, '-')) {
				s.AttemptsLeft = 0 // done at this height
			}
		}
	}
	return s
}

func trimPasses(a string) string {
	out := []rune{}
	for _, r := range a {
		if r != '-' {
			out = append(out, r)
		}
	}
	return string(out)
}

func containsRune(s string, r rune) bool {
	for _, c := range s {
		if c == r {
			return true
		}
	}
	return false
}

// better orders two competitors by TR 26 and says which rule decided:
// a negative result puts a first.
func better(a, b Standing) (int, string) {
	switch {
	case !sameBar(a.BestM, b.BestM):
		if a.BestM > b.BestM {
			return -1, RuleHeight
		}
		return 1, RuleHeight
	case a.AttemptsAtBest != b.AttemptsAtBest:
		return a.AttemptsAtBest - b.AttemptsAtBest, RuleAttempts
	case a.FailuresToBest != b.FailuresToBest:
		return a.FailuresToBest - b.FailuresToBest, RuleFailures
	}
	return 0, RuleEqual
}

// Place ranks the competitors. currentM is the bar now up (0 when the
// competition is over); jumpOff says the meet decides a tie for first by a
// jump-off.
func Place(cs []Competitor, currentM float64, jumpOff bool) []Standing {
	ss := make([]Standing, len(cs))
	for i, c := range cs {
		ss[i] = summary(c, currentM)
	}
	sort.SliceStable(ss, func(i, j int) bool {
		if (ss[i].BestM > 0) != (ss[j].BestM > 0) {
			return ss[i].BestM > 0
		}
		d, _ := better(ss[i], ss[j])
		return d < 0
	})
	for i := range ss {
		if ss[i].BestM == 0 {
			continue
		}
		if i > 0 && ss[i-1].BestM > 0 {
			if d, _ := better(ss[i-1], ss[i]); d == 0 {
				ss[i].Place, ss[i].Shared, ss[i-1].Shared = ss[i-1].Place, true, true
				ss[i].Rule, ss[i-1].Rule = RuleEqual, RuleEqual
				continue
			}
		}
		ss[i].Place = i + 1
		if i+1 < len(ss) && ss[i+1].BestM > 0 {
			if _, rule := better(ss[i], ss[i+1]); rule != RuleHeight {
				ss[i].Rule = rule
			}
		}
	}
	if jumpOff {
		for i := range ss {
			if ss[i].Place == 1 && ss[i].Shared {
				ss[i].JumpOff, ss[i].Rule = true, RuleJumpOff
			}
		}
	}
	return ss
}

// String is one line of the standings.
func (s Standing) String() string {
	return fmt.Sprintf("%d %s %.2f (%d at best, %d failures) %s", s.Place, s.Name, s.BestM, s.AttemptsAtBest, s.FailuresToBest, s.Rule)
}
