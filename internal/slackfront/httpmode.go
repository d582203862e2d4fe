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
	"golang.org/x/net/netutil"
)

// busyText answers a slash command when the inbox or the queue is full.
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

// maxHeaderBytes bounds a request's headers (Slack's are well under 4 KiB;
// net/http's default would let each connection hold 1 MiB).
const maxHeaderBytes = 16 << 10

// serveHTTP listens on Config.HTTPAddr until ctx is cancelled, then shuts
// the server down gracefully: handlers in progress finish, new connections
// are refused. At most Config.MaxConns connections are served at once
// (netutil.LimitListener: the rest wait in the kernel's accept queue, where
// they cost the process nothing), so clients that never sign cannot make
// the bot hold memory; headers, bodies and idle connections have short
// deadlines so that a slow client frees its slot soon.
func (f *Front) serveHTTP(ctx context.Context) error {
	ln, err := net.Listen("tcp", f.cfg.HTTPAddr)
	if err != nil {
		return fmt.Errorf("slack: listen on %s: %w", f.cfg.HTTPAddr, err)
	}
	addr := ln.Addr().String()
	f.addr.Store(&addr)
	ln = netutil.LimitListener(ln, f.cfg.MaxConns)
	srv := &http.Server{
		Handler:           f.httpHandler(),
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       f.cfg.BodyTimeout + 5*time.Second,
		WriteTimeout:      10 * time.Second,
		IdleTimeout:       10 * time.Second,
		MaxHeaderBytes:    maxHeaderBytes,
		ErrorLog:          slog.NewLogLogger(f.log.Handler(), slog.LevelWarn),
	}
	// One request a connection: an idle keep-alive connection would hold
	// one of the MaxConns slots while new connections wait unserved.
	srv.SetKeepAlivesEnabled(false)
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	f.log.Info("listening for Slack requests", "addr", addr, "max_conns", f.cfg.MaxConns)
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

// signed guards every Slack endpoint. Before any of the body is read it
// checks the signature headers (present, timestamp within 5 minutes) and
// the declared length; then it reads at most Config.MaxBodyBytes within
// Config.BodyTimeout, verifies the signature over the body, and restores
// the body for the parsers. A refusal closes the connection, answers in a
// few words, and is logged without the body.
func (f *Front) signed(next func(http.ResponseWriter, *http.Request, []byte)) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		refuse := func(status int, msg, reason string) {
			f.log.Warn("refused a request", "path", r.URL.Path, "remote", r.RemoteAddr, "status", status, "reason", reason)
			refuseAndClose(w, status, msg)
		}
		if _, err := checkHeaders(r.Header, f.cfg.Clock.Now()); err != nil {
			refuse(http.StatusUnauthorized, "invalid request signature", err.Error())
			return
		}
		if r.ContentLength > f.cfg.MaxBodyBytes {
			refuse(http.StatusRequestEntityTooLarge, "request body too large", fmt.Sprintf("declared %d bytes, limit %d", r.ContentLength, f.cfg.MaxBodyBytes))
			return
		}
		_ = http.NewResponseController(w).SetReadDeadline(time.Now().Add(f.cfg.BodyTimeout))
		body, err := readBody(w, r, f.cfg.MaxBodyBytes)
		if err != nil {
			var tooBig *http.MaxBytesError
			if errors.As(err, &tooBig) {
				refuse(http.StatusRequestEntityTooLarge, "request body too large", fmt.Sprintf("over the limit of %d bytes", f.cfg.MaxBodyBytes))
				return
			}
			refuse(http.StatusBadRequest, "could not read the request", err.Error())
			return
		}
		if err := verifySignature(r.Header, body, f.cfg.SigningSecret, f.cfg.Clock.Now()); err != nil {
			f.log.Warn("refused a request that failed signature verification",
				"path", r.URL.Path, "remote", r.RemoteAddr, "reason", err.Error(), "bytes", len(body))
			refuseAndClose(w, http.StatusUnauthorized, "invalid request signature")
			return
		}
		r.Body = io.NopCloser(bytes.NewReader(body))
		next(w, r, body)
	})
}

