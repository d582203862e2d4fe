package slackfront

import (
	"context"
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/slack-go/slack"
	"github.com/slack-go/slack/slackevents"

	"github.com/lathmark-team/lathmark/bot"
)

// inbound is one accepted delivery, waiting for a worker.
type inbound struct {
	kind     string     // "mention", "dm", "command", "button": for logs
	keys     []dedupKey // checked in order; the first one seen decides
	req      bot.Request
	to       target
	userName string       // the name Slack sent along, if any, used when users.info fails
	retry    int          // Slack's retry count (X-Slack-Retry-Num or retry_attempt)
	files    []sharedFile // files shared with the message (files.go)
	// inboxID is the stored copy of the delivery (see Inbox); the work
	// forgets it once done. "" when nothing is stored for this piece.
	inboxID string
	// receivedAt is set on work replayed from the inbox at start: when
	// Slack sent it. A reply past the response window goes privately.
	receivedAt time.Time
}

// dedupKey is one id under which a delivery is remembered. notice, when
// set, is told to the asker if the key was already seen (a second press of
// the same button); otherwise a repeat is dropped silently (a re-delivery).
type dedupKey struct {
	id     string
	notice string
}

// target is where a reply goes.
type target struct {
	channel     string // channel id to post in
	threadTS    string // thread to answer in; "" for the channel itself
	user        string // the asker, for ephemeral replies; "" when there is none
	direct      bool   // channel is a direct message with the asker
	responseURL string // a slash command's response_url, tried first
	// allOrNothing stops a delivery at its first failure while nothing is
	// posted yet (PostReply: its caller may retry the whole reply).
	allOrNothing bool
	// replaceTS, when set, is the message the reply replaces (a Details
	// button expanding its message): chat.update, or for an ephemeral
	// message (replaceEphemeral) its response_url with replace_original.
	replaceTS        string
	replaceEphemeral bool
}

// eventKeys are the dedup ids of a message event: its event id and the
// message's channel and ts (the same message may come as app_mention and as
// message.im, with different event ids).
func eventKeys(channel, ts, eventID string) []dedupKey {
	keys := []dedupKey{{id: "ev:" + channel + ":" + ts}}
	if eventID != "" {
		keys = append(keys, dedupKey{id: "eid:" + eventID})
	}
	return keys
}

// fromEvent turns an Events API callback into work; ok is false for events
// the bot ignores: its own messages, other bots, edits and every other
// message subtype, and event types it did not ask for.
func (f *Front) fromEvent(ev slackevents.EventsAPIEvent, retry int) (inbound, bool) {
	if ev.Type != slackevents.CallbackEvent {
		return inbound{}, false
	}
	eventID := ""
	if cb, ok := ev.Data.(*slackevents.EventsAPICallbackEvent); ok {
		eventID = cb.EventID
	}
	switch e := ev.InnerEvent.Data.(type) {
	case *slackevents.AppMentionEvent:
		if e.User == "" || e.BotID != "" || e.User == f.self.UserID || e.Edited != nil || e.TimeStamp == "" {
			return inbound{}, false
		}
		in := f.messageInbound("mention", e.Channel, e.User, e.Text, e.TimeStamp, e.ThreadTimeStamp, eventID, retry)
		if !in.to.direct && in.to.threadTS == "" {
			in.to.threadTS = e.TimeStamp // answer a channel mention in a thread
		}
		in.files = sharedFiles(e.Files)
		return in, true
	case *slackevents.MessageEvent:
		if e.ChannelType != "im" || (e.SubType != "" && e.SubType != "file_share") || e.BotID != "" || e.User == "" ||
			e.User == f.self.UserID || e.TimeStamp == "" {
			return inbound{}, false
		}
		in := f.messageInbound("dm", e.Channel, e.User, e.Text, e.TimeStamp, e.ThreadTimeStamp, eventID, retry)
		if e.Message != nil && len(e.Message.Files) > 0 {
			in.files = sharedFiles(e.Message.Files)
			if in.to.threadTS == "" {
				in.to.threadTS = e.TimeStamp // answer a shared file in its thread
			}
		}
		return in, true
	}
	return inbound{}, false
}

func (f *Front) messageInbound(kind, channel, user, text, ts, threadTS, eventID string, retry int) inbound {
	direct := isDirectChannel(channel)
	when, _ := tsTime(ts)
	req := bot.Request{
		UserID:    user,
		Channel:   channel,
		Text:      cleanText(text, f.self.UserID),
		Time:      when,
		MessageID: "ev:" + channel + ":" + ts,
	}
	if direct {
		req.Channel, req.Direct = "", true
	}
	return inbound{
		kind:  kind,
		keys:  eventKeys(channel, ts, eventID),
		req:   req,
		to:    target{channel: channel, threadTS: threadTS, user: user, direct: direct},
		retry: retry,
	}
}

