package bot

import (
	"github.com/lathmark-team/lathmark/internal/mechanics"
)

// crossingFlags compares a crossing's inputs with the published range
// table (mechanics.CheckRange), as the margin does: vz, h0 as a fraction
// of stature, the take-off distance and, when it was typed rather than
// derived from them, the speed across the bar. Each value outside every
// level's range gives one short line naming the range; the sweep still
// runs on the numbers as typed. (The flight angle of the table is taken
// with the whole horizontal speed, which the crossing does not have, so it
// is not checked here.)
func crossingFlags(in mechanics.CrossingInput, acrossTyped bool) []string {
	type check struct {
		q mechanics.Quantity
		v float64
	}
	checks := []check{{mechanics.QVz, in.VzMS}, {mechanics.QTakeoffDist, in.DM}}
	if in.Body.StatureM > 0 {
		checks = append(checks, check{mechanics.QH0Fraction, in.H0M / in.Body.StatureM})
	}
	if acrossTyped {
		checks = append(checks, check{mechanics.QAcrossSpeed, in.VxAcrossMS})
	}
	var out []string
	for _, c := range checks {
		if f, bad := mechanics.CheckRange(c.q, c.v, in.Body.Sex); bad {
			out = append(out, f.Line) // as the margin words it

		}
	}
	return out
}
