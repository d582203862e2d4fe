package weekly

import (
	"bytes"
	"context"
	"errors"
	"log/slog"
	"runtime"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/digest"
)

type fakeClock struct {
	mu sync.Mutex
	t  time.Time
}

func (c *fakeClock) Now() time.Time {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.t
}

func (c *fakeClock) Set(t time.Time) {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.t = t
}

// fakeLedger is the store's "posted weeks" bookkeeping, shared between
// Scheduler instances to stand for a restart.
type fakeLedger struct {
	mu     sync.Mutex
	posted map[digest.Week]bool
	err    error
}

func newLedger() *fakeLedger { return &fakeLedger{posted: map[digest.Week]bool{}} }

func (l *fakeLedger) Posted(w digest.Week) (bool, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.posted[w], l.err
}

func (l *fakeLedger) mark(w digest.Week) {
	l.mu.Lock()
	defer l.mu.Unlock()
	l.posted[w] = true
}

type post struct {
	week        digest.Week
	scheduledAt time.Time
	late        bool
}

// fakeJob records its posts and marks the ledger, as the bot's job does in
// one store transaction; during is called inside the post when set.
type fakeJob struct {
	ledger *fakeLedger
	during func()
	mu     sync.Mutex
	posts  []post
}

func (j *fakeJob) PostDigest(ctx context.Context, week digest.Week, scheduledAt time.Time, late bool) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	j.mu.Lock()
	j.posts = append(j.posts, post{week, scheduledAt, late})
	during := j.during
	j.mu.Unlock()
	if during != nil {
		during()
	}
	j.ledger.mark(week)
	return nil
}

func (j *fakeJob) Posts() []post {
	j.mu.Lock()
	defer j.mu.Unlock()
	return append([]post(nil), j.posts...)
}

// logBuf collects log lines from several goroutines.
type logBuf struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *logBuf) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *logBuf) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

type rig struct {
	clock  *fakeClock
	ledger *fakeLedger
	job    *fakeJob
	logs   *logBuf
}

func newRig(now time.Time) *rig {
	l := newLedger()
	return &rig{clock: &fakeClock{t: now}, ledger: l, job: &fakeJob{ledger: l}, logs: &logBuf{}}
}

