package slackfront

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"strconv"
	"time"

	"github.com/slack-go/slack"
	"github.com/slack-go/slack/slackevents"
)

// busyText answers a slash command when the queue is full.
const busyText = "I'm busy with other commands right now; nothing was done. Please send it again in a moment."

// httpHandler is the HTTP handler of HTTP mode: POST /slack/events,
// POST /slack/commands, POST /slack/interactive and GET /healthz.
func (f *Front) httpHandler() http.Handler {
	mux := http.NewServeMux()
	mux.Handle("POST /slack/events", f.signed(f.handleEvents))
	mux.Handle("POST /slack/commands", f.signed(f.handleCommand))
	mux.Handle("POST /slack/interactive", f.signed(f.handleInteractive))
	mux.HandleFunc("GET /healthz", func(w http.ResponseWriter, _ *http.Request) {
		w.Header().Set("Content-Type", "text/plain; charset=utf-8")
		_, _ = io.WriteString(w, "ok\n")
	})
	return mux
}

// serveHTTP listens on Config.HTTPAddr until ctx is cancelled, then shuts
// the server down gracefully: handlers in progress finish, new connections
// are refused.
func (f *Front) serveHTTP(ctx context.Context) error {
	ln, err := net.Listen("tcp", f.cfg.HTTPAddr)
	if err != nil {
		return fmt.Errorf("slack: listen on %s: %w", f.cfg.HTTPAddr, err)
	}
	addr := ln.Addr().String()
	f.addr.Store(&addr)
	srv := &http.Server{
		Handler:           f.httpHandler(),
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       10 * time.Second,
		WriteTimeout:      10 * time.Second,
		IdleTimeout:       60 * time.Second,
		ErrorLog:          slog.NewLogLogger(f.log.Handler(), slog.LevelWarn),
	}
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	f.log.Info("listening for Slack requests", "addr", addr)
	close(f.ready)

	select {
	case err = <-served:
		return fmt.Errorf("slack: http server: %w", err)
	case <-ctx.Done():
	}
	sctx, cancel := context.WithTimeout(context.WithoutCancel(ctx), f.cfg.ShutdownTimeout)
	defer cancel()
	if err := srv.Shutdown(sctx); err != nil {
		f.log.Warn("http shutdown did not finish cleanly", "err", err)
		_ = srv.Close()
	}
	if err := <-served; err != nil && !errors.Is(err, http.ErrServerClosed) {
		return fmt.Errorf("slack: http server: %w", err)
	}
	return nil
}

// signed reads the body once (at most Config.MaxBodyBytes), verifies
// Slack's signature before anything else runs, and restores the body for
// the parsers. Refusals are logged without the body.
func (f *Front) signed(next func(http.ResponseWriter, *http.Request, []byte)) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		body, err := io.ReadAll(http.MaxBytesReader(w, r.Body, f.cfg.MaxBodyBytes))
		if err != nil {
			var tooBig *http.MaxBytesError
			if errors.As(err, &tooBig) {
				f.log.Warn("refused an oversized request", "path", r.URL.Path, "remote", r.RemoteAddr, "limit", f.cfg.MaxBodyBytes)
				http.Error(w, "request body too large", http.StatusRequestEntityTooLarge)
				return
			}
			http.Error(w, "could not read the request", http.StatusBadRequest)
			return
		}
		if err := verifySignature(r.Header, body, f.cfg.SigningSecret, f.cfg.Clock.Now()); err != nil {
			f.log.Warn("refused a request that failed signature verification",
				"path", r.URL.Path, "remote", r.RemoteAddr, "reason", err.Error(), "bytes", len(body))
			http.Error(w, "invalid request signature", http.StatusUnauthorized)
			return
		}
		r.Body = io.NopCloser(bytes.NewReader(body))
		next(w, r, body)
	})
}

// retryOf reads X-Slack-Retry-Num: how many times Slack has sent this event
// before (0 for a first delivery).
func retryOf(r *http.Request) int {
	n, err := strconv.Atoi(r.Header.Get(headerRetryNum))
	if err != nil || n < 0 {
		return 0
	}
	return n
}

// handleEvents answers the Events API: the url_verification challenge, and
// event callbacks, which are queued and acknowledged at once. A full queue
// answers 503 so that Slack delivers the event again later.
func (f *Front) handleEvents(w http.ResponseWriter, r *http.Request, body []byte) {
	retry := retryOf(r)
	ev, err := slackevents.ParseEvent(json.RawMessage(body), slackevents.OptionNoVerifyToken())
	if err != nil {
		if json.Valid(body) {
			// An event type we did not ask for: acknowledge, so Slack stops.
			f.log.Debug("ignoring an event we cannot use", "err", err)
			w.WriteHeader(http.StatusOK)
			return
		}
		w.Header().Set("X-Slack-No-Retry", "1") // sending it again will not help
		http.Error(w, "not an Events API payload", http.StatusBadRequest)
		return
	}
	switch ev.Type {
	case slackevents.URLVerification:
		v, ok := ev.Data.(*slackevents.EventsAPIURLVerificationEvent)
		if !ok {
			http.Error(w, "bad url_verification", http.StatusBadRequest)
			return
		}
		w.Header().Set("Content-Type", "application/json")
		_ = json.NewEncoder(w).Encode(map[string]string{"challenge": v.Challenge})
		return
	case slackevents.AppRateLimited:
		f.log.Warn("Slack is dropping events for this app: it exceeded the Events API rate limit")
		w.WriteHeader(http.StatusOK)
		return
	}
	if retry > 0 {
		f.log.Info("Slack re-delivered an event", "retry", retry, "reason", r.Header.Get(headerRetryWhy))
	}
	in, ok := f.fromEvent(ev, retry)
	if !ok {
		w.WriteHeader(http.StatusOK)
		return
	}
	if !f.pool.Load().offer(in) {
		f.log.Warn("work queue full; asking Slack to deliver the event again later", "queue", f.cfg.QueueSize)
		http.Error(w, "busy", http.StatusServiceUnavailable)
		return
	}
	w.WriteHeader(http.StatusOK)
}

// handleCommand queues a slash command and answers 200 with an empty body
// at once; the reply follows through the response_url.
func (f *Front) handleCommand(w http.ResponseWriter, r *http.Request, _ []byte) {
	cmd, err := slack.SlashCommandParse(r)
	if err != nil || cmd.UserID == "" {
		http.Error(w, "not a slash command", http.StatusBadRequest)
		return
	}
	if !f.pool.Load().offer(f.fromSlash(cmd, retryOf(r))) {
		f.log.Warn("work queue full; told the asker to try again", "queue", f.cfg.QueueSize)
		w.Header().Set("Content-Type", "application/json")
		_ = json.NewEncoder(w).Encode(map[string]string{"response_type": slack.ResponseTypeEphemeral, "text": busyText})
		return
	}
	w.WriteHeader(http.StatusOK)
}

// handleInteractive queues button presses and answers 200 at once.
func (f *Front) handleInteractive(w http.ResponseWriter, r *http.Request, _ []byte) {
	cb, err := slack.InteractionCallbackParse(r)
	if err != nil {
		http.Error(w, "not an interaction payload", http.StatusBadRequest)
		return
	}
	for _, in := range f.fromAction(cb, retryOf(r)) {
		if !f.pool.Load().offer(in) {
			f.log.Warn("work queue full; the button press was not run", "queue", f.cfg.QueueSize)
			http.Error(w, "busy", http.StatusServiceUnavailable)
			return
		}
	}
	w.WriteHeader(http.StatusOK)
}
