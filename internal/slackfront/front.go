package slackfront

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"net/http"
	"net/url"
	"sync"
	"sync/atomic"
	"time"

	"github.com/slack-go/slack"
)

// Front is the Slack front end. Build it with New, then call Run; PostReply
// may be called at any time, also from other goroutines.
type Front struct {
	cfg     Config
	mode    Mode
	log     *slog.Logger
	api     *slack.Client
	apiURL  *url.URL
	redact  Redactor // the credentials inside SLACK_API_URL, for errors and logs
	notices *notices // "busy, nothing was done" answers in flight
	users   Users
	dir     *memberDirectory
	gate    rateGate
	busy    inflight
	// transport is ours to close when Run returns (nil when the caller gave
	// an HTTP client).
	transport *http.Transport

	running atomic.Bool
	ready   chan struct{}
	addr    atomic.Pointer[string]
	// self is the bot's own identity from auth.test; written once by Run
	// before any worker or listener starts.
	self identity
	pool atomic.Pointer[pool]
}

// identity is who the bot is, from auth.test.
type identity struct {
	UserID string // the bot user, as in <@U...> mentions
	BotID  string // the bot id on messages the bot posts
	TeamID string
	Team   string
}

// New checks cfg and builds a front end. It does not touch the network.
func New(cfg Config) (*Front, error) {
	red := NewRedactor(URLSecrets(cfg.APIURL)...)
	cfg, mode, err := cfg.withDefaults()
	if err != nil {
		return nil, red.redactErr(err)
	}
	// Credentials inside SLACK_API_URL never reach a log line.
	cfg.Logger = slog.New(NewRedactHandler(cfg.Logger.Handler(), red))
	f := &Front{
		redact:  red,
		notices: newNotices(),
		cfg:     cfg,
		mode:    mode,
		log:     cfg.Logger.With("component", "slack", "mode", mode.String()),
		ready:   make(chan struct{}),
	}
	f.apiURL, _ = url.Parse(cfg.APIURL) // checked in withDefaults
	httpc := cfg.HTTPClient
	if httpc == nil {
		f.transport = http.DefaultTransport.(*http.Transport).Clone()
		httpc = &http.Client{Transport: f.transport, Timeout: defaultHTTPTimeout}
	}
	opts := []slack.Option{
		slack.OptionAPIURL(cfg.APIURL),
		slack.OptionHTTPClient(httpc),
		slack.OptionLog(debugOutput{f.log}),
	}
	if cfg.AppToken != "" {
		opts = append(opts, slack.OptionAppLevelToken(cfg.AppToken))
	}
	f.api = slack.New(cfg.BotToken, opts...)
	f.dir = &memberDirectory{f: f, ttl: cfg.UserTTL, clock: cfg.Clock}
	f.users = cfg.Users
	if f.users == nil {
		f.users = newUserCache(f, cfg.UserTTL, cfg.Clock)
	}
	return f, nil
}

// Mode reports how Slack reaches this front end.
func (f *Front) Mode() Mode { return f.mode }

// Ready is closed once Run is serving: auth.test passed and the HTTP
// listener is bound or the socket-mode client started.
func (f *Front) Ready() <-chan struct{} { return f.ready }

// Addr is the HTTP listener's address once Ready is closed (useful with
// port 0), or "" in socket mode.
func (f *Front) Addr() string {
	if p := f.addr.Load(); p != nil {
		return *p
	}
	return ""
}

// Run connects to Slack and serves until ctx is cancelled or a fatal error
// (refused tokens, a listener that cannot bind) stops it. It starts with
// auth.test, bounded by Config.StartTimeout, then runs what the Inbox
// holds from an earlier run before it takes new traffic. On cancel it stops taking new
// work, lets accepted work finish (at most Config.ShutdownTimeout), and
// returns nil with no goroutine of its own left running. Ready is closed
// only once serving starts; an error before that (including a ctx cancelled
// during the start, which the error wraps) leaves it open.
func (f *Front) Run(ctx context.Context) error {
	return f.redact.redactErr(f.serve(ctx))
}

func (f *Front) serve(ctx context.Context) error {
	if !f.running.CompareAndSwap(false, true) {
		return errors.New("slack: Run called twice")
	}
	defer func() {
		if f.transport != nil {
			f.transport.CloseIdleConnections()
		}
	}()
	if err := f.start(ctx); err != nil {
		return err
	}
	// Before any new traffic: run what was acknowledged before a crash,
	// oldest first; its replies go out beside the new traffic.
	late := f.replay(ctx)
	p := f.startPool(ctx)
	f.pool.Store(p)
	if len(late) > 0 {
		p.spawn(func(ctx context.Context) { f.postReplayed(ctx, late) })
	}
	var err error
	switch f.mode {
	case ModeHTTP:
		err = f.serveHTTP(ctx)
	case ModeSocket:
		err = f.serveSocket(ctx)
	}
	p.stop(f.cfg.ShutdownTimeout, f.log)
	f.notices.wg.Wait()
	f.log.Info("slack front end stopped")
	return err
}

