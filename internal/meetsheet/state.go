package meetsheet

import (
	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/internal/standings"
)

// State is what the sheet says now.
type State struct {
	Standings []standings.Standing
	// CurrentM is the bar now up: the highest height jumped so far, or the
	// next one once every competitor still in is done there; before the
	// first jump the first announced step (0 if none).
	CurrentM float64
	// NextM is the height after CurrentM (0 when not known); NextWhy says
	// where it comes from.
	NextM   float64
	NextWhy string
	// ToJump are the competitors still in with attempts left at CurrentM,
	// in sheet order; Waiting counts those still in and done at CurrentM.
	ToJump  []StillIn
	Waiting int
	// Over: nobody is still in (the jump-off, if due, may follow).
	Over bool
	// Started: a height was jumped. CurrentM is 0 after the start when
	// the bar to come is not known yet (NextWhy says who chooses it).
	Started bool
}

// StillIn is one competitor with attempts left at the current height.
type StillIn struct {
	Name string
	Left int
}

// Reasons for NextWhy.
const (
	NextAnnounced = "announced"
	NextSameRise  = "the last rise again (the rise never grows, TR 26.4)"
	NextAlone     = "her or his choice, alone in the competition (TR 26.4 (a))"
)

// Now reads the sheet.
func (s *Sheet) Now() State {
	sums := make(map[string]series.Summary, len(s.Competitors))
	var top float64
	for _, c := range s.Competitors {
		sm := series.Summarize(s.Series(c.Name))
		sums[c.Name] = sm
		if sm.LastBarM > top {
			top = sm.LastBarM
		}
	}
	var st State
	in := 0
	roundDone := top > 0
	for _, c := range s.Competitors {
		sm := sums[c.Name]
		if sm.Out {
			continue
		}
		in++
		if !(mm(sm.LastBarM) == mm(top) && sm.DoneAtLast) {
			roundDone = false
		}
	}
	st.Over = in == 0 && len(s.Competitors) > 0 && top > 0
	st.Started = top > 0
	st.CurrentM = top
	switch {
	case top == 0 && len(s.StepsM) > 0:
		st.CurrentM = s.StepsM[0]
	case roundDone:
		st.CurrentM, st.NextWhy = s.next(top, in)
	}
	if st.Over {
		st.CurrentM = 0
	} else if st.CurrentM > 0 {
		st.NextM, st.NextWhy = s.next(st.CurrentM, in)
	}
	cs := make([]standings.Competitor, len(s.Competitors))
	for i, c := range s.Competitors {
		cs[i] = standings.Competitor{Name: c.Name, Series: sums[c.Name]}
	}
	st.Standings = standings.Place(cs, st.CurrentM, s.JumpOff)
	for _, c := range s.Competitors {
		sm := sums[c.Name]
		if sm.Out {
			continue
		}
		// Done at the bar up: it was cleared or passed there (or above).
		done := st.CurrentM > 0 && (mm(sm.LastBarM) > mm(st.CurrentM) || mm(sm.LastBarM) == mm(st.CurrentM) && sm.DoneAtLast)
		if st.CurrentM == 0 && roundDone {
			done = false // the next height is still to be chosen
		}
		if done {
			st.Waiting++
			continue
		}
		st.ToJump = append(st.ToJump, StillIn{c.Name, sm.Remaining})
	}
	return st
}

// next is the height after h with in competitors still in.
func (s *Sheet) next(h float64, in int) (float64, string) {
	if in == 1 && len(s.Competitors) > 1 {
		return 0, NextAlone
	}
	for _, b := range s.StepsM {
		if mm(b) > mm(h) {
			return b, NextAnnounced
		}
	}
	if n := len(s.StepsM); n >= 2 {
		return h + s.StepsM[n-1] - s.StepsM[n-2], NextSameRise
	}
	// No steps announced: the rise between the two highest heights used.
	var hi, lo int64
	for _, e := range s.Entries {
		for _, j := range e.Jumps {
			if j.JumpOff {
				continue
			}
			b := mm(j.BarM)
			switch {
			case b > hi:
				hi, lo = b, hi
			case b < hi && b > lo:
				lo = b
			}
		}
	}
	if lo > 0 && hi > lo && mm(h) >= hi {
		return h + float64(hi-lo)/1000, NextSameRise
	}
	return 0, ""
}
