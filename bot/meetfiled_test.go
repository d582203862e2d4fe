package bot_test

import (
	"strings"
	"testing"
)

// TestFiledStandings: a filed sheet reads back with the same places and
// tie notes as when it was open. The worked example is placed by hand from
// World Athletics TR 26.8 (numbers from memory): TR 26.8.1 puts Bea ahead
// of Ada, TR 26.8.2 Ada ahead of Cleo, Cleo and Dora share third (TR
// 26.8.3). standings last, standings NAME and standings DATE find it; meet
// list lists the filed sheets newest first.
func TestFiledStandings(t *testing.T) {
	te := newTestEngine(t)
	for _, l := range workedExampleLines {
		te.must(l)
	}
	te.must("meet log Dora 1.81 x") // out: everyone is out
	te.must("meet close")
	te.must("meet open Club night 2026-11-27")
	te.must("meet add Eli Fay guest")
	te.must("meet log Eli 1.50 o 1.55 xo")
	te.must("meet log Fay 1.50 xo 1.55 o") // closed with both still in
	te.must("meet close")

	r := te.must("standings")
	contains(t, r, "No meet sheet is open. Last filed: Club night (2026-11-27): Fay wins at 1.55.")
	golden(t, "meet-standings-none-open", plain(r))

	last := te.must("standings Harbour Open")
	golden(t, "meet-standings-filed", plain(last))
	p := plain(last)
	if !strings.HasPrefix(p, "Filed: Harbour Open (2026-11-25): Bea wins at 1.75.") {
		t.Errorf("the verdict comes first:\n%s", p)
	}
	for _, want := range []string{
		"1      Bea", "2      Ada", "3=     Cleo", "3=     Dora",
		"Bea ahead of Ada at 1.75: fewest jumps at the height of the tie (TR 26.8.1)",
		"Ada ahead of Cleo at 1.75: fewest failures up to and including the last height cleared (TR 26.8.2)",
		"Cleo and Dora share 3rd at 1.75: still tied: equal place (TR 26.8.3)",
		"Final places as filed",
	} {
		if !strings.Contains(p, want) {
			t.Errorf("filed standings lack %q:\n%s", want, p)
		}
	}
	if q := plain(te.must("standings 2026-11-25")); q != p {
		t.Errorf("by date:\n%s\nby name:\n%s", q, p)
	}
	if q := plain(te.must("standings harbour")); q != p {
		t.Errorf("by part of the name:\n%s", q)
	}
	// Closed while both were still in: nobody is called on a filed sheet.
	// Fay xo o and Eli o xo both clear 1.55; Fay 1 jump there against 2
	// (TR 26.8.1).
	nowt := plain(te.must("standings last"))
	if strings.Contains(nowt, "to jump") || !strings.Contains(nowt, "Fay ahead of Eli at 1.55: fewest jumps at the height of the tie (TR 26.8.1)") {
		t.Errorf("standings last:\n%s", nowt)
	}
	list := te.must("meet list")
	golden(t, "meet-list", plain(list))
	lp := plain(list)
	if i, j := strings.Index(lp, "Club night"), strings.Index(lp, "Harbour Open"); i < 0 || j < 0 || i > j {
		t.Errorf("meet list: newest first:\n%s", lp)
	}
	contains(t, te.must("meets"), "2 filed sheets, newest first.")
	for _, line := range []string{"standings 2026-01-01", "standings Nowhere", "meet list now"} {
		r := te.run(line)
		if r.OK() || r.Example == "" {
			t.Errorf("%q: want a refusal with an example:\n%s", line, plain(r))
		}
	}
}

// TestFiledStandingsPrivacy: on a filed sheet, as on the open one, a
// private athlete and one under 18 without consent are never named in a
// channel (standings of it, the offer of the last filed sheet, meet list);
// a coach in a direct message sees them.
func TestFiledStandingsPrivacy(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 private yes")
	te.must("athlete add Tia height 1.60 born 2012")
	te.must("athlete add Ren height 1.80")
	te.must("athlete link Ren <@U_REN>")
	te.must("role coach <@U_COACH>")
	te.must("meet open Club")
	te.must("meet add Mira Tia Ren")
	te.must("meet add Gus guest")
	te.must("meet log Mira 1.60 o")
	te.must("meet log Tia 1.60 xo")
	te.must("meet log Ren 1.60 xxo")
	te.must("meet log Gus 1.60 xxx")
	te.must("meet close")
	for _, line := range []string{"standings", "standings last", "standings more", "standings last more", "meet list"} {
		for _, who := range []struct {
			user, channel string
			direct        bool
		}{{"U_COACH", "C_JUMPS", false}, {"U_REN", "C_JUMPS", false}, {"U_REN", "", true}} {
			r := te.asIn(who.user, who.channel, who.direct, line)
			p := plain(r)
			if !r.OK() || strings.Contains(p, "Mira") || strings.Contains(p, "Tia") {
				t.Errorf("%s %q in %q: private and minor athletes must not be named:\n%s", who.user, line, who.channel, p)
			}
		}
	}
	contains(t, te.asIn("U_REN", "C_JUMPS", false, "standings last"), "2 squad athletes not shown here", "Ren", "Gus")
	contains(t, te.asIn("U_REN", "C_JUMPS", false, "meet list"), "the leaders are not shown here")
	p := plain(te.asIn("U_COACH", "D_COACH", true, "standings last"))
	if !strings.Contains(p, "Mira wins at 1.60") || !strings.Contains(p, "Tia") {
		t.Errorf("a coach in a direct message sees everyone:\n%s", p)
	}
}
