package meetsheet

import (
	"errors"
	"testing"
)

// TestRetireKeepsPlaceAndFreesTheRise: retiring (TR 25, from memory)
// keeps the place on the heights cleared and takes the competitor out of
// those still in; the one athlete left may then take a rise under 2 cm
// (TR 26.4 (a), from memory), which the series engine refuses while the
// retired competitor still counts as in.
func TestRetireKeepsPlaceAndFreesTheRise(t *testing.T) {
	s := &Sheet{ID: "r1", Name: "Club", Date: "2026-06-06"}
	for _, n := range []string{"Ada", "Bea"} {
		if err := s.Add(Competitor{Name: n}); err != nil {
			t.Fatal(err)
		}
	}
	mustLog(t, s, "Ada", 1.60, "o")
	mustLog(t, s, "Bea", 1.60, "o")
	mustLog(t, s, "Ada", 1.65, "xo")
	mustLog(t, s, "Bea", 1.65, "o")
	var be *BreachError
	if err := s.Log(entry("Bea", 1.66, "o")); !errors.As(err, &be) {
		t.Fatalf("a 1 cm rise with two still in: %v (TR 26.4)", err)
	}
	if err := s.Retire("Ada", "U", t0); err != nil {
		t.Fatal(err)
	}
	st := s.Now()
	if got := st.Standings; got[0].Name != "Bea" || got[1].Name != "Ada" || got[1].Place != 2 || !got[1].Out || !got[1].Retired || got[1].BestM != 1.65 {
		t.Errorf("after Ada retires: %+v", got)
	}
	for _, x := range st.ToJump {
		if x.Name == "Ada" {
			t.Errorf("a retired competitor is called: %+v", st.ToJump)
		}
	}
	mustLog(t, s, "Bea", 1.66, "o") // alone: 1 cm is allowed (TR 26.4 (a))
	if err := s.Log(entry("Ada", 1.70, "o")); !errors.Is(err, ErrRetired) {
		t.Errorf("an entry after retiring: %v", err)
	}
	for _, c := range []struct {
		name string
		want error
	}{{"Ada", ErrRetired}, {"Zed", ErrNotOn}} {
		if err := s.Retire(c.name, "U", t0); !errors.Is(err, c.want) {
			t.Errorf("retire %s: %v, want %v", c.name, err, c.want)
		}
	}
	if len(s.Filed(nil)) != 0 {
		t.Error("outsiders file nothing")
	}
}

// TestRetireOutRefused: three consecutive failures end a series (TR 26.2);
// there is nothing left to retire from.
func TestRetireOutRefused(t *testing.T) {
	s := &Sheet{ID: "r2", Name: "Club", Date: "2026-06-06"}
	_ = s.Add(Competitor{Name: "Ada"})
	mustLog(t, s, "Ada", 1.60, "xxx")
	if err := s.Retire("Ada", "U", t0); !errors.Is(err, ErrOut) {
		t.Errorf("retire after xxx: %v", err)
	}
}

// TestScrubKeepsEveryonesPlace: two removed athletes get distinct neutral
// labels, lose their ids and log keys, and every place is as by hand:
// at 1.60 o, xo, xxo are 1, 2 and 3 jumps at the height of the tie, so
// first, second, third (TR 26.8.1, from memory).
func TestScrubKeepsEveryonesPlace(t *testing.T) {
	s := &Sheet{ID: "s1", Name: "Club", Date: "2026-06-06"}
	for i, n := range []string{"Ada", "Bea", "Cleo"} {
		_ = s.Add(Competitor{Name: n, AthleteID: uint64(i + 1)})
	}
	mustLog(t, s, "Ada", 1.60, "o")
	mustLog(t, s, "Bea", 1.60, "xo")
	mustLog(t, s, "Cleo", 1.60, "xxo")
	if !s.Scrub(1) || !s.Scrub(2) || s.Scrub(9) {
		t.Fatal("scrub reported the wrong athletes")
	}
	got := s.Final().Standings
	names := []string{got[0].Name, got[1].Name, got[2].Name}
	if names[0] != RemovedLabel || names[1] != RemovedLabel+" 2" || names[2] != "Cleo" {
		t.Errorf("names after scrub: %v", names)
	}
	for i, x := range got {
		if x.Place != i+1 {
			t.Errorf("place of %s: %d, want %d", x.Name, x.Place, i+1)
		}
	}
	for _, c := range s.Competitors[:2] {
		if c.AthleteID != 0 {
			t.Errorf("%s keeps an id", c.Name)
		}
	}
}

// TestRetiredTiedForFirst: on a jump-off sheet, three tied for first by
// the tie rules (1.80 xo, 1.83 xxx each: same jumps at 1.80, TR 26.8.1,
// and failures to it, TR 26.8.2; from memory), one of whom retired before
// 1.83: the sheet holds no jump-off (how that tie is settled is the
// officials' call, not modelled) and shows an equal first (TR 26.8.3),
// open and filed alike; a jump-off entry is refused.
func TestRetiredTiedForFirst(t *testing.T) {
	s := &Sheet{ID: "j1", Name: "Final", Date: "2026-06-06", JumpOff: true}
	for _, n := range []string{"Ada", "Bea", "Cy"} {
		_ = s.Add(Competitor{Name: n})
	}
	for _, n := range []string{"Ada", "Bea", "Cy"} {
		mustLog(t, s, n, 1.80, "xo")
	}
	if err := s.Retire("Cy", "U", t0); err != nil {
		t.Fatal(err)
	}
	mustLog(t, s, "Ada", 1.83, "xxx")
	mustLog(t, s, "Bea", 1.83, "xxx")
	for _, st := range []State{s.Now(), s.Final()} {
		if st.JumpOff || !st.Over {
			t.Errorf("a jump-off is on: %+v", st)
		}
		for _, x := range st.Standings {
			if x.Place != 1 || !x.Shared || x.JumpOff {
				t.Errorf("%s: place %d shared %v jump-off %v, want an equal first", x.Name, x.Place, x.Shared, x.JumpOff)
			}
		}
	}
	e := entry("Ada", 1.83, "o")
	e.Jumps[0].JumpOff = true
	if err := s.Log(e); !errors.Is(err, ErrNoJumpOff) {
		t.Errorf("a jump-off entry: %v", err)
	}
}
