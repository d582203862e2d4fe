package bot_test

import (
	"bufio"
	"context"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
	"unicode"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/store"
)

// The speakers of the malformed corpus: the configured head coach, and
// Mira's own chat user (role athlete, linked to Mira).
const (
	malformedHead    = "U_HEAD"
	malformedAthlete = "U_MIRA"
)

// malformedCorpusPath is the corpus, one malformed command a line
// (slash-separated, relative to the bot package).
const malformedCorpusPath = "../testdata/malformed/commands.txt"

// malformedLine is one command of the corpus and who runs it.
type malformedLine struct {
	n         int    // line number in the file
	text      string // the command, unquoted
	asAthlete bool   // also run as the athlete user
}

// malformedRun is one way a line is sent: who, and from where.
type malformedRun struct {
	user  string
	local bool // typed at the bot's own terminal (Request.Local), else from chat
}

func (r malformedRun) String() string {
	if r.local {
		return r.user + " at the terminal"
	}
	return r.user + " in chat"
}

// runs lists the ways a line is sent: the head coach at the terminal and in
// chat, and for the athlete subset the athlete user in chat.
func (l malformedLine) runs() []malformedRun {
	rs := []malformedRun{{malformedHead, true}, {malformedHead, false}}
	if l.asAthlete {
		rs = append(rs, malformedRun{malformedAthlete, false})
	}
	return rs
}

// readMalformedCorpus reads the corpus: one command a line; # comments and
// blank lines skipped; a line in double quotes is a Go string literal;
// "#@ as head" and "#@ as head athlete" choose the speakers of the lines
// that follow.
func readMalformedCorpus(t *testing.T) []malformedLine {
	t.Helper()
	f, err := os.Open(filepath.FromSlash(malformedCorpusPath))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var (
		out       []malformedLine
		asAthlete bool
		n         int
	)
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 64*1024), 1<<20)
	for sc.Scan() {
		n++
		line := sc.Text()
		trimmed := strings.TrimSpace(line)
		switch {
		case trimmed == "#@ as head":
			asAthlete = false
			continue
		case trimmed == "#@ as head athlete":
			asAthlete = true
			continue
		case strings.HasPrefix(trimmed, "#@"):
			t.Fatalf("%s:%d: unknown directive %q", malformedCorpusPath, n, trimmed)
		case trimmed == "" || strings.HasPrefix(trimmed, "#"):
			continue
		case strings.HasPrefix(trimmed, `"`):
			u, err := strconv.Unquote(trimmed)
			if err != nil {
				t.Fatalf("%s:%d: bad quoted line %s: %v", malformedCorpusPath, n, trimmed, err)
			}
			line = u
		}
		out = append(out, malformedLine{n: n, text: line, asAthlete: asAthlete})
	}
	if err := sc.Err(); err != nil {
		t.Fatalf("read %s: %v", malformedCorpusPath, err)
	}
	if len(out) < 250 {
		t.Fatalf("%s holds %d commands; it should hold at least 250", malformedCorpusPath, len(out))
	}
	return out
}

// seedMalformedSquad gives the corpus something to be wrong about: three
// invented athletes, a few logged lines, a digest channel, and Mira linked
// to her own chat user with the athlete role.
func seedMalformedSquad(te *testEngine) {
	for _, line := range []string{
		"athlete add Mira height 1.78 mass 63 sex f leg left pb 1.81 born 2001",
		"athlete add Kai height 1.86 mass 74 sex m leg left pb 2.01",
		"athlete add Tane height 1.80 mass 70 sex m",
		"athlete link Mira <@" + malformedAthlete + ">",
		"log Mira 1.70 o 1.75 xo 1.78 xxx",
		"log Kai 1.95 o 2.00 xo 2.04 xxx meet",
		"log Mira 1.72 xo peak 2.01 vz 3.9",
		"digest channel #jumps",
	} {
		te.must(line)
	}
}

// send runs one line as te.as does, but from the terminal or from chat.
func (te *testEngine) send(run malformedRun, text string) bot.Reply {
	te.t.Helper()
	te.seq++
	te.advance(time.Second)
	return te.E.Handle(context.Background(), bot.Request{
		UserID: run.user, UserName: run.user, Text: text, Time: te.now,
		MessageID: "m" + itoa(te.seq), Local: run.local,
	})
}

