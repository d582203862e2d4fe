// Package passplot draws the stroboscopic picture of a pass over the bar:
// the bar in cross-section, the c.m. path, the body as a stick figure at a
// few instants and the lowest point, as a PNG (gonum/plot). It draws what
// internal/mechanics computed and computes nothing of its own.
package passplot

import (
	"bytes"
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/units"
)

// barRadiusM is the crossbar's radius for the drawing: a round bar of
// 30 mm diameter (World Athletics Technical Rules give 29-31 mm; from memory).
const barRadiusM = 0.015

// Pass is what the picture shows.
type Pass struct {
	Title    string
	BarM     float64 // bar height
	DM       float64 // bar plane, m from the take-off point
	Path     []mechanics.Point
	Poses    []mechanics.Pose
	Lowest   mechanics.Point // marked with a ring
	Imperial bool            // axis labels in feet and inches
}

// PNG renders the pass at widthPx × heightPx (at 96 dpi).
func PNG(p Pass, widthPx, heightPx int) ([]byte, error) {
	if widthPx < 200 || heightPx < 150 || widthPx > 4000 || heightPx > 4000 {
		return nil, fmt.Errorf("passplot: size %d×%d outside 200×150 to 4000×4000", widthPx, heightPx)
	}
	pl := plot.New()
	pl.Title.Text = p.Title
	unit := "m"
	if p.Imperial {
		unit = "ft-in"
	}
	pl.X.Label.Text = "from the take-off point (" + unit + ")"
	pl.Y.Label.Text = "height (" + unit + ")"
	ticks := plot.TickerFunc(func(min, max float64) []plot.Tick {
		var out []plot.Tick
		for v := math.Ceil(min*4) / 4; v <= max+1e-9; v += 0.25 {
			t := plot.Tick{Value: v}
			if math.Mod(math.Round(v*4), 2) == 0 {
				t.Label = units.Length(v, p.Imperial)
			}
			out = append(out, t)
		}
		return out
	})
	pl.X.Tick.Marker, pl.Y.Tick.Marker = ticks, ticks

	add := func(xys plotter.XYs, c color.Color, w vg.Length, dashed bool) error {
		l, err := plotter.NewLine(xys)
		if err != nil {
			return fmt.Errorf("passplot: %w", err)
		}
		l.Color, l.Width = c, w
		if dashed {
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		}
		pl.Add(l)
		return nil
	}
	xy := func(ps ...mechanics.Point) plotter.XYs {
		out := make(plotter.XYs, len(ps))
		for i, q := range ps {
			out[i] = plotter.XY{X: q.XM, Y: q.ZM}
		}
		return out
	}
	if len(p.Path) > 1 {
		if err := add(xy(p.Path...), color.RGBA{120, 120, 120, 255}, vg.Points(1), true); err != nil {
			return nil, err
		}
	}
	for i, q := range p.Poses {
		shade := uint8(40 + 150*(len(p.Poses)-1-i)/max(len(p.Poses)-1, 1))
		c := color.RGBA{shade, shade, 200, 255}
		trunk := make([]mechanics.Point, len(q.Trunk))
		copy(trunk, q.Trunk[:])
		for _, chain := range [][]mechanics.Point{
			{q.Vertex, q.Neck}, trunk, {q.Hip, q.Knee, q.Ankle}, {q.Heel, q.Toe},
			{q.Shoulder, q.Elbow, q.Wrist, q.Hand},
		} {
			if err := add(xy(chain...), c, vg.Points(2), false); err != nil {
				return nil, err
			}
		}
	}
	// The bar in cross-section and its stand line.
	var ring plotter.XYs
	for a := 0.0; a <= 2*math.Pi+1e-9; a += math.Pi / 16 {
		ring = append(ring, plotter.XY{X: p.DM + barRadiusM*math.Cos(a), Y: p.BarM - barRadiusM + barRadiusM*math.Sin(a)})
	}
	if err := add(ring, color.RGBA{200, 30, 30, 255}, vg.Points(2.5), false); err != nil {
		return nil, err
	}
	if err := add(xy(mechanics.Point{XM: p.DM, ZM: 0}, mechanics.Point{XM: p.DM, ZM: p.BarM - 2*barRadiusM}), color.RGBA{220, 150, 150, 255}, vg.Points(0.5), true); err != nil {
		return nil, err
	}
	low, err := plotter.NewScatter(xy(p.Lowest))
	if err != nil {
		return nil, fmt.Errorf("passplot: %w", err)
	}
	low.GlyphStyle = draw.GlyphStyle{Color: color.RGBA{230, 120, 0, 255}, Radius: vg.Points(6), Shape: draw.RingGlyph{}}
	pl.Add(low)
	pl.X.Min, pl.Y.Min = math.Min(pl.X.Min, 0), 0
	// Same scale on both axes, so the figure is not distorted.
	perPx := math.Max((pl.X.Max-pl.X.Min)/float64(widthPx), (pl.Y.Max-pl.Y.Min)/float64(heightPx))
	pl.X.Max, pl.Y.Max = pl.X.Min+perPx*float64(widthPx), pl.Y.Min+perPx*float64(heightPx)

	c := vgimg.NewWith(vgimg.UseWH(vg.Length(widthPx)*vg.Inch/96, vg.Length(heightPx)*vg.Inch/96), vgimg.UseDPI(96))
	pl.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("passplot: %w", err)
	}
	return buf.Bytes(), nil
}
