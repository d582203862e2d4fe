package store

import (
	"fmt"
	"path/filepath"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

// BenchmarkOpenPageWalk: the read-only Open with the page walk (every page
// in use read once with plain reads, keys in order) against the same Open
// without it, on files with 4 and 64 MiB of pages in use (attempts), alternating in
// one run. The file is in the page cache, as after a restart of the bot on
// a running machine; a cold cache adds the disk's time to read the file.
func BenchmarkOpenPageWalk(b *testing.B) {
	for _, mib := range []int64{4, 64} {
		b.Run(fmt.Sprintf("%dMiB", mib), func(b *testing.B) {
			path := filepath.Join(b.TempDir(), "walk.db")
			db, err := Open(path, Options{})
			if err != nil {
				b.Fatal(err)
			}
			for n := 0; dataBytes(b, db) < mib<<20; n += 5000 {
				fillAttemptsFrom(b, db, n, 5000)
			}
			used := dataBytes(b, db)
			if err := db.Close(); err != nil {
				b.Fatal(err)
			}
			open := func(walk int64) time.Duration {
				start := time.Now()
				db, err := Open(path, Options{ReadOnly: true, OpenWalkMaxBytes: walk})
				if err != nil {
					b.Fatal(err)
				}
				d := time.Since(start)
				_ = db.Close()
				return d
			}
			var with, without time.Duration
			for b.Loop() {
				with += open(used)
				without += open(-1)
			}
			n := float64(b.N)
			b.ReportMetric(float64(used)/(1<<20), "data-MiB")
			b.ReportMetric(float64(with.Nanoseconds())/n, "open-walk-ns")
			b.ReportMetric(float64(without.Nanoseconds())/n, "open-nowalk-ns")
			b.ReportMetric(float64(with)/float64(without), "walk/nowalk")
		})
	}
}

// dataBytes is the size of the pages in use (bbolt's tx.Size).
func dataBytes(b *testing.B, db *DB) int64 {
	var n int64
	if err := db.bolt.View(func(tx *bolt.Tx) error { n = tx.Size(); return nil }); err != nil {
		b.Fatal(err)
	}
	return n
}
