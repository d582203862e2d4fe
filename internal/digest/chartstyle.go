package digest

import (
	"fmt"
	"image/color"

	"gonum.org/v1/plot/vg/draw"

	"github.com/lathmark-team/lathmark/internal/record"
)

// okabeIto is the colour-blind-safe palette of Okabe M. and Ito K. (2008),
// Color Universal Design (CUD): how to make figures and presentations that
// are friendly to colorblind people (J*Fly; title and venue from memory):
// its eight colours in sRGB, without the yellow (#F0E442), which is
// unreadable on white (common practice).
var okabeIto = [...]struct {
	name string
	c    color.RGBA
}{
	{"blue", color.RGBA{0x00, 0x72, 0xB2, 0xff}},
	{"vermilion", color.RGBA{0xD5, 0x5E, 0x00, 0xff}},
	{"bluish green", color.RGBA{0x00, 0x9E, 0x73, 0xff}},
	{"reddish purple", color.RGBA{0xCC, 0x79, 0xA7, 0xff}},
	{"orange", color.RGBA{0xE6, 0x9F, 0x00, 0xff}},
	{"sky blue", color.RGBA{0x56, 0xB4, 0xE9, 0xff}},
	{"black", color.RGBA{0x00, 0x00, 0x00, 0xff}},
}

// markers are the point shapes, filled first then hollow, so that two
// athletes sharing a colour (slots 7 apart) never share a shape.
var markers = [...]struct {
	name  string
	glyph draw.GlyphDrawer
}{
	{"circle", draw.CircleGlyph{}},
	{"square", draw.SquareGlyph{}},
	{"triangle", draw.TriangleGlyph{}},
	{"ring", draw.RingGlyph{}},
	{"box", draw.BoxGlyph{}},
	{"pyramid", draw.PyramidGlyph{}},
}

// The greys of an athlete shown without data this week, and of the chart's
// own marks (the bar line, the meet ring).
var (
	greyed    = color.RGBA{0x9A, 0x9A, 0x9A, 0xff}
	meetRing  = color.RGBA{0x00, 0x00, 0x00, 0xff}
	zeroGrey  = color.RGBA{0x60, 0x60, 0x60, 0xff}
	lightText = color.RGBA{0x80, 0x80, 0x80, 0xff}
)

// Style is an athlete's colour and marker.
type Style struct {
	Colour color.RGBA
	Marker string // "circle", "square", ...
}

// StyleOf returns the colour and marker of chart style slot s
// (record.Athlete.ChartStyle, 1-based): colours and markers cycle
// separately, so the first record.ChartStyleSlots slots are all different
// pairs. A slot outside the range is read modulo it.
func StyleOf(slot int) Style {
	i := (slot - 1) % record.ChartStyleSlots
	if i < 0 {
		i += record.ChartStyleSlots
	}
	return Style{Colour: okabeIto[i%len(okabeIto)].c, Marker: markers[i%len(markers)].name}
}

// styleFor is a drawn athlete's style: the stored slot, or for a profile
// without one the slot of its place in the drawing order (1-based).
func styleFor(a AthleteWeek, order int) Style {
	if a.ChartStyle > 0 {
		return StyleOf(a.ChartStyle)
	}
	return StyleOf(order + 1)
}

// glyphOf maps a marker name to its drawer.
func glyphOf(name string) draw.GlyphDrawer {
	for _, m := range markers {
		if m.name == name {
			return m.glyph
		}
	}
	return draw.CircleGlyph{}
}

// hexColour writes c as #RRGGBB for the chart's data description.
func hexColour(c color.RGBA) string { return fmt.Sprintf("#%02X%02X%02X", c.R, c.G, c.B) }

// parseHex reads #RRGGBB; anything else is black.
func parseHex(s string) color.RGBA {
	var r, g, b uint8
	if _, err := fmt.Sscanf(s, "#%02X%02X%02X", &r, &g, &b); err != nil {
		return color.RGBA{A: 0xff}
	}
	return color.RGBA{r, g, b, 0xff}
}
