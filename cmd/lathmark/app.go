package main

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"os"
	"sync/atomic"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/console"
	"github.com/lathmark-team/lathmark/internal/control"
	"github.com/lathmark-team/lathmark/internal/demo"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// operatorID is the chat user id of whoever runs the terminal: a head coach.
const operatorID = "operator"

// app is the running bot: its store, engine and front ends.
type app struct {
	cfg    config
	io     stdio
	log    *slog.Logger
	db     *store.DB
	engine *bot.Engine
	// onTeam is called when a command changes the team settings; the Slack
	// mode points it at the scheduler.
	onTeam atomic.Pointer[func(record.Team)]
	// dir is the workspace directory once the Slack front end is built
	// (the engine is built first); empty in the terminal.
	dir lateDirectory
}

// lateDirectory is the engine's bot.Directory, pointed at the Slack front
// end's once that exists; before (and in the terminal) there is no
// workspace, and names resolve among the known users.
type lateDirectory struct{ p atomic.Pointer[bot.Directory] }

// Members asks the front end's directory, if there is one.
func (d *lateDirectory) Members(ctx context.Context) ([]bot.Member, bool, error) {
	if p := d.p.Load(); p != nil {
		return (*p).Members(ctx)
	}
	return nil, false, nil
}

// newApp opens the data file (or the re-seeded demo file) and builds the engine.
func newApp(ctx context.Context, cfg config, io stdio) (*app, error) {
	a := &app{cfg: cfg, io: io, log: newLogger(cfg.LogLevel, io.Err)}
	path := cfg.DataPath
	if cfg.Demo {
		path = cfg.DemoPath
		if err := os.Remove(path); err != nil && !errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("reset demo file: %w", err)
		}
	}
	// Group commit for concurrent loggers: up to 100 log commands share one
	// commit. A lone writer commits at once (store.DB.Batch); writers that
	// arrive together wait at most 2 ms for company. Measured with 100
	// concurrent loggers: 0.2 ms gave about 400 µs a log, 2 ms about 150 µs,
	// because the runtime fires so short a timer only after about 1 ms.
	db, err := store.Open(path, store.Options{Timeout: cfg.LockWait, MaxBatchSize: 100, MaxBatchDelay: 2 * time.Millisecond})
	if err != nil {
		return nil, err
	}
	a.db = db
	heads := append([]string(nil), cfg.Heads...)
	if !cfg.slack() || cfg.As != "" {
		heads = append(heads, operatorID)
	}
	a.engine, err = bot.New(bot.Config{Store: botstore.New(db), HeadCoaches: heads, Logger: a.log, OnTeamChange: a.teamChanged, Directory: &a.dir})
	if err != nil {
		db.Close()
		return nil, err
	}
	if cfg.Demo {
		if err := a.seedDemo(ctx); err != nil {
			db.Close()
			return nil, err
		}
	}
	return a, nil
}

// teamChanged passes a settings change on to whoever listens.
func (a *app) teamChanged(t record.Team) {
	if f := a.onTeam.Load(); f != nil {
		(*f)(t)
	}
}

// seedDemo types the invented squad's script into the engine.
func (a *app) seedDemo(ctx context.Context) error {
	loc, err := time.LoadLocation("Europe/London")
	if err != nil {
		return fmt.Errorf("demo: %w", err)
	}
	for i, l := range demo.Script(time.Now(), loc) {
		r := a.engine.Handle(ctx, bot.Request{UserID: operatorID, UserName: "demo", Text: l.Text, Time: l.Time, MessageID: fmt.Sprintf("demo-%d", i), Seed: true})
		if !r.OK() {
			return fmt.Errorf("demo: seeding %q: %s", l.Text, firstLine(r))
		}
	}
	return nil
}

func firstLine(r bot.Reply) string {
	if len(r.Lines) > 0 {
		return r.Lines[0]
	}
	return r.Title
}

// Close releases the store.
func (a *app) Close() error { return a.db.Close() }

// runBot runs the bot until ctx ends (a signal) or, in the terminal, until
// the end of standard input.
func runBot(ctx context.Context, cfg config, io stdio) error {
	a, err := newApp(ctx, cfg, io)
	if err != nil {
		return err
	}
	defer a.Close()
	ctl, err := control.Listen(a.db.Path(), a.db, a.log)
	if err != nil {
		// Without the socket, `lathmark backup` cannot reach this bot; the
		// bot itself works, so say so and go on.
		a.log.Warn("hot backups from the command line are unavailable", "err", err)
	} else {
		defer ctl.Close()
	}
	if cfg.slack() {
		return a.runSlack(ctx)
	}
	return a.runTerminal(ctx)
}

func (a *app) runTerminal(ctx context.Context) error {
	user, name := operatorID, "operator"
	if a.cfg.As != "" {
		user, name = a.cfg.As, a.cfg.As
	}
	t := &console.Terminal{
		Handler: a.engine, In: a.io.In, Out: a.io.Out,
		UserID: user, UserName: name, FilesDir: a.cfg.FilesDir, Prompt: isTerminal(a.io.In),
	}
	if t.Prompt {
		where := a.db.Path()
		if a.cfg.Demo {
			where = "the demo squad (Harbour Lane Athletics Club, invented)"
		}
		fmt.Fprintf(a.io.Out, "lathmark on %s. Type help, or Ctrl-D to leave.\n", where)
	}
	return t.Run(ctx)
}

// isTerminal reports whether r is an interactive terminal.
func isTerminal(r any) bool {
	f, ok := r.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

func newLogger(level string, w interface{ Write([]byte) (int, error) }) *slog.Logger {
	var l slog.Level
	if err := l.UnmarshalText([]byte(level)); err != nil {
		l = slog.LevelInfo
	}
	return slog.New(slog.NewTextHandler(w, &slog.HandlerOptions{Level: l}))
}

// runBackup takes a consistent hot copy of the data file, also while a bot
// is running on it (bbolt allows a reader beside the writer).
func runBackup(ctx context.Context, cfg config, io stdio) error {
	if len(cfg.SubArgs) != 1 {
		return errors.New("usage: lathmark backup [--data PATH] FILE")
	}
	dest := cfg.SubArgs[0]
	n, err := control.Backup(ctx, cfg.DataPath, dest)
	how := "by the running bot"
	if errors.Is(err, control.ErrNoServer) {
		how = "directly (no bot running)"
		n, err = backupDirect(cfg, dest)
	}
	if err != nil {
		return err
	}
	if err := store.Check(cfg.SubArgs[0]); err != nil {
		return fmt.Errorf("backup written but fails its check: %w", err)
	}
	fmt.Fprintf(io.Out, "backup of %s written %s to %s (%d bytes); consistency check passed\n", cfg.DataPath, how, dest, n)
	return nil
}

// backupDirect copies a data file that no bot holds open.
func backupDirect(cfg config, dest string) (int64, error) {
	db, err := store.Open(cfg.DataPath, store.Options{ReadOnly: true, Timeout: cfg.LockWait})
	if err != nil {
		return 0, err
	}
	defer db.Close()
	return db.BackupToFile(dest)
}

// runRestore puts a checked backup in place of the data file.
func runRestore(cfg config, io stdio) error {
	if len(cfg.SubArgs) != 1 {
		return errors.New("usage: lathmark restore [--data PATH] FILE")
	}
	if err := store.Restore(cfg.SubArgs[0], cfg.DataPath); err != nil {
		return err
	}
	fmt.Fprintf(io.Out, "restored %s from %s; the previous file is kept as %s.before-restore\n", cfg.DataPath, cfg.SubArgs[0], cfg.DataPath)
	return nil
}
