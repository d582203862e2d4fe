package bot_test

import (
	"context"
	"errors"
	"regexp"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/digest"
)

// rollbackStore runs every write transaction to its end and then rolls it
// back, so that a whole matrix of commands runs against one unchanging
// store without a copy of the file per case. wrote records whether any
// transaction would have committed (its function returned nil).
type rollbackStore struct {
	bot.Store
	wrote atomic.Bool
}

var errRollback = errors.New("rolled back by the test")

func (s *rollbackStore) Update(ctx context.Context, fn func(bot.Tx) error) error {
	var ferr error
	err := s.Store.Update(ctx, func(tx bot.Tx) error {
		if ferr = fn(tx); ferr == nil {
			s.wrote.Store(true)
		}
		return errRollback
	})
	if ferr != nil {
		return ferr
	}
	if errors.Is(err, errRollback) {
		return nil
	}
	return err
}

func (s *rollbackStore) Batch(ctx context.Context, fn func(bot.Tx) error) error {
	return s.Update(ctx, fn)
}

// The people of the privacy fixture: the configured head coach, a granted
// coach, the chat user linked to Mira, and anyone else in the workspace.
const (
	head    = "U_HEAD"
	coach   = "U_COACH"
	athlete = "U_MIRA"
	nobody  = "U_ANY"
)

var everyRole = []string{head, coach, athlete, nobody}

// The squad of the privacy fixture (invented): Mira (adult, linked to
// U_MIRA, with a birth year and a note), Kai (adult), Ines (private), Tom
// (born 2012, no guardian's consent recorded) and Lena (born 2011,
// consent recorded, in the juniors group).
const (
	fixtureNote = "secret-note-mira"
	fixtureBorn = "1999"
)

// hiddenWord matches the athletes who must appear in no channel reply.
var hiddenWord = regexp.MustCompile(`(?i)\b(ines|tom)\b`)

// privacyFixture is an engine over a prepared squad whose writes are rolled
// back (rollbackStore), at a fixed time in the week the jumps were logged.
type privacyFixture struct {
	t   testing.TB
	e   *bot.Engine
	st  *rollbackStore
	now time.Time
	seq int
}

func newPrivacyFixture(t testing.TB) *privacyFixture {
	t.Helper()
	te := newTestEngine(t)
	for _, line := range []string{
		"athlete add Mira height 1.78 mass 63 sex f pb 1.81 born " + fixtureBorn + " notes " + fixtureNote,
		"athlete add Kai height 1.86 mass 74 sex m pb 2.01",
		"athlete add Ines height 1.70 pb 1.60 private yes",
		"athlete add Tom height 1.65 born 2012",
		"athlete add Lena height 1.68 born 2011 consent yes group juniors",
		"athlete link Mira <@U_MIRA>",
		"role coach <@U_COACH>",
		"digest channel #jumps",
		"log Mira 1.70 o 1.75 xo vz 3.2",
		"log Kai 1.90 o 1.95 xxo",
		"log Ines 1.55 o 1.60 xxx",
		"log Tom 1.40 o 1.45 xo",
		"log Lena 1.50 o 1.55 o",
	} {
		te.must(line)
	}
	st := &rollbackStore{Store: botstore.New(te.DB)}
	f := &privacyFixture{t: t, st: st, now: te.now.Add(time.Minute)}
	e, err := bot.New(bot.Config{Store: st, Clock: bot.ClockFunc(func() time.Time { return f.now }), HeadCoaches: []string{head}, ChartWidthPx: 240})
	if err != nil {
		t.Fatal(err)
	}
	f.e = e
	return f
}

// run sends one line as user, in a shared channel or a direct message, as
// the Slack front end would (not at the bot's own terminal).
func (f *privacyFixture) run(user, line string, inChannel bool) bot.Reply {
	f.seq++
	req := bot.Request{UserID: user, UserName: user, Text: line, Time: f.now, MessageID: "pv" + itoa(f.seq)}
	if inChannel {
		req.Channel = "CTEAM00001"
	} else {
		req.Direct = true
	}
	f.st.wrote.Store(false)
	return f.e.Handle(context.Background(), req)
}

// shownText is everything a reply shows, its text attachments included.
func shownText(r bot.Reply) string {
	var b strings.Builder
	b.WriteString(plain(r))
	for _, a := range r.Actions {
		b.WriteString("\n" + a.Label + "\n" + a.Command)
	}
	for _, file := range r.Files {
		b.WriteString("\n" + file.Name + "\n" + file.Title)
		if strings.HasPrefix(file.MIME, "text/") || file.MIME == "application/json" {
			b.WriteString("\n" + string(file.Data))
		}
	}
	if r.Details != nil {
		b.WriteString("\n" + shownText(*r.Details))
	}
	return b.String()
}

