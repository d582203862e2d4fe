package bot_test

import (
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// TestPlanMeetStepsRule: announced bars that rise by under 2 cm, or by more
// than the rise before, are refused (World Athletics Technical Rules, TR 26);
// valid ones are used as given.
func TestPlanMeetStepsRule(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 pb 1.81")
	te.must("log Mira 1.60 o 1.65 o 1.70 xo 1.75 xxx")
	te.advance(48 * 3600e9)
	te.must("log Mira 1.62 o 1.67 o 1.72 xxo 1.75 xxx meet")
	for _, line := range []string{"plan Mira meet steps 1.60 1.61", "plan Mira meet steps 1.60 1.63 1.68"} {
		if r := te.run(line); r.Kind != bot.KindUsage {
			t.Errorf("%q: want a usage refusal, got %v\n%s", line, r.Kind, plain(r))
		}
	}
	r := te.must("plan Mira meet steps 1.60 1.65 1.70 1.73 1.75")
	contains(t, r, "1.65", "1.70", "TR 26", "not a prescription")
	if r := te.run("plan Mira 2026-13-40"); r.Kind != bot.KindUsage {
		t.Errorf("bad date: %v", r.Kind)
	}
	if r := te.run("team jumps 0"); r.Kind != bot.KindUsage {
		t.Errorf("team jumps 0: %v", r.Kind)
	}
	te.must("team jumps 25")
	contains(t, te.must("plan Mira"), "within the budget of 25 jumps")
}

// TestDigestTakeoffs: a coach's digest preview counts take-offs (o and x,
// never passes) per athlete.
func TestDigestTakeoffs(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 pb 1.81")
	te.must("log Mira 1.60 - 1.65 o 1.70 xo 1.75 xxx")
	contains(t, te.must("digest now"), "Take-offs Mira: 6 (6 full, 0 short approach)")
}
