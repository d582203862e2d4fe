package bot_test

import (
	"context"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// FuzzHandle sends arbitrary lines through the whole engine. Whatever the
// input, the engine must not fail internally (a recovered panic is reported
// as KindInternal), and every refusal must say what was wrong.
func FuzzHandle(f *testing.F) {
	for _, seed := range []string{
		"help", "athlete add Mira height 1.78 mass 63 sex f pb 1.81", "athlete Mira", "athletes",
		"log Mira 1.70 o 1.75 xo 1.78 xxx", "log me 1.80 clear by 3cm", "undo", "history Mira 6w", "best Mira",
		"margin 1.80 v 4.3 h0 1.22 arch 90 height 1.78", "margin 5-11 v 4.3", "flight v 4.4 h0 1.25", "flight time 0.60",
		"com arch 90 height 1.80", "digest now", "team units imperial", "team tz Europe/Madrid", "role coach <@U1>",
		"athlete add X height 5'10\"", "log Mira 3.20 o", "log Mira 1.70 ox", "margin", "margin 1.80 v 430",
		"athlete set Mira pb=1.83", "export csv Mira since 2026-01-01", "audit 30d", "\x00\xff", "   ", "log Mira 1.70 o note",
		"log Mira 1.70 o\nlog Mira 1.7 q\n\nhistory Mira", "role coach sam", "audit Mira 30d",
		"log Mira 1.70 o 1.75 x- 1.78 xx meet", "log Mira 1.81 xxo meet confirm", "log Mira 1.70 o yesterday at 18:30",
		"log Mira 1.70 o on 2026-11-20", "fix #1 1.60 xo", "drop #1", "undo line 1", "undo confirm", "history Mira since 2026-11-01",
		"log Mira 1.72 xo peak 1.95 vz 3.9",
	} {
		f.Add(seed)
	}
	te := newTestEngine(f)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.81")
	te.must("log Mira 1.70 o 1.75 xo 1.78 xxx")
	// Each input is a message of its own minute, as real messages are; a
	// fixed time would pile every logged line onto one key range and make
	// the run slow down as the store grows.
	var n atomic.Int64
	f.Fuzz(func(t *testing.T, line string) {
		at := testClockStart.Add(time.Duration(n.Add(1)) * time.Minute)
		r := te.E.Handle(context.Background(), bot.Request{UserID: "U_HEAD", Text: line, Time: at})
		if r.Kind == bot.KindInternal {
			t.Fatalf("internal failure on %q:\n%s", line, plain(r))
		}
		if !r.OK() && (len(r.Lines) == 0 || strings.TrimSpace(r.Lines[0]) == "") {
			t.Fatalf("refusal without a message on %q: %+v", line, r)
		}
	})
}
