package series

import "github.com/lathmark-team/lathmark/internal/record"

// Summary is what the placing rules of a competition read from one
// athlete's series: the best height, the counts the tie rules compare, and
// whether and with how many attempts the athlete is still in. It describes
// the valid attempts of the series, those before any breach (Verdict).
//
// Counts follow World Athletics TR 26.8 (rule numbers from memory): a pass
// is not a jump, so only o and x are counted; jump-off attempts are kept
// apart (TR 26.9) and counted in none of the figures.
type Summary struct {
	// BestM is the highest bar cleared outside a jump-off, metres (0 none).
	BestM float64
	// AttemptsAtBest is the number of jumps (o and x) at BestM: the figure
	// of TR 26.8.1, "fewest jumps at the height at which the tie occurs".
	AttemptsAtBest int
	// FailuresToBest is the number of failures at every height up to and
	// including BestM: the figure of TR 26.8.2.
	FailuresToBest int
	// Failures and Jumps count all failures and all jumps (o and x).
	Failures, Jumps int
	// LastBarM is the last height jumped or passed (0 none); DoneAtLast
	// says it was cleared or passed, so nothing more is jumped there.
	LastBarM   float64
	DoneAtLast bool
	// Remaining and Out are State.Remaining and State.Out after the valid
	// attempts.
	Remaining int
	Out       bool
	// JumpOff is the series' jump-off attempts in order.
	JumpOff []Attempt
	// Verdict is Validate's answer for the whole series.
	Verdict Verdict

	jumpsAtLast int // o and x at LastBarM
}

// Summarize validates a series and reads its summary.
func Summarize(atts []Attempt) Summary {
	var s Summary
	var st State
	for i, a := range atts {
		if b := st.Add(a); b != nil {
			b.Index = i
			s.Verdict = Verdict{Breach: b}
			break
		}
		s.count(a)
	}
	s.Remaining, s.Out = st.Remaining(), st.Out()
	s.Verdict.Remaining, s.Verdict.Out, s.Verdict.BestM = s.Remaining, s.Out, st.BestM()
	return s
}

// count adds one attempt already accepted by State.Add.
func (s *Summary) count(a Attempt) {
	if a.JumpOff {
		s.JumpOff = append(s.JumpOff, a)
		return
	}
	if mm(a.BarM) != mm(s.LastBarM) {
		s.LastBarM, s.DoneAtLast, s.jumpsAtLast = a.BarM, false, 0
	}
	switch a.Outcome {
	case record.Passed:
		s.DoneAtLast = true
		return
	case record.Failed:
		s.Failures++
	case record.Cleared:
		s.DoneAtLast = true
	}
	s.Jumps++
	s.jumpsAtLast++
	if a.Outcome == record.Cleared {
		// The bar never goes down, so a clearance is the new best.
		s.BestM, s.AttemptsAtBest, s.FailuresToBest = a.BarM, s.jumpsAtLast, s.Failures
	}
}
