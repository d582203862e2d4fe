package bot_test

import (
	"context"
	"path/filepath"
	"runtime"
	"strconv"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// digestSquadSize is the squad of the digest benchmark: a large club.
const digestSquadSize = 300

// seedDigestStore fills a store with digestSquadSize athletes and `weeks`
// weeks of practice before end: two sessions a week of eight jumps each.
// Generated here, not a check value: the benchmark only compares costs.
func seedDigestStore(b *testing.B, path string, end time.Time, weeks int) *bot.Engine {
	b.Helper()
	db, err := store.Open(path, testStoreOptions)
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { db.Close() })
	ctx := context.Background()
	for a := 0; a < digestSquadSize; a++ {
		ath := record.Athlete{Name: "A" + strconv.Itoa(a), StatureM: 1.80, Sex: record.SexMale, PersonalBestM: 2.00}
		var as []record.Attempt
		for w := 0; w < weeks; w++ {
			for _, day := range []int{1, 3} {
				at := end.AddDate(0, 0, -7*w-day)
				for j := 0; j < 8; j++ {
					out := record.Failed
					if j%2 == 1 {
						out = record.Cleared
					}
					as = append(as, record.Attempt{Time: at.Add(time.Duration(j) * time.Minute), BarM: 1.70 + 0.03*float64(j/2), Outcome: out,
						Number: j%2 + 1, HasCoachMargin: out == record.Cleared, CoachMarginM: 0.02, LoggedBy: "U_HEAD"})
				}
			}
		}
		err := db.Update(ctx, func(tx *store.Tx) error {
			if err := tx.PutAthlete(&ath); err != nil {
				return err
			}
			for i := range as {
				as[i].AthleteID = ath.ID
			}
			return tx.AddAttempts(as)
		})
		if err != nil {
			b.Fatal(err)
		}
	}
	e, err := bot.New(bot.Config{Store: botstore.New(db), HeadCoaches: []string{"U_HEAD"}, Clock: bot.ClockFunc(func() time.Time { return end })})
	if err != nil {
		b.Fatal(err)
	}
	return e
}

// peakHeap runs f while sampling the live heap, and returns the highest
// HeapAlloc seen above the level before f.
func peakHeap(f func()) uint64 {
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	base := ms.HeapAlloc
	var peak atomic.Uint64
	stop := make(chan struct{})
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		t := time.NewTicker(time.Millisecond)
		defer t.Stop()
		for {
			var m runtime.MemStats
			runtime.ReadMemStats(&m)
			if m.HeapAlloc > base && m.HeapAlloc-base > peak.Load() {
				peak.Store(m.HeapAlloc - base)
			}
			select {
			case <-stop:
				return
			case <-t.C:
			}
		}
	}()
	f()
	close(stop)
	wg.Wait()
	return peak.Load()
}

// BenchmarkDigest300 builds the digest of one week (`digest week`, with its
// chart, as the head coach) for 300 athletes with 8 weeks of history and,
// in the same loop, for the same squad with 2 years (26 weeks with -short).
// The digest reads only its 8-week window by range scans, so the ratio
// long/short should stay near 1 (goal at most 1.3). Peak heap is sampled
// during the long-history digest.
func BenchmarkDigest300(b *testing.B) {
	end := time.Date(2026, 11, 30, 7, 0, 0, 0, time.UTC) // a Monday: the digest of 2026-W48
	long := 104
	if testing.Short() {
		long = 26
	}
	short := seedDigestStore(b, filepath.Join(b.TempDir(), "8w.db"), end, 8)
	deep := seedDigestStore(b, filepath.Join(b.TempDir(), "2y.db"), end, long)
	ctx := context.Background()
	req := bot.Request{UserID: "U_HEAD", Text: "digest week 2026-W48", Time: end}
	var shortT, longT time.Duration
	var peak uint64
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		if r := short.Handle(ctx, req); !r.OK() {
			b.Fatalf("%+v", r)
		}
		t1 := time.Now()
		p := peakHeap(func() {
			if r := deep.Handle(ctx, req); !r.OK() {
				b.Fatalf("%+v", r)
			}
		})
		longT += time.Since(t1)
		shortT += t1.Sub(t0)
		peak = max(peak, p)
	}
	b.ReportMetric(float64(shortT.Milliseconds())/float64(b.N), "ms/digest-8w")
	b.ReportMetric(float64(longT.Milliseconds())/float64(b.N), "ms/digest-long")
	b.ReportMetric(float64(longT)/float64(shortT), "long/8w")
	b.ReportMetric(float64(peak)/(1<<20), "peak-heap-MB")
}
