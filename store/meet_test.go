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