// fromSlash turns a slash command into work. Its message id is the
// trigger_id, unique per invocation and repeated when Slack re-delivers the
// same envelope; without one, a hash of who typed what where in which
// minute (so an identical command typed twice within a minute runs once).
func (f *Front) fromSlash(c slack.SlashCommand, retry int, now time.Time) inbound {
	id := "cmd:" + c.TriggerID
	if c.TriggerID == "" {
		id = "cmd:h:" + hashID(c.TeamID, c.UserID, c.ChannelID, c.Command, c.Text, now.UTC().Truncate(time.Minute).Format(time.RFC3339))
	}
	direct := isDirectChannel(c.ChannelID) || c.ChannelName == "directmessage"
	req := bot.Request{
		UserID:    c.UserID,
		Channel:   c.ChannelID,
		Text:      cleanText(c.Text, f.self.UserID),
		Time:      now,
		MessageID: id,
	}
	if direct {
		req.Channel, req.Direct = "", true
	}
	return inbound{
		kind:     "command",
		keys:     []dedupKey{{id: id}},
		req:      req,
		to:       target{channel: c.ChannelID, user: c.UserID, direct: direct, responseURL: c.ResponseURL},
		userName: c.UserName,
		retry:    retry,
	}
}

// isOurAction reports whether an action id is one of lathmark's buttons.
func isOurAction(id string) bool {
	return id == ActionID || strings.HasPrefix(id, ActionID+":") || isExpandAction(id)
}

// isExpandAction reports whether an action id is a button whose reply
// replaces the message it is on.
func isExpandAction(id string) bool {
	return id == ExpandActionID || strings.HasPrefix(id, ExpandActionID+":")
}

// fromAction turns a press of one of lathmark's buttons into work: the
// button's value runs as a command typed by the presser, answered in the
// same channel and thread. Payloads that are not button presses, and
// presses of other apps' buttons, give nothing.
func (f *Front) fromAction(cb slack.InteractionCallback, retry int, now time.Time) []inbound {
	if cb.Type != slack.InteractionTypeBlockActions || cb.User.ID == "" {
		return nil
	}
	channel := cb.Channel.ID
	if channel == "" {
		channel = cb.Container.ChannelID
	}
	thread := cb.Container.ThreadTs
	if thread == "" {
		thread = cb.Message.ThreadTimestamp
	}
	msgTS := cb.Container.MessageTs
	if msgTS == "" {
		msgTS = cb.Message.Timestamp
	}
	direct := isDirectChannel(channel)
	var out []inbound
	for i, a := range cb.ActionCallback.BlockActions {
		if a == nil || !isOurAction(a.ActionID) || strings.TrimSpace(a.Value) == "" {
			continue
		}
		// A re-delivered payload repeats the trigger_id: dropped silently.
		// A second press by the same person of the same button on the same
		// message: dropped with a notice. The press key is the message id.
		var keys []dedupKey
		if cb.TriggerID != "" {
			keys = append(keys, dedupKey{id: "btn:t:" + cb.TriggerID + ":" + strconv.Itoa(i)})
		}
		if msgTS != "" {
			keys = append(keys, dedupKey{
				id:     "btn:" + channel + ":" + msgTS + ":" + a.ActionID + ":" + cb.User.ID,
				notice: fmt.Sprintf("You already pressed that button; nothing ran twice. To run it again, type `%s`.", a.Value),
			})
		}
		if len(keys) == 0 {
			keys = append(keys, dedupKey{id: "btn:h:" + hashID(channel, cb.User.ID, a.ActionID, a.ActionTs)})
		}
		press := keys[len(keys)-1].id
		when, ok := tsTime(a.ActionTs)
		if !ok {
			when = now
		}
		req := bot.Request{
			UserID:    cb.User.ID,
			Channel:   channel,
			Text:      cleanText(a.Value, f.self.UserID),
			Time:      when,
			MessageID: press,
		}
		if direct {
			req.Channel, req.Direct = "", true
		}
		to := target{channel: channel, threadTS: thread, user: cb.User.ID, direct: direct}
		kind := "button"
		if isExpandAction(a.ActionID) && msgTS != "" {
			kind = "expand"
			to.replaceTS, to.replaceEphemeral = msgTS, cb.Container.IsEphemeral
			to.responseURL = cb.ResponseURL
		}
		out = append(out, inbound{
			kind:     kind,
			keys:     keys,
			req:      req,
			to:       to,
			userName: cb.User.Name,
			retry:    retry,
		})
	}
	return out
}

// process runs one accepted delivery, posts its reply and forgets its
// stored copy.
func (f *Front) process(ctx context.Context, in inbound) {
	reply, ok := f.run(ctx, in)
	if ctx.Err() != nil && in.inboxID != "" {
		// Stopping, past the shutdown timeout: the command did not run to
		// the end (or it committed and deleted its record already). What
		// is still stored runs at the next start; posting "shutting down"
		// now would tell the asker nothing was done.
		f.log.Warn("stopping: left a delivery in the inbox for the next start", "kind", in.kind, "message_id", in.req.MessageID)
		return
	}
	if ok {
		f.post(ctx, in, reply)
	}
	f.forget(ctx, in)
}

