package slackfront

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"net/url"
	"strings"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// maxResponseURLPosts is how many messages one response_url takes (Slack
// allows five responses per slash command, within 30 minutes; from memory).
const maxResponseURLPosts = 5

// ErrPartlyPosted is wrapped by the error of PostReply (and of the front
// end's own replies) when part of the reply reached Slack before the
// failure: its message but not a file or a direct message, say. Posting the
// reply again would repeat what already went out, so a caller that retries
// failed posts must not retry one with this error.
var ErrPartlyPosted = errors.New("slack: the reply was posted in part")

// PostReply posts r in channel, in thread threadTS when it is not empty,
// with its files and its direct messages; see Poster. Rate limits are
// retried within Config.MaxAttempts and Config.MaxRetryWait. If the first
// part fails, nothing else is tried and the error is returned, so the
// caller can try the whole reply again later. A failure after some part was
// posted is returned wrapping ErrPartlyPosted (the rest was still tried):
// the posted parts stay posted, and trying again would repeat them.
func (f *Front) PostReply(ctx context.Context, channel, threadTS string, r bot.Reply) error {
	if channel == "" {
		return errors.New("slack: PostReply needs a channel id")
	}
	if err := f.deliver(ctx, target{channel: channel, threadTS: threadTS, allOrNothing: true}, r); err != nil {
		f.log.Error("posting a reply failed", "channel", channel, "partly_posted", errors.Is(err, ErrPartlyPosted), "err", err)
		return err
	}
	return nil
}

// deliver posts a reply to its target: the messages (ephemeral to the asker
// when the reply asks for it and there is an asker outside a direct
// message), then the files, then the direct messages. A failure after
// something was posted wraps ErrPartlyPosted.
func (f *Front) deliver(ctx context.Context, t target, r bot.Reply) error {
	posted, err := f.deliverParts(ctx, t, r)
	if err != nil && posted {
		return fmt.Errorf("%w: %w", ErrPartlyPosted, err)
	}
	return err
}

// deliverParts does deliver's work and reports whether any part reached
// Slack. With t.allOrNothing it stops at a failure while nothing has been
// posted yet, so that a retry of the whole reply repeats nothing; otherwise
// it goes on with the other parts (best effort for an asker's reply).
func (f *Front) deliverParts(ctx context.Context, t target, r bot.Reply) (posted bool, _ error) {
	msgs := Messages(r)
	ephemeral := r.Ephemeral && t.user != "" && !t.direct
	var errs []error
	stop := func() bool { return t.allOrNothing && !posted && len(errs) > 0 }

	if t.replaceTS != "" && len(msgs) > 0 && r.OK() {
		// Expand the message in place; what does not fit in one message
		// follows in its thread.
		if err := f.replaceMessage(ctx, t, msgs[0]); err != nil {
			f.log.Warn("could not expand the message in place; posting the details as a new message", "err", err)
		} else {
			posted, msgs = true, msgs[1:]
			if t.threadTS == "" {
				t.threadTS = t.replaceTS
			}
		}
		t.responseURL = ""
	}

	if t.responseURL != "" && len(msgs) > 0 && len(msgs) <= maxResponseURLPosts {
		if !f.responseURLAllowed(t.responseURL) {
			f.log.Warn("ignoring a response_url that is not a Slack host or the API URL", "host", hostOf(t.responseURL))
		} else {
			// Through the response_url an ephemeral answer stays private
			// even in a direct message between other people.
			n, err := f.postResponseURL(ctx, t.responseURL, r.Ephemeral, msgs)
			if err != nil {
				f.log.Warn("response_url failed; posting the rest through the Web API", "err", err, "posted", n)
			}
			posted = posted || n > 0
			msgs = msgs[n:]
		}
	}
	for _, m := range msgs {
		var err error
		if ephemeral {
			err = f.postEphemeral(ctx, t.channel, t.user, t.threadTS, m)
		} else {
			err = f.postMessage(ctx, t.channel, t.threadTS, m)
		}
		if err != nil {
			errs = append(errs, err)
			break // the rest would arrive out of context
		}
		posted = true
	}
	if stop() {
		return false, errors.Join(errs...)
	}

	if len(r.Files) > 0 {
		channel, thread := t.channel, t.threadTS
		if ephemeral {
			// Files cannot be ephemeral: send them privately instead.
			dm, err := f.openDM(ctx, t.user)
			if err != nil {
				errs = append(errs, err)
				channel = ""
			} else {
				channel, thread = dm, ""
			}
		}
		if channel != "" {
			for _, file := range r.Files {
				if err := f.upload(ctx, channel, thread, file); err != nil {
					errs = append(errs, err)
				} else {
					posted = true
				}
				if stop() {
					return false, errors.Join(errs...)
				}
			}
		}
	}
	if stop() {
		return false, errors.Join(errs...)
	}

	for _, d := range r.Direct {
		sent, err := f.sendDirect(ctx, d)
		posted = posted || sent
		if err != nil {
			errs = append(errs, err)
		}
		if stop() {
			return false, errors.Join(errs...)
		}
	}
	return posted, errors.Join(errs...)
}

// sendDirect opens a direct message with one user and posts a reply there;
// sent reports whether any of it reached Slack.
func (f *Front) sendDirect(ctx context.Context, d bot.Direct) (sent bool, _ error) {
	if d.UserID == "" {
		return false, errors.New("slack: a direct message without a user id")
	}
	dm, err := f.openDM(ctx, d.UserID)
	if err != nil {
		return false, err
	}
	r := d.Reply
	if len(r.Direct) > 0 {
		f.log.Warn("dropping direct messages nested inside a direct message", "count", len(r.Direct))
		r.Direct = nil
	}
	r.Ephemeral = false
	return f.deliverParts(ctx, target{channel: dm, direct: true}, r)
}

