package bot_test

import (
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// mustRefuse runs a line as the head coach, checks that it is refused with
// the given kind and that the store did not change.
func mustRefuse(t *testing.T, te *testEngine, line string, kind bot.Kind) bot.Reply {
	t.Helper()
	sum := te.checksum()
	r := te.run(line)
	if r.Kind != kind {
		t.Fatalf("%q: kind %v, want %v:\n%s", line, r.Kind, kind, plain(r))
	}
	if te.checksum() != sum {
		t.Errorf("%q was refused but changed the store", line)
	}
	return r
}
