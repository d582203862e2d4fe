package slackfront

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"time"

	"github.com/slack-go/slack"
	"github.com/slack-go/slack/slackevents"

	"github.com/lathmark-team/lathmark/bot"
)

// ErrInboxFull is matched by the error of Inbox.Put when the inbox holds
// its bound: the request is answered "busy, nothing was done".
var ErrInboxFull = errors.New("slack: inbox is full")

// Inbox keeps every delivery from before its acknowledgement until it has
// run, so that nothing Slack was told we accepted is lost in a crash (Slack
// never sends again what got its 200 or its ack). Back it with the store:
// Put goes through the group commit, so concurrent deliveries share one
// fsync.
type Inbox interface {
	// Put stores a delivery on disk and returns its id; a full inbox gives
	// an error matching ErrInboxFull and stores nothing.
	Put(ctx context.Context, key string, at time.Time, payload []byte) (id string, err error)
	// Pending lists what is stored, oldest first.
	Pending(ctx context.Context) ([]Stored, error)
	// Done forgets a delivery; a missing id is not an error (a writing
	// command deletes its delivery in its own transaction, through
	// bot.Request.InboxID).
	Done(ctx context.Context, id string) error
}

// Stored is one delivery kept in the Inbox.
type Stored struct {
	ID      string
	Key     string    // the delivery key: the dedupe key of the request
	At      time.Time // when it was received
	Payload []byte    // a storedPayload, JSON
}

// Payload kinds: how to read storedPayload.Body again.
const (
	viaEvent       = "event"        // an Events API callback, JSON (HTTP and socket mode alike)
	viaCommandForm = "command-form" // an HTTP slash command, form-encoded
	viaCommandJSON = "command-json" // a socket-mode slash command, JSON
	viaInteractive = "interactive"  // an interaction payload, JSON
)

// storedPayload is what the inbox keeps of a delivery: Slack's raw
// payload and how to read it.
type storedPayload struct {
	Via  string          `json:"via"`
	Body json.RawMessage `json:"body,omitempty"` // JSON payloads
	Form string          `json:"form,omitempty"` // form-encoded payloads
}

func encodePayload(via string, body []byte) ([]byte, error) {
	p := storedPayload{Via: via}
	if via == viaCommandForm {
		p.Form = string(body)
	} else {
		p.Body = body
	}
	return json.Marshal(p)
}

// fromStored reads a stored delivery back into work, as it was received at.
func (f *Front) fromStored(s Stored) ([]inbound, error) {
	var p storedPayload
	if err := json.Unmarshal(s.Payload, &p); err != nil {
		return nil, fmt.Errorf("slack: stored delivery %s: %w", s.ID, err)
	}
	switch p.Via {
	case viaEvent:
		ev, err := slackevents.ParseEvent(p.Body, slackevents.OptionNoVerifyToken())
		if err != nil {
			return nil, fmt.Errorf("slack: stored event %s: %w", s.ID, err)
		}
		in, ok := f.fromEvent(ev, 0)
		if !ok {
			return nil, nil
		}
		return []inbound{in}, nil
	case viaCommandForm:
		r, err := http.NewRequest(http.MethodPost, "/", bytes.NewReader([]byte(p.Form)))
		if err != nil {
			return nil, err
		}
		r.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		cmd, err := slack.SlashCommandParse(r)
		if err != nil {
			return nil, fmt.Errorf("slack: stored command %s: %w", s.ID, err)
		}
		return []inbound{f.fromSlash(cmd, 0, s.At)}, nil
	case viaCommandJSON:
		var cmd slack.SlashCommand
		if err := json.Unmarshal(p.Body, &cmd); err != nil {
			return nil, fmt.Errorf("slack: stored command %s: %w", s.ID, err)
		}
		return []inbound{f.fromSlash(cmd, 0, s.At)}, nil
	case viaInteractive:
		var cb slack.InteractionCallback
		if err := json.Unmarshal(p.Body, &cb); err != nil {
			return nil, fmt.Errorf("slack: stored interaction %s: %w", s.ID, err)
		}
		return f.fromAction(cb, 0, s.At), nil
	}
	return nil, fmt.Errorf("slack: stored delivery %s: unknown kind %q", s.ID, p.Via)
}

