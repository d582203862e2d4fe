package bot_test

import (
	"context"
	"encoding/binary"
	"path/filepath"
	"strconv"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/bot"
)

// concurrentWriters is the load of a busy pit: a hundred phones logging at once.
const concurrentWriters = 100

// BenchmarkLog100Writers logs from 100 goroutines at once through
// Engine.Handle (each log line one command, its own message id) and, in the
// same run on the same disk, writes one key per call from 100 goroutines
// through a bare bbolt Batch tuned for that load (MaxBatchSize 100,
// MaxBatchDelay 0.2 ms, as the bot opens its store). Metrics: µs per log,
// µs per bare batched write, and throughput/floor = bare time ÷ log time
// (goal at least 0.8).
func BenchmarkLog100Writers(b *testing.B) {
	now := time.Date(2026, 11, 2, 17, 0, 0, 0, time.UTC)
	db, e := benchStore(b, &now)
	// One athlete per phone: a day's log per athlete stays the size of a
	// real session however long the benchmark runs.
	for w := 0; w < concurrentWriters; w++ {
		a := logKai()
		a.Name = "A" + strconv.Itoa(w)
		logAddAthlete(b, db, a)
	}
	bare, err := bolt.Open(filepath.Join(b.TempDir(), "bare.db"), 0o600, &bolt.Options{Timeout: time.Second})
	if err != nil {
		b.Fatal(err)
	}
	defer bare.Close()
	bare.MaxBatchSize, bare.MaxBatchDelay = concurrentWriters, 200*time.Microsecond
	if err := bare.Update(func(tx *bolt.Tx) error { _, err := tx.CreateBucketIfNotExists([]byte("k")); return err }); err != nil {
		b.Fatal(err)
	}
	n := max(b.N, concurrentWriters)
	var seq atomic.Int64
	fan := func(work func(i int64)) time.Duration {
		start := time.Now()
		var wg sync.WaitGroup
		for w := 0; w < concurrentWriters; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for {
					i := seq.Add(1)
					if i > int64(n) {
						return
					}
					work(i)
				}
			}()
		}
		wg.Wait()
		return time.Since(start)
	}
	b.ResetTimer()
	logTime := fan(func(i int64) {
		name := "A" + strconv.FormatInt(i%concurrentWriters, 10)
		at := now.Add(time.Duration(i/concurrentWriters)*24*time.Hour + time.Duration(i)*time.Millisecond) // next day for the same athlete; every message its own time
		r := e.Handle(context.Background(), bot.Request{UserID: "U_HEAD", Text: "log " + name + " 1.90 xo", Time: at, MessageID: "load-" + strconv.FormatInt(i, 10)})
		if !r.OK() {
			b.Errorf("log refused: %v %v", r.Title, r.Lines)
		}
	})
	b.StopTimer()
	seq.Store(0)
	bareTime := fan(func(i int64) {
		key := binary.BigEndian.AppendUint64(nil, uint64(i))
		if err := bare.Batch(func(tx *bolt.Tx) error { return tx.Bucket([]byte("k")).Put(key, make([]byte, 200)) }); err != nil {
			b.Error(err)
		}
	})
	perLog := float64(logTime.Microseconds()) / float64(n)
	perBare := float64(bareTime.Microseconds()) / float64(n)
	b.ReportMetric(perLog, "µs/log")
	b.ReportMetric(perBare, "µs/bare-batch-write")
	b.ReportMetric(perBare/perLog, "throughput/floor")
}
