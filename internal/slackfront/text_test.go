package slackfront

import (
	"testing"
	"time"
)

// TestCleanText: Slack's message format (Slack, "Formatting text for app
// surfaces": mentions as <@U…> or <@U…|name>, &amp; &lt; &gt; escaped;
// from memory, matching the mention parsing in bot/call.go).
func TestCleanText(t *testing.T) {
	tests := []struct{ in, want string }{
		{"<@UBOT> log Kai 1.95 o", "log Kai 1.95 o"},
		{"<@UBOT|lathmark>   margin 2.00  for Kai", "margin 2.00 for Kai"},
		{"log <@UBOT> me 1.80 o", "log me 1.80 o"},
		{"athlete link Mira <@U0MIRA>", "athlete link Mira <@U0MIRA>"},
		{"<@UBOTX> hi", "<@UBOTX> hi"}, // another user whose id starts like ours
		{"log Kai 5&apos;10 &lt;x&gt; &amp;", "log Kai 5&apos;10 <x> &"},
		{"<@UBOT>: help", "help"},
		{" <@UBOT|lathmark> , history Kai 6w", "history Kai 6w"},
		{"<@UBOT> <@UBOT>: help", "help"},
		{"log Kai <@UBOT>: 1.95 o", "log Kai : 1.95 o"}, // only a leading mention takes its colon
		{"<@UBOT>:help", "help"},
		{"<@UBOT> :x: not a colon after the mention", ":x: not a colon after the mention"},
		{"<@UBOT", "<@UBOT"},
		{"<@UBOT>\nlog Kai 1.95 o\n\n  log Mira   1.80 xo \r\n", "log Kai 1.95 o\nlog Mira 1.80 xo"}, // a pasted block keeps its lines
		{"", ""},
	}
	for _, tt := range tests {
		if got := cleanText(tt.in, botUser); got != tt.want {
			t.Errorf("cleanText(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

// TestTsTime: Slack timestamps are Unix seconds with microseconds after
// the dot (Slack Web API docs on message ts values; from memory). The first
// case is the timestamp of Slack's request-signing example.
func TestTsTime(t *testing.T) {
	tests := []struct {
		in   string
		want time.Time
		ok   bool
	}{
		{"1531420618.000200", time.Unix(1531420618, 200000).UTC(), true},
		{"1531420618", time.Unix(1531420618, 0).UTC(), true},
		{"1531420618.5", time.Unix(1531420618, 500000000).UTC(), true},
		{"", time.Time{}, false},
		{"abc.def", time.Time{}, false},
		{"-5.0", time.Time{}, false},
	}
	for _, tt := range tests {
		got, ok := tsTime(tt.in)
		if ok != tt.ok || !got.Equal(tt.want) {
			t.Errorf("tsTime(%q) = %v %v, want %v %v", tt.in, got, ok, tt.want, tt.ok)
		}
	}
}
