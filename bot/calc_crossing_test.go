package bot_test

import (
	"bytes"
	"image/png"
	"strings"
	"testing"
)

// TestCrossingReply: the case and the same with the bar 10 cm
// higher name the same lowest part (the bar does not change the flight),
// and a decodable PNG of some substance is attached and named in the reply.
func TestCrossingReply(t *testing.T) {
	te := newTestEngine(t)
	var parts []string
	for _, bar := range []string{"2.00", "2.10"} {
		r := te.run("crossing " + bar + " v 4.4 h0 1.25 height 1.86 from 1.1")
		if !r.OK() {
			t.Fatalf("%s: %s", bar, plain(r))
		}
		golden(t, "crossing-"+bar, plain(r))
		if len(r.Files) != 1 || !strings.Contains(plain(r), r.Files[0].Name) {
			t.Fatalf("%s: want one PNG named in the reply, got %d files", bar, len(r.Files))
		}
		if _, err := png.Decode(bytes.NewReader(r.Files[0].Data)); err != nil || len(r.Files[0].Data) < 10000 {
			t.Errorf("%s: PNG of %d bytes, decode error %v", bar, len(r.Files[0].Data), err)
		}
		first := r.Lines[0]
		parts = append(parts, first[:strings.Index(first, ",")])
	}
	if parts[0] != parts[1] {
		t.Errorf("lowest part %q at 2.00, %q at 2.10", parts[0], parts[1])
	}
	if r := te.run("crossing 2.00 v 4.4 height 1.86"); r.OK() || !strings.Contains(plain(r), "from 1.1") {
		t.Errorf("no take-off distance: %s", plain(r))
	}
}
