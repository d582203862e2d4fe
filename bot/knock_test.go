package bot_test

import (
	"math"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/internal/mechanics"
)

// TestLogStoresCrossingForecast: a failure logged with the measurements the
// crossing model needs keeps the model's forecast beside the part the coach
// saw; history shows both, and the digest counts the knocks by part with
// how often the forecast named the same part. The forecast itself is
// checked against the model run directly for the same numbers (the model's
// own checks are in internal/mechanics); a line without a take-off
// distance gets none.
func TestLogStoresCrossingForecast(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Kai height 1.86 mass 74 sex m pb 2.01")
	te.must("log Kai 2.00 x knock calves vz 4.4 takeoff 1.05")
	te.must("log Kai 2.00 x knock hips")
	as := logAttempts(t, te.DB, "Kai")
	if len(as) != 2 {
		t.Fatalf("stored %d attempts, want 2", len(as))
	}
	// The forecast the log documents: de Leva (1996) male table for the
	// stature, h0 = TakeoffHeightFraction × stature, the speed across the
	// bar g·D/vz, crossing defaults otherwise.
	table, err := mechanics.DeLeva1996(mechanics.Male)
	if err != nil {
		t.Fatal(err)
	}
	g := mechanics.StandardGravity
	res, err := mechanics.Crossing(mechanics.CrossingInput{Body: mechanics.Body{StatureM: 1.86, Sex: mechanics.Male}, Table: table,
		BarM: 2.00, H0M: mechanics.TakeoffHeightFraction * 1.86, VzMS: 4.4, DM: 1.05, VxAcrossMS: g * 1.05 / 4.4})
	if err != nil {
		t.Fatal(err)
	}
	want := res.Lowest()
	if a := as[0]; !a.HasPrediction || a.PredictedPart != string(want.Part) || math.Abs(a.PredictedClearanceM-want.ClearanceM) > 1e-9 || a.Knock != "calves" {
		t.Errorf("first attempt %+v, want knock calves beside forecast %s %+.3f", a, want.Part, want.ClearanceM)
	}
	if as[1].HasPrediction {
		t.Errorf("a line without measurements got a forecast: %+v", as[1])
	}
	h := te.must("history Kai")
	if notes := strings.Join(h.Notes, "\n"); !strings.Contains(notes, "2.00 calves (model: "+string(want.Part)) || !strings.Contains(notes, "2.00 hips") {
		t.Errorf("history notes %q, want both knocks and the forecast", notes)
	}
	d := te.must("digest now")
	if notes := strings.Join(d.Notes, "\n"); !strings.Contains(notes, "Knocks by part") || !strings.Contains(notes, "Kai calves 1, hips 1") {
		t.Errorf("digest notes %q, want Kai's knocks by part", notes)
	}
}
