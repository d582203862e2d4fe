package slackfront

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"sync"
	"time"

	"github.com/slack-go/slack"
	"github.com/slack-go/slack/slackevents"
	"github.com/slack-go/slack/socketmode"
)

// ackTimeout bounds how long an acknowledgement may wait for the websocket
// writer (Slack wants it within 3 s).
const ackTimeout = 2 * time.Second

// serveSocket runs the socket-mode client and drains its events until ctx
// is cancelled or a fatal error stops it. slack-go reconnects by itself
// after a disconnect frame, a dead connection (no ping within
// Config.PingInterval) or a failed connect, with exponential backoff; it
// gives up only on refused tokens, which end Run with a clear message.
func (f *Front) serveSocket(ctx context.Context) error {
	sm := socketmode.New(f.api,
		socketmode.OptionPingInterval(f.cfg.PingInterval),
		socketmode.OptionLog(debugOutput{f.log}))
	runCtx, cancel := context.WithCancel(ctx)
	defer cancel()
	runDone := make(chan error, 1)
	go func() { runDone <- sm.RunContext(runCtx) }()
	// Envelopes are stored and acknowledged by up to maxAccepting
	// goroutines at once, so that their inbox writes share commits.
	acc := &accepting{slots: make(chan struct{}, maxAccepting)}
	defer acc.wg.Wait()
	close(f.ready)

	var fatal error
	for {
		select {
		case ev := <-sm.Events:
			// Always drain, also while stopping: a client whose events
			// are not read stalls and reconnects in a loop.
			if err := f.onSocketEvent(runCtx, sm, acc, ev); err != nil && fatal == nil {
				fatal = err
				f.log.Error("stopping socket mode", "err", err)
				cancel()
			}
		case err := <-runDone:
			switch {
			case fatal != nil:
				return fatal
			case ctx.Err() != nil:
				return nil
			case err == nil:
				return errors.New("slack: socket mode stopped without a reason")
			default:
				return socketFatal(RedactURL(f.cfg.APIURL), err)
			}
		}
	}
}

// socketFatal explains why socket mode cannot go on.
func socketFatal(apiURL string, err error) error {
	var se slack.SlackErrorResponse
	var sc slack.StatusCodeError
	switch {
	case errors.As(err, &se) && fatalAuthCode(se.Err):
		return fmt.Errorf("slack: socket mode refused SLACK_APP_TOKEN (%s): create an app-level token with the connections:write scope (Basic Information → App-Level Tokens) and turn Socket Mode on: %w", se.Err, err)
	case errors.As(err, &sc) && sc.Code == http.StatusNotFound:
		return fmt.Errorf("slack: apps.connections.open is not found at %s; check SLACK_API_URL: %w", apiURL, err)
	default:
		return fmt.Errorf("slack: socket mode stopped: %w", err)
	}
}

