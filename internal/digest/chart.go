package digest

import (
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"github.com/lathmark-team/lathmark/internal/units"
)

// Chart size and line limits.
const (
	DefaultChartWidthPx  = 1080
	DefaultChartHeightPx = 1350
	DefaultChartAthletes = 8
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
	MaxAthletes int    // lines per panel; 0 means DefaultChartAthletes, at most MaxChartAthletes
}

// lineStyle gives the i-th athlete's colour and marker. The colours are the
// Okabe and Ito (2008) colour-blind-safe set without its yellow, which is
// unreadable on white (common practice); markers cycle separately so that
// athletes beyond the seventh still differ.
func lineStyle(i int) (color.RGBA, draw.GlyphDrawer) {
	palette := [...]color.RGBA{
		{0x00, 0x72, 0xB2, 0xff}, // blue
		{0xD5, 0x5E, 0x00, 0xff}, // vermilion
		{0x00, 0x9E, 0x73, 0xff}, // bluish green
		{0xCC, 0x79, 0xA7, 0xff}, // reddish purple
		{0xE6, 0x9F, 0x00, 0xff}, // orange
		{0x56, 0xB4, 0xE9, 0xff}, // sky blue
		{0x00, 0x00, 0x00, 0xff}, // black
	}
	shapes := [...]draw.GlyphDrawer{
		draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{},
		draw.RingGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{},
	}
	return palette[i%len(palette)], shapes[i%len(shapes)]
}