// run drops a delivery that was handled before (here or, through Dedup,
// in an earlier run), otherwise hands it to the engine and remembers it.
// ok is false when there is nothing to post; a repeat that deserves a
// notice returns the notice.
func (f *Front) run(ctx context.Context, in inbound) (reply bot.Reply, ok bool) {
	log := f.log.With("kind", in.kind, "message_id", in.req.MessageID, "user", in.req.UserID)
	defer func() {
		if p := recover(); p != nil {
			log.Error("handling a Slack delivery panicked", "panic", fmt.Sprint(p))
			ok = false
		}
	}()
	notice := func(k dedupKey) (bot.Reply, bool) {
		if k.notice == "" {
			return bot.Reply{}, false
		}
		return bot.Reply{Lines: []string{k.notice}, Ephemeral: true}, true
	}
	if k, ok := f.busy.claim(in.keys); !ok {
		log.Info("dropped a copy of a delivery that is being handled", "key", k.id, "retry", in.retry)
		return notice(k)
	}
	defer f.busy.release(in.keys)
	for _, k := range in.keys {
		seen, err := f.cfg.Dedup.Seen(ctx, k.id)
		if err != nil {
			// Go on: the engine deduplicates writes by MessageID itself.
			log.Warn("dedup lookup failed; handling the delivery anyway", "key", k.id, "err", err)
			continue
		}
		if seen {
			log.Info("dropped a delivery that was already handled", "key", k.id, "retry", in.retry)
			return notice(k)
		}
	}
	req := in.req
	req.UserName = f.displayName(ctx, req.UserID, in.userName)
	req = f.withFiles(ctx, in, req)
	reply = WithDetails(f.cfg.Handler.Handle(ctx, req), req.Text)
	for _, k := range in.keys {
		if err := f.cfg.Dedup.MarkSeen(ctx, k.id); err != nil {
			log.Warn("could not record the delivery as handled", "key", k.id, "err", err)
		}
	}
	return reply, true
}

// post sends a delivery's reply. A delivery replayed after a restart and
// older than Slack's response window (a response_url lasts 30 minutes)
// is answered in a direct message that says what was run.
func (f *Front) post(ctx context.Context, in inbound, reply bot.Reply) {
	log := f.log.With("kind", in.kind, "message_id", in.req.MessageID, "user", in.req.UserID)
	if !in.receivedAt.IsZero() && in.req.UserID != "" && f.cfg.Clock.Now().Sub(in.receivedAt) > f.cfg.ResponseWindow {
		if _, err := f.sendDirect(ctx, bot.Direct{UserID: in.req.UserID, Reply: lateReply(in, reply)}); err != nil {
			log.Error("could not post the late reply", "err", err)
		}
		return
	}
	if err := f.deliver(ctx, in.to, reply); err != nil {
		log.Error("could not post the reply", "err", err)
		return
	}
	log.Debug("handled", "reply_kind", reply.Kind.String())
}

// lateReply is the reply to a delivery run long after it was sent, for a
// direct message: what was typed, when, and what came of it.
func lateReply(in inbound, r bot.Reply) bot.Reply {
	what := quoteInput(in.req.Text, maxQuotedRunes)
	note := fmt.Sprintf("The bot restarted before answering what you sent at %s UTC; it has now run `%s`:",
		in.receivedAt.UTC().Format("2006-01-02 15:04"), what)
	r.Lines = append([]string{note}, r.Lines...)
	r.Ephemeral = false
	r.Actions = nil // buttons under a late answer would act on a stale context
	return r
}

// forget deletes the delivery's stored copy once its work is done (a
// writing command has already deleted it in its own transaction).
func (f *Front) forget(ctx context.Context, in inbound) {
	if in.inboxID == "" || f.cfg.Inbox == nil {
		return
	}
	if err := f.cfg.Inbox.Done(context.WithoutCancel(ctx), in.inboxID); err != nil {
		f.log.Warn("could not forget a handled delivery; it may run again at the next start", "inbox_id", in.inboxID, "err", err)
	}
}

// displayName asks Users for the asker's name, falling back to the name
// Slack sent along and then to the id.
func (f *Front) displayName(ctx context.Context, userID, fallback string) string {
	if userID == "" {
		return fallback
	}
	lctx, cancel := context.WithTimeout(ctx, 3*time.Second)
	defer cancel()
	name, err := f.users.DisplayName(lctx, userID)
	if err == nil && name != "" {
		return name
	}
	if err != nil {
		f.log.Debug("users.info failed; using a fallback name", "user", userID, "err", err)
	}
	if fallback != "" {
		return fallback
	}
	return userID
}
