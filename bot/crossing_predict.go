package bot

import (
	"fmt"
	"math"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
)

// CrossingPrediction is the crossing model's forecast for one logged
// attempt: the part predicted lowest over the bar and its clearance.
type CrossingPrediction struct {
	Part       mechanics.BodyPart
	ClearanceM float64 // negative: the part is predicted to touch
	Touches    bool
	H0Assumed  bool // h0 was taken as mechanics.TakeoffHeightFraction × stature
}

// crossingPrediction runs the crossing model for a logged attempt with a
// take-off distance and either vz or a measured peak, for athlete's
// profile (stature needed; de Leva 1996 by sex, Dempster via Winter when
// the sex is not recorded). h0 is TakeoffHeightFraction × stature (from
// memory, Dapena's reports); the speed across the bar is g·D/vz, which puts
// the c.m. peak over the bar plane (derived; Dapena 1980: the peak lies
// close to the bar plane); everything else takes the crossing defaults.
// ok is false, with a nil error, when the attempt lacks the measurements.
// gMS2 0 means standard gravity.
func crossingPrediction(a record.Attempt, ath record.Athlete, gMS2 float64) (CrossingPrediction, bool, error) {
	if a.TakeoffDistM <= 0 || (a.VzMS <= 0 && a.PeakM <= 0) || ath.StatureM <= 0 {
		return CrossingPrediction{}, false, nil
	}
	g := gMS2
	if g == 0 {
		g = mechanics.StandardGravity
	}
	h0 := mechanics.TakeoffHeightFraction * ath.StatureM
	vz := a.VzMS
	if vz <= 0 {
		if a.PeakM <= h0 {
			return CrossingPrediction{}, false, fmt.Errorf("crossing prediction: peak %.2f m is not above the take-off height %.2f m", a.PeakM, h0)
		}
		vz = math.Sqrt(2 * g * (a.PeakM - h0))
	}
	var table mechanics.SegmentTable
	body := mechanics.Body{StatureM: ath.StatureM}
	switch ath.Sex {
	case record.SexMale, record.SexFemale:
		sex := mechanics.Male
		if ath.Sex == record.SexFemale {
			sex = mechanics.Female
		}
		t, err := mechanics.DeLeva1996(sex)
		if err != nil {
			return CrossingPrediction{}, false, fmt.Errorf("crossing prediction: %w", err)
		}
		table, body.Sex = t, sex
	default:
		table = mechanics.DempsterWinter()
	}
	if ath.BodyDepthM > 0 {
		body.Depths.TrunkM = 2 * ath.BodyDepthM
	}
	r, err := mechanics.Crossing(mechanics.CrossingInput{Body: body, Table: table, BarM: a.BarM, H0M: h0, VzMS: vz,
		DM: a.TakeoffDistM, VxAcrossMS: g * a.TakeoffDistM / vz, GMS2: gMS2})
	if err != nil {
		return CrossingPrediction{}, false, fmt.Errorf("crossing prediction: %w", err)
	}
	low := r.Lowest()
	return CrossingPrediction{Part: low.Part, ClearanceM: low.ClearanceM, Touches: low.Touches, H0Assumed: true}, true, nil
}

// withPrediction stores the crossing model's forecast in a logged attempt
// that carries the measurements it needs, beside the coach's observation
// (Knock), so that the two can be compared over a season. An attempt
// without the measurements, or whose numbers the model cannot use (a peak
// below the assumed take-off height), is returned unchanged: the log line
// stands on what the coach typed.
func withPrediction(a record.Attempt, ath record.Athlete, team record.Team) record.Attempt {
	if a.Outcome == record.Passed {
		return a
	}
	var g float64
	if team.HasLocation {
		if v, err := mechanics.NormalGravity(team.LatDeg, team.AltM); err == nil {
			g = v
		}
	}
	p, ok, err := crossingPrediction(a, ath, g)
	if err != nil || !ok {
		return a
	}
	a.HasPrediction, a.PredictedPart, a.PredictedClearanceM = true, string(p.Part), p.ClearanceM
	return a
}
