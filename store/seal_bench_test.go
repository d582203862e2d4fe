package store

// The cost of the seals, each against the same work without them in the
// same run: encoding and putting records inside one transaction (no commit,
// so no fsync hides the cost), getting and decoding them, and the quick
// check at open against bbolt's own read-only open of the same file.

import (
	"encoding/binary"
	"encoding/json"
	"path/filepath"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
)

const sealBenchRecords = 200

func sealBenchDB(b *testing.B) *DB {
	b.Helper()
	db, err := Open(filepath.Join(b.TempDir(), "seal.db"), Options{})
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { _ = db.Close() })
	if err := db.bolt.Update(func(tx *bolt.Tx) error {
		for _, n := range []string{"sealed", "raw"} {
			if _, err := tx.CreateBucket([]byte(n)); err != nil {
				return err
			}
		}
		return nil
	}); err != nil {
		b.Fatal(err)
	}
	return db
}

func sealBenchRecord(i int) ([]byte, record.Attempt) {
	at := time.Date(2026, 3, 3, 17, 30, 0, 0, time.UTC).Add(time.Duration(i) * time.Minute)
	return attemptKey(7, uint64(at.UnixNano()), 0), record.Attempt{AthleteID: 7, Time: at, BarM: 1.80, Outcome: record.Cleared, Number: 1, VzMS: 4.2, TakeoffDistM: 1.1, LoggedBy: "U012ABCDEF", MessageID: "1733240000.000100"}
}

// BenchmarkSealWrite: encode and put 200 attempts sealed (putJSON) against
// json.Marshal and a bare Put, in one write transaction each, rolled back.
func BenchmarkSealWrite(b *testing.B) {
	db := sealBenchDB(b)
	var sealed, raw time.Duration
	run := func(bucket string, put func(bk *bolt.Bucket, k []byte, a record.Attempt) error) time.Duration {
		start := time.Now()
		tx, err := db.bolt.Begin(true)
		if err != nil {
			b.Fatal(err)
		}
		bk := tx.Bucket([]byte(bucket))
		for i := range sealBenchRecords {
			k, a := sealBenchRecord(i)
			if err := put(bk, k, a); err != nil {
				b.Fatal(err)
			}
		}
		_ = tx.Rollback()
		return time.Since(start)
	}
	for b.Loop() {
		sealed += run("sealed", func(bk *bolt.Bucket, k []byte, a record.Attempt) error { return putJSON(bk, k, a) })
		raw += run("raw", func(bk *bolt.Bucket, k []byte, a record.Attempt) error {
			data, err := json.Marshal(a)
			if err != nil {
				return err
			}
			return bk.Put(k, data)
		})
	}
	reportSeal(b, sealed, raw)
}

// BenchmarkSealRead: get and decode 200 attempts through getJSON against a
// bare Get and json.Unmarshal of the same records stored unsealed.
func BenchmarkSealRead(b *testing.B) {
	db := sealBenchDB(b)
	if err := db.bolt.Update(func(tx *bolt.Tx) error {
		for i := range sealBenchRecords {
			k, a := sealBenchRecord(i)
			if err := putJSON(tx.Bucket([]byte("sealed")), k, a); err != nil {
				return err
			}
			data, _ := json.Marshal(a)
			if err := tx.Bucket([]byte("raw")).Put(k, data); err != nil {
				return err
			}
		}
		return nil
	}); err != nil {
		b.Fatal(err)
	}
	var sealed, raw time.Duration
	run := func(bucket string, get func(bk *bolt.Bucket, k []byte, a *record.Attempt) error) time.Duration {
		start := time.Now()
		if err := db.bolt.View(func(tx *bolt.Tx) error {
			bk := tx.Bucket([]byte(bucket))
			for i := range sealBenchRecords {
				k, _ := sealBenchRecord(i)
				var a record.Attempt
				if err := get(bk, k, &a); err != nil {
					return err
				}
			}
			return nil
		}); err != nil {
			b.Fatal(err)
		}
		return time.Since(start)
	}
	for b.Loop() {
		sealed += run("sealed", func(bk *bolt.Bucket, k []byte, a *record.Attempt) error {
			_, err := getJSON(bk, k, a)
			return err
		})
		raw += run("raw", func(bk *bolt.Bucket, k []byte, a *record.Attempt) error {
			return json.Unmarshal(bk.Get(k), a)
		})
	}
	reportSeal(b, sealed, raw)
}

func reportSeal(b *testing.B, sealed, raw time.Duration) {
	n := float64(b.N * sealBenchRecords)
	b.ReportMetric(float64(sealed.Nanoseconds())/n, "sealed-ns/record")
	b.ReportMetric(float64(raw.Nanoseconds())/n, "unsealed-ns/record")
	b.ReportMetric(float64(sealed)/float64(raw), "ratio")
}

// BenchmarkQuickCheckAtOpen: the quick check (two meta pages, the file's
// length) against bbolt's own read-only open and close of the same file,
// and the whole store.Open read-only (quick check included) against the same.
func BenchmarkQuickCheckAtOpen(b *testing.B) {
	path := filepath.Join(b.TempDir(), "open.db")
	db, err := Open(path, Options{})
	if err != nil {
		b.Fatal(err)
	}
	if err := db.bolt.Update(func(tx *bolt.Tx) error {
		bk := tx.Bucket([]byte(bucketAttempts))
		for i := range 5000 {
			k, a := sealBenchRecord(i)
			binary.BigEndian.PutUint64(k, 1)
			if err := putJSON(bk, k, a); err != nil {
				return err
			}
		}
		return nil
	}); err != nil {
		b.Fatal(err)
	}
	_ = db.Close()
	var quick, bare, whole time.Duration
	for b.Loop() {
		start := time.Now()
		if err := quickCheckFile(path); err != nil {
			b.Fatal(err)
		}
		quick += time.Since(start)
		start = time.Now()
		bdb, err := bolt.Open(path, fileMode, &bolt.Options{ReadOnly: true})
		if err != nil {
			b.Fatal(err)
		}
		_ = bdb.Close()
		bare += time.Since(start)
		start = time.Now()
		sdb, err := Open(path, Options{ReadOnly: true})
		if err != nil {
			b.Fatal(err)
		}
		_ = sdb.Close()
		whole += time.Since(start)
	}
	n := float64(b.N)
	b.ReportMetric(float64(quick.Nanoseconds())/n, "quick-check-ns")
	b.ReportMetric(float64(bare.Nanoseconds())/n, "bbolt-open-ns")
	b.ReportMetric(float64(quick)/float64(bare), "quick/bbolt-open")
	b.ReportMetric(float64(whole)/float64(bare), "store-open/bbolt-open")
}
