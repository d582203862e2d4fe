package slackfront

import (
	"context"
	"errors"
	"sync"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// maxBusyNotices bounds the "busy, nothing was done" answers being sent at
// once; past it a refused event is left for Slack to send again.
const maxBusyNotices = 16

// busyNoticeTimeout bounds the sending of one busy answer.
const busyNoticeTimeout = 10 * time.Second

// notices tracks the busy answers in flight, so that Run returns only
// after they are done.
type notices struct {
	slots chan struct{}
	wg    sync.WaitGroup
}

func newNotices() *notices { return &notices{slots: make(chan struct{}, maxBusyNotices)} }

// refuseBusy answers a delivery refused for a full inbox or a failing store
// (not a full work queue: that passes, and Slack's own retry is better)
// with "busy, nothing was done" to each sender, ephemeral in a channel,
// through the button's response_url, or in the direct message. It reports
// whether the answers are on their way; then the caller acknowledges the
// delivery, so that Slack does not send again what the sender was told was
// not done. When a sender cannot be answered (no channel, no response_url)
// or too many answers are already in flight, it sends nothing and reports
// false: the caller leaves the delivery for Slack to send again.
func (f *Front) refuseBusy(err error, work []inbound) bool {
	if errors.Is(err, errQueueFull) || len(work) == 0 {
		return false
	}
	for _, in := range work {
		if in.to.channel == "" && in.to.responseURL == "" {
			return false
		}
	}
	select {
	case f.notices.slots <- struct{}{}:
	default:
		return false
	}
	f.notices.wg.Go(func() {
		defer func() { <-f.notices.slots }()
		ctx, cancel := context.WithTimeout(context.Background(), busyNoticeTimeout)
		defer cancel()
		for _, in := range work {
			if err := f.deliver(ctx, in.to, busyReply(in)); err != nil {
				f.log.Warn("could not tell a sender the bot is busy", "kind", in.kind, "err", err)
			}
		}
	})
	return true
}

// busyReply tells the sender that their message was not run, quoting the
// start of it.
func busyReply(in inbound) bot.Reply {
	r := bot.Reply{Kind: bot.KindInternal, Title: "Busy, nothing was done", Lines: []string{busyText}, Ephemeral: true}
	if in.req.Text != "" {
		r.Lines = append(r.Lines, "Not run: "+quoteInput(in.req.Text, maxQuotedRunes))
	}
	return r
}
