package store

import (
	"path/filepath"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
)

// The open sheet survives closing and reopening the file, and filing it
// leaves no open sheet behind.
func TestMeetSheetSurvivesReopen(t *testing.T) {
	path := filepath.Join(t.TempDir(), "m.db")
	db, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	s := meetsheet.Sheet{ID: "x1", Name: "Club night", Date: "2026-06-06", Opened: time.Date(2026, 6, 6, 17, 0, 0, 0, time.UTC),
		Competitors: []meetsheet.Competitor{{Name: "Guest"}}}
	if err := db.Update(t.Context(), func(tx *Tx) error { return tx.PutOpenMeet(s) }); err != nil {
		t.Fatal(err)
	}
	db.Close()
	db, err = Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	err = db.Update(t.Context(), func(tx *Tx) error {
		got, ok, err := tx.OpenMeet()
		if err != nil || !ok || got.Name != "Club night" || len(got.Competitors) != 1 {
			t.Fatalf("after reopen: %+v %v %v", got, ok, err)
		}
		return tx.FileMeet(got)
	})
	if err != nil {
		t.Fatal(err)
	}
	_ = db.View(t.Context(), func(tx *Tx) error {
		if _, ok, _ := tx.OpenMeet(); ok {
			t.Error("filed sheet still open")
		}
		n := 0
		_ = tx.FiledMeets(func(meetsheet.Sheet) error { n++; return nil })
		if n != 1 {
			t.Errorf("filed sheets: %d", n)
		}
		return nil
	})
	if err := db.Check(); err != nil {
		t.Error(err)
	}
}

// PutFiledMeet replaces a filed sheet in place (same key, still sealed: the
// file passes its check) and refuses a sheet that was never filed.
func TestPutFiledMeetReplaces(t *testing.T) {
	db, err := Open(filepath.Join(t.TempDir(), "m.db"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	s := meetsheet.Sheet{ID: "x2", Name: "Cup", Date: "2026-06-07", Competitors: []meetsheet.Competitor{{Name: "Ann", AthleteID: 7}}}
	err = db.Update(t.Context(), func(tx *Tx) error {
		if err := tx.PutFiledMeet(s); err == nil {
			t.Error("a sheet never filed was put")
		}
		if err := tx.FileMeet(s); err != nil {
			return err
		}
		s.Competitors[0] = meetsheet.Competitor{Name: "removed athlete"}
		return tx.PutFiledMeet(s)
	})
	if err != nil {
		t.Fatal(err)
	}
	var got []meetsheet.Sheet
	_ = db.View(t.Context(), func(tx *Tx) error {
		return tx.FiledMeets(func(s meetsheet.Sheet) error { got = append(got, s); return nil })
	})
	if len(got) != 1 || got[0].Competitors[0].Name != "removed athlete" || got[0].Competitors[0].AthleteID != 0 {
		t.Errorf("filed sheets: %+v", got)
	}
	if err := db.Check(); err != nil {
		t.Error(err)
	}
}
