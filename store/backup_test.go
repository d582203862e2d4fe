package store_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

func TestBackupRoundTrip(t *testing.T) {
	db := openTemp(t)
	id := addAthlete(t, db, "Runa Falk")
	history(t, db, id, base, 100)
	update(t, db, func(tx *store.Tx) error { return tx.Audit(record.AuditEntry{Time: base, Actor: "U1", Action: "x"}) })
	var buf bytes.Buffer
	n, err := db.Backup(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if n != int64(buf.Len()) {
		t.Errorf("Backup reported %d bytes, wrote %d", n, buf.Len())
	}
	path := filepath.Join(t.TempDir(), "copy.db")
	if err := os.WriteFile(path, buf.Bytes(), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := store.Check(path); err != nil {
		t.Fatalf("check of the copy: %v", err)
	}
	cp := openUnchecked(t, path)
	if checksum(t, cp) != checksum(t, db) {
		t.Error("copy's checksum differs from the live file's")
	}
}

func TestBackupToFile(t *testing.T) {
	db := openTemp(t)
	addAthlete(t, db, "Ilse Berg")
	path := filepath.Join(t.TempDir(), "backups", "nightly.db")
	for range 2 { // the second run replaces the first backup
		n, err := db.BackupToFile(path)
		if err != nil {
			t.Fatal(err)
		}
		fi, err := os.Stat(path)
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode() != 0o600 || fi.Size() != n {
			t.Errorf("backup mode %v size %d, want 0600 and %d", fi.Mode(), fi.Size(), n)
		}
	}
	if err := store.Check(path); err != nil {
		t.Error(err)
	}
	if entries, _ := os.ReadDir(filepath.Dir(path)); len(entries) != 1 {
		t.Errorf("backup directory holds %d entries, want just the backup", len(entries))
	}
	sum := checksum(t, db)
	if _, err := db.BackupToFile(db.Path()); err == nil {
		t.Error("BackupToFile onto the open data file accepted")
	}
	if checksum(t, db) != sum {
		t.Error("refused backup changed the data")
	}
}

// TestBackupDuringWrites takes a hot backup while 1000 writes run in 20
// goroutines (half through Update, half through Batch). The backup's writer
// stalls until 50 more writes are acknowledged, proving writers are not
// blocked by it. The backup must pass Check, hold every write acknowledged
// before it started, and hold each write whole (its seen id and its attempt).
func TestBackupDuringWrites(t *testing.T) {
	path := tempPath(t)
	db, err := store.Open(path, store.Options{MaxBatchSize: 20, MaxBatchDelay: time.Millisecond})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = db.Close() })
	id := addAthlete(t, db, "Busy Athlete")

	const writes, workers = 1000, 20
	var acked, startedLate [writes]atomic.Bool // startedLate: began after the backup's transaction
	var nAcked atomic.Int64
	var backupOpen atomic.Bool
	grew := make(chan struct{}) // nAcked went up; buffered, lossy
	jobs := make(chan int)
	var wg sync.WaitGroup
	errs := make(chan error, writes)
	for w := range workers {
		wg.Go(func() {
			for i := range jobs {
				fn := func(tx *store.Tx) error {
					if err := tx.MarkSeen(fmt.Sprintf("w%04d", i), base); err != nil {
						return err
					}
					return tx.AddAttempts([]record.Attempt{attemptAt(id, base.Add(time.Duration(i)*time.Second), 1.5)})
				}
				startedLate[i].Store(backupOpen.Load())
				var err error
				if w%2 == 0 {
					err = db.Update(context.Background(), fn)
				} else {
					err = db.Batch(context.Background(), fn)
				}
				if err != nil {
					errs <- err
					continue
				}
				acked[i].Store(true)
				nAcked.Add(1)
				select {
				case grew <- struct{}{}:
				default:
				}
			}
		})
	}
	go func() {
		for i := range writes {
			jobs <- i
		}
		close(jobs)
	}()
	waitAcked := func(n int64) bool {
		deadline := time.After(10 * time.Second) // only against a hang, not a timing check
		for nAcked.Load() < n {
			select {
			case <-grew:
			case <-deadline:
				return false
			}
		}
		return true
	}

	waitAcked(writes / 3)
	var before []int
	for i := range writes {
		if acked[i].Load() {
			before = append(before, i)
		}
	}
	backup := filepath.Join(t.TempDir(), "hot.db")
	f, err := os.OpenFile(backup, os.O_CREATE|os.O_WRONLY|os.O_EXCL, 0o600)
	if err != nil {
		t.Fatal(err)
	}
	var atStart, atStall int64
	stall := &hookWriter{w: f, first: func() {
		backupOpen.Store(true)
		atStart = nAcked.Load()
		if !waitAcked(atStart + 50) {
			t.Error("writers made no progress while the backup's read transaction was open")
		}
		atStall = nAcked.Load()
	}}
	if _, err := db.Backup(stall); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Errorf("write failed: %v", err)
	}
	t.Logf("acknowledged: %d before the backup, %d as it began writing, %d after its stall, %d in all", len(before), atStart, atStall, nAcked.Load())

	if err := store.Check(backup); err != nil {
		t.Fatalf("check of the hot backup: %v", err)
	}
	bk, err := store.Open(backup, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = bk.Close() }()
	st, err := bk.Stats()
	if err != nil {
		t.Fatal(err)
	}
	if st.Seen < len(before) || st.Seen != st.Attempts {
		t.Errorf("backup holds %d seen ids and %d attempts; want equal and at least %d", st.Seen, st.Attempts, len(before))
	}
	late := 0
	view(t, bk, func(tx *store.Tx) error {
		for _, i := range before {
			if ok, err := tx.Seen(fmt.Sprintf("w%04d", i)); !ok || err != nil {
				t.Errorf("write %d acknowledged before the backup is missing (err %v)", i, err)
			}
		}
		for i := range writes {
			if !startedLate[i].Load() {
				continue
			}
			late++
			if ok, _ := tx.Seen(fmt.Sprintf("w%04d", i)); ok {
				t.Errorf("write %d began after the backup's transaction but is in the backup", i)
			}
		}
		return nil
	})
	if late == 0 {
		t.Error("no write began while the backup ran: the test proved nothing")
	}
	t.Logf("%d writes began after the backup's transaction", late)
	if err := db.Check(); err != nil {
		t.Error(err)
	}
}

