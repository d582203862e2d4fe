package bot

import (
	"errors"
	"fmt"
	"math"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// logArchDeg is the body arch the log assumes for the model margin when a
// jump is logged: the arc model's central angle, in degrees. A log line has
// no posture of its own; `margin ... arch A` computes other postures.
const logArchDeg = 90

// jumpModel is the model margin of one logged jump, or why there is none.
type jumpModel struct {
	ok          bool
	marginM     float64
	sigmaM      float64
	why         string   // when !ok and a measurement was given: the reason, for the reply
	assumptions []string // defaults the model took, in full
	assumed     []string // their short names for the phone reply: "arch 90°", "h0"
}

// modelMargin computes the mechanics library's clearance margin for a
// logged attempt from its c.m. peak (preferred: measured from video) or its
// vertical take-off velocity, with the athlete's stature, the default arch
// and body depth, and the venue's gravity (standard gravity without a
// venue). The defaults (h0 = 0.70 × stature, d = half a typical trunk
// depth) are the ones mechanics.Margin would take, stated here in the team's
// units. The c.m. is taken at its peak over the bar: the approach speed
// is not the take-off's horizontal velocity, so the bar-plane correction is
// not used.
//
//	margin = peak − (bar + d − s)   peak measured, or h0 + vz²/(2g)
func modelMargin(a record.Attempt, ath record.Athlete, team record.Team) jumpModel {
	if a.PeakM == 0 && a.VzMS == 0 {
		return jumpModel{}
	}
	if ath.StatureM == 0 {
		return jumpModel{why: fmt.Sprintf("no model margin: %s's profile has no height (athlete set %s height 1.80)", ath.Name, ath.Name)}
	}
	imp := imperial(team)
	in := mechanics.MarginInput{
		BarM:     a.BarM,
		StatureM: ath.StatureM,
		ArchDeg:  logArchDeg,
		DepthM:   ath.BodyDepthM,
		Sigma:    mechanics.DefaultUncertainty(),
	}
	// The defaults are taken here rather than inside mechanics.Margin, so
	// that the reply can state them in the team's units.
	notes := []string{fmt.Sprintf("model margin: arc model, body arch %d° over a body length of the stature %s, c.m. peak over the bar", logArchDeg, units.Length(ath.StatureM, imp))}
	assumed := []string{fmt.Sprintf("arch %d°", logArchDeg)}
	useVz := a.VzMS > 0
	if a.PeakM > 0 && a.VzMS > 0 {
		// The one rule for a jump measured both ways (mechanics.ComparePeakVz,
		// as in margin): agreeing, vz is used; contradicting, no margin.
		pv, err := mechanics.ComparePeakVz(mechanics.TakeoffHeightFraction*ath.StatureM, a.VzMS, a.PeakM, logGravity(team))
		if err != nil || !pv.Agree {
			return jumpModel{why: "no model margin: the measured peak and vz disagree by more than " + units.SmallAbs(mechanics.PeakVzToleranceM, imp)}
		}
		notes = append(notes, fmt.Sprintf("peak %s agrees with vz %.2f m/s within %s, so vz was used", units.Length(a.PeakM, imp), a.VzMS, units.SmallAbs(mechanics.PeakVzToleranceM, imp)))
	}
	if !useVz {
		in.PeakM = a.PeakM
	} else {
		in.VzMS = a.VzMS
		in.H0M = mechanics.TakeoffHeightFraction * ath.StatureM
		notes = append(notes, fmt.Sprintf("take-off c.m. height assumed %s = %.2f × stature", units.Length(in.H0M, imp), mechanics.TakeoffHeightFraction))
		assumed = append(assumed, "h0")
	}
	if in.DepthM == 0 {
		d, err := mechanics.DefaultUndersideDepth(ath.StatureM)
		if err != nil {
			return jumpModel{why: fmt.Sprintf("no model margin: height %s: %v", units.Length(ath.StatureM, imp), err)}
		}
		in.DepthM = d
		notes = append(notes, fmt.Sprintf("body depth (midline to underside) assumed %s = half a typical trunk depth (athlete set %s depth D sets it)", units.SmallAbs(d, imp), ath.Name))
		assumed = append(assumed, "body depth")
	} else {
		notes = append(notes, fmt.Sprintf("body depth %s from %s's profile", units.SmallAbs(in.DepthM, imp), ath.Name))
	}
	if team.HasLocation {
		g, err := mechanics.NormalGravity(team.LatDeg, team.AltM)
		if err == nil {
			in.GMS2 = g
			notes = append(notes, fmt.Sprintf("gravity %.4f m/s² at the team's venue", g))
		}
	}
	if in.GMS2 == 0 {
		notes = append(notes, fmt.Sprintf("standard gravity %.5f m/s² (no venue set)", mechanics.StandardGravity))
		assumed = append(assumed, "standard gravity")
	}
	res, err := mechanics.Margin(in)
	if err != nil {
		var ie *mechanics.InputError
		if errors.As(err, &ie) {
			return jumpModel{why: "no model margin: " + ie.Field + " " + ie.Reason}
		}
		return jumpModel{why: "no model margin: " + err.Error()}
	}
	return jumpModel{ok: true, marginM: res.MarginM, sigmaM: res.SigmaM, assumptions: notes, assumed: assumed}
}

// logGravity is the gravity the log's model uses: the team's venue, or 0
// (standard gravity) without one.
func logGravity(team record.Team) float64 {
	if !team.HasLocation {
		return 0
	}
	g, err := mechanics.NormalGravity(team.LatDeg, team.AltM)
	if err != nil {
		return 0
	}
	return g
}

// peakVzConflict says, for an attempt measured both ways, how its peak
// contradicts its vz (mechanics.ComparePeakVz); "" when they agree or the
// attempt lacks one of them or the profile its height.
func peakVzConflict(a record.Attempt, ath record.Athlete, team record.Team) string {
	if a.PeakM == 0 || a.VzMS == 0 || ath.StatureM == 0 {
		return ""
	}
	imp := imperial(team)
	h0 := mechanics.TakeoffHeightFraction * ath.StatureM
	pv, err := mechanics.ComparePeakVz(h0, a.VzMS, a.PeakM, logGravity(team))
	if err != nil || pv.Agree {
		return ""
	}
	return fmt.Sprintf("peak %s and vz %.2f m/s disagree: vz from h0 %s (0.70 × stature) gives a peak of %s, %s away (more than %s)",
		units.Length(a.PeakM, imp), a.VzMS, units.Length(h0, imp), units.Length(pv.FromVzM, imp),
		units.SmallAbs(math.Abs(pv.DiffM), imp), units.SmallAbs(mechanics.PeakVzToleranceM, imp))
}