// channelLeaks names what a reply posted in a channel must never show: a
// hidden athlete's name, or profile details (birth year, notes, mass).
func channelLeaks(r bot.Reply) []string {
	if r.Ephemeral {
		return nil
	}
	var out []string
	text := shownText(r)
	if m := hiddenWord.FindString(text); m != "" {
		out = append(out, "the hidden athlete "+m)
	}
	for _, fl := range r.Fields {
		switch fl.Label {
		case "Born", "Notes", "Mass":
			out = append(out, "the profile field "+fl.Label)
		}
	}
	if strings.Contains(text, fixtureNote) {
		out = append(out, "the profile note")
	}
	return out
}

// sampled reports whether case k runs role r in a channel (true) or a
// direct message (false) under -short: every command and every role runs,
// each role in both places across the commands, half of the full set.
func sampled(k, r int) (inChannel bool) { return (k+r)%2 == 0 }

// hiddenLines is every command's help example about each hidden athlete
// (Ines, private; Tom, under 18 without consent), and the lists and
// digests that cover the whole squad.
func hiddenLines(cmds []bot.CommandInfo) []string {
	named := regexp.MustCompile(`\b(Mira|Kai)\b`)
	var out []string
	for _, c := range cmds {
		if !named.MatchString(c.Example) {
			out = append(out, c.Example)
			continue
		}
		for _, n := range []string{"Ines", "Tom"} {
			out = append(out, named.ReplaceAllString(c.Example, n))
		}
	}
	return append(out,
		"athletes", "athletes juniors", "squad", "digest now", "digest week 2026-W48",
		"best Ines", "best Tom", "history Tom 6w", "chart Tom", "chart Ines",
		"log Tom 1.50 o", "log Ines 1.62 xo", "export csv", "export csv since 2026-01-01",
		"margin 1.50 for Tom v 3.6", "com for Ines", "plan Tom", "season Ines",
		"compare Kai Tom 12w", "audit 30d", "audit Tom 30d", "roles", "athlete Tom",
		"athlete set Tom pb 1.46", "athlete rename Tom Tomas", "undo",
		"log Mira 1.70 o\nlog Tom 1.45 o", // a pasted block
	)
}

// TestNoHiddenAthleteInChannel: no reply posted in a shared channel names
// a private athlete or an under-18 athlete without a guardian's consent,
// whoever asks and whatever the command (every command of the table runs
// about each of them); the same coach in a direct message does see them.
// Under -short each line runs for two of the four roles, by turns.
func TestNoHiddenAthleteInChannel(t *testing.T) {
	f := newPrivacyFixture(t)
	for k, line := range hiddenLines(f.e.Commands()) {
		for ri, who := range everyRole {
			if testing.Short() && !sampled(k, ri) {
				continue
			}
			r := f.run(who, line, true)
			if r.Kind == bot.KindInternal {
				t.Errorf("%s %q: internal failure:\n%s", who, line, plain(r))
			}
			if leaks := channelLeaks(r); len(leaks) > 0 {
				t.Errorf("%s %q in a channel shows %s:\n%s", who, line, strings.Join(leaks, ", "), shownText(r))
			}
		}
	}
	r := f.run(coach, "athletes", false)
	contains(t, r, "Ines", "Tom", "Lena", "Kept out of channel replies")
}

// TestChannelListsKeepConsentingJuniors: in a channel the squad list and
// the posted digest leave out the private athlete and the minor without
// consent (counted, not named) and keep the junior whose consent is
// recorded; the hidden athletes' details go by direct message to coaches.
func TestChannelListsKeepConsentingJuniors(t *testing.T) {
	f := newPrivacyFixture(t)
	r := f.run(coach, "athletes", true)
	if r.Ephemeral || !r.OK() {
		t.Fatalf("the squad list in a channel should be posted:\n%s", plain(r))
	}
	contains(t, r, "Mira", "Kai", "Lena", "2 more athletes not shown in a channel")
	if len(channelLeaks(r)) > 0 {
		t.Errorf("list shows %v", channelLeaks(r))
	}

	var posted bot.Reply
	week := digest.WeekOf(f.now, time.UTC)
	ok, err := f.e.PostDigest(context.Background(), week, f.now, false, func(_ context.Context, _ string, r bot.Reply) error {
		posted = r
		return nil
	})
	if err != nil || !ok {
		t.Fatalf("post digest: %v %v", ok, err)
	}
	if m := hiddenWord.FindString(plainNoDirect(posted)); m != "" {
		t.Errorf("the channel digest names %s:\n%s", m, plain(posted))
	}
	contains(t, posted, "Lena", "Mira", "Kai", "Details of 2 more athletes sent privately")
	toCoach := 0
	for _, d := range posted.Direct {
		if d.UserID == coach && hiddenWord.MatchString(plain(d.Reply)) {
			toCoach++
		}
	}
	if toCoach != 2 {
		t.Errorf("the coach got %d direct messages about the hidden athletes, want 2", toCoach)
	}
}

