package digest

import (
	"os"
	"path/filepath"
	"testing"
)

// goldenDir holds the expected renderings; regenerate with UPDATE_GOLDEN=1
// and review the diff.
const goldenDir = "../../testdata/digest"

func TestPrivateSummaryGolden(t *testing.T) {
	athletes, as := handWeek(t)
	athletes[0].Private = true // Ava's hand-counted week, sent privately
	d := build(t, Config{Week: Week{2026, 49}, TrendWeeks: 6}, athletes, as)
	ps := d.PrivateSummaries()
	if len(ps) != 2 || ps[0].Entry.Name != "Ava" {
		t.Fatalf("private summaries %+v", ps)
	}
	for _, tt := range []struct {
		file     string
		imperial bool
	}{{"private_summary_metric.golden", false}, {"private_summary_imperial.golden", true}} {
		got := ps[0].Text(tt.imperial) + "---\n" + ps[1].Text(tt.imperial)
		path := filepath.Join(goldenDir, tt.file)
		if os.Getenv("UPDATE_GOLDEN") != "" {
			if err := os.MkdirAll(goldenDir, 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with UPDATE_GOLDEN=1 to create it)", err)
		}
		if got != string(want) {
			t.Errorf("%s differs:\n got:\n%s\nwant:\n%s", tt.file, got, want)
		}
	}
}

// Feet and inches to the nearest quarter inch, 1 in = 0.0254 m exactly
// (international yard and pound agreement, 1959): 2.00 m = 78.74 in = 6-6¾;
// 1.83 m = 72.05 in = 6-0; 2.45 m = 96.46 in = 8-0½ (the trade's feet-inches,
// as the text replies write them).
func TestFormatBar(t *testing.T) {
	tests := []struct {
		m        float64
		imperial bool
		want     string
	}{
		{2.00, false, "2.00 m"},
		{2.00, true, "6-6¾"},
		{1.83, true, "6-0"},
		{2.45, true, "8-0½"},
	}
	for _, tt := range tests {
		if got := FormatBar(tt.m, tt.imperial); got != tt.want {
			t.Errorf("FormatBar(%v, %v) = %q, want %q", tt.m, tt.imperial, got, tt.want)
		}
	}
	if got := FormatMargin(-0.03, false); got != "−3.0 cm" {
		t.Errorf("FormatMargin = %q", got)
	}
	if got := FormatMargin(0.0254, true); got != "+1.0 in" {
		t.Errorf("FormatMargin imperial = %q", got)
	}
}
