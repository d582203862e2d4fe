package digest

import (
	"cmp"
	"errors"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"github.com/lathmark-team/lathmark/internal/units"
)

// Chart size and line limits.
const (
	DefaultChartWidthPx  = 1080
	DefaultChartHeightPx = 1350
	DefaultChartAthletes = 12
	MaxChartAthletes     = 12
	chartDPI             = 216 // at the default width: 1080 px = 5 in = 360 pt, the size the fonts are chosen for
)

// ErrNoChartData reports a digest with nothing to draw: no non-private
// athlete has an attempt in the trend window.
var ErrNoChartData = errors.New("digest: nothing to chart")

// ChartOptions adjusts Chart.
type ChartOptions struct {
	Imperial    bool   // bars in feet and inches, margins in inches
	Team        string // shown in the title when not empty
	WidthPx     int    // 0 means DefaultChartWidthPx
	HeightPx    int    // 0 means DefaultChartHeightPx
	MaxAthletes int    // athletes drawn; 0 means DefaultChartAthletes, at most MaxChartAthletes
}

// Chart draws the digest's team chart as a PNG for a phone screen (1080 ×
// 1350 px by default): on top each athlete's best practice bar per week as
// a line, broken at a missed week, with meet marks ringed; below it the key
// (athletes without jumps this week greyed); then the clearance margins as
// small multiples, one small panel per athlete on a shared scale, the
// coach's estimate and the model side by side each week. Colours and
// markers are the profiles' stored styles. Private athletes are never
// drawn. The same digest and options give the same bytes.
func Chart(d Digest, opts ChartOptions) ([]byte, error) {
	sp, err := TeamChartSpec(d, opts)
	if err != nil {
		return nil, err
	}
	return Render(sp)
}

// AthleteChart draws one athlete's chart over a.Weeks (weeks are their
// labels): best bars, meet marks, margins and make rate, as a PNG.
func AthleteChart(a AthleteWeek, weeks []Week, opts ChartOptions) ([]byte, error) {
	sp, err := AthleteChartSpec(a, weeks, opts)
	if err != nil {
		return nil, err
	}
	return Render(sp)
}

// newPanel returns a plot with phone-sized sans-serif fonts.
func newPanel() *plot.Plot {
	p := plot.New()
	sans := font.Font{Typeface: "Liberation", Variant: "Sans"}
	p.Title.TextStyle.Font = font.From(sans, 13)
	p.Title.Padding = vg.Points(6)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = font.From(sans, 11)
		ax.Tick.Label.Font = font.From(sans, 10)
		ax.LineStyle.Width = vg.Points(1)
		ax.Tick.LineStyle.Width = vg.Points(1)
	}
	p.Add(plotter.NewGrid())
	return p
}

// stepTicks puts labelled ticks at multiples of the smallest step in
// unitsPerStep that gives at most maxLabels (six) labels, with a minor tick halfway.
type stepTicks struct {
	unitsPerStep []float64
	label        func(float64) string
	maxLabels    int // 0 means 6
}

// Ticks implements plot.Ticker.
func (s stepTicks) Ticks(lo, hi float64) []plot.Tick {
	step := s.unitsPerStep[len(s.unitsPerStep)-1]
	for _, st := range s.unitsPerStep {
		if (hi-lo)/st <= float64(cmp.Or(s.maxLabels, 6)) {
			step = st
			break
		}
	}
	var ts []plot.Tick
	for k := math.Ceil(lo / step * 2); k <= math.Floor(hi/step*2); k++ {
		v := k * step / 2
		t := plot.Tick{Value: v}
		if int64(k)%2 == 0 {
			t.Label = s.label(v)
		}
		ts = append(ts, t)
	}
	return ts
}

// signed labels a margin tick: "−2", "0", "+2", "+0.5" (minus sign U+2212).
func signed(v float64) string {
	v = math.Round(v*1e6) / 1e6
	if v == 0 {
		return "0"
	}
	s := strconv.FormatFloat(math.Abs(v), 'f', -1, 64)
	if v > 0 {
		return "+" + s
	}
	return "−" + s
}

// feetInchTicks labels an axis in inches with feet and inches: a major tick
// every 2 in (every 6 in on a range wider than 2 ft), a minor one every inch.
func feetInchTicks(lo, hi float64) []plot.Tick {
	step := 2
	if hi-lo > 24 {
		step = 6
	}
	var ts []plot.Tick
	for in := int(math.Ceil(lo)); float64(in) <= hi; in++ {
		t := plot.Tick{Value: float64(in)}
		if in%step == 0 {
			t.Label = units.FeetInchesQuarter(float64(in) * MetresPerInch)
		}
		ts = append(ts, t)
	}
	return ts
}
