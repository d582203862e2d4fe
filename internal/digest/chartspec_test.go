package digest

import (
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"image/png"
	"os"
	"path/filepath"
	"testing"

	"github.com/lathmark-team/lathmark/internal/record"
)

var update = flag.Bool("update", false, "rewrite the chart data goldens under testdata/digest")

// chartWeeks is a six-week window 2026-W44..W49 (Mondays 26 Oct to 30 Nov
// 2026, UTC) with the cases the chart must draw: a missed week, a meet mark,
// an athlete resting this week, a private athlete and a profile stored
// without a chart style.
func chartWeeks(t *testing.T) Digest {
	athletes := []record.Athlete{
		{ID: 1, Name: "Ava", ChartStyle: 3},
		{ID: 2, Name: "Ben", ChartStyle: 1},
		{ID: 3, Name: "Cy", ChartStyle: 2},
		{ID: 4, Name: "Dee", ChartStyle: 4, Private: true},
		{ID: 5, Name: "Eve"},
		{ID: 6, Name: "Fin", ChartStyle: 6}, // no jumps in the window at all
	}
	var as []record.Attempt
	add := func(a record.Attempt, coach, model float64) {
		if coach != 0 {
			a.HasCoachMargin, a.CoachMarginM = true, coach
		}
		if model != 0 {
			a.HasModelMargin, a.ModelMarginM = true, model
		}
		as = append(as, a)
	}
	// Ava: practice W44, W45, W47, W49 (none in W46), a meet in W48.
	add(at(t, 1, "2026-10-26 18:00", 1.70, record.Cleared), 0.03, 0.02)
	add(at(t, 1, "2026-11-02 18:00", 1.72, record.Cleared), 0.02, 0)
	add(at(t, 1, "2026-11-16 18:00", 1.71, record.Cleared), 0, -0.01)
	add(meet(at(t, 1, "2026-11-28 14:00", 1.75, record.Cleared))[0], 0.01, 0.015)
	add(at(t, 1, "2026-12-02 18:00", 1.74, record.Cleared), 0.04, 0.03)
	add(at(t, 1, "2026-12-02 18:10", 1.77, record.Failed), -0.02, 0)
	// Ben: this week only. Cy: W45 only, so resting this week.
	add(at(t, 2, "2026-12-01 18:00", 1.90, record.Cleared), 0, 0.05)
	add(at(t, 3, "2026-11-03 18:00", 1.60, record.Cleared), 0.02, 0)
	// Dee (private) and Eve (no stored style) this week.
	add(at(t, 4, "2026-12-01 18:00", 1.55, record.Cleared), 0.01, 0.01)
	add(at(t, 5, "2026-12-01 18:00", 1.65, record.Cleared), 0, 0)
	return build(t, Config{Week: Week{2026, 49}, TrendWeeks: 6}, athletes, as)
}

func checkGolden(t *testing.T, name string, v any) {
	t.Helper()
	got, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	got = append(got, '\n')
	path := filepath.Join(goldenDir, name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./internal/digest -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from the golden (rerun with -update and read the diff):\n%s", name, got)
	}
}

// TestTeamChartSpecGolden: the series, colours and markers handed to the
// plotting library, as a golden file (it catches changes; the checks below
// test the rules).
func TestTeamChartSpecGolden(t *testing.T) {
	d := chartWeeks(t)
	sp, err := TeamChartSpec(d, ChartOptions{Team: "Test squad"})
	if err != nil {
		t.Fatal(err)
	}
	checkGolden(t, "chart_team.golden.json", sp)
	imp, err := TeamChartSpec(d, ChartOptions{Imperial: true})
	if err != nil {
		t.Fatal(err)
	}
	checkGolden(t, "chart_team_imperial.golden.json", imp)

	series := map[string]SeriesSpec{}
	for _, s := range sp.Bests.Series {
		series[s.Name+"/"+s.Kind] = s
	}
	// A missed week is a gap: Ava's practice line has three pieces, W44-W45, W47, W49.
	ava := series["Ava/"+KindPractice]
	if len(ava.Segments) != 3 || len(ava.Segments[0]) != 2 || ava.Segments[1][0].X != 3 || ava.Segments[2][0].X != 5 {
		t.Errorf("Ava's practice segments %v, want [[W44 W45] [W47] [W49]]", ava.Segments)
	}
	// The meet is its own series, not on the practice line.
	if m := series["Ava/"+KindMeet]; len(m.Segments) != 1 || len(m.Segments[0]) != 1 || m.Segments[0][0] != (XY{4, 1.75}) {
		t.Errorf("Ava's meet marks %v, want one at W48, 1.75 m", m.Segments)
	}
	// Okabe and Ito (2008) publish the colours as sRGB: blue #0072B2,
	// vermilion #D55E00, bluish green #009E73, reddish purple #CC79A7.
	want := map[string]string{"Ava": "#009E73", "Ben": "#0072B2", "Cy": "#D55E00"}
	var legendNames []string
	for _, e := range sp.Legend {
		legendNames = append(legendNames, e.Name)
		if c, ok := want[e.Name]; ok && e.Colour != c {
			t.Errorf("%s is %s in the legend, want %s", e.Name, e.Colour, c)
		}
		if e.Name == "Dee" {
			t.Error("the private athlete is in the legend")
		}
	}
	if sp.Legend[2].Name != "Cy (no jumps this week)" || !sp.Legend[2].Greyed || sp.Legend[0].Greyed {
		t.Errorf("legend %v: Cy should be listed, greyed", legendNames)
	}
	if e := sp.Legend[4]; e.Name != "Fin (no jumps this week)" || !e.Greyed || e.Colour != "#56B4E9" {
		t.Errorf("legend %v: Fin (no jumps in the window) should be in the key, greyed, sky blue #56B4E9", legendNames)
	}
	// One small margin panel per drawn athlete, all on one scale.
	if len(sp.Margins) != 4 {
		t.Fatalf("%d margin panels, want 4 (Ava, Ben, Cy, Eve)", len(sp.Margins))
	}
	for _, p := range sp.Margins {
		if p.YMin != sp.Margins[0].YMin || p.YMax != sp.Margins[0].YMax || p.YMin >= 0 || p.YMax <= 0 {
			t.Errorf("panel %q range %v..%v, want the shared range with 0 inside", p.Title, p.YMin, p.YMax)
		}
	}
	// Coach's estimate and model side by side in Ava's panel: W49 coach is
	// the median of +4 and −2 cm = +1 cm; model +3 cm.
	for _, s := range sp.Margins[0].Series {
		last := s.Segments[0][len(s.Segments[0])-1]
		if s.Kind == KindCoach && last != (XY{5, 1}) || s.Kind == KindModel && last != (XY{5, 3}) {
			t.Errorf("Ava's %s at W49: %v", s.Kind, last)
		}
	}
	// Imperial: 1.75 m = 68.90 in (1 in = 0.0254 m exactly).
	for _, s := range imp.Bests.Series {
		if s.Name == "Ava" && s.Kind == KindMeet && s.Segments[0][0].Y != round6(1.75/0.0254) {
			t.Errorf("imperial meet mark %v", s.Segments[0][0])
		}
	}
}

