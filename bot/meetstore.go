package bot

import (
	"fmt"
	"sort"
	"time"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
)

// meetTx is a Tx that also keeps the team's meet sheet: one open sheet at
// a time, and the filed ones. store.Tx implements it (store/meet.go).
type meetTx interface {
	// OpenMeet returns the open sheet; ok is false when none is open.
	OpenMeet() (s meetsheet.Sheet, ok bool, err error)
	// PutOpenMeet stores the open sheet, replacing the one there.
	PutOpenMeet(s meetsheet.Sheet) error
	// FileMeet files the sheet and leaves no sheet open.
	FileMeet(s meetsheet.Sheet) error
	// FiledMeets calls fn for every filed sheet, oldest date first.
	FiledMeets(fn func(meetsheet.Sheet) error) error
	// PutFiledMeet replaces a filed sheet (same date and id).
	PutFiledMeet(s meetsheet.Sheet) error
}

// sheets returns the transaction's meet sheets.
func sheets(tx Tx) (meetTx, error) {
	m, ok := tx.(meetTx)
	if !ok {
		return nil, fmt.Errorf("meet sheet: the store keeps no meet sheets")
	}
	return m, nil
}

// openSheet reads the open sheet; ok is false when none is open.
func openSheet(tx Tx) (meetsheet.Sheet, bool, error) {
	m, err := sheets(tx)
	if err != nil {
		return meetsheet.Sheet{}, false, err
	}
	return m.OpenMeet()
}

// mustOpenSheet reads the open sheet or refuses with how to open one.
func mustOpenSheet(tx Tx) (meetsheet.Sheet, error) {
	s, ok, err := openSheet(tx)
	if err != nil {
		return s, err
	}
	if !ok {
		return s, notFoundErr(meetOpenExample, "no meet sheet is open; a coach opens one with meet open NAME [DATE] [steps ...]")
	}
	return s, nil
}

// sheetContext is what a meet command reads before it works on the open
// sheet: the team, its time zone, whether it shows imperial units, and the
// sheet.
type sheetContext struct {
	team record.Team
	loc  *time.Location
	imp  bool
	s    meetsheet.Sheet
}

// openSheetIn reads the team, its zone and the open sheet, or refuses with
// how to open one.
func openSheetIn(tx Tx) (sheetContext, error) {
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return sheetContext{}, err
	}
	s, err := mustOpenSheet(tx)
	if err != nil {
		return sheetContext{}, err
	}
	return sheetContext{team: team, loc: loc, imp: imperial(team), s: s}, nil
}

// putSheet stores the open sheet.
func putSheet(tx Tx, s meetsheet.Sheet) error {
	m, err := sheets(tx)
	if err != nil {
		return err
	}
	return m.PutOpenMeet(s)
}

// filedSheets reads every filed sheet, newest first (by date, then by
// the time it was opened).
func filedSheets(tx Tx) ([]meetsheet.Sheet, error) {
	m, err := sheets(tx)
	if err != nil {
		return nil, err
	}
	var out []meetsheet.Sheet
	if err := m.FiledMeets(func(s meetsheet.Sheet) error {
		out = append(out, s)
		return nil
	}); err != nil {
		return nil, err
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].Date != out[j].Date {
			return out[i].Date > out[j].Date
		}
		return out[i].Opened.After(out[j].Opened)
	})
	return out, nil
}
