package store_test

// The checks in this package test the storage contract written in
// bot/storage.go (bot.Tx), the layout in store/schema.go and bbolt v1.5's
// documented behaviour (Options.Timeout and errors.ErrTimeout, Batch, tx.Check,
// tx.WriteTo). Record field values are arbitrary fixtures: every check
// compares what comes back with what went in, or counts records.

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
	bolterrors "go.etcd.io/bbolt/errors"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// Tx must satisfy the bot's transaction interface.
var _ bot.Tx = (*store.Tx)(nil)

const testTimeout = 100 * time.Millisecond

// base is an arbitrary fixture time.
var base = time.Date(2025, 3, 3, 17, 30, 0, 0, time.UTC)

func tempPath(t *testing.T) string {
	t.Helper()
	return filepath.Join(t.TempDir(), "data", "lathmark.db")
}

// openTemp opens a fresh data file; at cleanup it runs Check (bbolt pages
// and the invariants) and closes the file.
func openTemp(t *testing.T) *store.DB {
	t.Helper()
	db := openUnchecked(t, tempPath(t))
	t.Cleanup(func() {
		if err := db.Check(); err != nil {
			t.Errorf("check at cleanup: %v", err)
		}
	})
	return db
}

// openUnchecked opens path and closes it at cleanup without checking, for
// tests that break the invariants on purpose.
func openUnchecked(t *testing.T, path string) *store.DB {
	t.Helper()
	db, err := store.Open(path, store.Options{Timeout: testTimeout})
	if err != nil {
		t.Fatalf("open: %v", err)
	}
	t.Cleanup(func() {
		if err := db.Close(); err != nil {
			t.Errorf("close: %v", err)
		}
	})
	return db
}

func update(t *testing.T, db *store.DB, fn func(*store.Tx) error) {
	t.Helper()
	if err := db.Update(context.Background(), fn); err != nil {
		t.Fatalf("update: %v", err)
	}
}

func view(t *testing.T, db *store.DB, fn func(*store.Tx) error) {
	t.Helper()
	if err := db.View(context.Background(), fn); err != nil {
		t.Fatalf("view: %v", err)
	}
}

func checksum(t *testing.T, db *store.DB) [32]byte {
	t.Helper()
	sum, err := db.Checksum()
	if err != nil {
		t.Fatalf("checksum: %v", err)
	}
	return sum
}

func fileHash(t *testing.T, path string) [32]byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("read %s: %v", path, err)
	}
	return sha256.Sum256(data)
}

// addAthlete stores a profile with the given name and returns its id.
func addAthlete(t *testing.T, db *store.DB, name string) uint64 {
	t.Helper()
	a := record.Athlete{Name: name, StatureM: 1.80, MassKg: 70, Created: base}
	update(t, db, func(tx *store.Tx) error { return tx.PutAthlete(&a) })
	if a.ID == 0 {
		t.Fatalf("PutAthlete(%q) left ID 0", name)
	}
	return a.ID
}

// rawFile creates a bbolt file at path and lets fill shape it.
func rawFile(t *testing.T, path string, fill func(tx *bolt.Tx) error) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o700); err != nil {
		t.Fatal(err)
	}
	bdb, err := bolt.Open(path, 0o600, &bolt.Options{Timeout: testTimeout})
	if err != nil {
		t.Fatal(err)
	}
	if fill != nil {
		if err := bdb.Update(fill); err != nil {
			t.Fatal(err)
		}
	}
	if err := bdb.Close(); err != nil {
		t.Fatal(err)
	}
}

func setSchema(tx *bolt.Tx, v uint64) error {
	b, err := tx.CreateBucketIfNotExists([]byte("meta"))
	if err != nil {
		return err
	}
	return b.Put([]byte("schema"), store.Seal([]byte("schema"), binary.BigEndian.AppendUint64(nil, v)))
}

func TestFileModes(t *testing.T) {
	path := tempPath(t)
	openUnchecked(t, path)
	for _, c := range []struct {
		path string
		want os.FileMode
	}{
		{path, 0o600},
		{filepath.Dir(path), 0o700 | os.ModeDir},
	} {
		fi, err := os.Stat(c.path)
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode() != c.want {
			t.Errorf("%s: mode %v, want %v", c.path, fi.Mode(), c.want)
		}
	}
}

