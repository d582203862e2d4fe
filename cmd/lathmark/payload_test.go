package main

import (
	"context"
	"encoding/json"
	"io"
	"net/url"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/slackfront"
)

// payloadHeadroom: the largest payload we measure must stay under this
// share of slackfront's body bound (256 KiB, defaultMaxBodyBytes).
const (
	bodyBound       = 256 << 10
	payloadHeadroom = 2 // measured at most half the bound
)

// interactionBody is the form-encoded body Slack posts when a button under
// m is pressed: the block_actions payload repeats the whole message (its
// blocks included) the button sits under. Shape from Slack's block_actions
// payload reference (docs.slack.dev, "block_actions payloads").
func interactionBody(t *testing.T, m slackfront.Message) []byte {
	t.Helper()
	payload, err := json.Marshal(map[string]any{
		"type":         "block_actions",
		"user":         map[string]any{"id": "U0123456789", "username": "a.coach.name", "name": "a.coach.name", "team_id": "T0123456789"},
		"api_app_id":   "A0123456789",
		"token":        "0123456789abcdef0123456789",
		"container":    map[string]any{"type": "message", "message_ts": "1700000000.000200", "channel_id": "C0123456789", "is_ephemeral": false},
		"trigger_id":   "1234567890123.1234567890123.0123456789abcdef0123456789abcdef",
		"team":         map[string]any{"id": "T0123456789", "domain": "harbourlane"},
		"channel":      map[string]any{"id": "C0123456789", "name": "high-jump"},
		"message":      map[string]any{"type": "message", "user": "U0BOT", "ts": "1700000000.000200", "bot_id": "B0123456789", "text": m.Text, "blocks": m.Blocks, "team": "T0123456789"},
		"state":        map[string]any{"values": map[string]any{}},
		"response_url": "https://hooks.slack.com/actions/T0123456789/1234567890123/0123456789abcdefABCDEF01",
		"actions":      []map[string]any{{"action_id": slackfront.ActionID + ":1", "block_id": "abcde", "text": map[string]any{"type": "plain_text", "text": "Details"}, "value": "history Mira 16w more", "type": "button", "action_ts": "1700000001.000300"}},
	})
	if err != nil {
		t.Fatal(err)
	}
	return []byte(url.Values{"payload": {string(payload)}}.Encode())
}

// The largest payloads Slack sends the bot, measured on the demo squad's
// largest replies (help, lists, 16 weeks of history with details, the
// digest, exports): a button press repeats the message it sits under, so
// its payload grows with our largest message. Each must stay under half
// the front end's body bound, so the bound has headroom.
func TestLargestPayloads(t *testing.T) {
	env := func(k string) string { return map[string]string{"TMPDIR": t.TempDir()}[k] }
	cfg, err := parseConfig([]string{"--demo"}, env, io.Discard)
	if err != nil {
		t.Fatal(err)
	}
	a, err := newApp(context.Background(), cfg, stdio{strings.NewReader(""), io.Discard, io.Discard})
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	lines := []string{"help", "help log", "athletes", "history Mira 16w more", "history Kai 16w", "digest now", "digest now more", "best Mira more", "export csv Mira"}
	var largest int
	var which string
	for _, line := range lines {
		r := a.engine.Handle(context.Background(), bot.Request{UserID: operatorID, UserName: "demo", Text: line})
		for _, m := range slackfront.Messages(r) {
			n := len(interactionBody(t, m))
			if n > largest {
				largest, which = n, line
			}
		}
	}
	// A slash command with a long line (4,000 characters; Slack's limit
	// on a slash command's text is from memory) and its form fields.
	slash := len(url.Values{
		"token": {"0123456789abcdef0123456789"}, "team_id": {"T0123456789"}, "team_domain": {"harbourlane"},
		"channel_id": {"C0123456789"}, "channel_name": {"high-jump"}, "user_id": {"U0123456789"}, "user_name": {"a.coach.name"},
		"command": {"/lath"}, "text": {strings.Repeat("log Mira 1.80 o ", 250)}, "api_app_id": {"A0123456789"},
		"response_url": {"https://hooks.slack.com/commands/T0123456789/1234567890123/0123456789abcdefABCDEF01"},
		"trigger_id":   {"1234567890123.1234567890123.0123456789abcdef0123456789abcdef"},
	}.Encode())
	// A mention at Slack's longest message text (40,000 characters, from
	// memory), which the event carries twice: as text and as rich_text
	// blocks.
	text := strings.Repeat("log Mira 1.80 o ", 2500)
	mention, _ := json.Marshal(map[string]any{
		"token": "0123456789abcdef0123456789", "team_id": "T0123456789", "api_app_id": "A0123456789", "type": "event_callback",
		"event_id": "Ev0123456789", "event_time": 1700000000,
		"event": map[string]any{
			"type": "app_mention", "user": "U0123456789", "text": "<@U0BOT> " + text, "ts": "1700000000.000200", "channel": "C0123456789", "event_ts": "1700000000.000200",
			"blocks": []any{map[string]any{"type": "rich_text", "block_id": "abcde", "elements": []any{map[string]any{
				"type": "rich_text_section", "elements": []any{map[string]any{"type": "user", "user_id": "U0BOT"}, map[string]any{"type": "text", "text": " " + text}},
			}}}},
		},
	})
	t.Logf("largest interaction payload %d bytes (%q); slash command with 4,000 characters %d bytes; mention of 40,000 characters %d bytes; bound %d",
		largest, which, slash, len(mention), bodyBound)
	for _, n := range []int{largest, slash, len(mention)} {
		if n*payloadHeadroom > bodyBound {
			t.Errorf("a measured payload of %d bytes leaves less than %d× headroom under the %d-byte bound", n, payloadHeadroom, bodyBound)
		}
	}
}
