package bot

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"slices"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Config is what an Engine needs from its surroundings.
type Config struct {
	Store Store
	Clock Clock // nil means the wall clock
	// HeadCoaches are chat user ids that are head coaches whatever the store
	// says (the first head coaches, from configuration).
	HeadCoaches []string
	Logger      *slog.Logger // nil discards
	// OnTeamChange, if set, is called after a command changed the team
	// settings (digest schedule, time zone), so the scheduler can follow.
	OnTeamChange func(record.Team)
	// Directory lists the workspace's people for `role ROLE NAME`; nil
	// (the terminal) resolves names among the known users.
	Directory Directory
	// ChartWidthPx is the width of the charts in replies and digests, in
	// pixels (height 5:4); 0 means 1080, a phone screen's width.
	ChartWidthPx int
}

// Engine parses and runs commands. It is safe for concurrent use: all state
// lives in the store, and each command runs in its own transaction.
type Engine struct {
	store       Store
	clock       Clock
	headCoaches []string
	log         *slog.Logger
	onTeam      func(record.Team)
	directory   Directory
	chartW      int // chart width in px; 0 = the digest package's default
	commands    []command
	names       []commandName
	firstWords  []string
}

// New returns an engine over the given store.
func New(cfg Config) (*Engine, error) {
	if cfg.Store == nil {
		return nil, errors.New("bot: no store")
	}
	e := &Engine{store: cfg.Store, clock: cfg.Clock, headCoaches: slices.Clone(cfg.HeadCoaches), log: cfg.Logger, onTeam: cfg.OnTeamChange, directory: cfg.Directory}
	if cfg.ChartWidthPx != 0 {
		if cfg.ChartWidthPx < 200 || cfg.ChartWidthPx > 3200 {
			return nil, fmt.Errorf("bot: chart width %d px (want 200 to 3200)", cfg.ChartWidthPx)
		}
		e.chartW = cfg.ChartWidthPx
	}
	if e.clock == nil {
		e.clock = ClockFunc(time.Now)
	}
	if e.log == nil {
		e.log = slog.New(slog.DiscardHandler)
	}
	e.commands = allCommands()
	e.names, e.firstWords = indexNames(e.commands)
	return e, nil
}

// Handle runs one request and returns the reply. It never panics on any
// input: a panic inside a command is recovered and reported as the bot's own
// failure, with nothing written (the transaction rolls back).
func (e *Engine) Handle(ctx context.Context, req Request) (reply Reply) {
	start := e.clock.Now()
	if req.Time.IsZero() {
		req.Time = start
	}
	defer func() {
		if p := recover(); p != nil {
			e.log.Error("command panicked", "text", req.Text, "panic", fmt.Sprint(p))
			reply = internalReply()
		}
	}()
	if isBlock(req.Text) {
		return e.keepHiddenOutOfChannel(ctx, req, e.handleBlock(ctx, req))
	}
	ts := tokenize(req.Text)
	if len(ts) == 0 {
		return Reply{Title: "lathmark", Lines: []string{"Type `help` to see what I can do."}, Example: "help", Ephemeral: true}
	}
	cmd, args, err := e.lookup(ts)
	if err != nil {
		return e.refusal(req, err)
	}
	args, more := wantsMore(cmd, args)
	c := &call{ctx: ctx, e: e, req: req, cmd: cmd, args: args, now: req.Time}
	if err := c.loadSpeaker(); err != nil {
		return e.refusal(req, err)
	}
	if err := c.allowed(cmd.access); err != nil {
		return e.refusal(req, err)
	}
	r, err := cmd.run(c)
	if err != nil {
		return e.refusal(req, err)
	}
	if more && r.Details != nil {
		r = *r.Details
	}
	return e.keepHiddenOutOfChannel(ctx, req, r)
}

// wantsMore strips a trailing "more" from the arguments of a command that
// offers details, and reports whether it was there.
func wantsMore(cmd command, args []token) ([]token, bool) {
	if !cmd.details || len(args) == 0 || args[len(args)-1].Lower != "more" {
		return args, false
	}
	return args[:len(args)-1], true
}

// refusal turns an error into a reply: a UserError's own message, or a
// generic failure for anything else (logged, never shown raw).
func (e *Engine) refusal(req Request, err error) Reply {
	var ue *UserError
	if errors.As(err, &ue) {
		return Reply{Kind: ue.Kind, Title: "Not done", Lines: []string{cutLongWords(ue.Msg)}, Example: cutLongWords(ue.Example), Ephemeral: true}
	}
	if errors.Is(err, errDuplicate) {
		return Reply{Title: "Already done", Lines: []string{"That message was already handled; nothing was logged twice."}, Ephemeral: true}
	}
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return Reply{Kind: KindInternal, Title: "Not done", Lines: []string{"The bot is shutting down; nothing was changed. Please send it again in a minute."}, Ephemeral: true}
	}
	if r, ok := plainCauseReply(err); ok {
		return r
	}
	e.log.Error("command failed", "text", req.Text, "user", req.UserID, "err", err)
	return internalReply()
}

func internalReply() Reply {
	return Reply{Kind: KindInternal, Title: "Not done", Lines: []string{"Something went wrong on my side; nothing was changed. Please try again, and tell a coach if it keeps happening."}, Ephemeral: true}
}

// lookup finds the command whose words start the line, preferring the
// longest match ("athlete add" over "athlete").
func (e *Engine) lookup(ts []token) (command, []token, error) {
	var (
		best  command
		bestN int
	)
	for _, n := range e.names {
		if len(n.words) > len(ts) || len(n.words) <= bestN || !matchWords(ts, n.words) {
			continue
		}
		best, bestN = e.commands[n.cmd], len(n.words)
		best.name = n.name
	}
	if bestN > 0 {
		return best, ts[bestN:], nil
	}
	var (
		starts  []string
		example string
	)
	for _, n := range e.names {
		if n.words[0] == ts[0].Lower {
			starts = append(starts, n.name)
			if example == "" {
				example = e.commands[n.cmd].example
			}
		}
	}
	if len(starts) > 0 {
		return command{}, nil, usageErr(example, "%q needs more words: %s", ts[0].Raw, strings.Join(starts, ", "))
	}
	if s, ok := nearest(ts[0].Lower, e.firstWords); ok {
		return command{}, nil, usageErr("help", "I don't know the command %q. Did you mean %q?", ts[0].Raw, s)
	}
	return command{}, nil, usageErr("help", "I don't know the command %q. Type help for the list.", ts[0].Raw)
}

// commandName is one name (or alias) of a command, split into words once.
type commandName struct {
	name  string
	words []string
	cmd   int // index into Engine.commands
}

// indexNames splits every command name and alias into words.
func indexNames(cs []command) (names []commandName, firsts []string) {
	seen := map[string]bool{}
	for i, c := range cs {
		for _, n := range c.names() {
			w := strings.Fields(n)
			names = append(names, commandName{name: n, words: w, cmd: i})
			if !seen[w[0]] {
				seen[w[0]] = true
				firsts = append(firsts, w[0])
			}
		}
	}
	return names, firsts
}

func matchWords(ts []token, words []string) bool {
	for i, w := range words {
		if ts[i].Lower != w {
			return false
		}
	}
	return true
}

// Team returns the stored team settings.
func (e *Engine) Team(ctx context.Context) (record.Team, error) {
	var t record.Team
	err := e.store.View(ctx, func(tx Tx) error {
		var err error
		t, err = tx.Team()
		return err
	})
	return withDigestDefaults(t), err
}
