package bot_test

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/digest"
)

// digestSquad logs two weeks of practice for two athletes, one private.
func digestSquad(t *testing.T, te *testEngine) {
	t.Helper()
	te.must("team name Test Club")
	te.must("digest channel #jumps")
	te.must("athlete add Mira height 1.78 sex f pb 1.90")
	te.must("athlete add Ines height 1.69 sex f born 2011 private yes")
	te.must("athlete add Kai height 1.86 sex m")
	te.must("athlete link Ines <@U_INES>")
	te.must("role coach <@U_COACH>")
	// The test clock starts Wednesday 2026-11-25 (ISO week 48).
	te.must("log Mira 1.60 o 1.65 xo by 3cm 1.70 xxx meet")
	te.must("log Ines 1.50 o 1.55 xxx")
}

func TestPostDigestExactlyOnceAcrossRestart(t *testing.T) {
	path := filepath.Join(t.TempDir(), "d.db")
	te := newTestEngineAt(t, path)
	digestSquad(t, te)
	week := digest.Week{Year: 2026, Num: 48}
	var posts []bot.Reply
	post := func(_ context.Context, channel string, r bot.Reply) error {
		if channel != "jumps" {
			t.Errorf("posted to %q", channel)
		}
		posts = append(posts, r)
		return nil
	}
	ctx := context.Background()
	sched := time.Date(2026, 11, 30, 7, 0, 0, 0, time.UTC)
	if ok, err := te.E.PostDigest(ctx, week, sched, false, post); !ok || err != nil {
		t.Fatalf("first post: %v %v", ok, err)
	}
	if ok, err := te.E.PostDigest(ctx, week, sched, true, post); ok || err != nil {
		t.Fatalf("second post: %v %v", ok, err)
	}
	// A restart: a new engine on the reopened file.
	te.close()
	te2 := newTestEngineAt(t, path)
	if ok, err := te2.E.PostDigest(ctx, week, sched, true, post); ok || err != nil {
		t.Fatalf("after restart: %v %v", ok, err)
	}
	if len(posts) != 1 {
		t.Fatalf("%d posts, want exactly 1", len(posts))
	}
	p := plain(posts[0])
	for _, want := range []string{"Clearance digest 2026-W48: Test Club", "Mira", "Details of 1 more athlete sent privately", "No jumps this week: Kai"} {
		if !strings.Contains(p, want) {
			t.Errorf("digest lacks %q:\n%s", want, p)
		}
	}
	if strings.Contains(p, "1.50") || strings.Contains(p, "1.55") || strings.Contains(plainNoDirect(posts[0]), "Ines") {
		t.Errorf("the private athlete's numbers leaked into the channel:\n%s", p)
	}
	var toInes, toCoach bool
	for _, d := range posts[0].Direct {
		toInes = toInes || d.UserID == "U_INES"
		toCoach = toCoach || d.UserID == "U_COACH"
		if !strings.Contains(plain(d.Reply), "1.50") {
			t.Errorf("private message lacks the athlete's bar:\n%s", plain(d.Reply))
		}
	}
	if !toInes || !toCoach {
		t.Errorf("private details not sent to the athlete and the coach: %+v", posts[0].Direct)
	}
	if len(posts[0].Files) != 1 || posts[0].Files[0].MIME != "image/png" {
		t.Errorf("no chart attached: %+v", posts[0].Files)
	}
}

func TestPostDigestFailureReleasesTheWeek(t *testing.T) {
	te := newTestEngine(t)
	digestSquad(t, te)
	week := digest.Week{Year: 2026, Num: 48}
	ctx := context.Background()
	fail := func(context.Context, string, bot.Reply) error { return errors.New("slack is down") }
	if ok, err := te.E.PostDigest(ctx, week, time.Now(), false, fail); ok || err == nil {
		t.Fatalf("failed post reported %v, %v", ok, err)
	}
	if posted, _ := te.E.DigestPosted(ctx, week); posted {
		t.Fatal("a failed post left the week marked as posted")
	}
	n := 0
	okPost := func(context.Context, string, bot.Reply) error { n++; return nil }
	if ok, err := te.E.PostDigest(ctx, week, time.Now(), true, okPost); !ok || err != nil || n != 1 {
		t.Fatalf("retry: %v %v %d", ok, err, n)
	}
}

func TestPostDigestNeedsChannelAndHonoursOff(t *testing.T) {
	te := newTestEngine(t)
	week := digest.Week{Year: 2026, Num: 48}
	post := func(context.Context, string, bot.Reply) error { t.Error("posted"); return nil }
	if _, err := te.E.PostDigest(context.Background(), week, time.Now(), false, post); !errors.Is(err, bot.ErrNoDigestChannel) {
		t.Errorf("no channel: %v", err)
	}
	te.must("digest channel #jumps")
	te.must("digest off")
	if ok, err := te.E.PostDigest(context.Background(), week, time.Now(), false, post); ok || err != nil {
		t.Errorf("digest off still posted: %v %v", ok, err)
	}
}

