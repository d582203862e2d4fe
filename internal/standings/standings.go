// Package standings places the competitors of a vertical jump by World
// Athletics Technical Rule 26 (rule numbers from memory): the best height
// cleared, then the tie rules (TR 26.8.1 fewest jumps at the height where
// the tie occurs; TR 26.8.2 fewest failures up to and including the height
// last cleared; TR 26.8.3 an equal place, or for first place a jump-off,
// TR 26.9, where the meet uses one). It also says who is still in and with
// how many attempts at the current height.
//
// The second rule counts failures only up to and including the height last
// cleared, as the rule text and issue 18 say; the one-line summary in the
// shared reference notes ("fewest failures in the whole competition") is
// looser, and TestFailuresAboveBestDoNotCount pins the reading used here.
//
// It reads each competitor through the series engine (internal/series):
// the rules of one athlete's series and the figures the tie rules compare
// come from series.Summarize, so there is one rule engine. The package is
// pure: series in, standings out.
package standings

import (
	"fmt"
	"sort"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
)

// Competitor is one line of the sheet: a name and the summary of the
// competitor's series.
type Competitor struct {
	Name   string
	Series series.Summary
	// Retired: the competitor withdrew (their place stands on the heights
	// cleared; they are out from then on).
	Retired bool
}

// Of summarizes a series for the standings.
func Of(name string, atts []series.Attempt) Competitor {
	return Competitor{Name: name, Series: series.Summarize(atts)}
}

// Standing is one competitor's place and why.
type Standing struct {
	Name           string
	Place          int // 0 = no height cleared
	BestM          float64
	AttemptsAtBest int
	FailuresToBest int // failures up to and including the best height
	// Rule is the rule that placed this competitor ahead of the next one
	// when both cleared the same best height; "" when the height decided
	// or nobody follows. RuleEqual (or RuleJumpOff) when shared.
	Rule string
	// Behind names the next competitor when a tie rule, not the height,
	// put this one (and any equal to it) ahead, and NextRule is that rule;
	// for a competitor not sharing a place NextRule is Rule.
	Behind, NextRule string
	Shared           bool // an equal place
	// JumpOff: tied for first, the meet uses a jump-off and it has not
	// decided yet.
	JumpOff bool
	Out     bool // three consecutive failures, or retired
	Retired bool // withdrew from the competition
	// AttemptsLeft at the current height, 0 when out or done there.
	AttemptsLeft int
}

// Rule names, as shown beside each decision.
const (
	RuleAttempts = "fewest jumps at the height of the tie (TR 26.8.1)"
	RuleFailures = "fewest failures up to and including the last height cleared (TR 26.8.2)"
	RuleEqual    = "still tied: equal place (TR 26.8.3)"
	RuleJumpOff  = "still tied for first: jump-off (TR 26.9)"
	RuleWonOff   = "the jump-off for first (TR 26.9)"
)

func mm(m float64) int64 {
	if m < 0 {
		return -int64(-m*1000 + 0.5)
	}
	return int64(m*1000 + 0.5)
}

// standing reads one competitor at the current height (0 when none).
func standing(c Competitor, currentM float64) Standing {
	s := c.Series
	st := Standing{Name: c.Name, BestM: s.BestM, AttemptsAtBest: s.AttemptsAtBest, FailuresToBest: s.FailuresToBest,
		Out: s.Out || c.Retired, Retired: c.Retired}
	if !st.Out && currentM > 0 {
		st.AttemptsLeft = s.Remaining
		if mm(s.LastBarM) > mm(currentM) || mm(s.LastBarM) == mm(currentM) && s.DoneAtLast {
			st.AttemptsLeft = 0 // done at this height
		}
	}
	return st
}

// compare orders two competitors by TR 26.8 and says which rule decided:
// a negative result puts a first. The rule is "" when the height did.
func compare(a, b Standing) (int, string) {
	switch {
	case mm(a.BestM) != mm(b.BestM):
		if a.BestM > b.BestM {
			return -1, ""
		}
		return 1, ""
	case a.AttemptsAtBest != b.AttemptsAtBest: // TR 26.8.1
		return a.AttemptsAtBest - b.AttemptsAtBest, RuleAttempts
	case a.FailuresToBest != b.FailuresToBest: // TR 26.8.2
		return a.FailuresToBest - b.FailuresToBest, RuleFailures
	}
	return 0, RuleEqual // TR 26.8.3
}

