package store_test

// Each benchmark measures a floor in the same run, on the same file, and
// reports the ratio: store cost over the bare bbolt cost of the same disk
// work. Every write commits with fsync, so absolute numbers follow the disk.

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"path/filepath"
	"sync"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

func openBench(b *testing.B, opts store.Options) (*store.DB, uint64) {
	b.Helper()
	db, err := store.Open(filepath.Join(b.TempDir(), "bench.db"), opts)
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { _ = db.Close() })
	a := record.Athlete{Name: "Bench Athlete", Created: base}
	if err := db.Update(context.Background(), func(tx *store.Tx) error { return tx.PutAthlete(&a) }); err != nil {
		b.Fatal(err)
	}
	if err := store.Raw(db).Update(func(tx *bolt.Tx) error {
		_, err := tx.CreateBucket([]byte("bench-floor"))
		return err
	}); err != nil {
		b.Fatal(err)
	}
	return db, a.ID
}

// floorValue is a value as long as one stored attempt, for the bare writes.
func floorValue(b *testing.B, id uint64) []byte {
	b.Helper()
	v, err := json.Marshal(attemptAt(id, base, 1.8))
	if err != nil {
		b.Fatal(err)
	}
	return v
}

func report(b *testing.B, ours, floor time.Duration, n int, unit string) {
	b.ReportMetric(float64(ours.Nanoseconds())/float64(n), "store-ns/"+unit)
	b.ReportMetric(float64(floor.Nanoseconds())/float64(n), "floor-ns/"+unit)
	b.ReportMetric(float64(ours)/float64(floor), "ratio")
}

// BenchmarkPutAttempt: one Update storing one attempt, against a bare bbolt
// Update putting one key with a value of the same length into the same file.
func BenchmarkPutAttempt(b *testing.B) {
	db, id := openBench(b, store.Options{})
	raw := store.Raw(db)
	val := floorValue(b, id)
	var ours, floor time.Duration
	b.ResetTimer()
	for i := range b.N {
		at := base.Add(time.Duration(i) * time.Second)
		t0 := time.Now()
		if err := db.Update(context.Background(), func(tx *store.Tx) error {
			return tx.AddAttempts([]record.Attempt{attemptAt(id, at, 1.8)})
		}); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		b.StopTimer()
		if err := raw.Update(func(tx *bolt.Tx) error {
			return tx.Bucket([]byte("bench-floor")).Put(binary.BigEndian.AppendUint64(nil, uint64(i)), val)
		}); err != nil {
			b.Fatal(err)
		}
		floor += time.Since(t1)
		ours += t1.Sub(t0)
		b.StartTimer()
	}
	report(b, ours, floor, b.N, "op")
}

// BenchmarkAttemptsWindow reads the last 8 weeks of an athlete with 2 years
// of history and of one with only those 8 weeks (same density: 3 sessions a
// week, 12 attempts each); ratio ≈ 1 shows the scan touches only the window.
func BenchmarkAttemptsWindow(b *testing.B) {
	db, long := openBench(b, store.Options{})
	short := record.Athlete{Name: "Eight Weeks Only", Created: base}
	end := base
	sessions := func(id uint64, weeks int) []record.Attempt {
		var as []record.Attempt
		for d := weeks * 7; d > 0; d-- {
			if d%7 != 1 && d%7 != 3 && d%7 != 5 {
				continue
			}
			for k := range 12 {
				as = append(as, attemptAt(id, end.AddDate(0, 0, -d).Add(time.Duration(k)*time.Minute), 1.5+float64(k)/100))
			}
		}
		return as
	}
	if err := db.Update(context.Background(), func(tx *store.Tx) error {
		if err := tx.PutAthlete(&short); err != nil {
			return err
		}
		if err := tx.AddAttempts(sessions(long, 104)); err != nil {
			return err
		}
		return tx.AddAttempts(sessions(short.ID, 8))
	}); err != nil {
		b.Fatal(err)
	}
	from := end.AddDate(0, 0, -56)
	scan := func(id uint64) (int, time.Duration) {
		n := 0
		t0 := time.Now()
		if err := db.View(context.Background(), func(tx *store.Tx) error {
			return tx.Attempts(id, from, end, func(record.Attempt) error { n++; return nil })
		}); err != nil {
			b.Fatal(err)
		}
		return n, time.Since(t0)
	}
	var ours, floor time.Duration
	var nLong, nShort int
	b.ResetTimer()
	for range b.N {
		var d time.Duration
		nLong, d = scan(long)
		ours += d
		b.StopTimer()
		nShort, d = scan(short.ID)
		floor += d
		b.StartTimer()
	}
	if nLong != nShort || nLong == 0 {
		b.Fatalf("windows hold %d and %d attempts, want equal and non-zero", nLong, nShort)
	}
	b.ReportMetric(float64(nLong), "attempts/window")
	b.ReportMetric(float64(ours.Nanoseconds())/float64(b.N), "2y-ns/op")
	b.ReportMetric(float64(floor.Nanoseconds())/float64(b.N), "8w-ns/op")
	b.ReportMetric(float64(ours)/float64(floor), "ratio")
}

// BenchmarkBatch100Writers: 100 goroutines each storing one attempt through
// DB.Batch (MaxBatchSize 100, MaxBatchDelay 200 µs), against 100 goroutines
// each putting one key through bare bbolt Batch on the same, equally tuned
// handle.
func BenchmarkBatch100Writers(b *testing.B) {
	const writers = 100
	db, id := openBench(b, store.Options{MaxBatchSize: writers, MaxBatchDelay: 200 * time.Microsecond})
	raw := store.Raw(db)
	val := floorValue(b, id)
	round := func(write func(i int) error) time.Duration {
		var wg sync.WaitGroup
		errs := make(chan error, writers)
		t0 := time.Now()
		for i := range writers {
			wg.Go(func() {
				if err := write(i); err != nil {
					errs <- err
				}
			})
		}
		wg.Wait()
		d := time.Since(t0)
		close(errs)
		for err := range errs {
			b.Fatal(err)
		}
		return d
	}
	var ours, floor time.Duration
	b.ResetTimer()
	for n := range b.N {
		ours += round(func(i int) error {
			at := base.Add(time.Duration(n*writers+i) * time.Millisecond)
			return db.Batch(context.Background(), func(tx *store.Tx) error {
				return tx.AddAttempts([]record.Attempt{attemptAt(id, at, 1.8)})
			})
		})
		b.StopTimer()
		floor += round(func(i int) error {
			key := binary.BigEndian.AppendUint64(nil, uint64(n*writers+i))
			return raw.Batch(func(tx *bolt.Tx) error {
				return tx.Bucket([]byte("bench-floor")).Put(key, val)
			})
		})
		b.StartTimer()
	}
	report(b, ours, floor, b.N*writers, "write")
}
