package bot_test

import (
	"bytes"
	"context"
	"image/png"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
)

// smallCharts swaps te's engine for one drawing 240 px charts on the same
// store: the race detector makes full-size rendering slow, and the pictures
// themselves are checked in internal/digest.
func smallCharts(t *testing.T, te *testEngine) {
	t.Helper()
	e, err := bot.New(bot.Config{Store: botstore.New(te.DB), Clock: bot.ClockFunc(te.clock), HeadCoaches: []string{"U_HEAD"}, ChartWidthPx: 240})
	if err != nil {
		t.Fatal(err)
	}
	te.E = e
}

// chart NAME answers with a PNG of the asked window; the reply's text is in
// the team's units, the same notation as other replies.
func TestChartCommand(t *testing.T) {
	te := newTestEngine(t)
	digestSquad(t, te)
	smallCharts(t, te)
	r := te.must("chart Mira")
	golden(t, "chart-mira", plain(r))
	if len(r.Files) != 1 || r.Files[0].MIME != "image/png" || !strings.HasSuffix(r.Files[0].Name, "-12w.png") {
		t.Fatalf("files %+v", r.Files)
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(r.Files[0].Data))
	if err != nil || cfg.Width != 240 || cfg.Height != 300 {
		t.Errorf("chart PNG %v × %v, err %v", cfg.Width, cfg.Height, err)
	}
	contains(t, te.must("chart Mira season"), "season 2026 (48 weeks)")
	te.must("team units imperial")
	// 1.65 m = 64.96 in: 5-5 to the quarter inch (1 in = 0.0254 m).
	contains(t, te.must("chart Mira 6w"), "meet mark 5-5 in 2026-W48")
	for _, bad := range []string{"chart", "chart Mira 3w", "chart Mira 12 days", "chart Kai", "chart Zed"} {
		if r := te.run(bad); r.OK() || r.Example == "" {
			t.Errorf("%q accepted or refused without an example:\n%s", bad, plain(r))
		}
	}
}

// An athlete charts only themself; a private athlete's chart never goes to
// a channel, but comes in a direct message.
func TestChartRolesAndPrivacy(t *testing.T) {
	te := newTestEngine(t)
	digestSquad(t, te)
	smallCharts(t, te)
	if r := te.as("U_INES", "chart Mira"); r.Kind != bot.KindForbidden {
		t.Errorf("athlete charted someone else: %v", r.Kind)
	}
	inChannel := func(user, text string, direct bool) bot.Reply {
		return te.E.Handle(context.Background(), bot.Request{UserID: user, Text: text, Time: te.now, Channel: "CJUMPS0001", Direct: direct})
	}
	if r := inChannel("U_COACH", "chart Ines", false); r.Kind != bot.KindForbidden || len(r.Files) != 0 {
		t.Errorf("private athlete charted in a channel: %v %d files", r.Kind, len(r.Files))
	}
	if r := inChannel("U_INES", "chart me", true); !r.OK() || len(r.Files) != 1 || !r.Ephemeral {
		t.Errorf("private athlete's own chart in a DM: %v\n%s", r.Kind, plain(r))
	}
	if r := inChannel("U_COACH", "chart Mira", false); !r.OK() || len(r.Files) != 1 {
		t.Errorf("public athlete in a channel: %v", r.Kind)
	}
}