// start checks the bot token with auth.test and learns the bot's identity.
func (f *Front) start(ctx context.Context) error {
	actx, cancel := context.WithTimeout(ctx, f.cfg.StartTimeout)
	defer cancel()
	res, err := f.api.AuthTestContext(actx)
	if err != nil {
		var se slack.SlackErrorResponse
		var ne net.Error
		switch {
		case ctx.Err() != nil:
			return fmt.Errorf("slack: start cancelled: %w", ctx.Err())
		case errors.As(err, &se) && fatalAuthCode(se.Err):
			return fmt.Errorf("slack: Slack refused SLACK_BOT_TOKEN (%s): use the Bot User OAuth Token (xoxb-...) from the app's OAuth & Permissions page, and reinstall the app if it was revoked: %w", se.Err, err)
		case errors.Is(actx.Err(), context.DeadlineExceeded), errors.As(err, &ne) && ne.Timeout():
			return fmt.Errorf("slack: auth.test at %s did not answer within %s; check the network or SLACK_API_URL: %w", RedactURL(f.cfg.APIURL), f.cfg.StartTimeout, err)
		default:
			return fmt.Errorf("slack: auth.test at %s failed: %w", RedactURL(f.cfg.APIURL), err)
		}
	}
	f.self = identity{UserID: res.UserID, BotID: res.BotID, TeamID: res.TeamID, Team: res.Team}
	f.log.Info("signed in to Slack", "team", res.Team, "team_id", res.TeamID, "bot_user", res.UserID)
	return nil
}

// fatalAuthCode reports Slack error codes that no retry can cure: the token
// is wrong, revoked or of the wrong kind.
func fatalAuthCode(code string) bool {
	switch code {
	case "invalid_auth", "not_authed", "account_inactive", "token_revoked", "token_expired",
		"not_allowed_token_type", "invalid_token", "missing_scope", "no_permission":
		return true
	}
	return false
}

// pool runs accepted work on a fixed number of workers fed by a bounded
// queue. Work keeps running after Run's context is cancelled, so that what
// Slack was told we accepted gets done; stop waits for it.
type pool struct {
	mu     sync.RWMutex
	closed bool
	jobs   chan inbound
	wg     sync.WaitGroup
	ctx    context.Context
	cancel context.CancelFunc
}

// spawn runs fn beside the workers, with their context; stop waits for it.
func (p *pool) spawn(fn func(context.Context)) {
	p.wg.Go(func() { fn(p.ctx) })
}

func (f *Front) startPool(parent context.Context) *pool {
	ctx, cancel := context.WithCancel(context.WithoutCancel(parent))
	p := &pool{jobs: make(chan inbound, f.cfg.QueueSize), ctx: ctx, cancel: cancel}
	for range f.cfg.Workers {
		p.wg.Go(func() {
			for in := range p.jobs {
				f.process(ctx, in)
			}
		})
	}
	return p
}

// offer queues work without blocking; false means the queue is full or
// closed, and the caller tells Slack to come back later.
func (p *pool) offer(in inbound) bool {
	p.mu.RLock()
	defer p.mu.RUnlock()
	if p.closed {
		return false
	}
	select {
	case p.jobs <- in:
		return true
	default:
		return false
	}
}

// stop closes the queue and waits for the workers; after timeout it cancels
// their context so that the remaining work ends quickly.
func (p *pool) stop(timeout time.Duration, log *slog.Logger) {
	p.mu.Lock()
	if !p.closed {
		p.closed = true
		close(p.jobs)
	}
	p.mu.Unlock()
	done := make(chan struct{})
	go func() {
		p.wg.Wait()
		close(done)
	}()
	timer := time.NewTimer(timeout)
	defer timer.Stop()
	select {
	case <-done:
	case <-timer.C:
		log.Warn("shutdown timeout: cancelling unfinished work", "timeout", timeout, "queued", len(p.jobs))
		p.cancel()
		<-done
	}
	p.cancel()
}

// inflight holds the dedup keys of deliveries being handled right now, so a
// copy that arrives meanwhile is dropped before the store knows of the first.
type inflight struct {
	mu  sync.Mutex
	ids map[string]struct{}
}

// claim takes all keys, or none when one of them is taken; then it returns
// that key.
func (s *inflight) claim(keys []dedupKey) (taken dedupKey, ok bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.ids == nil {
		s.ids = make(map[string]struct{})
	}
	for _, k := range keys {
		if _, busy := s.ids[k.id]; busy {
			return k, false
		}
	}
	for _, k := range keys {
		s.ids[k.id] = struct{}{}
	}
	return dedupKey{}, true
}

func (s *inflight) release(keys []dedupKey) {
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, k := range keys {
		delete(s.ids, k.id)
	}
}

// debugOutput routes slack-go's own debug lines into our logger.
type debugOutput struct{ log *slog.Logger }

func (d debugOutput) Output(_ int, s string) error {
	d.log.Debug(s, "from", "slack-go")
	return nil
}
