package bot_test

import (
	"context"
	"encoding/binary"
	"fmt"
	"path/filepath"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/bot"
)

// BenchmarkProfileCommand changes a profile end to end (Engine.Handle:
// parse, role check, one write transaction with the audit entry, reply)
// and, in the same loop on the same disk, makes a bare bbolt update of one
// key: the floor any durable write pays. Metric profile/bare-update.
func BenchmarkProfileCommand(b *testing.B) {
	now := time.Date(2026, 11, 2, 6, 0, 0, 0, time.UTC)
	_, e := benchStore(b, &now)
	ctx := context.Background()
	if r := e.Handle(ctx, bot.Request{UserID: "U_HEAD", Text: "athlete add Mira height 1.78 mass 63 sex f pb 1.81", Time: now}); !r.OK() {
		b.Fatal(r)
	}
	bare, err := bolt.Open(filepath.Join(b.TempDir(), "bare.db"), 0o600, &bolt.Options{Timeout: time.Second})
	if err != nil {
		b.Fatal(err)
	}
	defer bare.Close()
	if err := bare.Update(func(tx *bolt.Tx) error { _, err := tx.CreateBucketIfNotExists([]byte("k")); return err }); err != nil {
		b.Fatal(err)
	}
	value := make([]byte, 300)
	var cmdT, bareT time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		now = now.Add(time.Minute)
		t0 := time.Now()
		r := e.Handle(ctx, bot.Request{UserID: "U_HEAD", Text: fmt.Sprintf("athlete set Mira mass %d", 55+i%20), Time: now, MessageID: fmt.Sprint("p", i)})
		t1 := time.Now()
		if !r.OK() {
			b.Fatal(r)
		}
		if err := bare.Update(func(tx *bolt.Tx) error {
			return tx.Bucket([]byte("k")).Put(binary.BigEndian.AppendUint64(nil, uint64(i)), value)
		}); err != nil {
			b.Fatal(err)
		}
		cmdT += t1.Sub(t0)
		bareT += time.Since(t1)
	}
	b.ReportMetric(float64(cmdT.Microseconds())/float64(b.N), "µs/command")
	b.ReportMetric(float64(bareT.Microseconds())/float64(b.N), "µs/bare-update")
	b.ReportMetric(float64(cmdT)/float64(bareT), "profile/bare-update")
}
