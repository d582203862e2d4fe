package meetsheet

import (
	"github.com/lathmark-team/lathmark/internal/record"
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
	// JumpOff: the competition proper is over and a jump-off for first is
	// on (TR 26.9): CurrentM is its height (0 before its first height is
	// set), ToJump those still to jump there, one attempt each. After a
	// whole round JumpOffLastM is that round's height and JumpOffUp says
	// everyone cleared it (the bar goes up) rather than failed (down).
	JumpOff      bool
	JumpOffLastM float64
	JumpOffUp    bool
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
	NextAlone     = "chosen by the one athlete still in (TR 26.4 (a))"
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
	retired := map[string]bool{}
	for _, e := range s.Entries {
		if e.Retire {
			retired[e.Name] = true
		}
	}
	// gone: out of the competition proper (out, retired, or on to a
	// jump-off).
	gone := func(name string) bool {
		sm := sums[name]
		return sm.Out || len(sm.JumpOff) > 0 || retired[name]
	}
	var st State
	in := 0
	roundDone := top > 0
	for _, c := range s.Competitors {
		sm := sums[c.Name]
		if gone(c.Name) {
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
		cs[i] = standings.Competitor{Name: c.Name, Series: sums[c.Name], Retired: retired[c.Name]}
	}
	st.Standings = standings.Place(cs, st.CurrentM, s.JumpOff)
	if st.Over && s.JumpOff {
		var tied []string // still to jump it
		retiredTied := false
		for _, x := range st.Standings {
			if x.JumpOff && !x.Retired {
				tied = append(tied, x.Name)
			}
			retiredTied = retiredTied || x.JumpOff && x.Retired
		}
		if retiredTied {
			// A competitor tied for first retired: the sheet holds no
			// jump-off (how such a tie is settled is the officials' call)
			// and the tie stands as an equal place (TR 26.8.3), as when a
			// sheet is filed without a jump-off result.
			st.Standings = standings.Place(cs, st.CurrentM, false)
		} else if len(tied) > 1 {
			st.Over = false
			jumpOffNow(&st, tied, sums)
			return st
		}
	}
	for _, c := range s.Competitors {
		sm := sums[c.Name]
		if gone(c.Name) {
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

// JumpOffRiseM is how far the bar moves between jump-off heights in the
// high jump: up after more than one clears, down after all fail (TR 26.9;
// from memory).
const JumpOffRiseM = 0.02

// jumpOffNow reads the jump-off among the competitors still tied for
// first: one attempt each at every height, taken in turn.
func jumpOffNow(st *State, tied []string, sums map[string]series.Summary) {
	st.JumpOff = true
	minK, maxK, at := -1, 0, ""
	for _, n := range tied {
		k := len(sums[n].JumpOff)
		if minK < 0 || k < minK {
			minK = k
		}
		if k > maxK {
			maxK, at = k, n
		}
	}
	if minK < maxK { // a round under way
		st.CurrentM = sums[at].JumpOff[maxK-1].BarM
		for _, n := range tied {
			if len(sums[n].JumpOff) < maxK {
				st.ToJump = append(st.ToJump, StillIn{n, 1})
			}
		}
		return
	}
	for _, n := range tied {
		st.ToJump = append(st.ToJump, StillIn{n, 1})
	}
	if maxK == 0 {
		return // its first height is the officials' call
	}
	last := sums[at].JumpOff[maxK-1]
	st.JumpOffLastM, st.JumpOffUp = last.BarM, last.Outcome == record.Cleared
	if st.JumpOffUp {
		st.CurrentM = last.BarM + JumpOffRiseM
	} else {
		st.CurrentM = last.BarM - JumpOffRiseM
	}
}

// Final reads a filed sheet: the places as the competition left them,
// with nobody called any more. A jump-off for first that the sheet does
// not settle (or holds none, a competitor tied for first having retired)
// is an equal first, as closing the sheet says.
func (s *Sheet) Final() State {
	st := s.Now()
	jumpOff := false
	for _, x := range st.Standings {
		jumpOff = jumpOff || x.JumpOff
	}
	cs := make([]standings.Competitor, 0, len(s.Competitors))
	for _, c := range s.Competitors {
		cs = append(cs, standings.Competitor{Name: c.Name, Series: series.Summarize(s.Series(c.Name)), Retired: s.Retired(c.Name)})
	}
	st.Standings = standings.Place(cs, 0, s.JumpOff && !jumpOff && !s.retiredTiedForFirst())
	st.ToJump, st.Waiting, st.CurrentM, st.NextM, st.NextWhy = nil, 0, 0, 0, ""
	st.JumpOff, st.Over = false, st.Started
	return st
}
