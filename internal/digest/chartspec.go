package digest

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"
)

// ChartSpec is everything a chart hands to the plotting library: panels,
// series with their points, colours and markers, and the legend. It is
// built from a digest without drawing (TeamChartSpec, AthleteChartSpec)
// and drawn by Render; tests compare it with a golden file.
type ChartSpec struct {
	Kind     string // "team" or "athlete"
	Title    string
	WidthPx  int
	HeightPx int
	Imperial bool
	Weeks    []string    // x-axis labels, oldest first ("W49"); x = index
	Bests    PanelSpec   // best bars: practice lines, meet marks
	Margins  []PanelSpec // clearance margins: one small panel per athlete
	MakeRate *PanelSpec  // make rate per week (athlete chart only)
	Legend   []LegendEntry
}

// PanelSpec is one panel of the chart.
type PanelSpec struct {
	Title  string
	YLabel string
	YUnit  string // "m", "ft-in", "cm", "in", "%"
	Greyed bool   // an athlete without jumps this week
	YMin   float64
	YMax   float64
	Series []SeriesSpec
}

// Series kinds.
const (
	KindPractice = "practice best" // a line with the athlete's marker, broken at missed weeks
	KindMeet     = "meet mark"     // the athlete's marker, ringed, no line
	KindCoach    = "coach estimate"
	KindModel    = "model"
	KindMakeRate = "make rate"
)

// SeriesSpec is one series. Lines join the points within a segment only: a
// week without a value starts a new segment, so a missed week is a gap.
// Margin and make-rate series are bars (coach's estimate left and light,
// model right and solid).
type SeriesSpec struct {
	Name     string
	Kind     string
	Colour   string // #RRGGBB
	Marker   string
	Segments [][]XY
}

// XY is one point: X the week index, Y in the panel's unit.
type XY struct{ X, Y float64 }

// LegendEntry is one row of the key. Greyed entries are athletes without
// jumps in the digest week: still listed, in grey.
type LegendEntry struct {
	Name   string
	Colour string
	Marker string
	Kind   string // "" for an athlete; a series kind for the key to the marks
	Greyed bool
}

// tallFrom is the number of athletes above which the team chart, when its
// height is not given, grows from 4:5 to 2:3 so that the key and the small
// panels stay readable.
const tallFrom = 8

// chartAthlete is an athlete chosen for the team chart.
type chartAthlete struct {
	a        AthleteWeek
	attempts int // in the window
	resting  bool
}

// TeamChartSpec chooses what the team chart shows: every non-private
// athlete with an attempt in the trend window (those without one this week
// greyed in the key), at most MaxAthletes of them (most attempts first,
// then by name), each in the colour and marker stored with the profile;
// athletes with no attempt in the window are listed in the key only,
// greyed, while room remains. Private athletes are never drawn.
func TeamChartSpec(d Digest, opts ChartOptions) (ChartSpec, error) {
	sp, err := newSpec("team", opts)
	if err != nil {
		return sp, err
	}
	maxA := cmp.Or(opts.MaxAthletes, DefaultChartAthletes)
	if maxA < 1 || maxA > MaxChartAthletes {
		return sp, fmt.Errorf("digest: chart of %d athletes (want 1 to %d)", maxA, MaxChartAthletes)
	}
	var cand, idle []chartAthlete
	for _, group := range []struct {
		as      []AthleteWeek
		resting bool
	}{{d.Athletes, false}, {d.Resting, true}} {
		for _, a := range group.as {
			if a.Private {
				continue
			}
			n := 0
			for _, ws := range a.Weeks {
				n += ws.Attempts
			}
			switch {
			case n > 0:
				cand = append(cand, chartAthlete{a, n, group.resting})
			case group.resting:
				idle = append(idle, chartAthlete{a, 0, true})
			}
		}
	}
	if len(cand) == 0 {
		return sp, fmt.Errorf("%w: week %s", ErrNoChartData, d.Week)
	}
	total := len(cand)
	byName := func(x, y chartAthlete) int {
		return cmp.Or(cmp.Compare(strings.ToLower(x.a.Name), strings.ToLower(y.a.Name)), cmp.Compare(x.a.AthleteID, y.a.AthleteID))
	}
	slices.SortStableFunc(cand, func(x, y chartAthlete) int { return cmp.Or(cmp.Compare(y.attempts, x.attempts), byName(x, y)) })
	cand = cand[:min(len(cand), maxA)]
	slices.SortStableFunc(cand, byName)
	if opts.HeightPx == 0 && len(cand) > tallFrom {
		sp.HeightPx = sp.WidthPx * 3 / 2 // 2:3 instead of 4:5: still a phone screen, scrolled once
	}

	sp.Title = "Week " + d.Week.String()
	if opts.Team != "" {
		sp.Title = opts.Team + ", week " + d.Week.String()
	}
	if total > len(cand) {
		sp.Title += fmt.Sprintf(" (%d of %d athletes, most attempts)", len(cand), total)
	}
	sp.Weeks = weekLabels(d.TrendWeeks)
	sp.Bests = sp.bestsPanel("Best bar cleared")
	for i, c := range cand {
		st := styleFor(c.a, i)
		sp.Bests.Series = append(sp.Bests.Series, sp.bestSeries(c.a, st)...)
		mp := sp.marginPanel(c.a.Name, c.a, st)
		mp.Greyed = c.resting
		sp.Margins = append(sp.Margins, mp)
		e := LegendEntry{Name: c.a.Name, Colour: hexColour(st.Colour), Marker: st.Marker, Greyed: c.resting}
		if c.resting {
			e.Name += " (no jumps this week)"
		}
		sp.Legend = append(sp.Legend, e)
	}
	// Athletes without a jump in the whole window: in the key only, greyed.
	for i, c := range idle[:min(len(idle), maxA-len(cand))] {
		st := styleFor(c.a, len(cand)+i)
		sp.Legend = append(sp.Legend, LegendEntry{Name: c.a.Name + " (no jumps this week)", Colour: hexColour(st.Colour), Marker: st.Marker, Greyed: true})
	}
	sp.finishBests()
	sp.shareMarginRange()
	sp.Legend = append(sp.Legend, markKey()...)
	return sp, nil
}

