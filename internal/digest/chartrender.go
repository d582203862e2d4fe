package digest

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Layout of a chart, in points at the default width (360 pt).
const (
	titleH    = 20.0
	keyRowH   = 12.0
	gridHeadH = 14.0
	pad       = 6.0
)

var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

// Render draws a chart spec as a PNG of sp.WidthPx × sp.HeightPx.
func Render(sp ChartSpec) ([]byte, error) {
	img := image.NewRGBA(image.Rect(0, 0, sp.WidthPx, sp.HeightPx))
	// Scale the resolution with the width so that every size has the same layout.
	dpi := max(1, int(math.Round(chartDPI*float64(sp.WidthPx)/DefaultChartWidthPx)))
	cv := vgimg.NewWith(vgimg.UseImage(img), vgimg.UseDPI(dpi))
	dc := draw.New(cv)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())

	top := dc.Max.Y
	take := func(h vg.Length) draw.Canvas {
		c := dc
		c.Max.Y, c.Min.Y = top, top-h
		top -= h
		return c
	}
	drawText(take(vg.Points(titleH)), sp.Title, 12, color.Black, true)
	free := top - dc.Min.Y
	cols := 2
	if sp.Kind == "athlete" {
		cols = 1
	}
	rows := (len(sp.Legend) + cols - 1) / cols
	keyH := vg.Points(keyRowH*float64(rows) + pad)

	bests := panelPlot(sp, sp.Bests, false)
	if sp.Kind == "athlete" {
		rest := free - keyH
		b := take(rest * 0.4)
		drawPlot(bests, b)
		drawKey(take(keyH), sp.Legend, cols)
		m := take(rest * 0.3)
		drawPlot(panelPlot(sp, sp.Margins[0], false), m)
		if sp.MakeRate != nil {
			drawPlot(panelPlot(sp, *sp.MakeRate, false), take(top-dc.Min.Y))
		}
	} else {
		drawPlot(bests, take(max(free*0.3, (free-keyH)*0.36)))
		drawKey(take(keyH), sp.Legend, cols)
		unit := "cm"
		if sp.Imperial {
			unit = "in"
		}
		drawText(take(vg.Points(gridHeadH)), "Clearance margin, weekly median ("+unit+", + clears)", 10, color.Black, false)
		drawGrid(sp, take(top-dc.Min.Y))
	}
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: cv}).WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("digest: chart: encode PNG: %w", err)
	}
	return buf.Bytes(), nil
}

// drawGrid lays the margin panels out as small multiples: three columns
// (two for four athletes or fewer).
func drawGrid(sp ChartSpec, c draw.Canvas) {
	n := len(sp.Margins)
	if n == 0 {
		return
	}
	cols := 3
	if n <= 4 {
		cols = 2
	}
	if n == 1 {
		cols = 1
	}
	rows := (n + cols - 1) / cols
	grid := make([][]*plot.Plot, rows)
	for r := range grid {
		grid[r] = make([]*plot.Plot, cols)
		for k := range grid[r] {
			if i := r*cols + k; i < n {
				grid[r][k] = panelPlot(sp, sp.Margins[i], true)
			}
		}
	}
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadTop: vg.Points(2), PadBottom: vg.Points(pad),
		PadLeft: vg.Points(pad), PadRight: vg.Points(pad), PadX: vg.Points(4), PadY: vg.Points(4)}
	cs := plot.Align(grid, tiles, c)
	for r := range grid {
		for k, p := range grid[r] {
			if p != nil {
				p.Draw(cs[r][k])
			}
		}
	}
}

func drawPlot(p *plot.Plot, c draw.Canvas) {
	p.Draw(draw.Crop(c, vg.Points(pad), -vg.Points(2*pad), vg.Points(2), -vg.Points(2)))
}

