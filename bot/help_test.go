package bot_test

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// TestHelpExamplesRun types every command's help example, as the head coach
// at the terminal, on a copy of a small squad: each must be understood (no
// usage refusal, no internal failure). A few examples name things that the
// squad lacks on purpose (a CSV file path); those may be not-found.
func TestHelpExamplesRun(t *testing.T) {
	tmpl := roleTemplate(t)
	probe := newTestEngine(t)
	for _, c := range probe.E.Commands() {
		if c.Example == "" || c.Usage == "" || c.Summary == "" {
			t.Errorf("command %q lacks usage, summary or example", c.Name)
			continue
		}
		t.Run(c.Name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "case.db")
			copyFile(t, tmpl, path)
			te := newTestEngineAt(t, path)
			te.idPrefix = "ex-"
			for _, line := range helpSetup[c.Name] {
				te.must(line)
			}
			r := te.run(c.Example)
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
	"meet add":   {"meet open Club-night"},
	"meet log":   {"meet open Club-night", "meet add Bea guest"},
	"meet undo":  {"meet open Club-night", "meet add Bea guest", "meet log Bea 1.60 xo"},
	"meet close": {"meet open Club-night"},
	"standings":  {"meet open Club-night"},
}
