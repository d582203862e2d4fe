package passplot

import (
	"bytes"
	"image/png"
	"testing"

	"github.com/lathmark-team/lathmark/internal/mechanics"
)

// TestPNGDecodes draws a computed pass and checks the file decodes as a PNG
// of the asked size with more than a blank canvas's bytes.
func TestPNGDecodes(t *testing.T) {
	tab, err := mechanics.DeLeva1996(mechanics.Male)
	if err != nil {
		t.Fatal(err)
	}
	in := mechanics.CrossingInput{Body: mechanics.Body{StatureM: 1.86}, Table: tab, BarM: 2.00, H0M: 1.25, VzMS: 4.4,
		DM: 1.1, VxAcrossMS: mechanics.StandardGravity * 1.1 / 4.4}
	r, err := mechanics.Crossing(in)
	if err != nil {
		t.Fatal(err)
	}
	var times []float64
	for i := range 7 {
		times = append(times, 0.15+float64(i)*0.08)
	}
	poses, err := mechanics.CrossingPoses(in, times)
	if err != nil {
		t.Fatal(err)
	}
	var path []mechanics.Point
	for _, p := range poses {
		path = append(path, p.COM)
	}
	for _, imp := range []bool{false, true} {
		data, err := PNG(Pass{Title: "pass", BarM: 2.00, DM: 1.1, Path: path, Poses: poses, Lowest: r.LowestPoint, Imperial: imp}, 800, 600)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(data))
		if err != nil {
			t.Fatal(err)
		}
		if b := img.Bounds(); b.Dx() != 800 || b.Dy() != 600 {
			t.Errorf("size %v, want 800×600", b)
		}
		if len(data) < 10000 {
			t.Errorf("PNG of %d bytes: too little drawn", len(data))
		}
	}
	if _, err := PNG(Pass{}, 10, 10); err == nil {
		t.Error("10×10 accepted")
	}
}