// drawText writes one line, centred or from the left.
func drawText(c draw.Canvas, s string, size vg.Length, col color.Color, centre bool) {
	st := text.Style{Color: col, Font: font.From(sans, size), Handler: plot.DefaultTextHandler, YAlign: text.YCenter}
	pt := vg.Point{X: c.Min.X + vg.Points(2*pad), Y: (c.Min.Y + c.Max.Y) / 2}
	if centre {
		st.XAlign = text.XCenter
		pt.X = (c.Min.X + c.Max.X) / 2
	}
	c.FillText(st, pt, s)
}

// drawKey draws the legend in cols columns: a swatch (line, marker or bars)
// and the name; greyed entries in grey.
func drawKey(c draw.Canvas, key []LegendEntry, cols int) {
	rows := (len(key) + cols - 1) / cols
	colW := (c.Max.X - c.Min.X - vg.Points(2*pad)) / vg.Length(cols)
	for i, e := range key {
		col, row := i/rows, i%rows
		x := c.Min.X + vg.Points(2*pad) + colW*vg.Length(col)
		y := c.Max.Y - vg.Points(keyRowH*(float64(row)+0.5)+pad/2)
		clr, txt := color.Color(parseHex(e.Colour)), color.Color(color.Black)
		if e.Greyed {
			clr, txt = greyed, lightText
		}
		sw := vg.Points(18)
		switch e.Kind {
		case "", KindPractice:
			c.StrokeLine2(draw.LineStyle{Color: clr, Width: vg.Points(1.5)}, x, y, x+sw, y)
			if e.Marker != "" {
				c.DrawGlyph(draw.GlyphStyle{Color: clr, Shape: glyphOf(e.Marker), Radius: vg.Points(2.5)}, vg.Point{X: x + sw/2, Y: y})
			}
		case KindMeet:
			c.DrawGlyph(draw.GlyphStyle{Color: clr, Shape: glyphOf(e.Marker), Radius: vg.Points(2.5)}, vg.Point{X: x + sw/2, Y: y})
			c.DrawGlyph(draw.GlyphStyle{Color: meetRing, Shape: draw.RingGlyph{}, Radius: vg.Points(4.5)}, vg.Point{X: x + sw/2, Y: y})
		default:
			h := vg.Points(3.5)
			bar := func(x0 vg.Length, fill color.Color) {
				pts := []vg.Point{{X: x0, Y: y - h}, {X: x0 + vg.Points(6), Y: y - h}, {X: x0 + vg.Points(6), Y: y + h}, {X: x0, Y: y + h}}
				c.FillPolygon(fill, pts)
				c.StrokeLines(draw.LineStyle{Color: clr, Width: vg.Points(0.7)}, append(pts, pts[0]))
			}
			bar(x+vg.Points(2), lighten(parseHex(e.Colour)))
			bar(x+vg.Points(9), clr)
		}
		c.FillText(text.Style{Color: txt, Font: font.From(sans, 8.5), Handler: plot.DefaultTextHandler, YAlign: text.YCenter},
			vg.Point{X: x + sw + vg.Points(4), Y: y}, e.Name)
	}
}

// lighten mixes c with white, 60 % white: the coach's estimate bars.
func lighten(c color.RGBA) color.RGBA {
	mix := func(v uint8) uint8 { return uint8(math.Round(float64(v)*0.4 + 255*0.6)) }
	return color.RGBA{mix(c.R), mix(c.G), mix(c.B), 0xff}
}

