package meetsheet

import (
	"errors"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/internal/standings"
)

var t0 = time.Date(2026, 6, 6, 14, 0, 0, 0, time.UTC)

func entry(name string, bar float64, marks string) Entry {
	e := Entry{Name: name, Time: t0}
	for _, r := range marks {
		e.Jumps = append(e.Jumps, Jump{BarM: bar, Outcome: record.Outcome(r)})
	}
	return e
}

func mustLog(t *testing.T, s *Sheet, name string, bar float64, marks string) {
	t.Helper()
	if err := s.Log(entry(name, bar, marks)); err != nil {
		t.Fatalf("%s %.2f %s: %v", name, bar, marks, err)
	}
}

// The worked example of internal/standings (TR 26.8, rule numbers from
// memory), entered round by round as officials call it, with the steps
// 1.70 1.75 1.78 announced.
func workedSheet(t *testing.T) *Sheet {
	s := &Sheet{ID: "m1", Name: "Harbour Open", Date: "2026-06-06", StepsM: []float64{1.70, 1.75, 1.78}}
	for _, n := range []string{"Ada", "Bea", "Cleo", "Dora"} {
		if err := s.Add(Competitor{Name: n}); err != nil {
			t.Fatal(err)
		}
	}
	mustLog(t, s, "Ada", 1.70, "o")
	mustLog(t, s, "Bea", 1.70, "o")
	mustLog(t, s, "Cleo", 1.70, "xo")
	mustLog(t, s, "Dora", 1.70, "xo")
	mustLog(t, s, "Ada", 1.75, "xo")
	mustLog(t, s, "Bea", 1.75, "o")
	mustLog(t, s, "Cleo", 1.75, "xo")
	mustLog(t, s, "Dora", 1.75, "xo")
	return s
}

func TestWorkedExampleOnTheSheet(t *testing.T) {
	s := workedSheet(t)
	// Every competitor still in is done at 1.75: the bar goes to the next
	// announced step, everyone has three attempts there (TR 26.2).
	st := s.Now()
	if st.CurrentM != 1.78 || len(st.ToJump) != 4 || st.ToJump[0].Left != 3 {
		t.Fatalf("after 1.75: current %.2f, to jump %+v", st.CurrentM, st.ToJump)
	}
	mustLog(t, s, "Ada", 1.78, "xxx")
	mustLog(t, s, "Bea", 1.78, "xx")
	mustLog(t, s, "Cleo", 1.78, "xxx")
	mustLog(t, s, "Dora", 1.78, "xx-")
	st = s.Now()
	// Bea has one attempt left at 1.78; Dora passed with two failures and
	// carries them: one attempt at the next height (TR 26.2).
	if st.CurrentM != 1.78 || len(st.ToJump) != 1 || st.ToJump[0] != (StillIn{"Bea", 1}) || st.Waiting != 1 {
		t.Fatalf("during 1.78: %+v", st)
	}
	if st.NextM != 1.81 || st.NextWhy != NextSameRise {
		t.Errorf("next after the last step: %.2f (%s), want 1.81, the last rise again (TR 26.4)", st.NextM, st.NextWhy)
	}
	mustLog(t, s, "Bea", 1.78, "x")
	// Dora is alone now: she may ask for a 1 cm rise (TR 26.4 (a)) and
	// has one attempt left after her carried failures.
	mustLog(t, s, "Dora", 1.79, "x")
	st = s.Now()
	if !st.Over {
		t.Fatalf("everyone is out: %+v", st)
	}
	want := []struct {
		name  string
		place int
		rule  string
	}{
		{"Bea", 1, standings.RuleAttempts}, // TR 26.8.1
		{"Ada", 2, standings.RuleFailures}, // TR 26.8.2
		{"Cleo", 3, standings.RuleEqual},   // TR 26.8.3
		{"Dora", 3, standings.RuleEqual},
	}
	for i, w := range want {
		g := st.Standings[i]
		if g.Name != w.name || g.Place != w.place || g.Rule != w.rule {
			t.Errorf("row %d: %+v, want %v", i, g, w)
		}
	}
}

