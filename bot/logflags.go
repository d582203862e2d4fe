package bot

import (
	"fmt"
	"math"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// Range flags of a logged attempt: each measured value is compared with the
// one published-range table (mechanics.CheckRange, by the athlete's sex,
// elite and developing rows) and worded with the calculations' own helpers
// (rangeNoteOf, checkLine). A flag never blocks a line: values inside the
// hard limits of jumpMeasureFor are stored, and the reply says what to check.

// mechSex is the range table's sex for a profile; unset spans both sexes.
func mechSex(s record.Sex) mechanics.Sex {
	switch s {
	case record.SexMale:
		return mechanics.Male
	case record.SexFemale:
		return mechanics.Female
	}
	return mechanics.SexUnknown
}

// attemptFlags checks an attempt's vz, approach speed and take-off distance
// against their published ranges, and a measured peak through the vz it
// implies from the stature-based take-off height (h0 = 0.70 × stature):
//
//	vz = √(2·g·(peak − h0))    m/s, g the venue's or standard gravity
//
// The peak is checked only when the profile has a height and no vz was
// measured (a measured vz is checked itself, and a peak that contradicts it
// already needs confirm: plausibility).
func attemptFlags(a record.Attempt, ath record.Athlete, team record.Team) []rangeNote {
	sex := mechSex(ath.Sex)
	var out []rangeNote
	check := func(q mechanics.Quantity, v float64) {
		if v == 0 {
			return
		}
		if f, bad := mechanics.CheckRange(q, v, sex); bad {
			out = append(out, rangeNoteOf(f))
		}
	}
	check(mechanics.QVz, a.VzMS)
	check(mechanics.QApproachSpeed, a.ApproachMS)
	check(mechanics.QTakeoffDist, a.TakeoffDistM)
	if n, ok := peakFlag(a, ath, team); ok {
		out = append(out, n)
	}
	return out
}

// peakFlag checks a measured peak by the vz it needs from h0 = 0.70 ×
// stature; a peak at or below h0 is flagged as below the take-off height.
func peakFlag(a record.Attempt, ath record.Athlete, team record.Team) (rangeNote, bool) {
	if a.PeakM == 0 || a.VzMS != 0 || ath.StatureM == 0 {
		return rangeNote{}, false
	}
	imp := imperial(team)
	h0 := mechanics.TakeoffHeightFraction * ath.StatureM
	if a.PeakM <= h0 {
		s := fmt.Sprintf("peak %s below h0 %s", units.Length(a.PeakM, imp), units.Length(h0, imp))
		return rangeNote{
			full:  fmt.Sprintf("peak %s is at or below the take-off c.m. height %s (0.70 × stature): check the number", units.Length(a.PeakM, imp), units.Length(h0, imp)),
			short: s,
		}, true
	}
	g := logGravity(team)
	if g == 0 {
		g = mechanics.StandardGravity
	}
	vz := math.Sqrt(2 * g * (a.PeakM - h0))
	f, bad := mechanics.CheckRange(mechanics.QVz, vz, mechSex(ath.Sex))
	if !bad {
		return rangeNote{}, false
	}
	n := rangeNoteOf(f)
	n.full = fmt.Sprintf("peak %s needs vz %.2f m/s from h0 %s (0.70 × stature); %s", units.Length(a.PeakM, imp), vz, units.Length(h0, imp), f.Line)
	n.short = fmt.Sprintf("peak %s needs %s", units.Length(a.PeakM, imp), n.short)
	return n, true
}

// logCheckLine is the log reply's one flag line: "Check: vz 5.50 m/s far
// above 4.3–4.7 m/s; …" (checkLine), each flag led by its jump ("1.90 #1")
// when more than one jump of the line has flags; "" without flags.
func logCheckLine(jumps []loggedJump, imp bool) string {
	var flagged int
	for _, j := range jumps {
		if len(j.flags) > 0 {
			flagged++
		}
	}
	var all []rangeNote
	for _, j := range jumps {
		for _, f := range j.flags {
			if flagged > 1 {
				f.short = fmt.Sprintf("%s #%d %s", units.Bar(j.rec.BarM, imp), j.rec.Number, f.short)
			}
			all = append(all, f)
		}
	}
	return checkLine(all)
}
