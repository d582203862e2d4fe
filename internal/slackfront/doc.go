// Package slackfront is lathmark's Slack front end. It receives commands
// from Slack and hands each one to the engine as a bot.Request, then renders
// the engine's bot.Reply as Block Kit and posts it back.
//
// Two ways in, chosen by Config:
//
//   - Socket mode (Config.AppToken, an xapp- token): a websocket opened by
//     the bot. Every envelope is acknowledged at once and the work is done
//     afterwards by a bounded worker pool; the events channel is always
//     drained; slack-go reconnects with exponential backoff after a dropped
//     connection or a disconnect frame; an auth error stops Run with a
//     message that names the token to check.
//   - Signed HTTP (Config.HTTPAddr and Config.SigningSecret): POST
//     /slack/events, /slack/commands and /slack/interactive, GET /healthz.
//     Every request's v0 signature and timestamp are checked before anything
//     else runs; the HTTP request is answered at once and the work is queued.
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
