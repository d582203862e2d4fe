package bot_test

import (
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// blockFive is a pasted block of five command lines, the third one bad
// ("q" is no attempt mark: the notation has o cleared, x failed, - passed;
// World Athletics Technical Rules, vertical jumps, common practice of the
// result sheet).
const blockFive = "athlete add Ana height 1.70 sex f pb 1.68\n" +
	"log Ana 1.60 o 1.65 xo\n" +
	"log Ana 1.70 q\n" +
	"\n" +
	"log Ana 1.70 xxo\n" +
	"history Ana"

// TestBlockFiveLinesOneBad: every good line runs, in order, the bad one is
// named by its number with what was wrong and a correct example, and the
// whole message answers once. The stored attempts are counted by hand from
// the notation: 1.60 o, 1.65 x o (line 2: 3 attempts), 1.70 x x o (line 5:
// 3 attempts), so 6, of which 3 cleared.
func TestBlockFiveLinesOneBad(t *testing.T) {
	te := newTestEngine(t)
	r := te.run(blockFive)
	if !r.OK() {
		t.Fatalf("block refused as a whole: %s", plain(r))
	}
	p := plain(r)
	if !strings.HasPrefix(p, "5 lines: 4 done, 1 not done") {
		t.Errorf("title: %s", p)
	}
	contains(t, r, "1 ✓", "2 ✓", "3 ✗ `log Ana 1.70 q`", `"q"`, "e.g. `log", "4 ✓", "5 ✓")
	as := logAttempts(t, te.DB, "Ana")
	if len(as) != 6 {
		t.Fatalf("stored %d attempts, want 6 (lines 2 and 5 only)", len(as))
	}
	cleared := 0
	for _, a := range as {
		if a.Outcome == 'o' {
			cleared++
		}
	}
	if cleared != 3 {
		t.Errorf("stored %d clearances, want 3", cleared)
	}
	// Order: line 5 ran after line 2 (its attempts are later).
	if as[0].BarM != 1.60 || as[len(as)-1].BarM != 1.70 {
		t.Errorf("attempts out of order: first %.2f last %.2f", as[0].BarM, as[len(as)-1].BarM)
	}
	golden(t, "block-five-lines", p)

	// The same message delivered again runs no line twice.
	te.seq--
	again := te.run(blockFive)
	if n := len(logAttempts(t, te.DB, "Ana")); n != 6 {
		t.Fatalf("re-delivered block stored %d attempts, want still 6:\n%s", n, plain(again))
	}
}

// TestBlockRefusalMatchesLineAlone: the reason given for a bad line of a
// block is the one the line gets on its own.
func TestBlockRefusalMatchesLineAlone(t *testing.T) {
	te := newTestEngine(t)
	alone := te.run("log Ana 1.70 q")
	r := te.run("log Ana 1.70 q\nhelp")
	if alone.OK() || len(alone.Lines) == 0 {
		t.Fatalf("line alone: %s", plain(alone))
	}
	contains(t, r, "1 ✗", alone.Lines[0], "2 ✓")
}

// TestBlockLimits: a block over the line limit runs nothing; blank lines
// do not count; a message of one line with surrounding blank lines is
// an ordinary command; every line refused makes a refusal.
func TestBlockLimits(t *testing.T) {
	te := newTestEngine(t)
	before := te.checksum()
	long := strings.Repeat("athlete add Zed height 1.80\n", 31)
	if r := te.run(long); r.OK() || !strings.Contains(plain(r), "up to 30") {
		t.Errorf("31 lines: %s", plain(r))
	}
	if te.checksum() != before {
		t.Error("a refused block changed the store")
	}
	if r := te.run("\n\nwhoami\n\n"); !r.OK() || !strings.HasPrefix(r.Title, "You are") {
		t.Errorf("one line with blanks: %s", plain(r))
	}
	r := te.run("frobnicate\nlog Nobody 1.70 o")
	if r.OK() || r.Kind == bot.KindInternal {
		t.Errorf("all refused: kind %v\n%s", r.Kind, plain(r))
	}
	contains(t, r, "2 lines: 0 done, 2 not done", "1 ✗", "2 ✗")
}