func TestReopenKeepsData(t *testing.T) {
	path := tempPath(t)
	db, err := store.Open(path, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	a := record.Athlete{Name: "Ines Varga", StatureM: 1.74, Created: base}
	if err := db.Update(context.Background(), func(tx *store.Tx) error {
		if err := tx.PutAthlete(&a); err != nil {
			return err
		}
		return tx.AddAttempts([]record.Attempt{{AthleteID: a.ID, Time: base, BarM: 1.70, Outcome: record.Cleared, Number: 1}})
	}); err != nil {
		t.Fatal(err)
	}
	before := checksum(t, db)
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}

	db = openTemp(t) // a second, unrelated file must not see the data
	view(t, db, func(tx *store.Tx) error {
		if _, ok, err := tx.AthleteByID(a.ID); ok || err != nil {
			t.Errorf("fresh file has athlete %d (ok %v, err %v)", a.ID, ok, err)
		}
		return nil
	})

	db2 := openUnchecked(t, path)
	if got := checksum(t, db2); got != before {
		t.Errorf("checksum after reopen differs")
	}
	view(t, db2, func(tx *store.Tx) error {
		got, ok, err := tx.AthleteByName("ines varga")
		if err != nil || !ok || got.StatureM != 1.74 {
			t.Errorf("after reopen: %+v ok %v err %v", got, ok, err)
		}
		return nil
	})
	if err := db2.Check(); err != nil {
		t.Error(err)
	}
}

func TestOpenLocked(t *testing.T) {
	path := tempPath(t)
	openUnchecked(t, path)
	for _, readOnly := range []bool{false, true} {
		start := time.Now()
		db, err := store.Open(path, store.Options{Timeout: testTimeout, ReadOnly: readOnly})
		t.Logf("read-only %v: gave up after %v", readOnly, time.Since(start))
		if err == nil {
			_ = db.Close()
			t.Fatalf("read-only %v: second open succeeded", readOnly)
		}
		if !errors.Is(err, store.ErrLocked) || !errors.Is(err, bolterrors.ErrTimeout) {
			t.Errorf("read-only %v: error %v does not match ErrLocked and bbolt ErrTimeout", readOnly, err)
		}
		var le *store.LockedError
		if !errors.As(err, &le) || le.Path != path || le.Waited != testTimeout {
			t.Errorf("read-only %v: LockedError %+v", readOnly, le)
		}
		if !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), "in use by another lathmark process") {
			t.Errorf("message %q lacks the path or the cause", err)
		}
	}
}

func TestOpenRefuses(t *testing.T) {
	cases := []struct {
		name string
		make func(t *testing.T, path string)
		opts store.Options
		want error // matched with errors.Is; nil means any error
	}{
		{"schema newer", func(t *testing.T, p string) {
			rawFile(t, p, func(tx *bolt.Tx) error { return setSchema(tx, store.SchemaVersion+1) })
		}, store.Options{}, store.ErrSchemaNewer},
		{"schema newer read-only", func(t *testing.T, p string) {
			rawFile(t, p, func(tx *bolt.Tx) error { return setSchema(tx, store.SchemaVersion+5) })
		}, store.Options{ReadOnly: true}, store.ErrSchemaNewer},
		{"no schema, foreign buckets", func(t *testing.T, p string) {
			rawFile(t, p, func(tx *bolt.Tx) error {
				_, err := tx.CreateBucket([]byte("widgets"))
				return err
			})
		}, store.Options{}, nil},
		{"older schema read-only", func(t *testing.T, p string) { rawFile(t, p, nil) }, store.Options{ReadOnly: true}, store.ErrSchemaOlder},
		{"not a bbolt file", func(t *testing.T, p string) {
			if err := os.MkdirAll(filepath.Dir(p), 0o700); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(p, []byte(strings.Repeat("not a data file\n", 1000)), 0o600); err != nil {
				t.Fatal(err)
			}
		}, store.Options{}, bolterrors.ErrInvalid},
		{"negative timeout", func(t *testing.T, p string) { rawFile(t, p, nil) }, store.Options{Timeout: -1}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := tempPath(t)
			c.make(t, path)
			before := fileHash(t, path)
			db, err := store.Open(path, c.opts)
			if err == nil {
				_ = db.Close()
				t.Fatal("open succeeded")
			}
			if c.want != nil && !errors.Is(err, c.want) {
				t.Errorf("error %v, want %v", err, c.want)
			}
			if !strings.Contains(err.Error(), path) {
				t.Errorf("error %q does not name the file", err)
			}
			if fileHash(t, path) != before {
				t.Error("refused open changed the file")
			}
		})
	}
}