// hookWriter calls first before its first write.
type hookWriter struct {
	w     *os.File
	first func()
	done  bool
}

func (h *hookWriter) Write(p []byte) (int, error) {
	if !h.done {
		h.done = true
		h.first()
	}
	return h.w.Write(p)
}

// liveWithHistory makes a closed data file at dir/live.db with one athlete
// and returns its path.
func liveWithHistory(t *testing.T, dir string) string {
	t.Helper()
	live := filepath.Join(dir, "live.db")
	db, err := store.Open(live, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	id := addAthlete(t, db, "Live Athlete")
	history(t, db, id, base, 20)
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	return live
}

// dirNames lists dir's entries.
func dirNames(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

func sumOf(t *testing.T, path string) [32]byte {
	t.Helper()
	db, err := store.Open(path, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = db.Close() }()
	return checksum(t, db)
}

func TestRestore(t *testing.T) {
	dir := t.TempDir()
	live := filepath.Join(dir, "live.db")
	db, err := store.Open(live, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	id := addAthlete(t, db, "Restored Athlete")
	history(t, db, id, base, 10)
	backup := filepath.Join(dir, "backups", "b1.db")
	if _, err := db.BackupToFile(backup); err != nil {
		t.Fatal(err)
	}
	wantSum := checksum(t, db)
	addAthlete(t, db, "Added After Backup")
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	previous := sumOf(t, live)

	if err := store.Restore(backup, live); err != nil {
		t.Fatal(err)
	}
	if err := store.Check(live); err != nil {
		t.Fatalf("restored file: %v", err)
	}
	if sumOf(t, live) != wantSum {
		t.Error("restored file differs from the backup")
	}
	kept := live + store.BeforeRestoreSuffix
	if sumOf(t, kept) != previous {
		t.Error("kept file differs from the previous live file")
	}
	for _, p := range []string{live, kept} {
		if fi, err := os.Stat(p); err != nil || fi.Mode() != 0o600 {
			t.Errorf("%s: mode %v err %v, want 0600", p, fi.Mode(), err)
		}
	}
	if got, want := dirNames(t, dir), []string{"backups", "live.db", "live.db.before-restore"}; !slices.Equal(got, want) {
		t.Errorf("directory holds %q, want %q", got, want)
	}

	t.Run("onto a missing live file", func(t *testing.T) {
		fresh := filepath.Join(t.TempDir(), "new", "live.db")
		if err := store.Restore(backup, fresh); err != nil {
			t.Fatal(err)
		}
		if sumOf(t, fresh) != wantSum {
			t.Error("restored file differs from the backup")
		}
		if _, err := os.Stat(fresh + store.BeforeRestoreSuffix); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("kept a previous file that never existed: %v", err)
		}
	})
	t.Run("an old-schema backup is migrated", func(t *testing.T) {
		d := t.TempDir()
		old := filepath.Join(d, "v0.db")
		rawFile(t, old, nil)
		target := filepath.Join(d, "live.db")
		if err := store.Restore(old, target); err != nil {
			t.Fatal(err)
		}
		if err := store.Check(target); err != nil {
			t.Error(err)
		}
	})
}

func TestRestoreRefuses(t *testing.T) {
	// Each case gets a directory with a good closed live file and returns
	// the backup path to restore; hold keeps the live file open.
	cases := []struct {
		name   string
		backup func(t *testing.T, dir, live string) string
		hold   bool
		want   error // errors.Is target; nil means any error
	}{
		{name: "live file held by a running process", hold: true, want: store.ErrLocked,
			backup: func(t *testing.T, dir, live string) string { return goodBackup(t, dir, live) }},
		{name: "not a data file", backup: func(t *testing.T, dir, _ string) string {
			return writeFile(t, dir, bytes.Repeat([]byte("garbage!"), 4096))
		}},
		{name: "truncated backup", backup: func(t *testing.T, dir, live string) string {
			data := readFile(t, goodBackup(t, dir, live))
			return writeFile(t, dir, data[:len(data)/2])
		}},
		{name: "meta pages zeroed", backup: func(t *testing.T, dir, live string) string {
			data := readFile(t, goodBackup(t, dir, live))
			clear(data[:2*4096])
			return writeFile(t, dir, data)
		}},
		{name: "damaged record (bbolt pages fine)", want: store.ErrInconsistent, backup: func(t *testing.T, dir, live string) string {
			data := readFile(t, goodBackup(t, dir, live))
			// Every copy: freed pages may hold older versions of the page.
			bad := bytes.ReplaceAll(data, []byte(`"stature_m":1.8`), []byte(`"stature_m":1#8`))
			if bytes.Equal(bad, data) {
				t.Fatal("record not found in the backup")
			}
			return writeFile(t, dir, bad)
		}},
		{name: "broken invariant", want: store.ErrInconsistent, backup: func(t *testing.T, dir, live string) string {
			p := goodBackup(t, dir, live)
			damage(t, p, func(tx *bolt.Tx) error {
				return tx.Bucket([]byte("names")).Put([]byte("ghost"), store.Seal([]byte("ghost"), binary.BigEndian.AppendUint64(nil, 77)))
			})
			return p
		}},
		{name: "newer schema", want: store.ErrSchemaNewer, backup: func(t *testing.T, dir, live string) string {
			p := goodBackup(t, dir, live)
			damage(t, p, func(tx *bolt.Tx) error { return setSchema(tx, store.SchemaVersion+1) })
			return p
		}},
		{name: "backup is the live file", backup: func(t *testing.T, _, live string) string { return live }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			live := liveWithHistory(t, dir)
			bdir := filepath.Join(t.TempDir(), "in")
			if err := os.Mkdir(bdir, 0o700); err != nil {
				t.Fatal(err)
			}
			backup := c.backup(t, bdir, live)
			if c.hold {
				openUnchecked(t, live)
			}
			before := fileHash(t, live)
			err := store.Restore(backup, live)
			t.Logf("refusal: %v", err)
			if err == nil {
				t.Fatal("restore succeeded")
			}
			if c.want != nil && !errors.Is(err, c.want) {
				t.Errorf("error %v, want %v", err, c.want)
			}
			if fileHash(t, live) != before {
				t.Error("refused restore changed the live file")
			}
			if got := dirNames(t, dir); !slices.Equal(got, []string{"live.db"}) {
				t.Errorf("refused restore left %q in the live directory", got)
			}
		})
	}
}

func goodBackup(t *testing.T, dir, live string) string {
	t.Helper()
	db, err := store.Open(live, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = db.Close() }()
	p := filepath.Join(dir, "good.db")
	if _, err := db.BackupToFile(p); err != nil {
		t.Fatal(err)
	}
	return p
}

func readFile(t *testing.T, p string) []byte {
	t.Helper()
	data, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

func writeFile(t *testing.T, dir string, data []byte) string {
	t.Helper()
	p := filepath.Join(dir, "bad.db")
	if err := os.WriteFile(p, data, 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// damage edits a closed data file behind the store's back.
func damage(t *testing.T, path string, fn func(tx *bolt.Tx) error) {
	t.Helper()
	bdb, err := bolt.Open(path, 0o600, &bolt.Options{Timeout: testTimeout})
	if err != nil {
		t.Fatal(err)
	}
	if err := bdb.Update(fn); err != nil {
		t.Fatal(err)
	}
	if err := bdb.Close(); err != nil {
		t.Fatal(err)
	}
}

func TestCheckFindsProblems(t *testing.T) {
	id8 := func(id uint64) []byte { return binary.BigEndian.AppendUint64(nil, id) }
	attemptKey := func(id uint64, at time.Time, seq uint32) []byte {
		k := binary.BigEndian.AppendUint64(id8(id), uint64(at.UnixNano()))
		return binary.BigEndian.AppendUint32(k, seq)
	}
	cases := []struct {
		name   string
		damage func(tx *bolt.Tx) error
		want   string // in the error message
	}{
		{"names entry to no profile", func(tx *bolt.Tx) error {
			return tx.Bucket([]byte("names")).Put([]byte("ghost"), store.Seal([]byte("ghost"), id8(77)))
		}, "points to athlete 77"},
		{"profile not indexed", func(tx *bolt.Tx) error {
			return tx.Bucket([]byte("names")).Delete([]byte("checked athlete"))
		}, "name index holds"},
		{"attempt of a missing athlete", func(tx *bolt.Tx) error {
			return putSealed(tx, "attempts", attemptKey(9, base, 0), `{"athlete":9,"time":"2025-03-03T17:30:00Z","outcome":"o"}`)
		}, "athlete 9 has no profile"},
		{"attempt key and value disagree", func(tx *bolt.Tx) error {
			return putSealed(tx, "attempts", attemptKey(1, base, 5), `{"athlete":1,"time":"2025-03-03T17:30:00Z","seq":4,"outcome":"o"}`)
		}, "seq 4"},
		{"user linked to a missing athlete", func(tx *bolt.Tx) error {
			return putSealed(tx, "users", []byte("U1"), `{"id":"U1","athlete":5}`)
		}, "linked to athlete 5"},
		{"damaged profile", func(tx *bolt.Tx) error {
			return putSealed(tx, "athletes", id8(1), `{"id":1,`)
		}, "athlete 1:"},
		{"schema version missing", func(tx *bolt.Tx) error {
			return tx.Bucket([]byte("meta")).Delete([]byte("schema"))
		}, "schema version 0"},
		{"bucket missing", func(tx *bolt.Tx) error { return tx.DeleteBucket([]byte("seen")) }, "bucket seen missing"},
		{"two lines share a number", func(tx *bolt.Tx) error {
			b := tx.Bucket([]byte("lines"))
			if err := b.SetSequence(4); err != nil {
				return err
			}
			for i, by := range []string{"U1", "U2"} {
				k := append([]byte(by+"\x00"), attemptKey(0, base, uint32(i))[8:]...)
				if err := putSealed(tx, "lines", k, `{"id":"L","by":"`+by+`","time":"2025-03-03T17:30:00Z","no":3}`); err != nil {
					return err
				}
			}
			return nil
		}, "share number #3"},
		{"line number never given", func(tx *bolt.Tx) error {
			k := append([]byte("U1\x00"), attemptKey(0, base, 0)[8:]...)
			return putSealed(tx, "lines", k, `{"id":"L","by":"U1","time":"2025-03-03T17:30:00Z","no":9}`)
		}, "above the last given"},
		{"audit key malformed", func(tx *bolt.Tx) error {
			return putSealed(tx, "audit", []byte("short"), `{}`)
		}, "audit key"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := tempPath(t)
			db := openUnchecked(t, path)
			addAthlete(t, db, "Checked Athlete")
			if err := db.Check(); err != nil {
				t.Fatalf("check before damage: %v", err)
			}
			if err := store.Raw(db).Update(c.damage); err != nil {
				t.Fatal(err)
			}
			err := db.Check()
			if !errors.Is(err, store.ErrInconsistent) || !strings.Contains(err.Error(), c.want) {
				t.Errorf("check: %v; want ErrInconsistent mentioning %q", err, c.want)
			}
		})
	}
}

// putSealed writes a record with the raw bbolt handle as the store seals it.
func putSealed(tx *bolt.Tx, bucket string, key []byte, v string) error {
	return tx.Bucket([]byte(bucket)).Put(key, store.Seal(key, []byte(v)))
}
