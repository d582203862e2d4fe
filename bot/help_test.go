package bot_test

import (
	"context"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
)

// TestHelpExamplesRun types every command's help example, as the head coach
// at the terminal, on a small squad (each against the same store: its
// writes are rolled back, as if each ran on its own copy): each must be
// understood (no usage refusal, no internal failure). A few examples name
// things that the squad lacks on purpose (a CSV file path); those may be
// not-found.
func TestHelpExamplesRun(t *testing.T) {
	path := filepath.Join(t.TempDir(), "examples.db")
	copyFile(t, roleTemplate(t), path)
	te := newTestEngineAt(t, path)
	e, err := bot.New(bot.Config{Store: &rollbackStore{Store: botstore.New(te.DB)}, Clock: bot.ClockFunc(te.clock), HeadCoaches: []string{"U_HEAD"}, ChartWidthPx: 240})
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range e.Commands() {
		if c.Example == "" || c.Usage == "" || c.Summary == "" {
			t.Errorf("command %q lacks usage, summary or example", c.Name)
			continue
		}
		t.Run(c.Name, func(t *testing.T) {
			var r bot.Reply
			if setup, ok := helpSetup[c.Name]; ok {
				// The example needs state first: a copy of its own, since
				// the shared store rolls every write back.
				ownPath := filepath.Join(t.TempDir(), "case.db")
				copyFile(t, roleTemplate(t), ownPath)
				own := newTestEngineAt(t, ownPath)
				own.idPrefix = "ex-"
				for _, line := range setup {
					own.must(line)
				}
				r = own.run(c.Example)
			} else {
				te.advance(time.Second)
				r = e.Handle(context.Background(), bot.Request{UserID: "U_HEAD", UserName: "U_HEAD", Text: c.Example, Time: te.now, MessageID: "ex-" + itoa(i), Local: true})
			}
			switch {
			case r.Kind == bot.KindInternal, r.Kind == bot.KindUsage, r.Kind == bot.KindForbidden:
				t.Errorf("help example %q of %q is refused (%v):\n%s", c.Example, c.Name, r.Kind, plain(r))
			case r.Kind == bot.KindNotFound && !strings.Contains(c.Example, "/"):
				t.Errorf("help example %q of %q finds nothing:\n%s", c.Example, c.Name, plain(r))
			}
		})
	}
}

// helpSetup are lines run before a help example that needs some state: the
// meet sheet commands need an open sheet (and an entry to take off).
var helpSetup = map[string][]string{
	"meet add":    {"meet open Club-night"},
	"meet log":    {"meet open Club-night", "meet add Bea guest"},
	"meet undo":   {"meet open Club-night", "meet add Bea guest", "meet log Bea 1.60 xo"},
	"meet close":  {"meet open Club-night"},
	"meet retire": {"meet open Club-night", "meet add Bea guest", "meet log Bea 1.60 o"},
	"standings":   {"meet open Club-night"},
}
