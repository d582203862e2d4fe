package digest

import (
	"testing"

	"github.com/lathmark-team/lathmark/internal/record"
)

// TestKnocks: only failures with a logged part count (a clearance or a
// pass cannot have touched; common practice of the trade: a knock is a
// failure), parts are ordered by count, and the model's forecast is
// compared only where one was stored. Counts worked by hand.
func TestKnocks(t *testing.T) {
	x := func(part, pred string) record.Attempt {
		a := record.Attempt{BarM: 2.00, Outcome: record.Failed, Knock: part}
		if pred != "" {
			a.HasPrediction, a.PredictedPart = true, pred
		}
		return a
	}
	as := []record.Attempt{
		x("calves", "calves"), x("calves", "heels"), x("calves", ""),
		x("hips", "hips"), x("", "calves"),
		{BarM: 2.00, Outcome: record.Cleared, Knock: "heels"}, // a clearance that touched is not a knock
		{BarM: 2.00, Outcome: record.Passed},
	}
	k := Knocks(as)
	if k.Total != 4 || k.ByPart["calves"] != 3 || k.ByPart["hips"] != 1 || len(k.ByPart) != 2 {
		t.Fatalf("tally %+v, want calves 3, hips 1", k)
	}
	if k.Predicted != 3 || k.Agreed != 2 {
		t.Fatalf("forecasts %d agreed %d, want 3 and 2", k.Predicted, k.Agreed)
	}
	want := "calves 3, hips 1 (the model named the same part 2 of 3 times)"
	if got := k.Text(); got != want {
		t.Fatalf("text %q, want %q", got, want)
	}
	if got := Knocks(nil).Text(); got != "" {
		t.Fatalf("no knocks gives %q, want empty", got)
	}
	tie := Knocks([]record.Attempt{x("shoulders", ""), x("hips", "")})
	if got := tie.Text(); got != "hips 1, shoulders 1" {
		t.Fatalf("tie order %q, want by name", got)
	}
}
