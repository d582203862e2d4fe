package planning

import (
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// TestSummarize: bands by whole centimetres under the PB, passes not
// counted as jumps, season-best progression from meet clearances only
// (values worked by hand from the definitions in the issue).
func TestSummarize(t *testing.T) {
	d := time.Date(2026, 5, 2, 12, 0, 0, 0, time.UTC)
	as := []record.Attempt{
		{Time: d, BarM: 1.70, Outcome: record.Cleared, Number: 1, Meet: true},                                // PB−10: band 1
		{Time: d.Add(time.Minute), BarM: 1.76, Outcome: record.Failed, Number: 1, Meet: true, Knock: "hips"}, // PB−4: band 2
		{Time: d.Add(2 * time.Minute), BarM: 1.76, Outcome: record.Cleared, Number: 2, Meet: true},
		{Time: d.Add(3 * time.Minute), BarM: 1.80, Outcome: record.Passed, Meet: true},
		{Time: d.AddDate(0, 0, 3), BarM: 1.82, Outcome: record.Cleared, Number: 1, Short: true}, // practice above PB
	}
	s := Summarize(as, 1.80, time.UTC)
	if s.Jumps != 4 || s.Short != 1 || s.Meets != 1 || s.FirstAttempt != 2 || s.Clearances != 3 {
		t.Errorf("counts %+v", s)
	}
	if len(s.SBProgression) != 1 || s.SBProgression[0].BarM != 1.76 {
		t.Errorf("SB progression %+v, want the meet's best 1.76 only (practice 1.82 not a mark)", s.SBProgression)
	}
	if b := s.Bands[1]; b.Made != 1 || b.Tried != 1 {
		t.Errorf("PB−10 band %+v", b)
	}
	if b := s.Bands[2]; b.Made != 1 || b.Tried != 2 {
		t.Errorf("PB−5..−3 band %+v", b)
	}
	if b := s.Bands[5]; b.Made != 1 || b.Tried != 1 {
		t.Errorf("above band %+v", b)
	}
	if s.Knocks["hips"] != 1 {
		t.Errorf("knocks %v", s.Knocks)
	}
}
