package bot_test

import (
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// TestMeetRetire: a competitor may retire; their place stands on the
// heights cleared and they are no longer still in or called (World
// Athletics Technical Rules, general conditions for field events, TR 25;
// number from memory). Checked by hand: Ada 1.60 o 1.65 o retires, Bea
// 1.60 xo is then the one athlete still in, so she chooses the next
// height after 1.65 (TR 26.4 (a)); after Bea's 1.65 xxx (out, TR 26.2)
// Ada wins at 1.65 on what she cleared. meet undo takes the retirement
// back like any entry.
func TestMeetRetire(t *testing.T) {
	te := newTestEngine(t)
	te.must("meet open Club steps 1.60 1.65 1.70")
	te.must("meet add Ada Bea Cy guest")
	te.must("meet log Ada 1.60 o")
	te.must("meet log Bea 1.60 xo")
	te.must("meet log Cy 1.60 xxx")
	te.must("meet log Ada 1.65 o")
	r := te.must("meet retire Ada")
	golden(t, "meet-retire", plain(r))
	contains(t, r, "Sheet: Ada retires; the place stands on 1.65.", "to jump Bea 3 (attempts left)")
	if p := plain(r); strings.Contains(p, "Ada 3") || strings.Contains(p, "Ada 2") {
		t.Errorf("a retired competitor is called:\n%s", p)
	}
	s := plain(te.must("standings"))
	for _, want := range []string{"Ada leads at 1.65", "1      Ada   1.65  1.60 o 1.65 o (retired)", "to jump Bea 3", "chosen by the one athlete still in (TR 26.4 (a))"} {
		if !strings.Contains(s, want) {
			t.Errorf("standings lack %q:\n%s", want, s)
		}
	}
	for _, c := range []struct {
		line string
		kind bot.Kind
		want string
	}{
		{"meet log Ada 1.70 o", bot.KindConflict, "Ada retired from the competition"},
		{"meet retire Ada", bot.KindConflict, "has retired already"},
		{"meet retire Cy", bot.KindConflict, "out already"},
		{"meet retire Zed", bot.KindNotFound, "not on the sheet"},
		{"meet retire", bot.KindUsage, "name the one competitor"},
		{"meet retire Ada Bea", bot.KindUsage, "name the one competitor"},
	} {
		before := te.checksum()
		r := te.run(c.line)
		if r.Kind != c.kind || !strings.Contains(plain(r), c.want) || r.Example == "" {
			t.Errorf("%q: want %v with %q and an example, got %v:\n%s", c.line, c.kind, c.want, r.Kind, plain(r))
		}
		if te.checksum() != before {
			t.Errorf("%q changed the store", c.line)
		}
	}
	contains(t, te.must("meet undo"), "Taken back: Ada's retirement; Ada is still in.")
	contains(t, te.must("standings"), "to jump Bea 3 (attempts left); 1 through. Next 1.70.") // Ada is in again, done at 1.65
	te.must("meet retire Ada")
	te.must("meet log Bea 1.65 xxx")
	s = plain(te.must("standings"))
	if !strings.Contains(s, "Ada wins at 1.65") || !strings.Contains(s, "Everyone is out") {
		t.Errorf("after Bea is out:\n%s", s)
	}
	te.must("meet close")
	contains(t, te.must("standings last"), "Filed: Club (2026-11-25): Ada wins at 1.65.", "(retired)")
}

// TestMeetRetireSquad: a squad athlete's retirement keeps the results so
// far, which closing files into the log; a log line after it is refused
// whole.
func TestMeetRetireSquad(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("meet open Club")
	te.must("meet add Mira")
	te.must("meet add Gus guest")
	te.must("meet log Mira 1.60 o 1.65 xo")
	te.must("meet retire Mira")
	before := te.checksum()
	if r := te.run("log Mira 1.70 o meet"); r.OK() || !strings.Contains(plain(r), "nothing was logged") {
		t.Errorf("a log line after retiring: %s", plain(r))
	}
	if te.checksum() != before {
		t.Error("a refused log line changed the store")
	}
	te.must("meet close")
	contains(t, te.must("history Mira"), "1.60 o, 1.65 xo")
}

// undo after a sheet entry points to meet undo and changes nothing.
func TestUndoAfterSheetEntryPointsToMeetUndo(t *testing.T) {
	te := newTestEngine(t)
	te.must("meet open Club-night")
	te.must("meet add Bea guest")
	te.must("meet log Bea 1.60 xo")
	r := te.run("undo")
	if r.Kind != bot.KindConflict {
		t.Fatalf("undo after meet log: %v\n%s", r.Kind, plain(r))
	}
	contains(t, r, "meet undo takes the sheet's last entry off")
	contains(t, te.must("standings"), "Bea")
}
