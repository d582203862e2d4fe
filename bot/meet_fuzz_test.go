package bot_test

import (
	"context"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/store"
)

// FuzzMeetSheet types arbitrary meet lines on an open sheet: nothing fails
// inside the bot, and every competitor's series on the stored sheet still
// keeps the rules (each entry was checked by internal/series), and no
// competitor has an entry after retiring (a retirement is final until
// meet undo takes it off the end).
func FuzzMeetSheet(f *testing.F) {
	for _, seed := range []string{
		"meet log Gus 1.60 o", "meet log Ada 1.60 xo 1.65 xxx", "meet log Gus 1.65 x- 1.70 xx", "meet log Ada 1.70 x jumpoff",
		"meet undo", "standings", "meet add Zed guest", "log Mira 1.60 xo meet", "undo", "meet log Mira 1.65 o",
		"meet log Gus 1.62 o", "meet log Ada 5-5 o", "meet log Ada 1.60 o 1.60 o",
		"meet retire Gus", "meet retire Ada", "meet retire Mira",
	} {
		f.Add(seed)
	}
	te := newTestEngine(f)
	te.must("athlete add Mira height 1.78")
	te.must("meet open Club steps 1.60 1.65 1.70 1.73")
	te.must("meet add Mira")
	te.must("meet add Gus Ada guest")
	var n atomic.Int64
	f.Fuzz(func(t *testing.T, line string) {
		at := testClockStart.Add(time.Duration(n.Add(1)) * time.Second)
		r := te.E.Handle(context.Background(), bot.Request{UserID: "U_HEAD", Text: line, Time: at})
		if r.Kind == bot.KindInternal {
			t.Fatalf("internal failure on %q:\n%s", line, plain(r))
		}
		err := te.DB.View(context.Background(), func(tx *store.Tx) error {
			s, ok, err := tx.OpenMeet()
			if err != nil || !ok {
				return err
			}
			for _, c := range s.Competitors {
				if v := series.Summarize(s.Series(c.Name)).Verdict; !v.Valid() {
					t.Fatalf("after %q the sheet holds a series of %s breaking %v", line, c.Name, v.Breach.Rule)
				}
			}
			retired := map[string]bool{}
			for _, e := range s.Entries {
				if retired[e.Name] {
					t.Fatalf("after %q the sheet holds an entry of %s after retiring", line, e.Name)
				}
				retired[e.Name] = e.Retire
			}
			return nil
		})
		if err != nil && !strings.Contains(err.Error(), "closed") {
			t.Fatal(err)
		}
	})
}