func msgOptions(threadTS string, m Message) []slack.MsgOption {
	opts := []slack.MsgOption{slack.MsgOptionBlocks(m.Blocks...), slack.MsgOptionText(m.Text, false)}
	if threadTS != "" {
		opts = append(opts, slack.MsgOptionTS(threadTS))
	}
	return opts
}

// replaceMessage puts m in place of the message t.replaceTS: by chat.update,
// or, for an ephemeral message (which chat.update cannot reach), through
// the button's response_url with replace_original.
func (f *Front) replaceMessage(ctx context.Context, t target, m Message) error {
	if t.replaceEphemeral {
		if t.responseURL == "" || !f.responseURLAllowed(t.responseURL) {
			return errors.New("an ephemeral message without a usable response_url")
		}
		return f.call(ctx, "response_url", func(ctx context.Context) error {
			_, _, err := f.api.PostMessageContext(ctx, "",
				slack.MsgOptionReplaceOriginal(t.responseURL),
				slack.MsgOptionBlocks(m.Blocks...),
				slack.MsgOptionText(m.Text, false))
			return err
		})
	}
	return f.call(ctx, "chat.update", func(ctx context.Context) error {
		_, _, _, err := f.api.UpdateMessageContext(ctx, t.channel, t.replaceTS,
			slack.MsgOptionBlocks(m.Blocks...), slack.MsgOptionText(m.Text, false))
		return err
	})
}

func (f *Front) postMessage(ctx context.Context, channel, threadTS string, m Message) error {
	return f.call(ctx, "chat.postMessage", func(ctx context.Context) error {
		_, _, err := f.api.PostMessageContext(ctx, channel, msgOptions(threadTS, m)...)
		return err
	})
}

func (f *Front) postEphemeral(ctx context.Context, channel, user, threadTS string, m Message) error {
	return f.call(ctx, "chat.postEphemeral", func(ctx context.Context) error {
		_, err := f.api.PostEphemeralContext(ctx, channel, user, msgOptions(threadTS, m)...)
		return err
	})
}

// postResponseURL answers a slash command through its response_url:
// "ephemeral" shows the answer to the asker only, "in_channel" to everyone.
func (f *Front) postResponseURL(ctx context.Context, responseURL string, ephemeral bool, msgs []Message) (posted int, err error) {
	kind := slack.ResponseTypeInChannel
	if ephemeral {
		kind = slack.ResponseTypeEphemeral
	}
	for i, m := range msgs {
		err := f.call(ctx, "response_url", func(ctx context.Context) error {
			_, _, err := f.api.PostMessageContext(ctx, "",
				slack.MsgOptionResponseURL(responseURL, kind),
				slack.MsgOptionBlocks(m.Blocks...),
				slack.MsgOptionText(m.Text, false))
			return err
		})
		if err != nil {
			return i, err
		}
	}
	return len(msgs), nil
}

// responseURLAllowed accepts https URLs on slack.com hosts and URLs on the
// configured API host (a test fake or a proxy); nothing else gets our
// replies.
func (f *Front) responseURLAllowed(raw string) bool {
	u, err := url.Parse(raw)
	if err != nil || u.Host == "" {
		return false
	}
	host := strings.ToLower(u.Hostname())
	if u.Scheme == "https" && (host == "slack.com" || strings.HasSuffix(host, ".slack.com")) {
		return true
	}
	return u.Scheme == f.apiURL.Scheme && strings.EqualFold(u.Host, f.apiURL.Host)
}

func hostOf(raw string) string {
	if u, err := url.Parse(raw); err == nil {
		return u.Host
	}
	return ""
}

// upload sends one file through Slack's external upload flow
// (files.getUploadURLExternal, a POST of the bytes, then
// files.completeUploadExternal sharing it in the channel and thread).
func (f *Front) upload(ctx context.Context, channel, threadTS string, file bot.File) error {
	if len(file.Data) == 0 {
		return fmt.Errorf("slack: file %q is empty; not uploaded", file.Name)
	}
	name := file.Name
	if name == "" {
		name = "lathmark-file"
	}
	title := file.Title
	if title == "" {
		title = name
	}
	return f.call(ctx, "files.upload", func(ctx context.Context) error {
		params := slack.UploadFileParameters{
			Reader:          bytes.NewReader(file.Data),
			FileSize:        len(file.Data),
			Filename:        name,
			Title:           title,
			Channel:         channel,
			ThreadTimestamp: threadTS,
		}
		if strings.HasPrefix(file.MIME, "image/") {
			params.AltTxt = title
		}
		_, err := f.api.UploadFileContext(ctx, params)
		return err
	})
}

// openDM opens (or finds) the direct message with a user and returns its
// channel id.
func (f *Front) openDM(ctx context.Context, user string) (string, error) {
	var id string
	err := f.call(ctx, "conversations.open", func(ctx context.Context) error {
		ch, _, _, err := f.api.OpenConversationContext(ctx, &slack.OpenConversationParameters{Users: []string{user}})
		if err != nil {
			return err
		}
		if ch == nil || ch.ID == "" {
			return errors.New("no channel in the answer")
		}
		id = ch.ID
		return nil
	})
	return id, err
}
