package store_test

import (
	"cmp"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// oldLine is a line of the version 2 fixture: who logged it and when
// (minutes after base), and whether it was stored with a number.
type oldLine struct {
	by       string
	minute   int
	numbered bool
}

// oldLines are stored so that key order (user, then time) differs from
// time order: U2's lines are older than most of U1's.
var oldLines = []oldLine{
	{"U1", 50, false}, {"U1", 10, false}, {"U1", 30, true}, {"U1", 70, false},
	{"U2", 5, false}, {"U2", 40, false}, {"U2", 40, false}, {"U3", 20, true},
}

// makeV2LineFile writes a version 2 file at path whose lines are in the old
// form: lines without a number and attempts without LineNo, beside lines
// already numbered as the bot numbers them (NextLineNumber). It returns
// the numbers the numbered lines got, by line ID.
func makeV2LineFile(t *testing.T, path string) map[string]uint64 {
	t.Helper()
	db, err := store.Open(path, store.Options{Timeout: testTimeout})
	if err != nil {
		t.Fatal(err)
	}
	ids := map[string]uint64{}
	numbered := map[string]uint64{}
	for _, name := range []string{"Ines", "Jon"} {
		a := record.Athlete{Name: name, StatureM: 1.80, MassKg: 70, Created: base}
		update(t, db, func(tx *store.Tx) error { return tx.PutAthlete(&a) })
		ids[name] = a.ID
	}
	for i, o := range oldLines {
		athlete := ids[[]string{"Ines", "Jon"}[i%2]]
		at := base.Add(time.Duration(o.minute) * time.Minute)
		lineID := fmt.Sprintf("L%d", i)
		update(t, db, func(tx *store.Tx) error {
			var n uint64
			if o.numbered {
				var err error
				if n, err = tx.NextLineNumber(); err != nil {
					return err
				}
				numbered[lineID] = n
			}
			as := []record.Attempt{
				{AthleteID: athlete, Time: at, BarM: 1.60, Outcome: record.Failed, Number: 1, LineID: lineID, LineNo: n},
				{AthleteID: athlete, Time: at, BarM: 1.60, Outcome: record.Cleared, Number: 2, LineID: lineID, LineNo: n},
			}
			if err := tx.AddAttempts(as); err != nil {
				return err
			}
			keys := []record.Key{as[0].Key(), as[1].Key()}
			return tx.PutLine(record.Line{ID: lineID, LoggedBy: o.by, Time: at, AthleteID: athlete, Attempts: keys, Text: "log 1.60 xo", Number: n})
		})
	}
	// A line whose attempts were dropped since: it is numbered all the same.
	update(t, db, func(tx *store.Tx) error {
		l, ok, err := tx.LastLine("U1")
		if err != nil || !ok {
			t.Fatalf("last line of U1: %v %v", ok, err)
		}
		return tx.DeleteAttempts(l.Attempts[:1])
	})
	if err := store.Raw(db).Update(func(tx *bolt.Tx) error { return setSchema(tx, 2) }); err != nil {
		t.Fatal(err)
	}
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	return numbered
}

// storedLines reads every line (through LastLine's bucket, by user) and
// every attempt of the fixture's athletes.
func storedLines(t *testing.T, db *store.DB) (map[string]record.Line, []record.Attempt) {
	t.Helper()
	lines := map[string]record.Line{}
	var attempts []record.Attempt
	view(t, db, func(tx *store.Tx) error {
		last, err := tx.LastLineNumber()
		if err != nil {
			return err
		}
		for n := uint64(1); n <= last+1; n++ {
			l, ok, err := tx.LineByNumber(n)
			if err != nil {
				return err
			}
			if ok {
				lines[l.ID] = l
			}
		}
		for _, name := range []string{"Ines", "Jon"} {
			a, _, err := tx.AthleteByName(name)
			if err != nil {
				return err
			}
			if err := tx.Attempts(a.ID, base.Add(-time.Hour), base.Add(24*time.Hour), func(x record.Attempt) error {
				attempts = append(attempts, x)
				return nil
			}); err != nil {
				return err
			}
		}
		return nil
	})
	return lines, attempts
}

// Opening a version 2 file numbers the lines stored without a number:
// fresh numbers from the lines bucket's sequence, in time order, unique,
// each attempt's LineNo its line's number, each reachable by LineByNumber;
// lines numbered before keep their numbers; a second open changes nothing.
func TestMigrateNumbersOldLines(t *testing.T) {
	path := tempPath(t)
	numberedBefore := makeV2LineFile(t, path)
	db, err := store.Open(path, store.Options{Timeout: testTimeout})
	if err != nil {
		t.Fatal(err)
	}
	st, err := db.Stats()
	if err != nil || st.SchemaVersion != 3 {
		t.Fatalf("schema version after open %d (%v), want 3", st.SchemaVersion, err)
	}
	if err := db.Check(); err != nil {
		t.Fatalf("check after migration: %v", err)
	}
	checkNumberedLines(t, db, numberedBefore)
	before := checksum(t, db)
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	again, err := store.Open(path, store.Options{Timeout: testTimeout})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _ = again.Close() }()
	if err := again.Check(); err != nil {
		t.Errorf("check after the second open: %v", err)
	}
	if checksum(t, again) != before {
		t.Error("a second open changed the file's contents")
	}
}