// TestMalformedCorpus sends every malformed command of the corpus through
// the whole engine, as the head coach (at the terminal and in chat) and, for
// a subset, as an athlete, and checks each refusal: it refuses the input
// (it is not the bot's own failure), its message names what was wrong, it
// offers a correct example, and the store's content is unchanged, byte for
// byte (DB.Checksum before and after).
func TestMalformedCorpus(t *testing.T) {
	corpus := readMalformedCorpus(t)
	te := newTestEngine(t)
	seedMalformedSquad(te)
	runs, athleteRuns, problems := 0, 0, 0
	for _, l := range corpus {
		for _, run := range l.runs() {
			before, err := te.DB.Checksum()
			if err != nil {
				t.Fatal(err)
			}
			r := te.send(run, l.text)
			after, err := te.DB.Checksum()
			if err != nil {
				t.Fatal(err)
			}
			runs++
			if run.user == malformedAthlete {
				athleteRuns++
			}
			where := "commands.txt:" + strconv.Itoa(l.n) + " " + shortQuote(l.text) + " as " + run.String()
			if before != after {
				problems++
				t.Errorf("%s: the store changed (reply %s):\n%s", where, r.Kind, plain(r))
			}
			for _, p := range refusalProblems(run.user, l.text, r) {
				problems++
				t.Errorf("%s: %s:\n%s", where, p, plain(r))
			}
		}
	}
	t.Logf("malformed corpus: %d commands checked in %d runs (%d as the athlete user); %d problems",
		len(corpus), runs, athleteRuns, problems)
}

// refusalProblems lists what is wrong with the reply to a malformed line.
func refusalProblems(user, line string, r bot.Reply) []string {
	var ps []string
	switch r.Kind {
	case bot.KindOK:
		ps = append(ps, "accepted (Kind ok): the line is not malformed, or the engine missed it")
	case bot.KindInternal:
		ps = append(ps, "the bot's own failure (Kind internal), not a refusal of the input")
	}
	if len(r.Lines) == 0 || !namesSomething(user, line, r.Lines[0]) {
		ps = append(ps, "no message line naming what was wrong")
	} else if s, ok := suggestsTyped(line, r.Lines[0]); ok {
		ps = append(ps, "the did-you-mean suggests "+strconv.Quote(s)+", which is what was typed")
	}
	if strings.TrimSpace(r.Example) == "" {
		ps = append(ps, "no example of a correct command (Reply.Example is empty)")
	}
	return ps
}

// namesSomething reports whether a refusal's message points at the
// problem: it repeats a word that was typed (two characters or more, a
// mention without its brackets, the speaker for "me"), quotes something,
// shows a number, or says what is missing.
func namesSomething(user, line, msg string) bool {
	if strings.IndexFunc(msg, unicode.IsLetter) < 0 {
		return false
	}
	low := strings.ToLower(msg)
	for _, w := range append(strings.Fields(line), user) {
		w = strings.ToLower(strings.Trim(w, "<@!#>"))
		if len([]rune(w)) >= 2 && strings.Contains(low, w) {
			return true
		}
	}
	if strings.ContainsAny(msg, "\"`0123456789") {
		return true
	}
	for _, cue := range []string{"give", "need", "missing", "name one", "say ", "not linked", "no longer exists"} {
		if strings.Contains(low, cue) {
			return true
		}
	}
	return false
}

// suggestsTyped reports a "Did you mean X?" whose X is a word of the line
// as typed: a suggestion that repeats the input helps no one.
func suggestsTyped(line, msg string) (string, bool) {
	_, after, ok := strings.Cut(msg, "Did you mean ")
	if !ok {
		return "", false
	}
	s, _, _ := strings.Cut(after, "?")
	s = strings.Trim(s, "\"`")
	for _, w := range strings.Fields(line) {
		if strings.EqualFold(w, s) {
			return s, true
		}
	}
	return "", false
}