// Chart draws the digest's trend window as a PNG for a phone screen
// (1080 × 1350 px by default): on top each athlete's best bar cleared per
// week (m, or ft-in), below each athlete's weekly median clearance margin
// (cm, or in) with the model's values as solid lines and the coach's
// estimates dashed, and the bar (zero margin) marked. Private athletes are
// never drawn. With more athletes than MaxAthletes, those with the most
// attempts in the window are drawn (ties by name) and the title says so.
// The same digest and options give the same bytes.
func Chart(d Digest, opts ChartOptions) ([]byte, error) {
	w, h := cmp.Or(opts.WidthPx, DefaultChartWidthPx), cmp.Or(opts.HeightPx, DefaultChartHeightPx)
	if w < 200 || h < 200 || w > 4000 || h > 4000 {
		return nil, fmt.Errorf("digest: chart of %d × %d px (want 200 to 4000 each)", w, h)
	}
	maxA := cmp.Or(opts.MaxAthletes, DefaultChartAthletes)
	if maxA < 1 || maxA > MaxChartAthletes {
		return nil, fmt.Errorf("digest: chart of %d athletes (want 1 to %d)", maxA, MaxChartAthletes)
	}
	type drawn struct {
		a        AthleteWeek
		attempts int
	}
	var cand []drawn
	for _, a := range d.Athletes {
		if a.Private {
			continue
		}
		n := 0
		for _, ws := range a.Weeks {
			n += ws.Attempts
		}
		if n > 0 {
			cand = append(cand, drawn{a, n})
		}
	}
	if len(cand) == 0 {
		return nil, fmt.Errorf("%w: week %s", ErrNoChartData, d.Week)
	}
	total := len(cand)
	slices.SortStableFunc(cand, func(x, y drawn) int { return cmp.Compare(y.attempts, x.attempts) })
	if len(cand) > maxA {
		cand = cand[:maxA]
	}
	slices.SortStableFunc(cand, func(x, y drawn) int {
		return cmp.Or(cmp.Compare(strings.ToLower(x.a.Name), strings.ToLower(y.a.Name)), cmp.Compare(x.a.AthleteID, y.a.AthleteID))
	})

	barUnit, marginUnit, barScale, marginScale := "m", "cm", 1.0, 100.0
	if opts.Imperial {
		barUnit, marginUnit, barScale, marginScale = "ft-in", "in", 1/MetresPerInch, 1/MetresPerInch
	}
	top, bottom := newPanel(), newPanel()
	title := "Week " + d.Week.String()
	if opts.Team != "" {
		title = opts.Team + ", week " + d.Week.String()
	}
	if total > len(cand) {
		title += fmt.Sprintf("\n%d of %d athletes (most attempts)", len(cand), total)
	}
	top.Title.Text = title + "\nBest bar cleared"
	top.Y.Label.Text = "best bar cleared (" + barUnit + ")"
	bottom.Title.Text = "Clearance margin, weekly median"
	bottom.Y.Label.Text = "margin (" + marginUnit + "), + clears"
	top.X.Label.Text = "ISO week"
	bottom.X.Label.Text = "ISO week"

	nw := len(d.TrendWeeks)
	var ticks []plot.Tick
	for i, wk := range d.TrendWeeks {
		ticks = append(ticks, plot.Tick{Value: float64(i), Label: fmt.Sprintf("W%02d", wk.Num)})
	}
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Tick.Marker = plot.ConstantTicks(ticks)
		p.X.Min, p.X.Max = -0.4, float64(nw-1)+0.4
	}

	// Athletes share a colour and marker across both panels; the key is
	// drawn in two columns below the panels so that it never hides data.
	var key []legendItem
	barLo, barHi := math.Inf(1), math.Inf(-1)
	marLo, marHi := 0.0, 0.0 // the bar (zero margin) is always in view
	anyMargin := false
	for i, c := range cand {
		col, shape := lineStyle(i)
		var best, model, coach plotter.XYs
		for wi, ws := range c.a.Weeks {
			x := float64(wi)
			if ws.HasBest {
				y := ws.BestM * barScale
				best = append(best, plotter.XY{X: x, Y: y})
				barLo, barHi = math.Min(barLo, y), math.Max(barHi, y)
			}
			if ws.ModelMargin.N > 0 {
				y := ws.ModelMargin.MedianM * marginScale
				model = append(model, plotter.XY{X: x, Y: y})
				marLo, marHi = math.Min(marLo, y), math.Max(marHi, y)
			}
			if ws.CoachMargin.N > 0 {
				y := ws.CoachMargin.MedianM * marginScale
				coach = append(coach, plotter.XY{X: x, Y: y})
				marLo, marHi = math.Min(marLo, y), math.Max(marHi, y)
			}
		}
		for _, s := range []struct {
			p      *plot.Plot
			xys    plotter.XYs
			dashed bool
		}{{top, best, false}, {bottom, model, false}, {bottom, coach, true}} {
			if len(s.xys) == 0 {
				continue
			}
			sr, err := newSeries(s.xys, col, shape, s.dashed)
			if err != nil {
				return nil, err
			}
			s.p.Add(sr.line, sr.scatter)
			anyMargin = anyMargin || s.p == bottom
		}
		name := c.a.Name
		if len(best) == 0 {
			name += " (no clearance)"
		}
		key = append(key, legendItem{name, col, shape, false})
	}
	key = append(key,
		legendItem{"margin: model", color.Black, nil, false},
		legendItem{"margin: coach estimate", color.Black, nil, true})

	if math.IsInf(barLo, 1) {
		barLo, barHi = 1.5*barScale, 2.0*barScale
		top.Title.Text += " (none in the window)"
	}
	pad := math.Max(0.06*(barHi-barLo), 0.02*barScale)
	top.Y.Min, top.Y.Max = barLo-pad, barHi+pad
	if opts.Imperial {
		top.Y.Tick.Marker = plot.TickerFunc(feetInchTicks)
	} else {
		top.Y.Tick.Marker = stepTicks{unitsPerStep: []float64{0.01, 0.02, 0.05, 0.1, 0.2, 0.5}, label: func(v float64) string { return fmt.Sprintf("%.2f", v) }}
	}
	if !anyMargin {
		marLo, marHi = -5*marginScale/100, 5*marginScale/100
		bottom.Title.Text += " (none logged)"
	}
	mpad := math.Max(0.08*(marHi-marLo), 0.5*marginScale/100)
	bottom.Y.Min, bottom.Y.Max = marLo-mpad, marHi+mpad
	bottom.Y.Tick.Marker = stepTicks{unitsPerStep: []float64{0.5, 1, 2, 5, 10, 20, 50}, label: signed}
	zero, err := plotter.NewLine(plotter.XYs{{X: bottom.X.Min, Y: 0}, {X: bottom.X.Max, Y: 0}})
	if err != nil {
		return nil, fmt.Errorf("digest: chart: %w", err)
	}
	zero.Color = color.Gray{Y: 0x60}
	zero.Width = vg.Points(1.5)
	bottom.Add(zero)

	img := image.NewRGBA(image.Rect(0, 0, w, h))
	// Scale the resolution with the width so that every size has the same layout.
	dpi := max(1, int(math.Round(chartDPI*float64(w)/DefaultChartWidthPx)))
	cv := vgimg.NewWith(vgimg.UseImage(img), vgimg.UseDPI(dpi))
	dc := draw.New(cv)
	const margin = 6
	cols := [2]plot.Legend{newLegend(), newLegend()}
	half := (len(key) + 1) / 2
	for i, k := range key {
		sr, err := newSeries(nil, k.col, k.shape, k.dashed)
		if err != nil {
			return nil, err
		}
		if k.shape == nil {
			cols[i/half].Add(k.name, sr.line)
		} else {
			cols[i/half].Add(k.name, sr.line, sr.scatter)
		}
	}
	keyH := vg.Length(0)
	for i := range cols {
		keyH = max(keyH, cols[i].Rectangle(dc).Size().Y)
	}
	keyH += 2 * vg.Points(margin)
	keyC := dc
	keyC.Max.Y = dc.Min.Y + keyH
	plotC := dc
	plotC.Min.Y = keyC.Max.Y
	midX := (dc.Min.X + dc.Max.X) / 2
	for i := range cols {
		c := draw.Crop(keyC, vg.Points(2*margin), -vg.Points(margin), vg.Points(margin), -vg.Points(margin))
		if i == 0 {
			c.Max.X = midX
		} else {
			c.Min.X = midX
		}
		cols[i].Draw(c)
	}
	tiles := draw.Tiles{Rows: 2, Cols: 1, PadTop: vg.Points(margin), PadBottom: vg.Points(margin),
		PadLeft: vg.Points(margin), PadRight: vg.Points(2 * margin), PadY: vg.Points(3 * margin)}
	canvases := plot.Align([][]*plot.Plot{{top}, {bottom}}, tiles, plotC)
	top.Draw(canvases[0][0])
	bottom.Draw(canvases[1][0])

	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: cv}).WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("digest: chart: encode PNG: %w", err)
	}
	return buf.Bytes(), nil
}

