package weekly

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"maps"
	"slices"
	"sync"
	"time"

	"github.com/robfig/cron/v3"

	"github.com/lathmark-team/lathmark/internal/digest"
)

// Clock tells the time. The system clock is time.Now; tests pass a fake.
type Clock interface {
	Now() time.Time
}

// Job posts one week's digest. It must post a week at most once even when
// asked twice (for instance by two processes sharing a store): the bot's job
// records the week as posted in the same store transaction as the post's
// bookkeeping, and does nothing for a week already recorded.
type Job interface {
	PostDigest(ctx context.Context, week digest.Week, scheduledAt time.Time, late bool) error
}

// Ledger tells whether a week's digest was already posted.
type Ledger interface {
	Posted(week digest.Week) (bool, error)
}

// Errors of the Scheduler.
var (
	ErrConfig  = errors.New("weekly: bad configuration")
	ErrStarted = errors.New("weekly: scheduler already started")
	ErrStopped = errors.New("weekly: scheduler stopped")
)

// Config sets up a Scheduler.
type Config struct {
	Day           time.Weekday   // digest weekday in Loc
	Minute        int            // digest minute after local midnight, 0..1439 (07:00 = 420)
	Loc           *time.Location // team zone; nil means UTC
	Off           bool           // the digest is switched off; daily jobs still run
	Clock         Clock          // nil means the system clock
	Job           Job            // required
	Ledger        Ledger         // required
	Logger        *slog.Logger   // nil discards
	CatchUpWindow time.Duration  // 0 means DefaultCatchUpWindow; at most 6 days
}

// Scheduler runs the weekly digest, and any daily jobs added with AddDaily,
// on robfig/cron in the team's zone. Every job is wrapped with
// cron.SkipIfStillRunning outside cron.Recover: a run that starts while the
// previous one is still going is skipped, and a panic is logged instead of
// ending the process (Recover inside, so a panicking run still releases the
// skip guard).
//
// Start checks once whether the most recent slot's digest is still
// unposted and, within the catch-up window, posts it late (a cron does not
// run what was missed while the process was down); then the cron takes
// over. Stop stops the cron and waits for running jobs; afterwards no
// goroutine of the Scheduler is left.
//
// The slots are this package's own cron.Schedule (SlotOn's rules for
// skipped and repeated local times) rather than a parsed spec, which would
// miss a week whose slot falls in a skipped hour and fire twice in a
// repeated one; Spec gives the equivalent spec for display. Each schedule
// carries its zone, so Reschedule can change zones; the zone given to
// cron.WithLocation in New only sets how the cron reads the clock.
type Scheduler struct {
	clock  Clock
	job    Job
	ledger Ledger
	log    *slog.Logger
	window time.Duration
	cron   *cron.Cron

	mu       sync.Mutex // guards the fields below
	slot     slotSchedule
	off      bool
	digestID cron.EntryID
	daily    map[string]dailyEntry
	ctx      context.Context
	cancel   context.CancelFunc
	started  bool
	stopped  bool
	running  bool // the cron was started

	runMu sync.Mutex     // one digest run at a time, whatever triggered it
	bg    sync.WaitGroup // digest checks started by Reschedule
}

type dailyEntry struct {
	id     cron.EntryID
	minute int
	fn     func(context.Context) error
}

type systemClock struct{}

func (systemClock) Now() time.Time { return time.Now() }

// New checks cfg and returns a Scheduler that is not yet running.
func New(cfg Config) (*Scheduler, error) {
	if cfg.Job == nil || cfg.Ledger == nil {
		return nil, fmt.Errorf("%w: a Job and a Ledger are required", ErrConfig)
	}
	if err := checkSlot(cfg.Day, cfg.Minute); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrConfig, err)
	}
	window := cfg.CatchUpWindow
	if window == 0 {
		window = DefaultCatchUpWindow
	}
	if window < 0 || window > 6*24*time.Hour {
		return nil, fmt.Errorf("%w: catch-up window %v (want up to 6 days, below the week between slots)", ErrConfig, window)
	}
	loc := cfg.Loc
	if loc == nil {
		loc = time.UTC
	}
	log := cfg.Logger
	if log == nil {
		log = slog.New(slog.DiscardHandler)
	}
	clock := cfg.Clock
	if clock == nil {
		clock = systemClock{}
	}
	chainLog := cronLogger{log: log, info: slog.LevelInfo}
	s := &Scheduler{
		clock: clock, job: cfg.Job, ledger: cfg.Ledger, log: log, window: window,
		cron: cron.New(
			cron.WithLocation(loc),
			cron.WithChain(cron.SkipIfStillRunning(chainLog), cron.Recover(chainLog)),
			cron.WithLogger(cronLogger{log: log, info: slog.LevelDebug}),
		),
		slot:  slotSchedule{day: cfg.Day, minute: cfg.Minute, loc: loc},
		off:   cfg.Off,
		daily: make(map[string]dailyEntry),
	}
	s.digestID = s.cron.Schedule(s.slot, cron.FuncJob(func() { s.runDue("schedule") }))
	return s, nil
}

