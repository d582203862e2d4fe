package mechanics

import "math"

// PeakVzToleranceM is how far a measured c.m. peak may sit from the peak
// implied by a measured vertical take-off speed before the two are said to
// contradict each other, metres. 3 cm is about what video digitising of the
// c.m. and a take-off speed read to 0.05 m/s leave between them (common
// practice).
const PeakVzToleranceM = 0.03

// PeakVz is the verdict on a jump measured both ways.
type PeakVz struct {
	FromVzM float64 // peak implied by vz: h0 + vz²/(2g), metres
	DiffM   float64 // measured peak − FromVzM, metres
	Agree   bool    // |DiffM| ≤ PeakVzToleranceM
}

// ComparePeakVz is the one rule for a jump that carries both a measured
// c.m. peak peakM and a measured vertical take-off speed vzMS (h0M the
// take-off c.m. height, gMS2 gravity, 0 meaning StandardGravity):
//
//	peak from vz = h0 + vz²/(2g)          (a projectile's rise)
//	agree        ⇔ |peak − peak from vz| ≤ PeakVzToleranceM
//
// When they agree the margin is computed from vz (the peak only confirms
// it); when they contradict, a calculation refuses and a log line asks for
// confirmation, and a confirmed line gets no model margin.
func ComparePeakVz(h0M, vzMS, peakM, gMS2 float64) (PeakVz, error) {
	t := Takeoff{H0M: h0M, VzMS: vzMS, GMS2: gMS2}
	from, err := t.PeakHeight()
	if err != nil {
		return PeakVz{}, err
	}
	d := peakM - from
	return PeakVz{FromVzM: from, DiffM: d, Agree: math.Abs(d) <= PeakVzToleranceM+1e-9}, nil
}