// Entries that break a rule of the series are refused with the rule and
// leave the sheet as it was (TR 26.2, TR 26.4).
func TestRefusedEntries(t *testing.T) {
	cases := []struct {
		name       string
		who        string
		bar        float64
		marks      string
		rule       series.Rule
		ruleSource string
	}{
		{"a fourth attempt after xxx", "Ada", 1.81, "o", series.ThreeFailures, "TR 26.2"},
		{"the bar never goes down", "Dora", 1.70, "o", series.BarDown, "TR 26.4"},
		{"at least 2 cm while others remain", "Bea", 1.76, "o", series.SmallRise, "TR 26.4 (a)"},
		{"nothing more at a height cleared", "Bea", 1.75, "o", series.HeightDone, "TR 26.2"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := workedSheet(t)
			mustLog(t, s, "Ada", 1.78, "xxx")
			n := len(s.Entries)
			err := s.Log(entry(c.who, c.bar, c.marks))
			var be *BreachError
			if !errors.As(err, &be) || be.Breach.Rule != c.rule {
				t.Fatalf("%s: got %v, want %v", c.ruleSource, err, c.rule)
			}
			if len(s.Entries) != n {
				t.Error("a refused entry changed the sheet")
			}
		})
	}
}

func TestUndoAndForgetLine(t *testing.T) {
	s := workedSheet(t)
	e := entry("Ada", 1.78, "x")
	e.LineID = "log:1"
	if err := s.Log(e); err != nil {
		t.Fatal(err)
	}
	if n := s.ForgetLine("log:1"); n != 1 || len(s.Entries) != 8 {
		t.Fatalf("forget line: %d, %d entries", n, len(s.Entries))
	}
	last, ok := s.Undo()
	if !ok || last.Name != "Dora" || len(s.Entries) != 7 {
		t.Fatalf("undo: %+v", last)
	}
}

// Closing files the squad's sheet entries as meet attempts and leaves out
// outsiders and entries already logged.
func TestFiled(t *testing.T) {
	s := &Sheet{ID: "m2", Name: "Club night", Date: "2026-06-06"}
	_ = s.Add(Competitor{Name: "Mira", AthleteID: 7})
	_ = s.Add(Competitor{Name: "Guest"})
	mustLog(t, s, "Mira", 1.70, "xo")
	mustLog(t, s, "Guest", 1.70, "o")
	logged := entry("Mira", 1.75, "o")
	logged.LineID = "log:9"
	if err := s.Log(logged); err != nil {
		t.Fatal(err)
	}
	late := entry("Mira", 1.78, "xxx")
	late.Time = t0.AddDate(0, 0, 2)
	if err := s.Log(late); err != nil {
		t.Fatal(err)
	}
	got := s.Filed(time.UTC)
	if len(got) != 5 {
		t.Fatalf("filed %d attempts, want 5 (Mira's xo and xxx)", len(got))
	}
	if got[1].Number != 2 || !got[1].Meet || got[1].AthleteID != 7 || got[4].Number != 3 {
		t.Errorf("numbers and kind: %+v", got)
	}
	if d := got[4].Time.Format("2006-01-02"); d != "2026-06-06" {
		t.Errorf("an entry typed later is filed on the meet's date, got %s", d)
	}
}

// While announced heights last, only they are jumped (TR 26.4, from
// memory); above the last one, or for the one athlete left, any rise of at
// least 2 cm.
func TestAnnouncedHeights(t *testing.T) {
	s := &Sheet{ID: "m3", StepsM: []float64{1.60, 1.65}}
	_ = s.Add(Competitor{Name: "P"})
	_ = s.Add(Competitor{Name: "Q"})
	mustLog(t, s, "P", 1.60, "o")
	var se *StepError
	if err := s.Log(entry("P", 1.62, "o")); !errors.As(err, &se) {
		t.Errorf("1.62 between the steps: %v", err)
	}
	mustLog(t, s, "P", 1.65, "o")
	mustLog(t, s, "P", 1.68, "o") // above the last step
	mustLog(t, s, "Q", 1.60, "xxx")
	mustLog(t, s, "P", 1.69, "o") // alone: a 1 cm rise is hers (TR 26.4 (a))
}