func TestOpenReadOnly(t *testing.T) {
	path := tempPath(t)
	if _, err := store.Open(path, store.Options{ReadOnly: true}); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("read-only open of a missing file: %v, want not-exist", err)
	}
	if _, err := os.Stat(path); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("read-only open created the file: %v", err)
	}
	db, err := store.Open(path, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	addAthlete(t, db, "Noor Haddad")
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	before := fileHash(t, path)

	ro, err := store.Open(path, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = ro.Close() }()
	view(t, ro, func(tx *store.Tx) error {
		if _, ok, err := tx.AthleteByName("noor haddad"); !ok || err != nil {
			t.Errorf("read-only lookup: ok %v err %v", ok, err)
		}
		return nil
	})
	if err := ro.Update(context.Background(), func(tx *store.Tx) error { return tx.MarkSeen("m1", base) }); !errors.Is(err, bolterrors.ErrDatabaseReadOnly) {
		t.Errorf("read-only update: %v, want ErrDatabaseReadOnly", err)
	}
	if err := ro.Check(); err != nil {
		t.Errorf("check read-only: %v", err)
	}
	if fileHash(t, path) != before {
		t.Error("read-only use changed the file")
	}
}

func TestMigrations(t *testing.T) {
	cases := []struct {
		name     string
		start    func(tx *bolt.Tx) error // shapes the raw file; nil = empty file
		next     func(tx *bolt.Tx) error // the extra test step; nil = plain Open
		wantErr  bool
		wantVer  uint64
		wantMark bool
	}{
		{name: "version 0 (empty file) to current", wantVer: store.SchemaVersion},
		{name: "version 0 with our meta bucket only", start: func(tx *bolt.Tx) error {
			_, err := tx.CreateBucket([]byte("meta"))
			return err
		}, wantVer: store.SchemaVersion},
		{name: "version 0 to the test step in one run", next: markStep, wantVer: store.SchemaVersion + 1, wantMark: true},
		{name: "version 1 to the test step", start: func(tx *bolt.Tx) error { return makeV1(tx) }, next: markStep, wantVer: store.SchemaVersion + 1, wantMark: true},
		{name: "failing step leaves the file alone", start: func(tx *bolt.Tx) error { return makeV1(tx) }, next: func(tx *bolt.Tx) error {
			if err := markStep(tx); err != nil {
				return err
			}
			return errors.New("step failed")
		}, wantErr: true},
		{name: "failing step after step 0 undoes step 0", next: func(tx *bolt.Tx) error { return errors.New("step failed") }, wantErr: true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := tempPath(t)
			rawFile(t, path, c.start)
			before := fileHash(t, path)
			var db *store.DB
			var err error
			if c.next == nil {
				db, err = store.Open(path, store.Options{})
			} else {
				db, err = store.OpenWithNext(path, store.Options{}, c.next)
			}
			if c.wantErr {
				if err == nil {
					_ = db.Close()
					t.Fatal("open succeeded")
				}
				if fileHash(t, path) != before {
					t.Error("failed migration changed the file")
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			defer func() { _ = db.Close() }()
			st, err := db.Stats()
			if err != nil {
				t.Fatal(err)
			}
			if st.SchemaVersion != c.wantVer {
				t.Errorf("schema version %d, want %d", st.SchemaVersion, c.wantVer)
			}
			var mark bool
			if err := store.Raw(db).View(func(tx *bolt.Tx) error {
				mark = tx.Bucket([]byte("meta")).Get([]byte("test-mark")) != nil
				return nil
			}); err != nil {
				t.Fatal(err)
			}
			if mark != c.wantMark {
				t.Errorf("test step ran: %v, want %v", mark, c.wantMark)
			}
			if c.next == nil {
				if err := db.Check(); err != nil {
					t.Errorf("check after migration: %v", err)
				}
				addAthlete(t, db, "Tomas Reyes") // the buckets work
			}
		})
	}
}

// makeV1 lays out an empty version 1 file by hand (version 1 stored its
// schema version unsealed).
func makeV1(tx *bolt.Tx) error {
	for _, n := range []string{"meta", "team", "athletes", "names", "attempts", "lines", "users", "seen", "audit", "digests"} {
		if _, err := tx.CreateBucket([]byte(n)); err != nil {
			return err
		}
	}
	return tx.Bucket([]byte("meta")).Put([]byte("schema"), binary.BigEndian.AppendUint64(nil, 1))
}

func markStep(tx *bolt.Tx) error {
	return tx.Bucket([]byte("meta")).Put([]byte("test-mark"), []byte{1})
}

func TestUpdateRollsBack(t *testing.T) {
	db := openTemp(t)
	id := addAthlete(t, db, "Ada Okafor")
	before := checksum(t, db)
	sentinel := errors.New("command failed")
	writeAll := func(tx *store.Tx) {
		a := record.Athlete{Name: "Second"}
		_ = tx.PutAthlete(&a)
		_ = tx.AddAttempts([]record.Attempt{{AthleteID: id, Time: base, BarM: 1.6, Outcome: record.Failed, Number: 1}})
		_ = tx.PutTeam(record.Team{Name: "changed"})
		_ = tx.PutUser(record.User{ID: "U1", AthleteID: id})
		_ = tx.MarkSeen("m1", base)
		_ = tx.Audit(record.AuditEntry{Time: base, Actor: "U1", Action: "test"})
		_ = tx.MarkDigestPosted("2025-W10", base)
		_ = tx.PutLine(record.Line{ID: "L1", LoggedBy: "U1", Time: base, AthleteID: id})
	}

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	cases := []struct {
		name string
		ctx  context.Context
		fn   func(tx *store.Tx) error
		want error
	}{
		{"fn error", context.Background(), func(tx *store.Tx) error { writeAll(tx); return sentinel }, sentinel},
		{"cancelled before start", ctx, func(tx *store.Tx) error { t.Error("fn ran"); writeAll(tx); return nil }, context.Canceled},
		{"cancelled during fn", context.Background(), nil, context.Canceled},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ctx, fn := c.ctx, c.fn
			if fn == nil {
				var cancel context.CancelFunc
				ctx, cancel = context.WithCancel(context.Background())
				fn = func(tx *store.Tx) error { writeAll(tx); cancel(); return nil }
			}
			err := db.Update(ctx, fn)
			if !errors.Is(err, c.want) {
				t.Errorf("update: %v, want %v", err, c.want)
			}
			if got := checksum(t, db); got != before {
				t.Error("a failed update changed the data")
			}
		})
	}
	if err := db.View(ctx, func(*store.Tx) error { t.Error("view fn ran"); return nil }); !errors.Is(err, context.Canceled) {
		t.Errorf("view with cancelled ctx: %v", err)
	}
	if err := db.Batch(ctx, func(*store.Tx) error { t.Error("batch fn ran"); return nil }); !errors.Is(err, context.Canceled) {
		t.Errorf("batch with cancelled ctx: %v", err)
	}
	if err := db.Update(context.Background(), func(*store.Tx) error { return sentinel }); err != sentinel {
		t.Errorf("fn error came back as %v, want it unchanged", err)
	}

	func() {
		defer func() {
			if recover() == nil {
				t.Error("panic in fn did not propagate")
			}
		}()
		_ = db.Update(context.Background(), func(tx *store.Tx) error { writeAll(tx); panic("boom") })
	}()
	if got := checksum(t, db); got != before {
		t.Error("a panicking update changed the data")
	}
}

func TestBatch(t *testing.T) {
	path := tempPath(t)
	db, err := store.Open(path, store.Options{MaxBatchSize: 10, MaxBatchDelay: time.Millisecond})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = db.Close() }()
	id := addAthlete(t, db, "Lea Brandt")
	const writers = 50
	errs := make(chan error, writers)
	for i := range writers {
		go func() {
			errs <- db.Batch(context.Background(), func(tx *store.Tx) error {
				if i == 7 {
					return errors.New("writer 7 fails")
				}
				return tx.AddAttempts([]record.Attempt{{AthleteID: id, Time: base.Add(time.Duration(i) * time.Second), BarM: 1.5, Outcome: record.Cleared, Number: 1}})
			})
		}()
	}
	failed := 0
	for range writers {
		if err := <-errs; err != nil {
			failed++
		}
	}
	if failed != 1 {
		t.Errorf("%d batch calls failed, want 1", failed)
	}
	st, err := db.Stats()
	if err != nil {
		t.Fatal(err)
	}
	if st.Attempts != writers-1 {
		t.Errorf("%d attempts stored, want %d", st.Attempts, writers-1)
	}
	if err := db.Check(); err != nil {
		t.Error(err)
	}
}