// plainNoDirect is what the channel sees of a posted reply: its text and
// attachments' names, not the direct messages carried beside it.
func plainNoDirect(r bot.Reply) string {
	r.Direct = nil
	return shownText(r)
}

// TestConsentHeadCoachOnlyAndAudited: only a head coach records a
// guardian's consent; the change is in the audit trail, and from then on
// the minor appears in the channel's squad list.
func TestConsentHeadCoachOnlyAndAudited(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Tom height 1.65 born 2012")
	te.must("role coach <@U_COACH>")
	inChannel := func(user, line string) bot.Reply {
		te.seq++
		return te.E.Handle(context.Background(), bot.Request{UserID: user, Text: line, Time: te.now, Channel: "CTEAM00001", MessageID: "c" + itoa(te.seq)})
	}
	if r := inChannel(coach, "athletes"); strings.Contains(plain(r), "Tom") || !strings.Contains(plain(r), "1 more athlete not shown") {
		t.Errorf("a minor without consent in the channel list:\n%s", plain(r))
	}
	r := te.as(coach, "athlete set Tom consent yes")
	if r.Kind != bot.KindForbidden || !strings.Contains(plain(r), "needs the role head coach") {
		t.Fatalf("a coach recording consent:\n%s", plain(r))
	}
	if r := te.as(coach, "athlete add Zed height 1.70 born 2013 consent yes"); r.Kind != bot.KindForbidden {
		t.Errorf("a coach adding a minor with consent: %v", r.Kind)
	}
	r = te.must("athlete set Tom consent yes")
	contains(t, r, "Guardian consent", "recorded")
	contains(t, te.must("audit Tom"), "athlete set")
	if p := plain(te.must("audit Tom")); !strings.Contains(p, "consent") {
		t.Errorf("the audit trail does not show the consent:\n%s", p)
	}
	if r := inChannel(coach, "athletes"); !strings.Contains(plain(r), "Tom") || r.Ephemeral {
		t.Errorf("a minor with consent stays out of the channel list:\n%s", plain(r))
	}
	if r := te.run("athlete set Tom consent maybe"); r.Kind != bot.KindUsage || !strings.Contains(plain(r), "yes or no") {
		t.Errorf("consent maybe: %s", plain(r))
	}
}

// TestAthleteSeesOwnLineAndCoaches: `athletes` for an athlete is their own
// line and who their coaches are; for a member with no athlete linked, who
// the coaches are.
func TestAthleteSeesOwnLineAndCoaches(t *testing.T) {
	f := newPrivacyFixture(t)
	r := f.run(athlete, "athletes", false)
	contains(t, r, "Mira", "Your coaches: U_HEAD, U_COACH")
	for _, other := range []string{"Kai", "Lena", "Ines", "Tom", "2.01"} {
		if strings.Contains(plain(r), other) {
			t.Errorf("an athlete's squad list shows %s:\n%s", other, plain(r))
		}
	}
	for _, line := range []string{"athlete Kai", "history Kai", "best Kai", "export csv Kai", "audit Kai", "chart Kai", "season Kai", "plan Kai", "compare Mira Kai"} {
		r := f.run(athlete, line, false)
		if r.Kind != bot.KindForbidden || !(strings.Contains(plain(r), "coach")) {
			t.Errorf("%q by an athlete: %v\n%s", line, r.Kind, plain(r))
		}
	}
}

// TestProfileNeverInChannel: a profile (birth year, notes, mass) goes to
// the asker alone in a channel, whoever asks, also when it is added or
// changed there.
func TestProfileNeverInChannel(t *testing.T) {
	f := newPrivacyFixture(t)
	for _, c := range []struct{ who, line string }{
		{head, "athlete Mira"}, {coach, "athlete Mira"}, {athlete, "athlete me"},
		{coach, "athlete set Mira mass 62"}, {coach, "athlete add Zed height 1.80 born 1990 notes knee"},
	} {
		r := f.run(c.who, c.line, true)
		if !r.OK() || !r.Ephemeral {
			t.Errorf("%s %q in a channel: ok %v, ephemeral %v", c.who, c.line, r.OK(), r.Ephemeral)
		}
	}
}

// A typo suggests only names the speaker may see: every athlete to a
// coach, only their own to an athlete, none to anyone else.
func TestDidYouMeanOnlyWhatTheSpeakerSees(t *testing.T) {
	f := newPrivacyFixture(t)
	if r := f.run(coach, "history Tomm", false); !strings.Contains(plain(r), "Did you mean Tom") {
		t.Errorf("coach: %s", plain(r))
	}
	for _, who := range []string{athlete, nobody} {
		if r := f.run(who, "history Tomm", false); hiddenWord.MatchString(plain(r)) {
			t.Errorf("%s is told of Tom:\n%s", who, plain(r))
		}
	}
	if r := f.run(athlete, "history Mirra", false); !strings.Contains(plain(r), "Did you mean Mira") {
		t.Errorf("athlete's own typo: %s", plain(r))
	}
}