// Place ranks the competitors. currentM is the bar now up (0 when the
// competition is over); jumpOff says the meet decides a tie for first by a
// jump-off (TR 26.9), whose attempts are read from each series.
func Place(cs []Competitor, currentM float64, jumpOff bool) []Standing {
	ss := make([]Standing, len(cs))
	offs := map[string][]series.Attempt{}
	for i, c := range cs {
		ss[i] = standing(c, currentM)
		offs[c.Name] = c.Series.JumpOff
	}
	sort.SliceStable(ss, func(i, j int) bool {
		if (ss[i].BestM > 0) != (ss[j].BestM > 0) {
			return ss[i].BestM > 0
		}
		d, _ := compare(ss[i], ss[j])
		return d < 0
	})
	for i := range ss {
		if ss[i].BestM == 0 {
			continue
		}
		if i+1 < len(ss) && ss[i+1].BestM > 0 {
			if _, rule := compare(ss[i], ss[i+1]); rule != "" && rule != RuleEqual {
				ss[i].NextRule, ss[i].Behind = rule, ss[i+1].Name
			}
		}
		if i > 0 {
			if d, _ := compare(ss[i-1], ss[i]); d == 0 {
				ss[i].Place, ss[i].Shared, ss[i-1].Shared = ss[i-1].Place, true, true
				ss[i].Rule, ss[i-1].Rule = RuleEqual, RuleEqual
				continue
			}
		}
		ss[i].Place = i + 1
		ss[i].Rule = ss[i].NextRule
	}
	if jumpOff {
		n := 0
		for n < len(ss) && ss[n].Place == 1 {
			n++
		}
		if n > 1 {
			behind, rule := ss[n-1].Behind, ss[n-1].NextRule
			settleJumpOff(ss[:n], offs)
			if ss[n-1].Behind == "" {
				ss[n-1].Behind, ss[n-1].NextRule = behind, rule // the group against the next
			}
		}
	}
	return ss
}

// settleJumpOff places the competitors tied for first by their jump-off
// attempts (TR 26.9): each jumps once at each jump-off height; at a height
// where some clear and some fail, those who fail are out of the jump-off
// and placed behind the others, equal among themselves. The tie stands
// (JumpOff set) until one competitor is left.
func settleJumpOff(tied []Standing, offs map[string][]series.Attempt) {
	alive := make([]int, len(tied))
	for i := range tied {
		alive[i] = i
	}
	outRound := make([]int, len(tied)) // 0: still in the jump-off
	for k := 0; len(alive) > 1; k++ {
		var cleared, failed []int
		for _, i := range alive {
			o := offs[tied[i].Name]
			if k >= len(o) {
				cleared, failed = nil, nil
				break
			}
			if o[k].Outcome == record.Cleared {
				cleared = append(cleared, i)
			} else {
				failed = append(failed, i)
			}
		}
		if cleared == nil && failed == nil {
			break // the round is not complete
		}
		if len(cleared) > 0 && len(failed) > 0 {
			for _, i := range failed {
				outRound[i] = k + 1
			}
			alive = cleared
		}
	}
	// Order: still in (outRound 0) first, then later rounds before earlier.
	key := func(i int) int {
		if outRound[i] == 0 {
			return 1 << 30
		}
		return outRound[i]
	}
	idx := make([]int, len(tied))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return key(idx[a]) > key(idx[b]) })
	out := make([]Standing, len(tied))
	for p, i := range idx {
		out[p] = tied[i]
		out[p].Behind, out[p].NextRule, out[p].Shared = "", "", false
		if p > 0 && key(idx[p-1]) == key(i) {
			out[p].Place, out[p].Shared, out[p-1].Shared = out[p-1].Place, true, true
		} else {
			out[p].Place = p + 1
		}
	}
	for p := range out {
		switch {
		case len(alive) > 1 && outRound[idx[p]] == 0:
			out[p].JumpOff, out[p].Rule = true, RuleJumpOff
		case out[p].Shared:
			out[p].Rule = RuleEqual
		case p+1 < len(out):
			out[p].Rule, out[p].NextRule, out[p].Behind = RuleWonOff, RuleWonOff, out[p+1].Name
		default:
			out[p].Rule = ""
		}
	}
	copy(tied, out)
}

// String is one line of the standings.
func (s Standing) String() string {
	return fmt.Sprintf("%d %s %.2f (%d at best, %d failures) %s", s.Place, s.Name, s.BestM, s.AttemptsAtBest, s.FailuresToBest, s.Rule)
}
