package store_test

// Damage: every record carries a CRC-32C seal (checked against its published
// check value in seal_internal_test.go); here, reading a damaged record
// through every accessor must give ErrDamaged and never the damaged value, a
// fault of the memory map must become the same error, and old files must
// migrate. The expected values are the records the test itself wrote.

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// fillStore writes records of every kind: the team, athletes (some renamed
// and one removed, so free pages hold older versions), attempts, lines,
// users, seen ids, audit entries, digests, hints and inbox entries.
func fillStore(t testing.TB, db *store.DB, athletes, attemptsEach int) {
	t.Helper()
	ctx := context.Background()
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	must(db.Update(ctx, func(tx *store.Tx) error {
		return tx.PutTeam(record.Team{Name: "Test squad", TZ: "Europe/Madrid", DigestChannel: "#jumps", DigestMinute: 420})
	}))
	for i := range athletes {
		a := record.Athlete{Name: fmt.Sprintf("Ath%02d", i), StatureM: 1.70 + float64(i)/100, MassKg: 60 + float64(i), Sex: record.SexFemale, PersonalBestM: 1.60 + float64(i)/100, Created: base}
		must(db.Update(ctx, func(tx *store.Tx) error {
			if err := tx.PutAthlete(&a); err != nil {
				return err
			}
			user := fmt.Sprintf("U%02d", i)
			if err := tx.PutUser(record.User{ID: user, Name: "user " + user, Role: record.RoleAthlete, AthleteID: a.ID}); err != nil {
				return err
			}
			if err := tx.MarkHintShown(user, "knock", base); err != nil {
				return err
			}
			for j := 0; j < attemptsEach; j += 3 {
				at := base.Add(time.Duration(j) * time.Hour)
				as := []record.Attempt{
					{AthleteID: a.ID, Time: at, BarM: 1.50, Outcome: record.Failed, Number: 1},
					{AthleteID: a.ID, Time: at, BarM: 1.50, Outcome: record.Cleared, Number: 2},
					{AthleteID: a.ID, Time: at, BarM: 1.55, Outcome: record.Passed, Number: 1},
				}
				if err := tx.AddAttempts(as); err != nil {
					return err
				}
				keys := make([]record.Key, len(as))
				for k, x := range as {
					keys[k] = record.Key{AthleteID: x.AthleteID, Time: x.Time, Seq: x.Seq}
				}
				id := fmt.Sprintf("m-%d-%d", i, j)
				if err := tx.PutLine(record.Line{ID: id, LoggedBy: user, Time: at, AthleteID: a.ID, Attempts: keys, Text: "log 1.50 xo 1.55 -"}); err != nil {
					return err
				}
				if err := tx.MarkSeen(id, at); err != nil {
					return err
				}
			}
			return tx.Audit(record.AuditEntry{Time: base, Actor: "coach", Action: "athlete add", Subject: a.Name, AthleteID: a.ID})
		}))
	}
	// Renames and a removal leave older page versions among the free pages.
	must(db.Update(ctx, func(tx *store.Tx) error {
		a, _, err := tx.AthleteByName("Ath00")
		if err != nil {
			return err
		}
		a.Name = "Ath00-R"
		return tx.PutAthlete(&a)
	}))
	if athletes > 2 {
		must(db.Update(ctx, func(tx *store.Tx) error {
			a, _, err := tx.AthleteByName("Ath02")
			if err != nil {
				return err
			}
			_, err = tx.DeleteAthlete(a.ID)
			return err
		}))
	}
	must(db.Update(ctx, func(tx *store.Tx) error {
		for _, w := range []string{"2025-W10", "2025-W11"} {
			if err := tx.MarkDigestPosted(w, base); err != nil {
				return err
			}
		}
		return nil
	}))
	for i := range 3 {
		at := base.Add(time.Duration(i) * time.Minute)
		must(db.InboxPut(ctx, store.InboxEntry{ID: db.NewInboxID(at), Key: fmt.Sprintf("delivery-%d", i), At: at, Payload: []byte(`{"text":"log Ath01 1.50 o"}`)}, 0))
	}
}

// probes are the keys a dump asks for by name (the accessors that take a
// key), gathered once from the undamaged file.
type probes struct {
	seen, weeks, hintUsers []string
}

