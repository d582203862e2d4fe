package digest

import (
	"runtime"
	"slices"
	"sort"
	"testing"
	"time"
	"unsafe"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Benchmarks on a synthetic squad of 300 athletes, three sessions a week and
// up to eight attempts a session (about 24 attempts per athlete-week).

const benchAthletes = 300

func benchConfig(b *testing.B) Config {
	return Config{Week: Week{2026, 49}, Loc: mustLoc(b, "Europe/Madrid")}
}

// runBuilder is the work the bot does for one digest once the attempts are
// in hand: a Builder, the squad, the attempts, the Result.
func runBuilder(b *testing.B, cfg Config, athletes []record.Athlete, feed func(*Builder)) Digest {
	bl, err := NewBuilder(cfg)
	if err != nil {
		b.Fatal(err)
	}
	for _, a := range athletes {
		bl.AddAthlete(a)
	}
	feed(bl)
	return bl.Result()
}

func addAll(b *testing.B, as []record.Attempt) func(*Builder) {
	return func(bl *Builder) {
		for _, a := range as {
			if err := bl.Add(a); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// BenchmarkDigest300x8w builds the digest of 300 athletes from the eight
// weeks of the default trend window.
func BenchmarkDigest300x8w(b *testing.B) {
	cfg := benchConfig(b)
	athletes := squad(benchAthletes)
	bl, _ := NewBuilder(cfg)
	from, _ := bl.Window()
	var as []record.Attempt
	synthWeeks(athletes, from, cfg.Loc, DefaultTrendWeeks, 1, func(a record.Attempt) { as = append(as, a) })
	b.ReportAllocs()
	for b.Loop() {
		runBuilder(b, cfg, athletes, addAll(b, as))
	}
	b.ReportMetric(float64(len(as)), "attempts/op")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(as)), "ns/attempt")
}

// history stands in for the store: attempts in time order, compact, decoded
// into record.Attempt values as a scan reaches them.
type history []packed

type packed struct {
	unixNano   int64
	athlete    uint32
	barMM      uint16
	outcome    byte
	hasC, hasM bool
	coachMM    int16
	modelMM    int16
}

func pack(as []record.Attempt) history {
	h := make(history, len(as))
	for i, a := range as {
		h[i] = packed{a.Time.UnixNano(), uint32(a.AthleteID), uint16(mm(a.BarM)), byte(a.Outcome),
			a.HasCoachMargin, a.HasModelMargin, int16(mm(a.CoachMarginM)), int16(mm(a.ModelMarginM))}
	}
	slices.SortFunc(h, func(x, y packed) int { return int(x.unixNano - y.unixNano) })
	return h
}

func (p packed) attempt() record.Attempt {
	return record.Attempt{AthleteID: uint64(p.athlete), Time: time.Unix(0, p.unixNano), BarM: float64(p.barMM) / 1000,
		Outcome: record.Outcome(p.outcome), HasCoachMargin: p.hasC, CoachMarginM: float64(p.coachMM) / 1000,
		HasModelMargin: p.hasM, ModelMarginM: float64(p.modelMM) / 1000}
}

// scanWindow feeds the Builder only the history inside its Window: two
// binary searches, as a store's range scan over time-ordered keys.
func scanWindow(b *testing.B, h history) func(*Builder) {
	return func(bl *Builder) {
		from, to := bl.Window()
		lo := sort.Search(len(h), func(i int) bool { return h[i].unixNano >= from.UnixNano() })
		hi := sort.Search(len(h), func(i int) bool { return h[i].unixNano >= to.UnixNano() })
		for _, p := range h[lo:hi] {
			if err := bl.Add(p.attempt()); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// scanAll feeds the whole history and lets the Builder reject what lies
// outside its window: what a caller that ignores Window pays.
func scanAll(h history) func(*Builder) {
	return func(bl *Builder) {
		for _, p := range h {
			_ = bl.Add(p.attempt()) // ErrOutsideWindow for most of the history
		}
	}
}

// BenchmarkDigest300x2y is the same digest with two years (104 weeks) of
// history behind it. The caller scans only Window, so the Builder sees the
// same attempts as in the 8-week case; the metrics are ratios against that
// 8-week floor (same squad, the window alone as history) measured in the same
// run: x-8w for the windowed scan of two years, fullscan-x-8w for feeding the
// whole history.
func BenchmarkDigest300x2y(b *testing.B) {
	cfg := benchConfig(b)
	athletes := squad(benchAthletes)
	bl, _ := NewBuilder(cfg)
	from, to := bl.Window()
	const weeks = 104
	start := from.In(cfg.Loc).AddDate(0, 0, -7*(weeks-DefaultTrendWeeks))
	var as []record.Attempt
	synthWeeks(athletes, start, cfg.Loc, weeks, 1, func(a record.Attempt) { as = append(as, a) })
	full := pack(as)
	as = nil
	lo := sort.Search(len(full), func(i int) bool { return full[i].unixNano >= from.UnixNano() })
	hi := sort.Search(len(full), func(i int) bool { return full[i].unixNano >= to.UnixNano() })
	window := full[lo:hi]

	// The floor runs interleaved with the measured runs (timer stopped) so
	// that both see the same machine load.
	var floor time.Duration
	b.ReportAllocs()
	for b.Loop() {
		runBuilder(b, cfg, athletes, scanWindow(b, full))
		b.StopTimer()
		t0 := time.Now()
		runBuilder(b, cfg, athletes, scanWindow(b, window))
		floor += time.Since(t0)
		b.StartTimer()
	}
	perOp := b.Elapsed() / time.Duration(b.N)
	floor /= time.Duration(b.N)
	t0 := time.Now()
	runBuilder(b, cfg, athletes, scanAll(full))
	fullScan := time.Since(t0)
	b.ReportMetric(float64(len(full)), "history-attempts")
	b.ReportMetric(float64(len(window)), "window-attempts")
	b.ReportMetric(float64(perOp)/float64(floor), "x-8w")
	b.ReportMetric(float64(fullScan)/float64(floor), "fullscan-x-8w")
}

// BenchmarkDigestHeap300x8w measures the Builder's memory with the heap
// statistics of runtime.ReadMemStats while attempts stream in from a
// generator (none are kept by the caller): peak-heap-B is the highest heap
// in use seen during the stream (garbage included), retained-B what the
// Builder holds once it is full (after a collection). x-attempts compares
// retained-B with keeping the window's attempts as record.Attempt values;
// 2y-x-8w compares retained-B after streaming two years of history (the
// Builder rejects what lies outside its window) with the 8-week stream.
func BenchmarkDigestHeap300x8w(b *testing.B) {
	cfg := benchConfig(b)
	athletes := squad(benchAthletes)
	bl0, _ := NewBuilder(cfg)
	from, _ := bl0.Window()
	measure := func(weeks int) (peak, retained uint64, n int) {
		var ms runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&ms)
		base := ms.HeapAlloc
		start := from.In(cfg.Loc).AddDate(0, 0, -7*(weeks-DefaultTrendWeeks))
		bl, err := NewBuilder(cfg)
		if err != nil {
			b.Fatal(err)
		}
		for _, a := range athletes {
			bl.AddAthlete(a)
		}
		synthWeeks(athletes, start, cfg.Loc, weeks, 1, func(a record.Attempt) {
			if bl.Add(a) == nil {
				n++
			}
			if n%4096 == 0 {
				runtime.ReadMemStats(&ms)
				peak = max(peak, ms.HeapAlloc-min(ms.HeapAlloc, base))
			}
		})
		runtime.GC()
		runtime.ReadMemStats(&ms)
		retained = ms.HeapAlloc - min(ms.HeapAlloc, base)
		peak = max(peak, retained)
		runtime.KeepAlive(bl)
		return peak, retained, n
	}
	var peak, retained uint64
	var n int
	for b.Loop() {
		peak, retained, n = measure(DefaultTrendWeeks)
	}
	b.StopTimer()
	_, retained2y, _ := measure(104)
	b.ReportMetric(float64(peak), "peak-heap-B")
	b.ReportMetric(float64(retained), "retained-B")
	b.ReportMetric(float64(retained)/float64(benchAthletes*DefaultTrendWeeks), "B/athlete-week")
	b.ReportMetric(float64(retained)/float64(uintptr(n)*unsafe.Sizeof(record.Attempt{})), "x-attempts")
	b.ReportMetric(float64(retained2y)/float64(retained), "2y-x-8w")
}