// The athlete chart uses the athlete's one colour and marker, the same as
// in the team chart.
func TestAthleteChartSpecGolden(t *testing.T) {
	d := chartWeeks(t)
	ava := d.Athletes[0]
	sp, err := AthleteChartSpec(ava, d.TrendWeeks, ChartOptions{})
	if err != nil {
		t.Fatal(err)
	}
	checkGolden(t, "chart_athlete.golden.json", sp)
	team, _ := TeamChartSpec(d, ChartOptions{})
	if sp.Legend[0].Colour != team.Legend[0].Colour || sp.Legend[0].Marker != team.Legend[0].Marker {
		t.Errorf("Ava is %v alone but %v in the team chart", sp.Legend[0], team.Legend[0])
	}
	// Make rate W49: 1 of 2 = 50 %.
	mr := sp.MakeRate.Series[0].Segments[0]
	if last := mr[len(mr)-1]; last != (XY{5, 50}) {
		t.Errorf("make rate at W49 %v, want 50", last)
	}
	if _, err := AthleteChartSpec(d.Resting[0], d.TrendWeeks[:2], ChartOptions{}); err == nil {
		t.Error("mismatched week labels accepted")
	}
	quiet := AthleteWeek{Name: "Nobody", Weeks: make([]WeekStat, 6)}
	if _, err := AthleteChartSpec(quiet, d.TrendWeeks, ChartOptions{}); !errors.Is(err, ErrNoChartData) {
		t.Errorf("athlete without attempts: %v", err)
	}
}

// One rendered PNG per chart kind: a PNG of the asked size, of a plausible
// file size (a blank or broken render compresses far smaller). Small sizes keep
// the race-detector run short; the layout scales with the width.
func TestChartKindsRender(t *testing.T) {
	d := chartWeeks(t)
	team, err := Chart(d, ChartOptions{WidthPx: 540, HeightPx: 675})
	if err != nil {
		t.Fatal(err)
	}
	ath, err := AthleteChart(d.Athletes[0], d.TrendWeeks, ChartOptions{Imperial: true, WidthPx: 360, HeightPx: 450})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		png  []byte
		w, h int
	}{{"team", team, 540, 675}, {"athlete", ath, 360, 450}} {
		cfg, err := png.DecodeConfig(bytes.NewReader(c.png))
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if cfg.Width != c.w || cfg.Height != c.h {
			t.Errorf("%s: %d × %d, want %d × %d", c.name, cfg.Width, cfg.Height, c.w, c.h)
		}
		if n := len(c.png); n < 8_000 || n > 500_000 {
			t.Errorf("%s: %d bytes, want 8 to 500 kB", c.name, n)
		}
		t.Logf("%s: %d × %d px, %d bytes", c.name, cfg.Width, cfg.Height, len(c.png))
		if dir := os.Getenv("DIGEST_CHART_DIR"); dir != "" {
			if err := os.WriteFile(filepath.Join(dir, "kind-"+c.name+".png"), c.png, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
}

func TestStyleOfSlotsDistinct(t *testing.T) {
	seen := map[Style]int{}
	for s := 1; s <= record.ChartStyleSlots; s++ {
		st := StyleOf(s)
		if prev, ok := seen[st]; ok {
			t.Errorf("slots %d and %d share %v", prev, s, st)
		}
		seen[st] = s
	}
	if StyleOf(1) != StyleOf(1+record.ChartStyleSlots) {
		t.Error("slots do not wrap")
	}
}
