package mechanics

import (
	"runtime"
	"testing"
	"time"
)

// Each benchmark times a floor in the same run and reports its own time as
// a multiple of it ("x-floor"), so the figure means the same on any machine.

// floorNs times f over max(n, 10000) calls, three times after a GC, and
// returns the fastest ns per call.
func floorNs(n int, f func()) float64 {
	n = max(n, 10000)
	runtime.GC()
	best := 0.0
	for try := range 3 {
		start := time.Now()
		for range n {
			f()
		}
		ns := float64(time.Since(start).Nanoseconds()) / float64(n)
		if try == 0 || ns < best {
			best = ns
		}
	}
	return best
}

func report(b *testing.B, floor float64) {
	b.StopTimer()
	per := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
	b.ReportMetric(floor, "floor-ns/op")
	if floor > 0 {
		b.ReportMetric(per/floor, "x-floor")
	}
}

// weightedSum14 is the trivial floor for the segment model: Σ mᵢzᵢ / Σ mᵢ
// over 14 fixed segments.
//
//go:noinline
func weightedSum14(m, z *[14]float64) float64 {
	var s, w float64
	for i := range m {
		s += m[i] * z[i]
		w += m[i]
	}
	return s / w
}

//go:noinline
func peakFloor(h0, vz, g float64) float64 { return h0 + vz*vz/(2*g) }

func BenchmarkBodyCOM(b *testing.B) {
	tab, _ := DeLeva1996(Male)
	body := Body{StatureM: 1.85, MassKG: 75}
	p := FlopLayout()
	var m, z [14]float64
	for i := range m {
		m[i], z[i] = float64(i+1), float64(14-i)
	}
	var sink float64
	floor := floorNs(b.N, func() { sink += weightedSum14(&m, &z) })
	b.ResetTimer()
	for range b.N {
		r, err := BodyCOM(body, p, tab)
		if err != nil {
			b.Fatal(err)
		}
		sink += r.DropM
	}
	report(b, floor)
	runtime.KeepAlive(sink)
}

func BenchmarkMarginWithUncertainty(b *testing.B) {
	in := MarginInput{BarM: 2.00, PeakM: 2.05, H0M: 1.25, DM: 1.0, VxMS: 4.0, ArchDeg: 90, StatureM: 1.86,
		Sigma: DefaultUncertainty()}
	var sink float64
	floor := floorNs(b.N, func() { sink += peakFloor(1.25, 4.4, StandardGravity) })
	b.ResetTimer()
	for range b.N {
		r, err := Margin(in)
		if err != nil {
			b.Fatal(err)
		}
		sink += r.SigmaM
	}
	report(b, floor)
	runtime.KeepAlive(sink)
}

// The numerical arc integral against the closed-form ArcDrop as its floor.
func BenchmarkArcDropNumeric(b *testing.B) {
	benchArc(b, func() (float64, error) { return ArcDropNumeric(1.8, Radians(90), 64) })
}

func BenchmarkArcDropQuad(b *testing.B) {
	benchArc(b, func() (float64, error) { return ArcDropQuad(1.8, Radians(90), 8) })
}

func benchArc(b *testing.B, f func() (float64, error)) {
	var sink float64
	floor := floorNs(b.N, func() {
		s, _ := ArcDrop(1.8, Radians(90))
		sink += s
	})
	b.ResetTimer()
	for range b.N {
		s, err := f()
		if err != nil {
			b.Fatal(err)
		}
		sink += s
	}
	report(b, floor)
	runtime.KeepAlive(sink)
}