// Start runs the catch-up check once (posting a missed digest late when it
// is within the catch-up window; Start returns after that post), then starts
// the cron. ctx is handed to every job run; cancelling it does not stop the
// Scheduler (Stop does), but jobs see it. Start may be called once.
func (s *Scheduler) Start(ctx context.Context) error {
	s.mu.Lock()
	if s.stopped {
		s.mu.Unlock()
		return ErrStopped
	}
	if s.started {
		s.mu.Unlock()
		return ErrStarted
	}
	s.started = true
	s.ctx, s.cancel = context.WithCancel(ctx)
	id := s.digestID
	s.mu.Unlock()

	s.logOlderMiss()
	// The catch-up, through the same chain as scheduled runs. (A Reschedule
	// in between replaced the entry and runs its own check.)
	if e := s.cron.Entry(id); e.Valid() {
		e.WrappedJob.Run()
	}

	s.mu.Lock()
	defer s.mu.Unlock()
	if s.stopped {
		return ErrStopped
	}
	s.cron.Start()
	s.running = true
	s.log.Info("digest schedule started", "next", s.nextLocked())
	return nil
}

// Run starts the Scheduler, waits for ctx to end, then stops it.
func (s *Scheduler) Run(ctx context.Context) error {
	if err := s.Start(ctx); err != nil {
		return err
	}
	<-ctx.Done()
	s.Stop()
	return nil
}

// Stop stops the cron and waits for running jobs and pending checks to
// finish, then cancels the context jobs were given. Stop is idempotent.
func (s *Scheduler) Stop() {
	s.mu.Lock()
	if s.stopped {
		s.mu.Unlock()
		return
	}
	s.stopped = true
	running := s.running
	s.mu.Unlock()
	if running {
		<-s.cron.Stop().Done()
	}
	s.bg.Wait()
	s.mu.Lock()
	if s.cancel != nil {
		s.cancel()
	}
	s.mu.Unlock()
}

