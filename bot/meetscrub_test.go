package bot_test

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/store"
)

// storedSheets reads the open sheet and every filed one straight from the
// store, not through the bot.
func storedSheets(t *testing.T, te *testEngine) (open *meetsheet.Sheet, filed []meetsheet.Sheet) {
	t.Helper()
	err := te.DB.View(t.Context(), func(tx *store.Tx) error {
		s, ok, err := tx.OpenMeet()
		if err != nil {
			return err
		}
		if ok {
			open = &s
		}
		return tx.FiledMeets(func(s meetsheet.Sheet) error { filed = append(filed, s); return nil })
	})
	if err != nil {
		t.Fatal(err)
	}
	return open, filed
}

// athleteID is a squad athlete's stored id.
func athleteID(t *testing.T, te *testEngine, name string) uint64 {
	t.Helper()
	var id uint64
	err := te.DB.View(t.Context(), func(tx *store.Tx) error {
		a, ok, err := tx.AthleteByName(name)
		if !ok {
			t.Fatalf("no athlete %s", name)
		}
		id = a.ID
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return id
}

// sheetHolds reports whether a stored sheet still holds the name (in any
// field of its JSON) or the athlete id (on a competitor or a log key).
func sheetHolds(t *testing.T, s meetsheet.Sheet, name string, id uint64) string {
	t.Helper()
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(strings.ToLower(string(b)), strings.ToLower(name)) {
		return "the name"
	}
	for _, c := range s.Competitors {
		if c.AthleteID == id {
			return "the athlete id"
		}
	}
	for _, e := range s.Entries {
		for _, k := range e.Keys {
			if k.AthleteID == id {
				return "a log key with the athlete id"
			}
		}
	}
	return ""
}

// places maps each competitor's name to place and whether shared, as
// Final reads a sheet.
func places(s meetsheet.Sheet) map[string]string {
	out := map[string]string{}
	for _, x := range s.Final().Standings {
		p := itoa(x.Place)
		if x.Shared {
			p += "="
		}
		out[x.Name] = p
	}
	return out
}

// TestForgetScrubsMeetSheets: forget takes the athlete's name and id off
// the open sheet and every filed one, read from the store directly, and
// says how many sheets it touched; the others keep their places. The
// places are checked against the tie rules by hand (World Athletics TR
// 26.8.1 fewest jumps at the height of the tie, TR 26.8.2 fewest failures
// up to and including the last height cleared; numbers from memory):
// filed sheet, all best 1.65: Mira o o (1 jump at 1.65) ahead of Ren o xo
// (2 jumps, 26.8.1), Ren ahead of Gus xo xo (2 jumps, 2 failures against
// 1, 26.8.2).
func TestForgetScrubsMeetSheets(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.70")
	te.must("athlete add Ren height 1.80 mass 66 sex m pb 1.78")
	id := athleteID(t, te, "Mira")
	te.must("meet open Club night 2026-11-20")
	te.must("meet add Mira Ren")
	te.must("meet add Gus guest")
	te.must("meet log Mira 1.60 o 1.65 o 1.70 xxx")
	te.must("meet log Ren 1.60 o 1.65 xo 1.70 xxx")
	te.must("meet log Gus 1.60 xo 1.65 xo 1.70 xxx")
	te.must("meet close")
	te.must("meet open Winter cup")
	te.must("meet add Mira Ren")
	te.must("log Mira 1.60 o meet") // an entry with the log's keys
	te.must("meet log Ren 1.60 xo")
	_, filed := storedSheets(t, te)
	want := map[string]string{"Mira": "1", "Ren": "2", "Gus": "3"}
	for n, p := range want {
		if got := places(filed[0])[n]; got != p {
			t.Errorf("before forget, %s is %s, want %s (TR 26.8.1, 26.8.2)", n, got, p)
		}
	}

	r := te.must("forget Mira confirm")
	contains(t, r, `Taken off 2 meet sheets (named "removed athlete" there; other places unchanged).`)
	// The export, the only copy left, holds her lines of both sheets.
	var exp struct {
		Sheets []struct {
			Meet  string  `json:"meet"`
			Filed bool    `json:"filed"`
			Place int     `json:"place"`
			BestM float64 `json:"best_m"`
			Jumps string  `json:"jumps"`
		} `json:"meet_sheets"`
	}
	if len(r.Files) != 1 || json.Unmarshal(r.Files[0].Data, &exp) != nil || len(exp.Sheets) != 2 {
		t.Fatalf("export: %d files, %+v", len(r.Files), exp)
	}
	if x := exp.Sheets[0]; x.Filed || x.Meet != "Winter cup" || x.Place != 1 || x.BestM != 1.60 || x.Jumps != "1.60 o" {
		t.Errorf("export of the open sheet: %+v", x)
	}
	if x := exp.Sheets[1]; !x.Filed || x.Meet != "Club night" || x.Place != 1 || x.BestM != 1.65 || x.Jumps != "1.60 o 1.65 o 1.70 xxx" {
		t.Errorf("export of the filed sheet: %+v", x)
	}

	open, filed := storedSheets(t, te)
	if open == nil || len(filed) != 1 {
		t.Fatalf("sheets after forget: open %v, %d filed", open != nil, len(filed))
	}
	for _, s := range append(filed, *open) {
		if what := sheetHolds(t, s, "Mira", id); what != "" {
			t.Errorf("sheet %s still holds %s of the forgotten athlete: %+v", s.Name, what, s)
		}
	}
	got := places(filed[0])
	for n, p := range map[string]string{meetsheet.RemovedLabel: "1", "Ren": "2", "Gus": "3"} {
		if got[n] != p {
			t.Errorf("after forget, %s is %s, want %s: %v", n, got[n], p, got)
		}
	}
	// The open sheet's standings: the label leads, Ren second by TR 26.8.1.
	contains(t, te.must("standings more"), "removed athlete ahead of Ren at 1.60: fewest jumps at the height of the tie (TR 26.8.1)")
	if r := te.must("meet close"); strings.Contains(plain(r), "Mira") {
		t.Errorf("close names the forgotten athlete:\n%s", plain(r))
	}
}

// TestAthleteRemoveScrubsOpenSheet: athlete remove takes the name and id
// off the open sheet; Ren's place (second by TR 26.8.1, from memory) stays.
func TestAthleteRemoveScrubsOpenSheet(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("athlete add Ren height 1.80")
	id := athleteID(t, te, "Mira")
	te.must("meet open Club")
	te.must("meet add Mira Ren")
	te.must("meet log Mira 1.60 o")
	te.must("meet log Ren 1.60 xo")
	contains(t, te.must("athlete remove Mira confirm"), `On the open meet sheet as "removed athlete" now`)
	open, _ := storedSheets(t, te)
	if open == nil {
		t.Fatal("no open sheet")
	}
	if what := sheetHolds(t, *open, "Mira", id); what != "" {
		t.Errorf("the open sheet still holds %s: %+v", what, *open)
	}
	if got := places(*open); got["Ren"] != "2" || got[meetsheet.RemovedLabel] != "1" {
		t.Errorf("places after remove: %v", got)
	}
}