// onSocketEvent handles one event of the socket-mode client. Envelopes are
// acknowledged at once and their work queued; when the queue is full an
// event is left unacknowledged, so Slack delivers it again later, and a
// slash command is acknowledged with a "busy" answer. A non-nil error is
// fatal.
func (f *Front) onSocketEvent(ctx context.Context, sm *socketmode.Client, acc *accepting, ev socketmode.Event) error {
	retry := 0
	if ev.Request != nil {
		retry = ev.Request.RetryAttempt
		if retry > 0 {
			f.log.Info("Slack re-delivered an envelope", "type", ev.Type, "retry", retry, "reason", ev.Request.RetryReason)
		}
	}
	switch ev.Type {
	case socketmode.EventTypeConnecting:
		f.log.Debug("connecting to Slack")
	case socketmode.EventTypeConnected:
		f.log.Info("socket mode connected")
	case socketmode.EventTypeHello:
		f.log.Debug("socket mode hello")
	case socketmode.EventTypeInvalidAuth:
		return errors.New("slack: socket mode refused SLACK_APP_TOKEN (invalid_auth): create an app-level token with the connections:write scope and turn Socket Mode on")
	case socketmode.EventTypeConnectionError:
		if ce, ok := ev.Data.(*slack.ConnectionErrorEvent); ok {
			var se slack.SlackErrorResponse
			if errors.As(ce.ErrorObj, &se) && fatalAuthCode(se.Err) {
				return socketFatal(RedactURL(f.cfg.APIURL), ce.ErrorObj)
			}
			f.log.Warn("socket mode connection failed; retrying with backoff", "attempt", ce.Attempt, "backoff", ce.Backoff, "err", ce.ErrorObj)
		}
	case socketmode.EventTypeEventsAPI:
		data, _ := ev.Data.(slackevents.EventsAPIEvent)
		in, ok := f.fromEvent(data, retry)
		if !ok {
			f.ack(ctx, sm, ev.Request, nil)
			return nil
		}
		now := f.cfg.Clock.Now()
		acc.run(func() { f.acceptEnvelope(ctx, sm, ev.Request, viaEvent, now, []inbound{in}, nil) })
	case socketmode.EventTypeSlashCommand:
		cmd, _ := ev.Data.(slack.SlashCommand)
		if cmd.UserID == "" {
			f.ack(ctx, sm, ev.Request, nil)
			return nil
		}
		busy := map[string]string{"response_type": slack.ResponseTypeEphemeral, "text": busyText}
		now := f.cfg.Clock.Now()
		work := []inbound{f.fromSlash(cmd, retry, now)}
		acc.run(func() { f.acceptEnvelope(ctx, sm, ev.Request, viaCommandJSON, now, work, busy) })
	case socketmode.EventTypeInteractive:
		cb, _ := ev.Data.(slack.InteractionCallback)
		now := f.cfg.Clock.Now()
		work := f.fromAction(cb, retry, now)
		acc.run(func() { f.acceptEnvelope(ctx, sm, ev.Request, viaInteractive, now, work, nil) })
	case socketmode.EventTypeErrorBadMessage:
		if bm, ok := ev.Data.(*socketmode.ErrorBadMessage); ok {
			// Acknowledge what we cannot read, or Slack sends it forever.
			var env struct {
				EnvelopeID string `json:"envelope_id"`
			}
			if json.Unmarshal(bm.Message, &env) == nil && env.EnvelopeID != "" {
				f.ack(ctx, sm, &socketmode.Request{EnvelopeID: env.EnvelopeID}, nil)
			}
			f.log.Warn("unreadable socket-mode message", "err", bm.Cause)
		}
	case socketmode.EventTypeIncomingError, socketmode.EventTypeErrorWriteFailed:
		f.log.Warn("socket mode trouble", "type", ev.Type, "data", fmt.Sprint(ev.Data))
	}
	return nil
}

// maxAccepting bounds the envelopes being stored and acknowledged at once.
const maxAccepting = 64

// accepting runs the store-then-ack of envelopes beside the event loop,
// which must keep draining.
type accepting struct {
	slots chan struct{}
	wg    sync.WaitGroup
}

// run starts fn once a slot is free (the loop waits only when
// maxAccepting envelopes are already being stored).
func (a *accepting) run(fn func()) {
	a.slots <- struct{}{}
	a.wg.Go(func() {
		defer func() { <-a.slots }()
		fn()
	})
}

// acceptEnvelope stores the envelope's work in the inbox, queues it, and
// only then acknowledges it: what Slack was told we accepted is on disk.
// A refusal (inbox or queue full, the store failing) sends the busy
// payload, if any, as the acknowledgement; without one, a full inbox is
// acknowledged and the sender told "busy, nothing was done" (refuseBusy),
// and otherwise the envelope stays unacknowledged and Slack delivers it
// again later.
func (f *Front) acceptEnvelope(ctx context.Context, sm *socketmode.Client, req *socketmode.Request, via string, at time.Time, work []inbound, busy any) {
	var payload []byte
	if req != nil {
		payload = req.Payload
	}
	if err := f.accept(ctx, via, payload, at, work); err != nil {
		if busy != nil {
			f.ack(ctx, sm, req, busy)
			return
		}
		if f.refuseBusy(err, work) {
			f.ack(ctx, sm, req, nil) // the sender was told "busy, nothing was done"
			return
		}
		f.log.Warn("leaving an envelope for Slack to deliver again")
		return
	}
	f.ack(ctx, sm, req, nil)
}

func (f *Front) ack(ctx context.Context, sm *socketmode.Client, req *socketmode.Request, payload any) {
	if req == nil || req.EnvelopeID == "" {
		return
	}
	actx, cancel := context.WithTimeout(ctx, ackTimeout)
	defer cancel()
	if err := sm.AckCtx(actx, req.EnvelopeID, payload); err != nil {
		f.log.Warn("could not acknowledge an envelope; Slack will deliver it again", "envelope", req.EnvelopeID, "err", err)
	}
}