// panelPlot builds the gonum plot of one panel; small panels (the margin
// grid) get smaller fonts, fewer week labels and no axis labels.
func panelPlot(sp ChartSpec, ps PanelSpec, small bool) *plot.Plot {
	p := newPanel()
	p.Title.Text = ps.Title
	if ps.Greyed {
		p.Title.TextStyle.Color = lightText
	}
	n := len(sp.Weeks)
	maxLabels := 9
	if small {
		maxLabels = 3
		p.Title.TextStyle.Font = font.From(sans, 8)
		p.Title.Padding = vg.Points(2)
		for _, ax := range []*plot.Axis{&p.X, &p.Y} {
			ax.Tick.Label.Font = font.From(sans, 6.5)
			ax.Tick.Length = vg.Points(3)
		}
	} else {
		p.Y.Label.Text = ps.YLabel
		p.X.Label.Text = "ISO week"
	}
	every := max(1, (n+maxLabels-1)/maxLabels)
	var ticks []plot.Tick
	for i, l := range sp.Weeks {
		t := plot.Tick{Value: float64(i)}
		if (n-1-i)%every == 0 { // the latest week always labelled
			t.Label = l
		}
		ticks = append(ticks, t)
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	p.X.Min, p.X.Max = -0.5, float64(n)-0.5
	p.Y.Min, p.Y.Max = ps.YMin, ps.YMax
	switch ps.YUnit {
	case "ft-in":
		p.Y.Tick.Marker = plot.TickerFunc(feetInchTicks)
	case "m":
		p.Y.Tick.Marker = stepTicks{unitsPerStep: []float64{0.01, 0.02, 0.05, 0.1, 0.2, 0.5}, label: func(v float64) string { return fmt.Sprintf("%.2f", v) }}
	case "%":
		p.Y.Tick.Marker = stepTicks{unitsPerStep: []float64{25, 50}, label: func(v float64) string { return fmt.Sprintf("%.0f", v) }}
	case "cm", "in":
		p.Y.Tick.Marker = stepTicks{unitsPerStep: []float64{0.5, 1, 2, 5, 10, 20, 50}, label: signed}
		if small {
			p.Y.Tick.Marker = stepTicks{unitsPerStep: []float64{1, 2, 5, 10, 20, 50}, label: signed, maxLabels: 4}
		}
	}
	if ps.YUnit == "cm" || ps.YUnit == "in" {
		if z, err := plotter.NewLine(plotter.XYs{{X: p.X.Min, Y: 0}, {X: p.X.Max, Y: 0}}); err == nil {
			z.Color, z.Width = zeroGrey, vg.Points(1)
			p.Add(z)
		}
	}
	for _, s := range ps.Series {
		addSeries(p, s)
	}
	return p
}

// addSeries adds one series in its kind's style.
func addSeries(p *plot.Plot, s SeriesSpec) {
	col := parseHex(s.Colour)
	glyph := draw.GlyphStyle{Color: col, Shape: glyphOf(s.Marker), Radius: vg.Points(3)}
	for _, seg := range s.Segments {
		xys := make(plotter.XYs, len(seg))
		for i, pt := range seg {
			xys[i] = plotter.XY{X: pt.X, Y: pt.Y}
		}
		switch s.Kind {
		case KindPractice:
			if len(xys) > 1 {
				if l, err := plotter.NewLine(xys); err == nil {
					l.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(1.8)}
					p.Add(l)
				}
			}
			if sc, err := plotter.NewScatter(xys); err == nil {
				sc.GlyphStyle = glyph
				p.Add(sc)
			}
		case KindMeet:
			if sc, err := plotter.NewScatter(xys); err == nil {
				sc.GlyphStyle = glyph
				ring, _ := plotter.NewScatter(xys)
				ring.GlyphStyle = draw.GlyphStyle{Color: meetRing, Shape: draw.RingGlyph{}, Radius: vg.Points(5.5)}
				p.Add(sc, ring)
			}
		case KindCoach, KindModel, KindMakeRate:
			off, w, fill := 0.0, 0.6, color.Color(col)
			switch s.Kind {
			case KindCoach:
				off, w, fill = -0.19, 0.36, lighten(col)
			case KindModel:
				off, w = 0.19, 0.36
			}
			for _, pt := range xys {
				x0, x1 := pt.X+off-w/2, pt.X+off+w/2
				poly, err := plotter.NewPolygon(plotter.XYs{{X: x0, Y: 0}, {X: x1, Y: 0}, {X: x1, Y: pt.Y}, {X: x0, Y: pt.Y}})
				if err != nil {
					continue
				}
				poly.Color = fill
				poly.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(0.6)}
				p.Add(poly)
			}
		}
	}
}
