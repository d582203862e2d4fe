package bot_test

import (
	"context"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// Names are stored in Unicode NFC (UAX #15): "Zoe" + U+0308 COMBINING
// DIAERESIS is the same name as "Zo" + U+00EB (the canonical composition
// of e and U+0308 is U+00EB, UnicodeData.txt, from memory), found either
// way and refused as a second athlete.
func TestNamesNormalisedToNFC(t *testing.T) {
	te := newTestEngine(t)
	r := te.must("athlete add Zoe\u0308 height 1.70")
	contains(t, r, "Added Zo\u00eb")
	contains(t, te.must("athlete Zo\u00eb"), "Zo\u00eb")
	if r := te.run("athlete add Zo\u00eb height 1.70"); r.Kind != bot.KindConflict || !strings.Contains(plain(r), "already an athlete called Zo\u00eb") {
		t.Errorf("the same name in the other form: %v\n%s", r.Kind, plain(r))
	}
}

// A name stored before names were normalised (decomposed, "Rene" + U+0301)
// is found by its NFC form, and a new athlete of that name is refused.
func TestStoredNameComparedInNFC(t *testing.T) {
	te := newTestEngine(t)
	err := te.DB.Update(context.Background(), func(tx *store.Tx) error {
		return tx.PutAthlete(&record.Athlete{Name: "Rene\u0301", StatureM: 1.80, Created: testClockStart})
	})
	if err != nil {
		t.Fatal(err)
	}
	te.must("log Ren\u00e9 1.70 o")
	contains(t, te.must("history Ren\u00e9"), "1.70")
	if r := te.run("athlete add Ren\u00e9 height 1.80"); r.Kind != bot.KindConflict {
		t.Errorf("a second René: %v\n%s", r.Kind, plain(r))
	}
}

// A new name that looks like an existing one is refused with the existing
// name shown. Skeletons per Unicode Technical Standard #39 and its
// confusables.txt (from memory: U+006D m → "rn"; U+0049 I → l; Cyrillic
// U+041A К → K, U+0430 а → a, U+0456 і → i); a name that mixes Latin and
// Cyrillic letters is refused whatever it looks like.
func TestConfusableNamesRefused(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("athlete add Kail height 1.86")
	te.must("athlete add Kai height 1.80")
	for _, tt := range []struct{ line, want string }{
		{"athlete add Rnira height 1.70", "looks like Mira"},
		{"athlete add KaiI height 1.70", "looks like Kail"},
		{"athlete add Kai1 height 1.70", "looks like Kail"},
		{"athlete add \u041a\u0430\u0456 height 1.70", "looks like Kai"},            // all Cyrillic
		{"athlete add M\u0456ra height 1.70", "mixes letters of different scripts"}, // Latin + Cyrillic і
		{"athlete rename Mira Kai1", "looks like Kail"},
	} {
		r := te.run(tt.line)
		if r.OK() || !strings.Contains(plain(r), tt.want) {
			t.Errorf("%q: want a refusal saying %q, got %v:\n%s", tt.line, tt.want, r.Kind, plain(r))
		}
	}
	// Names in one script, or Han with kana, and the athlete's own rename to
	// another case pass.
	for _, line := range []string{"athlete add Ren height 1.70", "athlete add \u041c\u0438\u0440\u0430 height 1.70", "athlete add \u5c71\u7530\u3055\u304f\u3089 height 1.60", "athlete rename Mira MIRA"} {
		te.must(line)
	}
}