// dumpStore reads everything through the store's accessors, each in its own
// transaction as the bot's commands do, and returns one entry per record
// found (its JSON) or, for a read that failed, "ERR " and the error. A
// record not found has no entry, so a missing record is told apart from a
// record read as another value. A read that fails does not stop the others.
func dumpStore(db *store.DB, pr probes) (map[string]string, []error) {
	d, errs := dumpStoreReads(db, pr)
	return d.out, errs
}

// storeDump is what dumpStoreReads read: the entries, the read each entry
// came from, and the reads that ran to the end without an error.
type storeDump struct {
	out     map[string]string
	readOf  map[string]string
	okReads map[string]bool
}

// dumpStoreReads is dumpStore, also saying which read found each entry.
func dumpStoreReads(db *store.DB, pr probes) (storeDump, []error) {
	ctx := context.Background()
	d := storeDump{out: map[string]string{}, readOf: map[string]string{}, okReads: map[string]bool{}}
	out := d.out
	var errs []error
	current := ""
	put := func(name string, v any) {
		data, _ := json.Marshal(v)
		out[name] = string(data)
		d.readOf[name] = current
	}
	read := func(name string, fn func(tx *store.Tx) error) {
		current = name
		if err := db.View(ctx, fn); err != nil {
			out[name] = "ERR " + err.Error()
			errs = append(errs, err)
		} else {
			d.okReads[name] = true
		}
	}
	read("team", func(tx *store.Tx) error {
		t, err := tx.Team()
		put("team", t)
		return err
	})
	var ids []uint64
	var users []string
	read("athletes", func(tx *store.Tx) error {
		as, err := tx.Athletes()
		if err != nil {
			return err
		}
		for _, a := range as {
			ids = append(ids, a.ID)
			put("listed "+a.Name, a.ID)
		}
		return nil
	})
	for _, id := range ids {
		read(fmt.Sprintf("athlete %d", id), func(tx *store.Tx) error {
			a, ok, err := tx.AthleteByID(id)
			if err != nil || !ok {
				return err
			}
			put(fmt.Sprintf("athlete %d", id), a)
			b, ok, err := tx.AthleteByName(a.Name)
			if ok {
				put("by name "+a.Name, b.ID)
			}
			return err
		})
		read(fmt.Sprintf("attempts %d", id), func(tx *store.Tx) error {
			return tx.Attempts(id, time.Unix(0, 0), time.Date(2200, 1, 1, 0, 0, 0, 0, time.UTC), func(a record.Attempt) error {
				put(fmt.Sprintf("attempt %d %s %d", a.AthleteID, a.Time.Format(time.RFC3339Nano), a.Seq), a)
				return nil
			})
		})
	}
	read("users", func(tx *store.Tx) error {
		us, err := tx.Users()
		for _, u := range us {
			users = append(users, u.ID)
			put("listed user "+u.ID, u)
		}
		return err
	})
	for _, u := range append(users, pr.hintUsers...) {
		read("user "+u, func(tx *store.Tx) error {
			if got, ok, err := tx.User(u); err != nil {
				return err
			} else if ok {
				put("user "+u, got)
			}
			if l, ok, err := tx.LastLine(u); err != nil {
				return err
			} else if ok {
				put("last line "+u, l)
			}
			if at, ok, err := tx.HintShown(u, "knock"); err != nil {
				return err
			} else if ok {
				put("hint "+u, at)
			}
			return nil
		})
	}
	read("audit", func(tx *store.Tx) error {
		return tx.AuditEntries(time.Unix(0, 0), func(e record.AuditEntry) error {
			put("audit "+e.Action+" "+e.Subject, e)
			return nil
		})
	})
	for _, id := range pr.seen {
		read("seen "+id, func(tx *store.Tx) error {
			ok, err := tx.Seen(id)
			if ok {
				put("seen "+id, ok)
			}
			return err
		})
	}
	for _, w := range pr.weeks {
		read("digest "+w, func(tx *store.Tx) error {
			at, ok, err := tx.DigestPosted(w)
			if ok {
				put("digest "+w, at)
			}
			return err
		})
	}
	current = "inbox"
	if es, err := db.InboxEntries(ctx); err != nil {
		out["inbox"] = "ERR " + err.Error()
		errs = append(errs, err)
	} else {
		d.okReads["inbox"] = true
		for _, e := range es {
			put("inbox "+e.ID, e)
		}
	}
	return d, errs
}

