package digest

import (
	"bytes"
	"errors"
	"image/png"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

func chartDigest(t testing.TB, n int) Digest {
	t.Helper()
	cfg := Config{Week: Week{2027, 2}}
	b, err := NewBuilder(cfg)
	if err != nil {
		t.Fatal(err)
	}
	from, _ := b.Window()
	athletes := squad(n)
	athletes[0].Private = true
	for _, a := range athletes {
		b.AddAthlete(a)
	}
	synthWeeks(athletes, from, time.UTC, DefaultTrendWeeks, 3, func(a record.Attempt) {
		if err := b.Add(a); err != nil {
			t.Fatal(err)
		}
	})
	return b.Result()
}

func TestChartPNG(t *testing.T) {
	d := chartDigest(t, 5)
	tests := []struct {
		name string
		opts ChartOptions
		w, h int
	}{
		{"default", ChartOptions{Team: "Test squad"}, 1080, 1350},
		{"imperial", ChartOptions{Imperial: true, WidthPx: 540, HeightPx: 675, MaxAthletes: 2}, 540, 675},
	}
	for _, tt := range tests {
		img, err := Chart(d, tt.opts)
		if err != nil {
			t.Fatalf("%s: %v", tt.name, err)
		}
		cfg, err := png.DecodeConfig(bytes.NewReader(img))
		if err != nil {
			t.Fatalf("%s: not a PNG: %v", tt.name, err)
		}
		if cfg.Width != tt.w || cfg.Height != tt.h {
			t.Errorf("%s: %d × %d px, want %d × %d", tt.name, cfg.Width, cfg.Height, tt.w, tt.h)
		}
		if tt.name != "default" { // same code path at every size; the race detector makes big ones slow
			again, err := Chart(d, tt.opts)
			if err != nil || !bytes.Equal(img, again) {
				t.Errorf("%s: a second rendering differs (err %v)", tt.name, err)
			}
		}
		if dir := os.Getenv("DIGEST_CHART_DIR"); dir != "" {
			if err := os.WriteFile(filepath.Join(dir, "chart-"+tt.name+".png"), img, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
}

func TestChartRefuses(t *testing.T) {
	d := chartDigest(t, 1) // its only athlete is private
	if _, err := Chart(d, ChartOptions{}); !errors.Is(err, ErrNoChartData) {
		t.Errorf("private-only digest: err %v, want ErrNoChartData", err)
	}
	d = chartDigest(t, 3)
	for _, o := range []ChartOptions{{MaxAthletes: MaxChartAthletes + 1}, {WidthPx: 50}, {HeightPx: 5000}} {
		if _, err := Chart(d, o); err == nil {
			t.Errorf("Chart accepted %+v", o)
		}
	}
}

// Private athletes never reach the picture: a digest whose private athlete
// is removed draws the same bytes.
func TestChartLeavesOutPrivate(t *testing.T) {
	d := chartDigest(t, 4)
	small := ChartOptions{WidthPx: 400, HeightPx: 500}
	img, err := Chart(d, small)
	if err != nil {
		t.Fatal(err)
	}
	pub := d
	pub.Athletes = nil
	for _, a := range d.Athletes {
		if !a.Private {
			pub.Athletes = append(pub.Athletes, a)
		}
	}
	if len(pub.Athletes) != len(d.Athletes)-1 {
		t.Fatal("test digest has no private athlete")
	}
	img2, err := Chart(pub, small)
	if err != nil || !bytes.Equal(img, img2) {
		t.Errorf("chart depends on the private athlete (err %v)", err)
	}
}
