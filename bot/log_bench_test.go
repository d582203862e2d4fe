package bot_test

import (
	"context"
	"encoding/binary"
	"path/filepath"
	"strconv"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// benchStore opens a store in a temporary folder with an engine whose
// clock is set by the caller.
func benchStore(b *testing.B, now *time.Time) (*store.DB, *bot.Engine) {
	b.Helper()
	db, err := store.Open(filepath.Join(b.TempDir(), "lathmark.db"), testStoreOptions)
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { db.Close() })
	e, err := bot.New(bot.Config{Store: botstore.New(db), Clock: bot.ClockFunc(func() time.Time { return *now }), HeadCoaches: []string{"U_HEAD"}})
	if err != nil {
		b.Fatal(err)
	}
	return db, e
}

// seedSessions stores three practice sessions a week of 12 jumps each for
// the weeks before end, in one transaction.
func seedSessions(b *testing.B, db *store.DB, athleteID uint64, end time.Time, weeks int) {
	b.Helper()
	var as []record.Attempt
	for d := 1; d <= weeks*7; d++ {
		if d%7 != 1 && d%7 != 3 && d%7 != 5 {
			continue
		}
		at := end.AddDate(0, 0, -d)
		for j := 0; j < 12; j++ {
			out := record.Failed
			if j%3 == 2 {
				out = record.Cleared
			}
			as = append(as, record.Attempt{AthleteID: athleteID, Time: at.Add(time.Duration(j) * time.Minute), BarM: 1.70 + 0.02*float64(j/3),
				Outcome: out, Number: j%3 + 1, LoggedBy: "U_HEAD", MessageID: "seed-" + strconv.Itoa(d) + "-" + strconv.Itoa(j)})
		}
	}
	if err := db.Update(context.Background(), func(tx *store.Tx) error { return tx.AddAttempts(as) }); err != nil {
		b.Fatal(err)
	}
}

// BenchmarkLogLine logs one line end to end (Engine.Handle: speaker,
// parse, one write transaction with its fsync) and, in the same loop on the
// same disk, two bare bbolt updates: one writing a single key (the floor any
// write pays; metric log/bare-update, target within 1.5) and one making the
// same writes a logged line must make, raw: six attempts, the line for
// undo, the seen message id and an audit entry, in four buckets (metric
// log/bare-same-writes: what the engine adds over bbolt itself).
func BenchmarkLogLine(b *testing.B) {
	for _, bc := range []struct {
		name  string
		weeks int
	}{{"fresh", 0}, {"two-years-logged", 104}} {
		b.Run(bc.name, func(b *testing.B) {
			now := time.Date(2026, 11, 2, 6, 0, 0, 0, time.UTC)
			db, e := benchStore(b, &now)
			kai := logAddAthlete(b, db, logKai())
			seedSessions(b, db, kai.ID, now, bc.weeks)
			bare, err := bolt.Open(filepath.Join(b.TempDir(), "bare.db"), 0o600, &bolt.Options{Timeout: time.Second})
			if err != nil {
				b.Fatal(err)
			}
			defer bare.Close()
			buckets := []string{"k", "attempts", "lines", "seen", "audit"}
			if err := bare.Update(func(tx *bolt.Tx) error {
				for _, n := range buckets {
					if _, err := tx.CreateBucketIfNotExists([]byte(n)); err != nil {
						return err
					}
				}
				return nil
			}); err != nil {
				b.Fatal(err)
			}
			value := make([]byte, 200)
			line, entry := make([]byte, 600), make([]byte, 250)
			ctx := context.Background()
			var logT, bareT, sameT time.Duration
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				now = now.Add(6 * time.Hour)
				t0 := time.Now()
				err := bare.Update(func(tx *bolt.Tx) error {
					return tx.Bucket([]byte("k")).Put(binary.BigEndian.AppendUint64(nil, uint64(i)), value)
				})
				t1 := time.Now()
				r := e.Handle(ctx, bot.Request{UserID: "U_HEAD", Text: "log Kai 1.95 o 2.00 xo 2.04 xxx", Time: now, MessageID: "bench-" + strconv.Itoa(i)})
				t2 := time.Now()
				if err != nil || !r.OK() {
					b.Fatalf("%v %+v", err, r)
				}
				err = bare.Update(func(tx *bolt.Tx) error {
					k := binary.BigEndian.AppendUint64(nil, uint64(now.UnixNano()))
					for j := 0; j < 6; j++ {
						if err := tx.Bucket([]byte("attempts")).Put(append(binary.BigEndian.AppendUint64(nil, 1), append(k, byte(j))...), value); err != nil {
							return err
						}
					}
					if err := tx.Bucket([]byte("lines")).Put(append([]byte("U_HEAD\x00"), k...), line); err != nil {
						return err
					}
					if err := tx.Bucket([]byte("seen")).Put([]byte("bench-"+strconv.Itoa(i)), k); err != nil {
						return err
					}
					return tx.Bucket([]byte("audit")).Put(k, entry)
				})
				t3 := time.Now()
				if err != nil {
					b.Fatal(err)
				}
				bareT += t1.Sub(t0)
				logT += t2.Sub(t1)
				sameT += t3.Sub(t2)
			}
			b.ReportMetric(float64(logT)/float64(bareT), "log/bare-update")
			b.ReportMetric(float64(logT)/float64(sameT), "log/bare-same-writes")
			b.ReportMetric(float64(logT.Nanoseconds())/float64(b.N), "log-ns/op")
			b.ReportMetric(float64(bareT.Nanoseconds())/float64(b.N), "bare-ns/op")
		})
	}
}

// BenchmarkHistory reads 8 weeks for an athlete with two years of logs and
// for one with only those 8 weeks, in the same loop. The metric
// two-years/8-weeks is about 1 when history is a range scan of the window,
// and about 13 (104/8) if it scanned everything.
func BenchmarkHistory(b *testing.B) {
	now := time.Date(2026, 11, 25, 20, 0, 0, 0, time.UTC)
	db, e := benchStore(b, &now)
	long := logAddAthlete(b, db, logKai())
	short := logAddAthlete(b, db, logMira())
	seedSessions(b, db, long.ID, now, 104)
	seedSessions(b, db, short.ID, now, 8)
	ctx := context.Background()
	var longT, shortT time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		r1 := e.Handle(ctx, bot.Request{UserID: "U_HEAD", Text: "history Kai 8w", Time: now})
		t1 := time.Now()
		r2 := e.Handle(ctx, bot.Request{UserID: "U_HEAD", Text: "history Mira 8w", Time: now})
		t2 := time.Now()
		if !r1.OK() || !r2.OK() || len(r1.Table.Rows) != len(r2.Table.Rows) {
			b.Fatalf("%+v %+v", r1, r2)
		}
		longT += t1.Sub(t0)
		shortT += t2.Sub(t1)
	}
	b.ReportMetric(float64(longT)/float64(shortT), "two-years/8-weeks")
	b.ReportMetric(float64(longT.Nanoseconds())/float64(b.N), "two-years-ns/op")
	b.ReportMetric(float64(shortT.Nanoseconds())/float64(b.N), "8-weeks-ns/op")
}
