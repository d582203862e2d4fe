package planning

import (
	"math"
	"sort"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Band is a range of bars relative to the personal best.
type Band struct {
	Label       string
	Made, Tried int
}

// BestMark is a meet clearance that raised the season best.
type BestMark struct {
	Time time.Time
	BarM float64
}

// Season sums up a stretch of an athlete's log.
type Season struct {
	SBProgression []BestMark // meet clearances that raised the season best, in order
	Meets         int        // meet days entered
	FirstAttempt  int        // clearances on a first attempt (meets and practice)
	Clearances    int
	Bands         []Band         // make rate by bar relative to the PB
	Knocks        map[string]int // failures by the body part that touched the bar
	Jumps, Short  int            // take-offs (o and x), of them from a short approach
}

// bandOf places a bar relative to the PB, in whole centimetres d = bar − PB:
// under −10, −10 to −6, −5 to −3, −2 to −1, at the PB, above.
func bandOf(barM, pbM float64) int {
	d := int(math.Round((barM - pbM) * 100))
	switch {
	case d < -10:
		return 0
	case d <= -6:
		return 1
	case d <= -3:
		return 2
	case d <= -1:
		return 3
	case d == 0:
		return 4
	}
	return 5
}

// BandLabels name the bands of Season.Bands.
var bandLabels = [...]string{"under PB−10 cm", "PB−10 to −6 cm", "PB−5 to −3 cm", "PB−2 to −1 cm", "at PB", "above PB"}

// Summarize reads attempts (time order) in loc's days.
func Summarize(as []record.Attempt, pbM float64, loc *time.Location) Season {
	s := Season{Knocks: map[string]int{}}
	if pbM > 0 {
		s.Bands = make([]Band, len(bandLabels))
		for i := range s.Bands {
			s.Bands[i].Label = bandLabels[i]
		}
	}
	meetDays := map[time.Time]bool{}
	sb := 0.0
	for _, a := range as {
		if a.Outcome == record.Passed {
			continue
		}
		s.Jumps++
		if a.Short {
			s.Short++
		}
		if a.Meet {
			y, m, d := a.Time.In(loc).Date()
			meetDays[time.Date(y, m, d, 0, 0, 0, 0, loc)] = true
		}
		if a.Outcome == record.Failed && a.Knock != "" {
			s.Knocks[a.Knock]++
		}
		if s.Bands != nil {
			b := &s.Bands[bandOf(a.BarM, pbM)]
			b.Tried++
			if a.Outcome == record.Cleared {
				b.Made++
			}
		}
		if a.Outcome == record.Cleared {
			s.Clearances++
			if a.Number == 1 {
				s.FirstAttempt++
			}
			if a.Meet && a.RuleBreach == "" && a.BarM > sb+barTolM { // a line stored as breaking the rules is no best
				sb = a.BarM
				n := len(s.SBProgression)
				if n > 0 && sameDay(s.SBProgression[n-1].Time, a.Time, loc) {
					s.SBProgression[n-1] = BestMark{a.Time, a.BarM} // one mark per meet: its best
				} else {
					s.SBProgression = append(s.SBProgression, BestMark{a.Time, a.BarM})
				}
			}
		}
	}
	s.Meets = len(meetDays)
	return s
}

// KnockParts lists the knocked body parts, most often first.
func (s Season) KnockParts() []string {
	var ks []string
	for k := range s.Knocks {
		ks = append(ks, k)
	}
	sort.Slice(ks, func(i, j int) bool {
		if s.Knocks[ks[i]] != s.Knocks[ks[j]] {
			return s.Knocks[ks[i]] > s.Knocks[ks[j]]
		}
		return ks[i] < ks[j]
	})
	return ks
}

func sameDay(a, b time.Time, loc *time.Location) bool {
	ay, am, ad := a.In(loc).Date()
	by, bm, bd := b.In(loc).Date()
	return ay == by && am == bm && ad == bd
}
