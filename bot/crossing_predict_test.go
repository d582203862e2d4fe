package bot

import (
	"math"
	"testing"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
)

// TestCrossingPredictionPeakAndVzAgree: a measured peak and the vz that
// gives it (peak = h0 + vz²/2g, constant-acceleration kinematics) predict
// the same part and clearance; without a take-off distance there is no
// prediction; a bar 0.10 m higher lowers the clearance by 0.10 m.
func TestCrossingPredictionPeakAndVzAgree(t *testing.T) {
	ath := record.Athlete{Name: "Test", StatureM: 1.86, Sex: record.SexMale}
	h0 := mechanics.TakeoffHeightFraction * ath.StatureM
	vz := 4.4
	peak := h0 + vz*vz/(2*mechanics.StandardGravity)
	byVz, ok, err := crossingPrediction(record.Attempt{BarM: 2.00, VzMS: vz, TakeoffDistM: 1.1}, ath, 0)
	if err != nil || !ok {
		t.Fatalf("vz: ok %v err %v", ok, err)
	}
	byPeak, ok, err := crossingPrediction(record.Attempt{BarM: 2.00, PeakM: peak, TakeoffDistM: 1.1}, ath, 0)
	if err != nil || !ok {
		t.Fatalf("peak: ok %v err %v", ok, err)
	}
	if byVz.Part != byPeak.Part || math.Abs(byVz.ClearanceM-byPeak.ClearanceM) > 1e-6 {
		t.Errorf("vz gives %s %+.4f, peak gives %s %+.4f", byVz.Part, byVz.ClearanceM, byPeak.Part, byPeak.ClearanceM)
	}
	higher, _, _ := crossingPrediction(record.Attempt{BarM: 2.10, VzMS: vz, TakeoffDistM: 1.1}, ath, 0)
	if higher.Part != byVz.Part || math.Abs(byVz.ClearanceM-higher.ClearanceM-0.10) > 1e-9 {
		t.Errorf("2.10: %s %+.4f against 2.00: %s %+.4f", higher.Part, higher.ClearanceM, byVz.Part, byVz.ClearanceM)
	}
	if _, ok, err := crossingPrediction(record.Attempt{BarM: 2.00, VzMS: vz}, ath, 0); ok || err != nil {
		t.Errorf("no take-off distance: ok %v err %v, want no prediction", ok, err)
	}
	if _, ok, err := crossingPrediction(record.Attempt{BarM: 2.00, PeakM: 1.0, TakeoffDistM: 1.1}, ath, 0); ok || err == nil {
		t.Errorf("peak below h0: ok %v err %v, want an error", ok, err)
	}
}