func (r *rig) scheduler(t *testing.T, loc *time.Location) *Scheduler {
	t.Helper()
	s, err := New(Config{Day: time.Monday, Minute: 7 * 60, Loc: loc, Clock: r.clock, Job: r.job, Ledger: r.ledger,
		Logger: slog.New(slog.NewTextHandler(r.logs, &slog.HandlerOptions{Level: slog.LevelDebug}))})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestCatchUpOnStart(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	slot := time.Date(2026, 3, 30, 7, 0, 0, 0, madrid) // Monday of 2026-W14, first after the spring change
	tests := []struct {
		name  string
		now   time.Time
		posts []post
		log   string
	}{
		{"two hours late", slot.Add(2 * time.Hour), []post{{digest.Week{Year: 2026, Num: 13}, slot, true}}, "digest posted"},
		{"47 hours late", slot.Add(47 * time.Hour), []post{{digest.Week{Year: 2026, Num: 13}, slot, true}}, "late=true"},
		{"on the minute", slot.Add(10 * time.Second), []post{{digest.Week{Year: 2026, Num: 13}, slot, false}}, "late=false"},
		{"49 hours late", slot.Add(49 * time.Hour), nil, "missed digest not posted"},
	}
	for _, tt := range tests {
		r := newRig(tt.now)
		r.ledger.mark(digest.Week{Year: 2026, Num: 12}) // the week before was posted
		s := r.scheduler(t, madrid)
		if err := s.Start(context.Background()); err != nil {
			t.Fatal(err)
		}
		s.Stop()
		got := r.job.Posts()
		if len(got) != len(tt.posts) {
			t.Fatalf("%s: posts %+v, want %+v", tt.name, got, tt.posts)
		}
		for i := range got {
			if got[i].week != tt.posts[i].week || !got[i].scheduledAt.Equal(tt.posts[i].scheduledAt) || got[i].late != tt.posts[i].late {
				t.Errorf("%s: post %+v, want %+v", tt.name, got[i], tt.posts[i])
			}
		}
		if !strings.Contains(r.logs.String(), tt.log) {
			t.Errorf("%s: log lacks %q:\n%s", tt.name, tt.log, r.logs)
		}
	}
}

// The week before last was never posted: Start logs it and posts nothing for it.
func TestOlderMissLogged(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	r := newRig(time.Date(2026, 3, 30, 9, 0, 0, 0, madrid))
	s := r.scheduler(t, madrid)
	if err := s.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	s.Stop()
	if posts := r.job.Posts(); len(posts) != 1 || posts[0].week != (digest.Week{Year: 2026, Num: 13}) {
		t.Errorf("posts %+v, want only 2026-W13", posts)
	}
	if !strings.Contains(r.logs.String(), "missed digest not posted") || !strings.Contains(r.logs.String(), "week=2026-W12") {
		t.Errorf("older miss not logged:\n%s", r.logs)
	}
}

// Two Scheduler instances share the ledger, as two runs of the bot share the
// store: the second start posts nothing more.
func TestExactlyOnceAcrossRestart(t *testing.T) {
	ny := mustLoc(t, "America/New_York")
	slot := time.Date(2026, 3, 9, 7, 0, 0, 0, ny)
	r := newRig(slot.Add(30 * time.Minute))
	s1 := r.scheduler(t, ny)
	if err := s1.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	s1.Stop()
	r.clock.Set(slot.Add(time.Hour))
	s2 := r.scheduler(t, ny)
	if err := s2.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	// A scheduled run of the second instance finds the week posted too.
	s2.cron.Entry(s2.digestID).WrappedJob.Run()
	s2.Stop()
	if posts := r.job.Posts(); len(posts) != 1 || posts[0].week != (digest.Week{Year: 2026, Num: 10}) {
		t.Errorf("posts %+v, want one post of 2026-W10", posts)
	}
	if next := s2.NextDigest(); !next.Equal(time.Date(2026, 3, 16, 7, 0, 0, 0, ny)) {
		t.Errorf("next digest %v, want Monday 2026-03-16 07:00 New York", next)
	}
}

// A panicking job is logged, not fatal, and, because Recover sits inside
// SkipIfStillRunning, the next run is not mistaken for an overlap.
func TestPanickingJobRecovered(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	r := newRig(time.Date(2026, 3, 30, 7, 0, 5, 0, madrid))
	r.job.during = func() { panic("store exploded") }
	s := r.scheduler(t, madrid)
	defer s.Stop()
	if err := s.Start(context.Background()); err != nil { // the catch-up run panics inside
		t.Fatal(err)
	}
	if !strings.Contains(r.logs.String(), "cron: panic") || !strings.Contains(r.logs.String(), "store exploded") {
		t.Fatalf("panic not logged:\n%s", r.logs)
	}
	r.job.mu.Lock()
	r.job.during = nil
	r.job.mu.Unlock()
	s.cron.Entry(s.digestID).WrappedJob.Run()
	if posts := r.job.Posts(); len(posts) != 2 {
		t.Errorf("%d posts, want the panicked one and a successful retry", len(posts))
	}
	if ok, _ := r.ledger.Posted(digest.Week{Year: 2026, Num: 13}); !ok {
		t.Error("the retry did not post")
	}
}

// A run that starts while the previous one is still posting is skipped by
// the chain (cron's "skip" line) and never reaches the job.
func TestOverlappingRunSkipped(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	r := newRig(time.Date(2026, 3, 29, 12, 0, 0, 0, madrid)) // Sunday: last week's digest already posted
	r.ledger.mark(digest.Week{Year: 2026, Num: 12})
	r.ledger.mark(digest.Week{Year: 2026, Num: 11})
	s := r.scheduler(t, madrid)
	if err := s.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	defer s.Stop()
	r.clock.Set(time.Date(2026, 3, 30, 7, 0, 0, 0, madrid))
	inside, release := make(chan struct{}), make(chan struct{})
	r.job.during = func() { close(inside); <-release }
	wrapped := s.cron.Entry(s.digestID).WrappedJob
	done := make(chan struct{})
	go func() { defer close(done); wrapped.Run() }()
	<-inside
	wrapped.Run() // overlaps: returns at once
	close(release)
	<-done
	if posts := r.job.Posts(); len(posts) != 1 {
		t.Errorf("%d posts, want 1", len(posts))
	}
	if !strings.Contains(r.logs.String(), "cron: skip") {
		t.Errorf("no skip logged:\n%s", r.logs)
	}
}

// Moving the digest to an earlier hour on the digest day, after the new slot
// has passed, posts that week rather than skipping it.
func TestRescheduleChecksNewSlot(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	r := newRig(time.Date(2026, 3, 30, 6, 30, 0, 0, madrid)) // Monday 06:30, before the 07:00 slot
	r.ledger.mark(digest.Week{Year: 2026, Num: 12})
	r.ledger.mark(digest.Week{Year: 2026, Num: 11})
	s := r.scheduler(t, madrid)
	if err := s.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	if n := len(r.job.Posts()); n != 0 {
		t.Fatalf("%d posts before the slot", n)
	}
	if err := s.Reschedule(time.Monday, 6*60, madrid); err != nil {
		t.Fatal(err)
	}
	if err := s.Reschedule(time.Monday, 25*60, madrid); !errors.Is(err, ErrSchedule) {
		t.Errorf("bad reschedule err = %v", err)
	}
	s.Stop() // waits for the check Reschedule started
	posts := r.job.Posts()
	if len(posts) != 1 || posts[0].week != (digest.Week{Year: 2026, Num: 13}) || !posts[0].late ||
		!posts[0].scheduledAt.Equal(time.Date(2026, 3, 30, 6, 0, 0, 0, madrid)) {
		t.Errorf("posts %+v, want 2026-W13 late for 06:00", posts)
	}
	if next := s.NextDigest(); !next.Equal(time.Date(2026, 4, 6, 6, 0, 0, 0, madrid)) {
		t.Errorf("next %v, want Monday 2026-04-06 06:00", next)
	}
	s.SetOff(true)
	if !s.NextDigest().IsZero() {
		t.Error("NextDigest not zero while off")
	}
}

func TestDigestOffPostsNothing(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	r := newRig(time.Date(2026, 3, 30, 9, 0, 0, 0, madrid))
	s, err := New(Config{Day: time.Monday, Minute: 420, Loc: madrid, Off: true, Clock: r.clock, Job: r.job, Ledger: r.ledger})
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	s.Stop()
	if n := len(r.job.Posts()); n != 0 {
		t.Errorf("%d posts while off", n)
	}
}

func TestLedgerErrorPostsNothing(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	r := newRig(time.Date(2026, 3, 30, 9, 0, 0, 0, madrid))
	r.ledger.err = errors.New("disk on fire")
	s := r.scheduler(t, madrid)
	if err := s.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	s.Stop()
	if n := len(r.job.Posts()); n != 0 {
		t.Errorf("%d posts without a ledger answer", n)
	}
	if !strings.Contains(r.logs.String(), "disk on fire") {
		t.Errorf("ledger error not logged:\n%s", r.logs)
	}
}

func TestAddDaily(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	r := newRig(time.Date(2026, 3, 30, 9, 0, 0, 0, madrid))
	r.ledger.mark(digest.Week{Year: 2026, Num: 13})
	r.ledger.mark(digest.Week{Year: 2026, Num: 12})
	s := r.scheduler(t, madrid)
	type ctxKey struct{}
	ctx := context.WithValue(context.Background(), ctxKey{}, "from Start")
	var mu sync.Mutex
	var seen []string
	if err := s.AddDaily("backup", 3*60, func(ctx context.Context) error {
		mu.Lock()
		defer mu.Unlock()
		seen = append(seen, ctx.Value(ctxKey{}).(string))
		return errors.New("disk full")
	}); err != nil {
		t.Fatal(err)
	}
	if err := s.AddDaily("", 0, nil); !errors.Is(err, ErrConfig) {
		t.Errorf("unnamed job err = %v", err)
	}
	if err := s.AddDaily("late", 1440, func(context.Context) error { return nil }); !errors.Is(err, ErrSchedule) {
		t.Errorf("minute 1440 err = %v", err)
	}
	if err := s.Start(ctx); err != nil {
		t.Fatal(err)
	}
	// The cron plans with the real clock: the next run is the coming 03:00 in Madrid.
	e := s.cron.Entry(s.daily["backup"].id)
	if next := e.Next.In(madrid); next.Hour() != 3 || next.Minute() != 0 || !next.After(time.Now()) || next.Sub(time.Now()) > 25*time.Hour {
		t.Errorf("backup next %v, want the coming 03:00 Madrid time", next)
	}
	e.WrappedJob.Run()
	if err := s.AddDaily("backup", 4*60, func(context.Context) error { panic("bad tape") }); err != nil {
		t.Fatal(err)
	}
	s.cron.Entry(s.daily["backup"].id).WrappedJob.Run() // recovered
	s.Stop()
	if len(seen) != 1 || seen[0] != "from Start" {
		t.Errorf("daily job saw %v", seen)
	}
	logs := r.logs.String()
	if !strings.Contains(logs, "disk full") || !strings.Contains(logs, "bad tape") {
		t.Errorf("daily failures not logged:\n%s", logs)
	}
	if err := s.AddDaily("x", 0, func(context.Context) error { return nil }); !errors.Is(err, ErrStopped) {
		t.Errorf("AddDaily after Stop err = %v", err)
	}
}

func TestStartStopLifecycle(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	before := runtime.NumGoroutine()
	r := newRig(time.Date(2026, 3, 30, 9, 0, 0, 0, madrid))
	s := r.scheduler(t, madrid)
	if err := s.AddDaily("backup", 180, func(context.Context) error { return nil }); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error)
	go func() { done <- s.Run(ctx) }()
	// Run's Start posts the catch-up; wait for it, then stop through ctx.
	for len(r.job.Posts()) == 0 {
		runtime.Gosched()
	}
	cancel()
	if err := <-done; err != nil {
		t.Fatal(err)
	}
	s.Stop() // idempotent
	if err := s.Start(context.Background()); !errors.Is(err, ErrStopped) {
		t.Errorf("Start after Stop err = %v", err)
	}
	if err := s.Reschedule(time.Tuesday, 0, madrid); !errors.Is(err, ErrStopped) {
		t.Errorf("Reschedule after Stop err = %v", err)
	}
	// The cron's goroutine ends as Stop returns; give it a moment to be reaped.
	deadline := time.Now().Add(2 * time.Second)
	for runtime.NumGoroutine() > before && time.Now().Before(deadline) {
		time.Sleep(5 * time.Millisecond)
	}
	if n := runtime.NumGoroutine(); n > before {
		buf := make([]byte, 1<<16)
		t.Errorf("%d goroutines after Stop, %d before:\n%s", n, before, buf[:runtime.Stack(buf, true)])
	}

	s2 := newRig(time.Now()).scheduler(t, madrid)
	if err := s2.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	if err := s2.Start(context.Background()); !errors.Is(err, ErrStarted) {
		t.Errorf("second Start err = %v", err)
	}
	s2.Stop()
}