// refuseAndClose answers a refused request and closes its connection at
// once. net/http would otherwise drain part of an unread body, or wait
// half a second after a half-close before closing, holding one of the
// MaxConns slots for a client that did not sign.
func refuseAndClose(w http.ResponseWriter, status int, msg string) {
	conn, buf, err := http.NewResponseController(w).Hijack()
	if err != nil {
		w.Header().Set("Connection", "close")
		http.Error(w, msg, status)
		return
	}
	defer conn.Close()
	_ = conn.SetWriteDeadline(time.Now().Add(time.Second))
	fmt.Fprintf(buf, "HTTP/1.1 %d %s\r\nContent-Type: text/plain; charset=utf-8\r\nConnection: close\r\nContent-Length: %d\r\n\r\n%s\n",
		status, http.StatusText(status), len(msg)+1, msg)
	_ = buf.Flush()
}

// readBody reads a request body of at most limit bytes: into a buffer of
// the declared length when there is one (no growing and copying), else
// through a growing buffer that stops at the limit.
func readBody(w http.ResponseWriter, r *http.Request, limit int64) ([]byte, error) {
	rd := http.MaxBytesReader(w, r.Body, limit)
	if r.ContentLength >= 0 && r.ContentLength <= limit {
		buf := make([]byte, r.ContentLength)
		if _, err := io.ReadFull(rd, buf); err != nil {
			return nil, err
		}
		return buf, nil
	}
	return io.ReadAll(rd)
}

// errQueueFull refuses a delivery because the work queue is full: a
// passing rush, so an event is left for Slack to send again.
var errQueueFull = errors.New("slack: work queue is full")

// accept stores a delivery in the inbox (when there is one) and queues its
// work; an error means it was refused and nothing will run: the inbox is
// full (ErrInboxFull), the store failed, or the queue is full
// (errQueueFull).
func (f *Front) accept(ctx context.Context, via string, body []byte, at time.Time, work []inbound) error {
	if err := f.store(ctx, via, body, at, work); err != nil {
		if errors.Is(err, ErrInboxFull) {
			f.log.Warn("inbox full; refused a delivery", "err", err)
		} else {
			f.log.Error("could not store a delivery; refused it", "err", err)
		}
		return err
	}
	for _, in := range work {
		if !f.pool.Load().offer(in) {
			f.log.Warn("work queue full; refused a delivery", "queue", f.cfg.QueueSize)
			f.unstore(ctx, work)
			return errQueueFull
		}
	}
	return nil
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
// event callbacks, which are stored, queued and acknowledged at once. A
// full inbox acknowledges and tells the sender "busy, nothing was done"
// (refuseBusy); a full queue answers 503 so that Slack delivers the event
// again later.
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
	if err := f.accept(r.Context(), viaEvent, body, f.cfg.Clock.Now(), []inbound{in}); err != nil {
		if f.refuseBusy(err, []inbound{in}) {
			w.WriteHeader(http.StatusOK) // the sender was told; Slack must not send it again
			return
		}
		// Slack delivers an event that got no 2xx again, later.
		http.Error(w, "busy, nothing was done", http.StatusServiceUnavailable)
		return
	}
	w.WriteHeader(http.StatusOK)
}

// handleCommand queues a slash command and answers 200 with an empty body
// at once; the reply follows through the response_url.
func (f *Front) handleCommand(w http.ResponseWriter, r *http.Request, body []byte) {
	cmd, err := slack.SlashCommandParse(r)
	if err != nil || cmd.UserID == "" {
		http.Error(w, "not a slash command", http.StatusBadRequest)
		return
	}
	now := f.cfg.Clock.Now()
	if f.accept(r.Context(), viaCommandForm, body, now, []inbound{f.fromSlash(cmd, retryOf(r), now)}) != nil {
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
	now := f.cfg.Clock.Now()
	work := f.fromAction(cb, retryOf(r), now)
	if err := f.accept(r.Context(), viaInteractive, []byte(r.PostFormValue("payload")), now, work); err != nil {
		if f.refuseBusy(err, work) {
			w.WriteHeader(http.StatusOK)
			return
		}
		http.Error(w, "busy, nothing was done", http.StatusServiceUnavailable)
		return
	}
	w.WriteHeader(http.StatusOK)
}