func TestDigestCommands(t *testing.T) {
	te := newTestEngine(t)
	digestSquad(t, te)
	contains(t, te.must("digest"), "every Monday at 07:00 UTC", "#jumps", "none in the last 8 weeks")
	te.must("team tz Europe/Madrid")
	te.must("digest schedule thu 18:30")
	contains(t, te.must("digest"), "every Thursday at 18:30 Europe/Madrid")
	// A coach's preview shows the private athlete in full, to the coach only.
	r := te.as("U_COACH", "digest now")
	if !r.Ephemeral || len(r.Direct) != 0 {
		t.Errorf("preview must be ephemeral and send nothing: %+v", r.Direct)
	}
	contains(t, r, "This week so far", "Ines")
	// An athlete's preview is the channel's view.
	// The channel counts the private athlete and never names her.
	contains(t, te.as("U_INES", "digest now"), "Details of 1 more athlete sent privately")
	contains(t, te.must("digest week 2026-W47"), "No jumps were logged this week.")
	for _, bad := range []string{"digest week 2026-W60", "digest week 2027-W10", "digest schedule funday 07:00", "digest schedule mon 25:00", "digest channel ##", "digest off now"} {
		if r := te.run(bad); r.OK() || r.Example == "" {
			t.Errorf("%q: %v\n%s", bad, r.Kind, plain(r))
		}
	}
}

// TestDigestLinesCarryUnits: bars in the digest's sentences carry their
// unit (the table's columns stay compact); imperial teams see feet-inches.
func TestDigestLinesCarryUnits(t *testing.T) {
	te := newTestEngine(t)
	digestSquad(t, te)
	r := te.must("digest now")
	// The totals and the channel's table both leave the private Ines out.
	contains(t, r, "1 athlete jumped: 6 attempts, 2 cleared, make rate 33% (not counting 1 private athlete).")
	contains(t, r, "Mira 1.65 m season best (meet)", "Ceiling (highest bar made on at least half its tries, 8 weeks): Mira 1.65 m.")
	te.must("team units imperial")
	// 1.65 m = 64.96 in, 5-5 to the inch (1 in = 0.0254 m, NIST Handbook 44).
	contains(t, te.must("digest now"), "Mira 5-5 season best (meet)", "weeks): Mira 5-5.")
}

// TestDigestPreviewIsTheChannelPost: a coach's `digest week` shows exactly
// what PostDigest sends to the channel (lines, table, notes, chart bytes),
// then the private part under its mark; the channel's count line and table
// count the same athletes.
func TestDigestPreviewIsTheChannelPost(t *testing.T) {
	te := newTestEngine(t)
	digestSquad(t, te)
	te.must("athlete add Ren height 1.80 sex m private yes")
	te.must("log Kai 1.90 o 1.95 xo")
	te.must("log Ren 1.80 o")
	smallCharts(t, te)
	var posted bot.Reply
	post := func(_ context.Context, _ string, r bot.Reply) error { posted = r; return nil }
	if ok, err := te.E.PostDigest(context.Background(), digest.Week{Year: 2026, Num: 48}, time.Now(), false, post); !ok || err != nil {
		t.Fatalf("post: %v %v", ok, err)
	}
	prev := te.as("U_COACH", "digest week 2026-W48")
	if strings.Join(prev.Lines, "\n") != strings.Join(posted.Lines, "\n") {
		t.Errorf("preview lines\n%q\nchannel lines\n%q", prev.Lines, posted.Lines)
	}
	if fmt.Sprint(prev.Table) != fmt.Sprint(posted.Table) {
		t.Errorf("preview table %v, channel table %v", prev.Table, posted.Table)
	}
	wantNotes := append(append([]string{}, posted.Notes...), "! "+posted.Caution)
	if len(prev.Notes) <= len(wantNotes) || strings.Join(prev.Notes[:len(wantNotes)], "\n") != strings.Join(wantNotes, "\n") {
		t.Fatalf("preview notes do not start with the channel's:\n%q\n%q", prev.Notes, wantNotes)
	}
	rest := strings.Join(prev.Notes[len(wantNotes):], "\n")
	if !strings.HasPrefix(rest, "── Private") || !strings.Contains(rest, "Ines") || !strings.Contains(rest, "Ren") {
		t.Errorf("private part missing or unmarked:\n%s", rest)
	}
	if len(prev.Files) != 1 || len(posted.Files) != 1 || !bytes.Equal(prev.Files[0].Data, posted.Files[0].Data) {
		t.Errorf("preview chart differs from the channel's")
	}
	// Counts and table agree: 2 non-private athletes jumped, 2 rows, no private name.
	contains(t, posted, "2 athletes jumped", "(not counting 2 private athletes)")
	if n := len(posted.Table.Rows); n != 2 {
		t.Errorf("channel table has %d rows for 2 athletes counted: %v", n, posted.Table.Rows)
	}
	for _, row := range posted.Table.Rows {
		if row[0] == "Ines" || row[0] == "Ren" {
			t.Errorf("private athlete %s in the channel table", row[0])
		}
	}
	// An athlete's preview is the channel part only.
	if p := plain(te.as("U_INES", "digest week 2026-W48")); strings.Contains(p, "── Private") {
		t.Errorf("athlete saw the private part:\n%s", p)
	}
}
