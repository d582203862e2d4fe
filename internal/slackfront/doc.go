// Package slackfront is lathmark's Slack front end. It receives commands
// from Slack and hands each one to the engine as a bot.Request, then renders
// the engine's bot.Reply as Block Kit and posts it back.
//
// Two ways in, chosen by Config:
//
//   - Socket mode (Config.AppToken, an xapp- token): a websocket opened by
//     the bot. Every envelope is stored in the Inbox, then acknowledged,
//     and the work is done afterwards by a bounded worker pool; the events channel is always
//     drained; slack-go reconnects with exponential backoff after a dropped
//     connection or a disconnect frame; an auth error stops Run with a
//     message that names the token to check.
//   - Signed HTTP (Config.HTTPAddr and Config.SigningSecret): POST
//     /slack/events, /slack/commands and /slack/interactive, GET /healthz.
//     The signature headers and the declared length are checked before any
//     of the body is read, the body is bounded (Config.MaxBodyBytes) and
//     must arrive within Config.BodyTimeout, and at most Config.MaxConns
//     connections are served at once, one request each. A signed request
//     is stored in the Inbox, answered 200, and its work queued.
//
// The durable inbox: every delivery is written to Config.Inbox (the data
// file, through the group commit) before Slack hears it was accepted, and
// forgotten once it has run; a writing command forgets it inside its own
// transaction (bot.Request.InboxID), so a crash never runs it twice. Run
// starts by running what the inbox still holds, oldest first, before it
// listens or connects; a reply to a request older than
// Config.ResponseWindow goes as a direct message that says what was run.
// A full inbox answers "busy, nothing was done".
//
// Commands arrive as a slash command (any name; the manifest suggests /lath),
// as a mention of the bot in a channel (the reply goes in a thread) or as a
// direct message to the bot. Buttons (action_id "lathmark_cmd" or
// "lathmark_cmd:N") run their value as a command typed by whoever pressed.
//
// Replies: errors and help (Reply.Ephemeral) go only to the asker; other
// replies asked in a channel answer in the channel. A slash command's reply
// goes back through the command's response_url (it works in channels the bot
// has not joined and supports private answers), falling back to
// chat.postMessage / chat.postEphemeral. Mentions, direct messages and
// buttons answer through chat.postMessage / chat.postEphemeral. Files are
// uploaded through Slack's external upload flow; Reply.Direct opens a direct
// message with each named user.
//
// Exactly once: Slack re-delivers events that were not acknowledged in time.
// Each delivery is checked against a Dedup (store-backed, so it survives a
// restart) by event id and by the message's channel and ts; a second copy
// that arrives while the first is still running is held off in memory. The
// engine also deduplicates writes by Request.MessageID inside its own
// transaction, so even a crash between the two never logs a jump twice.
//
// Message ids given to the engine:
//
//	ev:<channel>:<ts>          a mention or direct message (stable across retries)
//	cmd:<trigger_id>           a slash command
//	cmd:h:<hash>               a slash command without trigger_id: SHA-256 of
//	                           team, user, channel, command, text and the minute
//	btn:<channel>:<msg ts>:<action_id>:<user>
//	                           a button press; each person's press of a button
//	                           runs once (a second press gets a short notice)
//
// Rate limits: a *slack.RateLimitedError is retried after its RetryAfter, at
// most Config.MaxAttempts times and never for longer than Config.MaxRetryWait;
// a post that still fails is logged and returned as an error. PostReply
// stops at a first part that fails (nothing went out, so the caller may try
// the whole reply again); a failure after some part was posted wraps
// ErrPartlyPosted, and trying again would repeat what went out.
package slackfront