// checkNumberedLines checks the lines and attempts of the fixture after the
// migration (see TestMigrateNumbersOldLines).
func checkNumberedLines(t *testing.T, db *store.DB, numberedBefore map[string]uint64) {
	t.Helper()
	lines, attempts := storedLines(t, db)
	if len(lines) != len(oldLines) {
		t.Fatalf("LineByNumber reaches %d lines, want %d: %v", len(lines), len(oldLines), lines)
	}
	seen := map[uint64]string{}
	var migrated []record.Line
	for id, l := range lines {
		if l.Number == 0 {
			t.Errorf("line %s has no number", id)
		}
		if other, dup := seen[l.Number]; dup {
			t.Errorf("lines %s and %s share number %d", id, other, l.Number)
		}
		seen[l.Number] = id
		if n, ok := numberedBefore[id]; ok {
			if l.Number != n {
				t.Errorf("line %s was numbered %d and is now %d", id, n, l.Number)
			}
			continue
		}
		migrated = append(migrated, l)
	}
	// Time order: sorted by number, the migrated lines' times never go back,
	// and every migrated number is fresh (above those given before).
	slices.SortFunc(migrated, func(a, b record.Line) int { return cmp.Compare(a.Number, b.Number) })
	for i, l := range migrated {
		if i > 0 && l.Time.Before(migrated[i-1].Time) {
			t.Errorf("line #%d (%s) is older than line #%d (%s)", l.Number, l.Time, migrated[i-1].Number, migrated[i-1].Time)
		}
		for _, n := range numberedBefore {
			if l.Number <= n {
				t.Errorf("migrated line %s got #%d, not above #%d given before", l.ID, l.Number, n)
			}
		}
	}
	if want := len(numberedBefore) + len(migrated); len(migrated) > 0 && migrated[len(migrated)-1].Number != uint64(want) {
		t.Errorf("last number %d, want %d (the sequence, one per line)", migrated[len(migrated)-1].Number, want)
	}
	// 2 attempts a line, one dropped before the migration.
	if want := 2*len(oldLines) - 1; len(attempts) != want {
		t.Errorf("%d attempts, want %d", len(attempts), want)
	}
	for _, a := range attempts {
		l, ok := lines[a.LineID]
		if !ok || a.LineNo != l.Number {
			t.Errorf("attempt of line %s at %s has LineNo %d, its line #%d", a.LineID, a.Time, a.LineNo, l.Number)
		}
	}
}

// A version 2 backup with unnumbered lines restores: Restore migrates the
// copy, so the restored file has every line numbered.
func TestRestoreVersion2BackupNumbersLines(t *testing.T) {
	dir := t.TempDir()
	backup := filepath.Join(dir, "v2-backup.db")
	numberedBefore := makeV2LineFile(t, backup)
	raw, err := os.ReadFile(backup)
	if err != nil {
		t.Fatal(err)
	}
	live := filepath.Join(dir, "live.db")
	if err := store.Restore(backup, live); err != nil {
		t.Fatalf("restore a version 2 backup: %v", err)
	}
	if got, err := os.ReadFile(backup); err != nil || string(got) != string(raw) {
		t.Errorf("restore changed the backup itself (%v)", err)
	}
	if err := store.Check(live); err != nil {
		t.Fatalf("check after restore: %v", err)
	}
	db := openUnchecked(t, live)
	checkNumberedLines(t, db, numberedBefore)
}