// AthleteChartSpec is one athlete's chart over a.Weeks (weeks gives their
// labels): best bars (practice line, meet marks ringed), the clearance
// margins (coach's estimate and model side by side) and the make rate.
func AthleteChartSpec(a AthleteWeek, weeks []Week, opts ChartOptions) (ChartSpec, error) {
	sp, err := newSpec("athlete", opts)
	if err != nil {
		return sp, err
	}
	if len(weeks) != len(a.Weeks) || len(weeks) == 0 {
		return sp, fmt.Errorf("digest: athlete chart: %d week labels for %d weeks", len(weeks), len(a.Weeks))
	}
	n := 0
	for _, ws := range a.Weeks {
		n += ws.Attempts
	}
	if n == 0 {
		return sp, fmt.Errorf("%w: %s has no attempts from %s to %s", ErrNoChartData, a.Name, weeks[0], weeks[len(weeks)-1])
	}
	st := styleFor(a, 0)
	sp.Title = fmt.Sprintf("%s, %s to %s", a.Name, weeks[0], weeks[len(weeks)-1])
	if opts.Team != "" {
		sp.Title = opts.Team + ": " + sp.Title
	}
	sp.Weeks = weekLabels(weeks)
	sp.Bests = sp.bestsPanel("Best bar cleared")
	sp.Bests.Series = sp.bestSeries(a, st)
	sp.finishBests()
	sp.Margins = []PanelSpec{sp.marginPanel("Clearance margin, weekly median", a, st)}
	sp.shareMarginRange()
	mr := PanelSpec{Title: "Make rate, O/(O+X) per week", YLabel: "make rate (%)", YUnit: "%", YMin: 0, YMax: 100}
	var pts []XY
	for i, ws := range a.Weeks {
		if v, ok := ws.MakeRate.Value(); ok {
			pts = append(pts, XY{float64(i), round6(100 * v)})
		}
	}
	if len(pts) > 0 {
		mr.Series = []SeriesSpec{{Name: a.Name, Kind: KindMakeRate, Colour: hexColour(st.Colour), Marker: st.Marker, Segments: [][]XY{pts}}}
	}
	sp.MakeRate = &mr
	sp.Legend = append([]LegendEntry{{Name: a.Name, Colour: hexColour(st.Colour), Marker: st.Marker}}, markKey()...)
	return sp, nil
}

func newSpec(kind string, opts ChartOptions) (ChartSpec, error) {
	w, h := cmp.Or(opts.WidthPx, DefaultChartWidthPx), cmp.Or(opts.HeightPx, DefaultChartHeightPx)
	if w < 200 || h < 200 || w > 4000 || h > 4000 {
		return ChartSpec{}, fmt.Errorf("digest: chart of %d × %d px (want 200 to 4000 each)", w, h)
	}
	return ChartSpec{Kind: kind, WidthPx: w, HeightPx: h, Imperial: opts.Imperial}, nil
}

// markKey explains the marks shared by every athlete.
func markKey() []LegendEntry {
	k := hexColour(meetRing)
	return []LegendEntry{
		{Name: "practice best (gap: no jump)", Colour: k, Kind: KindPractice},
		{Name: "meet mark (ringed)", Colour: k, Marker: "circle", Kind: KindMeet},
		{Name: "margin: light coach, solid model", Colour: k, Kind: KindModel},
	}
}

func weekLabels(ws []Week) []string {
	out := make([]string, len(ws))
	for i, w := range ws {
		out[i] = fmt.Sprintf("W%02d", w.Num)
	}
	return out
}

func (sp *ChartSpec) bestsPanel(title string) PanelSpec {
	p := PanelSpec{Title: title, YLabel: "best bar cleared (m)", YUnit: "m"}
	if sp.Imperial {
		p.YLabel, p.YUnit = "best bar cleared (ft-in)", "ft-in"
	}
	return p
}

