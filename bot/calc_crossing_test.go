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
		checkShort(t, "crossing "+bar, r)
		first := r.Details.Lines[0]
		parts = append(parts, first[:strings.Index(first, ",")])
	}
	if parts[0] != parts[1] {
		t.Errorf("lowest part %q at 2.00, %q at 2.10", parts[0], parts[1])
	}
	if r := te.run("crossing 2.00 v 4.4 height 1.86"); r.OK() || !strings.Contains(plain(r), "from 1.1") {
		t.Errorf("no take-off distance: %s", plain(r))
	}
}

// TestCrossingFlagsPublishedRanges: inputs outside the published ranges
// the margin checks (vz 3.9–4.7 m/s in elite jumpers and take-off
// distance 0.9–1.3 m, Dapena 1980 and reports as cited in
// internal/mechanics/ranges.go; h0 0.62–0.74 of stature, from memory) get
// one line each naming the range; inputs inside get none.
func TestCrossingFlagsPublishedRanges(t *testing.T) {
	te := newTestEngine(t)
	cases := []struct {
		line string
		want []string
	}{
		{"crossing 2.00 v 4.4 h0 1.25 height 1.86 from 1.1", nil},
		{"crossing 2.00 v 6.5 h0 1.25 height 1.86 from 1.1", []string{"vz 6.50 m/s is far above the 3.9–4.7 m/s"}},
		{"crossing 2.00 v 4.4 h0 1.25 height 1.86 from 2.5", []string{"take-off distance 2.50 m is far above the 0.9–1.3 m"}},
		{"crossing 2.00 v 4.4 h0 0.5 height 1.86 from 1.1 across 8", []string{"h0/stature 0.27 is far below", "speed across the bar 8.00 m/s is far above"}},
	}
	for _, c := range cases {
		r := te.run(c.line)
		if !r.OK() {
			t.Fatalf("%s: %s", c.line, plain(r))
		}
		text := strings.Join(r.Lines, "\n")
		if c.want == nil && strings.Contains(text, "check the number") {
			t.Errorf("%s: flagged inside the ranges:\n%s", c.line, text)
		}
		for _, w := range c.want {
			if !strings.Contains(text, w) {
				t.Errorf("%s: no %q in\n%s", c.line, w, text)
			}
		}
	}
}
