package bot_test

import (
	"strings"
	"testing"
	"time"
)

// A hint shown once to a person is not repeated to them for a week; other
// people still get it the first time; after a week it comes back once.
func TestHintOnceAWeek(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 sex f")
	te.must("role coach <@U_COACH>")
	const hint = "Measurements go with the jump written just before them"
	has := func(user, line string) bool {
		t.Helper()
		r := te.as(user, line)
		if !r.OK() {
			t.Fatalf("%q: %s", line, plain(r))
		}
		return strings.Contains(plain(r), hint)
	}
	first := te.as("U_HEAD", "log Mira 1.60 o vz 3.0")
	golden(t, "hint-measures", plain(first))
	if !strings.Contains(plain(first), hint) {
		t.Fatalf("first log with a measurement lacks the hint:\n%s", plain(first))
	}
	if has("U_HEAD", "log Mira 1.62 o vz 3.1") {
		t.Error("hint repeated to the same person at once")
	}
	if !has("U_COACH", "log Mira 1.64 o vz 3.1") {
		t.Error("another person did not get the hint the first time")
	}
	te.advance(6*24*time.Hour + 23*time.Hour)
	if has("U_HEAD", "log Mira 1.66 o vz 3.1") {
		t.Error("hint repeated within the week")
	}
	te.advance(2 * time.Hour) // now over a week since it was shown
	if !has("U_HEAD", "log Mira 1.68 o vz 3.2") {
		t.Error("hint not shown again after a week")
	}
	if has("U_HEAD", "log Mira 1.70 o vz 3.2") {
		t.Error("hint repeated right after it came back")
	}
}
