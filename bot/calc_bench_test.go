package bot_test

import (
	"context"
	"io"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/console"
	"github.com/lathmark-team/lathmark/store"
)

// BenchmarkCalcMarginFor times `margin ... for Mira` end to end (Engine.Handle:
// parse, speaker and profile reads, the margin with its uncertainty, then
// console.Render) against a floor measured in the same iterations: a bare
// store read transaction fetching one key (the team settings). The two are
// interleaved so drift affects both alike; the ratio is the reported figure.
// Its line sits near the peak (the angle assumed puts the peak 6 cm before
// the bar plane), so it includes the Monte Carlo ± of 3 × 2,000 margins.
func BenchmarkCalcMarginFor(b *testing.B) {
	benchMargin(b, "margin 1.80 for Mira v 4.3 from 1.0 speed 3.5")
}

// BenchmarkCalcMarginAtPeak is the same without a take-off distance: the
// c.m. judged at its peak, first-order ± and the peak-spot moments.
func BenchmarkCalcMarginAtPeak(b *testing.B) {
	benchMargin(b, "margin 1.80 for Mira v 4.3")
}

func benchMargin(b *testing.B, text string) {
	te := newTestEngine(b)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.81")
	ctx := context.Background()
	req := bot.Request{UserID: "U_HEAD", Text: text, Time: testClockStart}
	if r := te.E.Handle(ctx, req); !r.OK() {
		b.Fatalf("refused:\n%s", plain(r))
	}
	readOne := func(tx *store.Tx) error { _, err := tx.Team(); return err }
	var floor, cmd time.Duration
	n := 0
	for b.Loop() {
		t0 := time.Now()
		if err := te.DB.View(ctx, readOne); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		r := te.E.Handle(ctx, req)
		if err := console.Render(io.Discard, r); err != nil {
			b.Fatal(err)
		}
		t2 := time.Now()
		floor += t1.Sub(t0)
		cmd += t2.Sub(t1)
		n++
	}
	if n == 0 || floor <= 0 {
		b.Fatal("nothing measured")
	}
	b.ReportMetric(float64(cmd)/float64(floor), "x-store-read")
	b.ReportMetric(float64(cmd.Nanoseconds())/float64(n), "margin-ns/op")
	b.ReportMetric(float64(floor.Nanoseconds())/float64(n), "read-ns/op")
}