// Reschedule moves the digest to a new weekday, minute and zone (daily jobs
// move to the new zone, keeping their minute). If the new schedule's most
// recent slot is unposted and within the catch-up window, the digest is
// posted in the background: otherwise a move to an earlier hour on the
// digest day would skip that week.
func (s *Scheduler) Reschedule(day time.Weekday, minute int, loc *time.Location) error {
	if err := checkSlot(day, minute); err != nil {
		return err
	}
	if loc == nil {
		loc = time.UTC
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.stopped {
		return ErrStopped
	}
	s.slot = slotSchedule{day: day, minute: minute, loc: loc}
	s.cron.Remove(s.digestID)
	s.digestID = s.cron.Schedule(s.slot, cron.FuncJob(func() { s.runDue("schedule") }))
	for _, name := range slices.Sorted(maps.Keys(s.daily)) {
		e := s.daily[name]
		s.cron.Remove(e.id)
		e.id = s.cron.Schedule(slotSchedule{daily: true, minute: e.minute, loc: loc}, s.dailyJob(name, e.fn))
		s.daily[name] = e
	}
	s.log.Info("digest rescheduled", "day", day.String(), "time", hhmm(minute), "zone", loc.String(), "next", s.nextLocked())
	if e := s.cron.Entry(s.digestID); s.started && e.Valid() {
		s.bg.Go(e.WrappedJob.Run)
	}
	return nil
}

// SetOff switches the digest off or back on; daily jobs are not affected.
func (s *Scheduler) SetOff(off bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.off = off
}

// NextDigest returns the next digest slot after the clock's now (zero when
// the digest is off).
func (s *Scheduler) NextDigest() time.Time {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.nextLocked()
}

func (s *Scheduler) nextLocked() time.Time {
	if s.off {
		return time.Time{}
	}
	return s.slot.Next(s.clock.Now())
}

// AddDaily runs fn every day at minute past local midnight in the team's
// zone (local times resolved as in SlotOn), wrapped like the digest: an
// overlapping run is skipped, a panic is logged. A name added again replaces
// the earlier job. Runs missed while the process is down are not made up.
func (s *Scheduler) AddDaily(name string, minute int, fn func(ctx context.Context) error) error {
	if name == "" || fn == nil {
		return fmt.Errorf("%w: a daily job needs a name and a function", ErrConfig)
	}
	if err := checkSlot(time.Sunday, minute); err != nil {
		return err
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.stopped {
		return ErrStopped
	}
	if old, ok := s.daily[name]; ok {
		s.cron.Remove(old.id)
	}
	id := s.cron.Schedule(slotSchedule{daily: true, minute: minute, loc: s.slot.loc}, s.dailyJob(name, fn))
	s.daily[name] = dailyEntry{id: id, minute: minute, fn: fn}
	return nil
}

func (s *Scheduler) dailyJob(name string, fn func(context.Context) error) cron.Job {
	return cron.FuncJob(func() {
		start := s.clock.Now()
		if err := fn(s.jobContext()); err != nil {
			s.log.Error("daily job failed", "job", name, "err", err)
			return
		}
		s.log.Info("daily job done", "job", name, "took", s.clock.Now().Sub(start))
	})
}

func (s *Scheduler) jobContext() context.Context {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.ctx == nil {
		return context.Background()
	}
	return s.ctx
}

// runDue posts the most recent slot's digest if it is unposted and within
// the catch-up window. Scheduled runs, the start-up catch-up and the check
// after Reschedule all come here; runMu keeps them from overlapping.
func (s *Scheduler) runDue(trigger string) {
	if !s.runMu.TryLock() {
		s.log.Info("digest check skipped: another is running", "trigger", trigger)
		return
	}
	defer s.runMu.Unlock()
	s.mu.Lock()
	sl, off := s.slot, s.off
	s.mu.Unlock()
	if off {
		return
	}
	ctx := s.jobContext()
	now := s.clock.Now()
	last := LastScheduled(now.Add(EarlyTolerance), sl.day, sl.minute, sl.loc)
	week := DigestWeek(last, sl.loc)
	c := CatchUp(now, last, s.window)
	if !c.Post {
		posted, err := s.ledger.Posted(week)
		if err == nil && !posted {
			s.log.Warn("missed digest not posted: older than the catch-up window",
				"week", week.String(), "scheduled", last, "late_by", c.Age.Round(time.Minute), "window", s.window)
		}
		return
	}
	posted, err := s.ledger.Posted(week)
	if err != nil {
		s.log.Error("digest check failed", "week", week.String(), "err", err)
		return
	}
	if posted {
		s.log.Debug("digest already posted", "week", week.String())
		return
	}
	if err := s.job.PostDigest(ctx, week, last, c.Late); err != nil {
		s.log.Error("digest post failed", "week", week.String(), "scheduled", last, "late", c.Late, "err", err)
		return
	}
	s.log.Info("digest posted", "week", week.String(), "scheduled", last, "late", c.Late, "trigger", trigger)
}

// logOlderMiss logs, at start-up, an unposted digest from the slot before
// the most recent one: it is past any catch-up window and will not be posted.
func (s *Scheduler) logOlderMiss() {
	s.mu.Lock()
	sl, off := s.slot, s.off
	s.mu.Unlock()
	if off {
		return
	}
	last := LastScheduled(s.clock.Now().Add(EarlyTolerance), sl.day, sl.minute, sl.loc)
	before := LastScheduled(last.Add(-time.Second), sl.day, sl.minute, sl.loc)
	week := DigestWeek(before, sl.loc)
	if posted, err := s.ledger.Posted(week); err == nil && !posted {
		s.log.Warn("missed digest not posted: older than the catch-up window",
			"week", week.String(), "scheduled", before)
	}
}

func hhmm(minute int) string { return fmt.Sprintf("%02d:%02d", minute/60, minute%60) }

// cronLogger hands robfig/cron's log lines to slog: errors (such as a
// recovered panic, with its stack) as errors, the rest at the info level
// chosen (Info for the chain's "skip", Debug for the cron's own chatter).
type cronLogger struct {
	log  *slog.Logger
	info slog.Level
}

func (l cronLogger) Info(msg string, kv ...any) {
	l.log.Log(context.Background(), l.info, "cron: "+msg, kv...)
}

func (l cronLogger) Error(err error, msg string, kv ...any) {
	l.log.Error("cron: "+msg, append([]any{"err", err}, kv...)...)
}