func TestNewConfig(t *testing.T) {
	r := newRig(time.Now())
	for _, cfg := range []Config{
		{Day: time.Monday, Minute: 420, Ledger: r.ledger},
		{Day: time.Monday, Minute: 420, Job: r.job},
		{Day: 8, Minute: 420, Job: r.job, Ledger: r.ledger},
		{Day: time.Monday, Minute: 1440, Job: r.job, Ledger: r.ledger},
		{Day: time.Monday, Minute: 420, Job: r.job, Ledger: r.ledger, CatchUpWindow: 7 * 24 * time.Hour},
		{Day: time.Monday, Minute: 420, Job: r.job, Ledger: r.ledger, CatchUpWindow: -time.Hour},
	} {
		if _, err := New(cfg); !errors.Is(err, ErrConfig) {
			t.Errorf("New(%+v) err = %v, want ErrConfig", cfg, err)
		}
	}
}

// A scheduled run that wakes half a minute early by the wall clock still
// posts this week's digest, on time.
func TestEarlyWakeCountsAsSlot(t *testing.T) {
	madrid := mustLoc(t, "Europe/Madrid")
	slot := time.Date(2026, 3, 30, 7, 0, 0, 0, madrid)
	r := newRig(slot.Add(-time.Hour))
	r.ledger.mark(digest.Week{Year: 2026, Num: 12})
	r.ledger.mark(digest.Week{Year: 2026, Num: 11})
	s := r.scheduler(t, madrid)
	if err := s.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	defer s.Stop()
	r.clock.Set(slot.Add(-30 * time.Second))
	s.cron.Entry(s.digestID).WrappedJob.Run()
	posts := r.job.Posts()
	if len(posts) != 1 || posts[0].week != (digest.Week{Year: 2026, Num: 13}) || posts[0].late || !posts[0].scheduledAt.Equal(slot) {
		t.Errorf("posts %+v, want 2026-W13 on time for %v", posts, slot)
	}
}