// store puts a delivery in the inbox before it is acknowledged and ties the
// work to it: the last piece of work carries the inbox id and deletes it
// (one delivery with several button actions runs them in order of the
// payload; the earlier ones are kept from running twice by their message
// ids). With no Inbox configured it does nothing.
func (f *Front) store(ctx context.Context, via string, body []byte, at time.Time, work []inbound) error {
	if f.cfg.Inbox == nil || len(work) == 0 {
		return nil
	}
	payload, err := encodePayload(via, body)
	if err != nil {
		return err
	}
	last := &work[len(work)-1]
	id, err := f.cfg.Inbox.Put(ctx, last.req.MessageID, at, payload)
	if err != nil {
		return err
	}
	last.inboxID = id
	last.req.InboxID = id
	return nil
}

// unstore forgets a stored delivery that was refused after all (the queue
// was full): the asker is told nothing was done, so it must not run later.
func (f *Front) unstore(ctx context.Context, work []inbound) {
	for _, in := range work {
		if in.inboxID == "" {
			continue
		}
		if err := f.cfg.Inbox.Done(context.WithoutCancel(ctx), in.inboxID); err != nil {
			f.log.Warn("could not forget a refused delivery; it will run at the next start", "inbox_id", in.inboxID, "err", err)
		}
	}
}

// replayed is one delivery run at start whose reply still has to go out.
type replayed struct {
	in    inbound
	reply bot.Reply
	run   bool
}

// replay runs, oldest first, every delivery the inbox still holds from an
// earlier run (acknowledged, then the process died). It runs the commands
// before any new traffic is taken, and returns their replies for posting
// afterwards (posting can wait on Slack's rate limits; the work cannot
// wait on posting).
func (f *Front) replay(ctx context.Context) []replayed {
	if f.cfg.Inbox == nil {
		return nil
	}
	pending, err := f.cfg.Inbox.Pending(ctx)
	if err != nil {
		f.log.Error("could not read the inbox; deliveries acknowledged before the restart wait for the next start", "err", err)
		return nil
	}
	if len(pending) == 0 {
		return nil
	}
	f.log.Warn("running deliveries acknowledged before the restart", "count", len(pending))
	var out []replayed
	for _, s := range pending {
		if ctx.Err() != nil {
			// Stopped during the start: what did not run stays stored
			// for the next one.
			f.log.Warn("stopped before every stored delivery ran; the rest run at the next start", "ran", len(out))
			break
		}
		work, err := f.fromStored(s)
		if err != nil {
			// A payload this version cannot read: keep nothing that would
			// block every start, but say so.
			f.log.Error("dropping a stored delivery that cannot be read", "inbox_id", s.ID, "key", s.Key, "err", err)
			_ = f.cfg.Inbox.Done(ctx, s.ID)
			continue
		}
		if len(work) == 0 {
			_ = f.cfg.Inbox.Done(ctx, s.ID)
			continue
		}
		work[len(work)-1].inboxID = s.ID
		work[len(work)-1].req.InboxID = s.ID
		for _, in := range work {
			in.receivedAt = s.At
			reply, ok := f.run(ctx, in)
			if ctx.Err() != nil {
				// Cut short by a stop: the record stays unless the
				// command committed (and so deleted it).
				return out
			}
			out = append(out, replayed{in: in, reply: reply, run: ok})
		}
	}
	return out
}

// postReplayed posts the replies of replayed deliveries in order, then
// forgets each delivery.
func (f *Front) postReplayed(ctx context.Context, rs []replayed) {
	for _, r := range rs {
		if r.run {
			f.post(ctx, r.in, r.reply)
		}
		f.forget(ctx, r.in)
	}
}