// TestMalformedExamples runs the example each refusal of the corpus offers
// on a copy of the seeded store, as the head coach, from chat if it was
// offered in chat (where import csv is refused) and at the terminal
// otherwise: an example is meant to be typed as it stands, so it must not be
// refused as unreadable (KindUsage) nor fail (KindInternal). A refusal that
// depends on what is stored or on the speaker (an athlete or a file that is
// not there, a role) is allowed.
func TestMalformedExamples(t *testing.T) {
	corpus := readMalformedCorpus(t)
	te := newTestEngine(t)
	seedMalformedSquad(te)
	snapshot := filepath.Join(t.TempDir(), "seeded.db")
	if _, err := te.DB.BackupToFile(snapshot); err != nil {
		t.Fatal(err)
	}
	seeded, err := os.ReadFile(snapshot)
	if err != nil {
		t.Fatal(err)
	}
	type offer struct {
		from  string // the first corpus line that offered it
		local bool   // offered only at the terminal
	}
	offers := map[string]*offer{}
	for _, l := range corpus {
		for _, run := range l.runs() {
			r := te.send(run, l.text)
			if r.Example == "" {
				continue
			}
			o := offers[r.Example]
			if o == nil {
				o = &offer{from: "commands.txt:" + strconv.Itoa(l.n) + " " + shortQuote(l.text), local: true}
				offers[r.Example] = o
			}
			o.local = o.local && run.local
		}
	}
	examples := make([]string, 0, len(offers))
	for ex := range offers {
		examples = append(examples, ex)
	}
	slices.Sort(examples)
	scratch := newScratchStore(t, filepath.Join(t.TempDir(), "scratch.db"), seeded, te.now.Add(time.Minute))
	for _, ex := range examples {
		o := offers[ex]
		run := malformedRun{user: malformedHead, local: o.local}
		if r := scratch.run(run, ex); r.Kind == bot.KindUsage || r.Kind == bot.KindInternal {
			t.Errorf("the example %s offered for %s is itself refused as %s (%s):\n%s", shortQuote(ex), o.from, run, r.Kind, plain(r))
		}
	}
	t.Logf("malformed corpus: %d distinct examples run on copies of the seeded store", len(examples))
}

// scratchStore runs lines on a copy of a seeded store, putting the seeded
// copy back whenever a line has changed it, so every line meets the same
// store.
type scratchStore struct {
	t      *testing.T
	path   string
	seeded []byte
	sum    [32]byte // the seeded content's checksum
	at     time.Time
	db     *store.DB
	e      *bot.Engine
}

func newScratchStore(t *testing.T, path string, seeded []byte, at time.Time) *scratchStore {
	t.Helper()
	s := &scratchStore{t: t, path: path, seeded: seeded, at: at}
	s.reset()
	sum, err := s.db.Checksum()
	if err != nil {
		t.Fatal(err)
	}
	s.sum = sum
	t.Cleanup(func() { s.db.Close() })
	return s
}

// reset (re)writes the seeded copy and opens it.
func (s *scratchStore) reset() {
	s.t.Helper()
	if s.db != nil {
		if err := s.db.Close(); err != nil {
			s.t.Fatal(err)
		}
	}
	if err := os.WriteFile(s.path, s.seeded, 0o600); err != nil {
		s.t.Fatal(err)
	}
	db, err := store.Open(s.path, store.Options{})
	if err != nil {
		s.t.Fatal(err)
	}
	e, err := bot.New(bot.Config{Store: botstore.New(db), Clock: bot.ClockFunc(func() time.Time { return s.at }), HeadCoaches: []string{malformedHead}})
	if err != nil {
		s.t.Fatal(err)
	}
	s.db, s.e = db, e
}

// run runs one line on the seeded content.
func (s *scratchStore) run(run malformedRun, text string) bot.Reply {
	s.t.Helper()
	r := s.e.Handle(context.Background(), bot.Request{
		UserID: run.user, UserName: run.user, Text: text, Time: s.at, MessageID: "example", Local: run.local,
	})
	sum, err := s.db.Checksum()
	if err != nil {
		s.t.Fatal(err)
	}
	if sum != s.sum {
		s.reset()
	}
	return r
}

// shortQuote quotes a command for a failure message, cut to 80 bytes.
func shortQuote(s string) string {
	if len(s) > 80 {
		return strconv.Quote(s[:80]) + "..."
	}
	return strconv.Quote(s)
}