// probesOf lists the keys of the seen, digests and hints buckets.
func probesOf(t testing.TB, db *store.DB) probes {
	t.Helper()
	var pr probes
	err := store.Raw(db).View(func(tx *bolt.Tx) error {
		keys := func(bucket string) (ks []string) {
			_ = tx.Bucket([]byte(bucket)).ForEach(func(k, _ []byte) error { ks = append(ks, string(k)); return nil })
			return ks
		}
		pr.seen, pr.weeks = keys("seen"), keys("digests")
		for _, k := range keys("hints") {
			pr.hintUsers = append(pr.hintUsers, strings.SplitN(k, "\x00", 2)[0])
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return pr
}

// TestDamagedRecordsAreReported flips one bit in each stored value in turn
// (raw, so the seal is not renewed) and reads everything: the read that
// meets the record fails with ErrDamaged, no read returns anything but
// what was written, and Check names the record.
func TestDamagedRecordsAreReported(t *testing.T) {
	db := openUnchecked(t, tempPath(t))
	fillStore(t, db, 3, 3)
	pr := probesOf(t, db)
	want, errs := dumpStore(db, pr)
	if len(errs) > 0 {
		t.Fatalf("undamaged file: %v", errs)
	}
	type rec struct{ bucket, key string }
	var recs []rec
	if err := store.Raw(db).View(func(tx *bolt.Tx) error {
		return tx.ForEach(func(name []byte, b *bolt.Bucket) error {
			return b.ForEach(func(k, _ []byte) error {
				recs = append(recs, rec{string(name), string(k)})
				return nil
			})
		})
	}); err != nil {
		t.Fatal(err)
	}
	flip := func(r rec) {
		t.Helper()
		if err := store.Raw(db).Update(func(tx *bolt.Tx) error {
			b := tx.Bucket([]byte(r.bucket))
			v := bytes.Clone(b.Get([]byte(r.key)))
			v[len(v)/2] ^= 0x08
			return b.Put([]byte(r.key), v)
		}); err != nil {
			t.Fatal(err)
		}
	}
	for _, r := range recs {
		flip(r)
		got, errs := dumpStore(db, pr)
		for _, err := range errs {
			if !errors.Is(err, store.ErrDamaged) {
				t.Errorf("%s %q damaged: read failed with %v, want ErrDamaged", r.bucket, r.key, err)
			}
		}
		for k, v := range got {
			if !strings.HasPrefix(v, "ERR ") && v != want[k] {
				t.Errorf("%s %q damaged: %s read as %s, was %s", r.bucket, r.key, k, v, want[k])
			}
		}
		if len(errs) == 0 && r.bucket != "meta" {
			t.Errorf("%s %q damaged: every read succeeded", r.bucket, r.key)
		}
		if err := db.Check(); !errors.Is(err, store.ErrInconsistent) {
			t.Errorf("%s %q damaged: check gave %v", r.bucket, r.key, err)
		}
		flip(r) // undo
	}
	if err := db.Check(); err != nil {
		t.Fatalf("after undoing every flip: %v", err)
	}
}

// A sealed record moved under another key (as a damaged key byte would show
// it) is damage, not a record of another athlete or time.
func TestMovedRecordIsDamage(t *testing.T) {
	db := openUnchecked(t, tempPath(t))
	id := addAthlete(t, db, "Ines")
	update(t, db, func(tx *store.Tx) error {
		return tx.AddAttempts([]record.Attempt{{AthleteID: id, Time: base, BarM: 1.6, Outcome: record.Cleared, Number: 1}})
	})
	if err := store.Raw(db).Update(func(tx *bolt.Tx) error {
		b := tx.Bucket([]byte("attempts"))
		k, v := b.Cursor().First()
		moved := bytes.Clone(k)
		moved[len(moved)-1] = 7 // seq 0 -> 7
		return b.Put(moved, bytes.Clone(v))
	}); err != nil {
		t.Fatal(err)
	}
	err := db.View(context.Background(), func(tx *store.Tx) error {
		return tx.Attempts(id, base.Add(-time.Hour), base.Add(time.Hour), func(record.Attempt) error { return nil })
	})
	if !errors.Is(err, store.ErrDamaged) {
		t.Errorf("attempts with a moved record: %v, want ErrDamaged", err)
	}
}

// A version 1 file (values unsealed, schema version unsealed) opens, is
// sealed by the migration, has its line numbered, reads back what it held,
// and passes its check;
// read-only it is refused as needing the migration.
func TestVersion1FileMigrates(t *testing.T) {
	id8 := func(id uint64) []byte { return binary.BigEndian.AppendUint64(nil, id) }
	attemptKey := func(id uint64, at time.Time, seq uint32) []byte {
		k := binary.BigEndian.AppendUint64(id8(id), uint64(at.UnixNano()))
		return binary.BigEndian.AppendUint32(k, seq)
	}
	path := tempPath(t)
	athlete := `{"id":1,"name":"Nora","stature_m":1.74,"created":"2025-03-03T17:30:00Z"}`
	attempt := `{"athlete":1,"time":"2025-03-03T17:30:00Z","seq":0,"bar_m":1.62,"outcome":"o","n":1}`
	line := `{"id":"m1","by":"U1","time":"2025-03-03T17:30:00Z","athlete":1,"attempts":[{"athlete":1,"time":"2025-03-03T17:30:00Z","seq":0}],"text":"log Nora 1.62 o"}`
	rawFile(t, path, func(tx *bolt.Tx) error {
		if err := makeV1(tx); err != nil {
			return err
		}
		ath := tx.Bucket([]byte("athletes"))
		if err := ath.SetSequence(1); err != nil {
			return err
		}
		puts := []struct{ b, k, v string }{
			{"team", "settings", `{"name":"Old squad","digest_day":1,"digest_minute":420}`},
			{"athletes", string(id8(1)), athlete},
			{"names", "nora", string(id8(1))},
			{"attempts", string(attemptKey(1, base, 0)), attempt},
			{"users", "U1", `{"id":"U1","athlete":1}`},
			{"seen", "m1", string(binary.BigEndian.AppendUint64(nil, uint64(base.UnixNano())))},
			{"lines", "U1\x00" + string(attemptKey(0, base, 0)[8:]), line},
		}
		for _, p := range puts {
			if err := tx.Bucket([]byte(p.b)).Put([]byte(p.k), []byte(p.v)); err != nil {
				return err
			}
		}
		return nil
	})
	if _, err := store.Open(path, store.Options{ReadOnly: true, Timeout: testTimeout}); !errors.Is(err, store.ErrSchemaOlder) {
		t.Fatalf("read-only open of a version 1 file: %v, want ErrSchemaOlder", err)
	}
	db := openUnchecked(t, path)
	if err := db.Check(); err != nil {
		t.Fatalf("check after migration: %v", err)
	}
	view(t, db, func(tx *store.Tx) error {
		team, err := tx.Team()
		if err != nil || team.Name != "Old squad" {
			t.Errorf("team %+v, %v", team, err)
		}
		a, ok, err := tx.AthleteByName("NORA")
		if err != nil || !ok || a.StatureM != 1.74 {
			t.Errorf("athlete %+v %v %v", a, ok, err)
		}
		n := 0
		if err := tx.Attempts(1, base, base.Add(time.Second), func(x record.Attempt) error {
			n++
			if x.BarM != 1.62 || x.LineNo != 1 {
				t.Errorf("attempt %+v, want bar 1.62 on line #1", x)
			}
			return nil
		}); err != nil || n != 1 {
			t.Errorf("%d attempts, %v", n, err)
		}
		if seen, err := tx.Seen("m1"); err != nil || !seen {
			t.Errorf("seen %v %v", seen, err)
		}
		// Lines are numbered by the version 3 step that follows the seal.
		if l, ok, err := tx.LineByNumber(1); err != nil || !ok || l.ID != "m1" {
			t.Errorf("line #1: %+v %v %v, want m1", l, ok, err)
		}
		return nil
	})
	// Every value is now sealed.
	if err := store.Raw(db).View(func(tx *bolt.Tx) error {
		return tx.ForEach(func(name []byte, b *bolt.Bucket) error {
			return b.ForEach(func(k, v []byte) error {
				if _, err := store.Unseal(k, v); err != nil {
					t.Errorf("%s %q not sealed: %v", name, k, err)
				}
				return nil
			})
		})
	}); err != nil {
		t.Fatal(err)
	}
}

// A version 1 backup restores: Restore migrates the copy before checking it.
func TestRestoreVersion1Backup(t *testing.T) {
	dir := t.TempDir()
	backup := filepath.Join(dir, "old-backup.db")
	rawFile(t, backup, func(tx *bolt.Tx) error {
		if err := makeV1(tx); err != nil {
			return err
		}
		return tx.Bucket([]byte("team")).Put([]byte("settings"), []byte(`{"name":"Old squad","digest_day":1}`))
	})
	live := filepath.Join(dir, "live.db")
	if err := store.Restore(backup, live); err != nil {
		t.Fatalf("restore a version 1 backup: %v", err)
	}
	if err := store.Check(live); err != nil {
		t.Fatalf("check after restore: %v", err)
	}
	db := openUnchecked(t, live)
	view(t, db, func(tx *store.Tx) error {
		team, err := tx.Team()
		if err != nil || team.Name != "Old squad" {
			t.Errorf("team after restore: %+v, %v", team, err)
		}
		return nil
	})
}

// logCounter counts log records at error level.
type logCounter struct {
	mu   sync.Mutex
	msgs []string
}

func (c *logCounter) Enabled(context.Context, slog.Level) bool { return true }
func (c *logCounter) Handle(_ context.Context, r slog.Record) error {
	c.mu.Lock()
	defer c.mu.Unlock()
	if r.Level >= slog.LevelError {
		c.msgs = append(c.msgs, r.Message)
	}
	return nil
}
func (c *logCounter) WithAttrs([]slog.Attr) slog.Handler { return c }
func (c *logCounter) WithGroup(string) slog.Handler      { return c }

// A data file cut short under a running DB makes reads of the lost pages
// fault (SIGBUS); View, Update and Batch return ErrDamaged instead of
// killing the process, reads of pages still there go on working, and the
// damage is logged once.
func TestFaultBecomesDamage(t *testing.T) {
	path := tempPath(t)
	logs := &logCounter{}
	db, err := store.Open(path, store.Options{Timeout: testTimeout, Logger: slog.New(logs)})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = db.Close() }()
	fillStore(t, db, 4, 300)
	ctx := context.Background()
	var id uint64
	view(t, db, func(tx *store.Tx) error {
		a, _, err := tx.AthleteByName("Ath03")
		id = a.ID
		return err
	})
	fi, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	// Keep the meta pages and the first data pages; the rest is gone.
	if err := os.Truncate(path, 4*4096); err != nil {
		t.Fatal(err)
	}
	t.Logf("file cut from %d to %d bytes", fi.Size(), 4*4096)
	readAll := func(tx *store.Tx) error {
		return tx.Attempts(id, time.Unix(0, 0), time.Now(), func(record.Attempt) error { return nil })
	}
	// First, before any damage is known: concurrent callers, so that
	// bbolt's batch goroutine runs them. (Once damage is known, Batch
	// commits on the caller's goroutine.)
	var wg sync.WaitGroup
	batchErrs := make([]error, 8)
	gate := make(chan struct{})
	for i := range batchErrs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			<-gate
			batchErrs[i] = db.Batch(ctx, readAll)
		}()
	}
	close(gate)
	wg.Wait()
	for i, err := range batchErrs {
		if !errors.Is(err, store.ErrDamaged) {
			t.Errorf("batch %d: %v, want ErrDamaged", i, err)
		}
	}
	if err := db.View(ctx, readAll); !errors.Is(err, store.ErrDamaged) {
		t.Errorf("view: %v, want ErrDamaged", err)
	}
	if err := db.Update(ctx, readAll); !errors.Is(err, store.ErrDamaged) {
		t.Errorf("update: %v, want ErrDamaged", err)
	}
	if err := db.View(ctx, func(tx *store.Tx) error { return nil }); err != nil {
		t.Errorf("a view that reads nothing after the faults: %v", err)
	}
	if len(logs.msgs) != 1 {
		t.Errorf("damage logged %d times, want once: %q", len(logs.msgs), logs.msgs)
	}
}

// A panic of the caller's own function is not damage: it goes on up.
func TestOtherPanicsPassThrough(t *testing.T) {
	db := openTemp(t)
	defer func() {
		if r := recover(); r != "caller's bug" {
			t.Errorf("recovered %v, want the caller's panic", r)
		}
	}()
	_ = db.View(context.Background(), func(*store.Tx) error { panic("caller's bug") })
	t.Error("View returned")
}

// sortedKeys lists a map's keys in order, for stable messages.
func sortedKeys(m map[string]string) []string {
	ks := make([]string, 0, len(m))
	for k := range m {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return ks
}