// legendItem is one entry of the chart's key.
type legendItem struct {
	name   string
	col    color.Color
	shape  draw.GlyphDrawer // nil: a line only
	dashed bool
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

func newLegend() plot.Legend {
	l := plot.NewLegend()
	l.TextStyle.Font = font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, 10)
	l.Top, l.Left = true, true
	l.ThumbnailWidth = vg.Points(24)
	l.Padding = vg.Points(2.5)
	return l
}

// stepTicks puts labelled ticks at multiples of the smallest step in
// unitsPerStep that gives at most six labels, with a minor tick halfway.
type stepTicks struct {
	unitsPerStep []float64
	label        func(float64) string
}

// Ticks implements plot.Ticker.
func (s stepTicks) Ticks(lo, hi float64) []plot.Tick {
	step := s.unitsPerStep[len(s.unitsPerStep)-1]
	for _, st := range s.unitsPerStep {
		if (hi-lo)/st <= 6 {
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

// series is one line with its point markers, drawn and explained in a legend together.
type series struct {
	line    *plotter.Line
	scatter *plotter.Scatter
}

// newSeries styles xys as a 2 pt line with 3 pt markers; with no points it
// makes a legend-only entry.
func newSeries(xys plotter.XYs, c color.Color, shape draw.GlyphDrawer, dashed bool) (series, error) {
	ls := draw.LineStyle{Color: c, Width: vg.Points(2)}
	if dashed {
		ls.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
	}
	gs := draw.GlyphStyle{Color: c, Shape: shape, Radius: vg.Points(3)}
	if len(xys) == 0 {
		return series{&plotter.Line{LineStyle: ls}, &plotter.Scatter{GlyphStyle: gs}}, nil
	}
	l, p, err := plotter.NewLinePoints(xys)
	if err != nil {
		return series{}, fmt.Errorf("digest: chart: %w", err)
	}
	l.LineStyle, p.GlyphStyle = ls, gs
	return series{l, p}, nil
}

// signed labels a margin tick: "-2", "0", "+2", "+0.5".
func signed(v float64) string {
	v = math.Round(v*1e6) / 1e6
	if v == 0 {
		return "0"
	}
	s := strconv.FormatFloat(v, 'f', -1, 64)
	if v > 0 {
		s = "+" + s
	}
	return s
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