// barValue is a bar height in the panel's unit: metres, or inches for ft-in.
func (sp *ChartSpec) barValue(m float64) float64 {
	if sp.Imperial {
		return round6(m / MetresPerInch)
	}
	return round6(m)
}

// marginValue is a margin in cm, or in.
func (sp *ChartSpec) marginValue(m float64) float64 {
	if sp.Imperial {
		return round6(m / MetresPerInch)
	}
	return round6(100 * m)
}

// bestSeries is an athlete's practice-best line (split at missed weeks)
// and meet marks.
func (sp *ChartSpec) bestSeries(a AthleteWeek, st Style) []SeriesSpec {
	var segs [][]XY
	var meet []XY
	prev := -2
	for i, ws := range a.Weeks {
		if ws.HasPracticeBest {
			p := XY{float64(i), sp.barValue(ws.PracticeBestM)}
			if i == prev+1 {
				segs[len(segs)-1] = append(segs[len(segs)-1], p)
			} else {
				segs = append(segs, []XY{p})
			}
			prev = i
		}
		if ws.HasMeetBest {
			meet = append(meet, XY{float64(i), sp.barValue(ws.MeetBestM)})
		}
	}
	var out []SeriesSpec
	col := hexColour(st.Colour)
	if len(segs) > 0 {
		out = append(out, SeriesSpec{Name: a.Name, Kind: KindPractice, Colour: col, Marker: st.Marker, Segments: segs})
	}
	if len(meet) > 0 {
		out = append(out, SeriesSpec{Name: a.Name, Kind: KindMeet, Colour: col, Marker: st.Marker, Segments: [][]XY{meet}})
	}
	return out
}

// finishBests sets the best-bar panel's range from its points.
func (sp *ChartSpec) finishBests() {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range sp.Bests.Series {
		for _, seg := range s.Segments {
			for _, p := range seg {
				lo, hi = math.Min(lo, p.Y), math.Max(hi, p.Y)
			}
		}
	}
	scale := 1.0
	if sp.Imperial {
		scale = 1 / MetresPerInch
	}
	if math.IsInf(lo, 1) {
		lo, hi = 1.5*scale, 2.0*scale
		sp.Bests.Title += " (none in the window)"
	}
	pad := math.Max(0.06*(hi-lo), 0.02*scale)
	sp.Bests.YMin, sp.Bests.YMax = round6(lo-pad), round6(hi+pad)
}

// marginPanel is one athlete's small panel of weekly median margins, the
// coach's estimate and the model side by side.
func (sp *ChartSpec) marginPanel(title string, a AthleteWeek, st Style) PanelSpec {
	p := PanelSpec{Title: title, YLabel: "margin (cm)", YUnit: "cm"}
	if sp.Imperial {
		p.YLabel, p.YUnit = "margin (in)", "in"
	}
	var coach, model []XY
	for i, ws := range a.Weeks {
		if ws.CoachMargin.N > 0 {
			coach = append(coach, XY{float64(i), sp.marginValue(ws.CoachMargin.MedianM)})
		}
		if ws.ModelMargin.N > 0 {
			model = append(model, XY{float64(i), sp.marginValue(ws.ModelMargin.MedianM)})
		}
	}
	col := hexColour(st.Colour)
	if len(coach) > 0 {
		p.Series = append(p.Series, SeriesSpec{Name: a.Name, Kind: KindCoach, Colour: col, Marker: st.Marker, Segments: [][]XY{coach}})
	}
	if len(model) > 0 {
		p.Series = append(p.Series, SeriesSpec{Name: a.Name, Kind: KindModel, Colour: col, Marker: st.Marker, Segments: [][]XY{model}})
	}
	if len(p.Series) == 0 {
		p.Title += " (no margins)"
	}
	return p
}

// shareMarginRange gives every margin panel the same range, the bar (zero)
// always in view, so that small panels compare at a glance.
func (sp *ChartSpec) shareMarginRange() {
	lo, hi := 0.0, 0.0
	any := false
	for _, p := range sp.Margins {
		for _, s := range p.Series {
			for _, seg := range s.Segments {
				for _, pt := range seg {
					lo, hi, any = math.Min(lo, pt.Y), math.Max(hi, pt.Y), true
				}
			}
		}
	}
	unit := 1.0 // cm
	if sp.Imperial {
		unit = 1 / (100 * MetresPerInch)
	}
	if !any {
		lo, hi = -5*unit, 5*unit
	}
	pad := math.Max(0.08*(hi-lo), 0.5*unit)
	for i := range sp.Margins {
		sp.Margins[i].YMin, sp.Margins[i].YMax = round6(lo-pad), round6(hi+pad)
	}
}

// round6 keeps six decimals, so that the spec reads the same on every
// platform.
func round6(v float64) float64 { return math.Round(v*1e6) / 1e6 }
