package slackfront

import (
	"strings"
	"testing"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// TestWithDetailsAddsExpandButton checks that a short reply with a full
// read-out behind it gets a Details button that reruns the line with
// "more" and is marked to replace its message, and that a reply without
// details gets none.
func TestWithDetailsAddsExpandButton(t *testing.T) {
	short := bot.Reply{Title: "Clears by 4 cm", Details: &bot.Reply{Title: "Margin at 2.00 m"}}
	got := WithDetails(short, "  margin 2.00 v 4.4  ")
	if len(got.Actions) != 1 {
		t.Fatalf("actions %+v, want one Details button", got.Actions)
	}
	a := got.Actions[0]
	if a.Label != "Details" || a.Command != "margin 2.00 v 4.4 more" || !a.Expand {
		t.Fatalf("button %+v", a)
	}
	if len(short.Actions) != 0 {
		t.Fatalf("WithDetails changed its argument's actions: %+v", short.Actions)
	}
	if plain := WithDetails(bot.Reply{Title: "Logged"}, "log Kai 2.00 o"); len(plain.Actions) != 0 {
		t.Fatalf("a reply without details got buttons: %+v", plain.Actions)
	}

	blocks, _ := Render(got)
	var ids []string
	for _, b := range blocks {
		if ab, ok := b.(*slack.ActionBlock); ok {
			for _, e := range ab.Elements.ElementSet {
				if bt, ok := e.(*slack.ButtonBlockElement); ok {
					ids = append(ids, bt.ActionID)
				}
			}
		}
	}
	if len(ids) != 1 || !strings.HasPrefix(ids[0], ExpandActionID+":") || !isExpandAction(ids[0]) || !isOurAction(ids[0]) {
		t.Fatalf("button ids %v, want one %s:N recognised as ours", ids, ExpandActionID)
	}
	if isExpandAction(ActionID + ":0") {
		t.Fatal("an ordinary button is taken for an expand button")
	}
}

// TestWithDetailsRunsTheReadOnlyCommand: a reply from a command that writes
// names a read-only command for its details (log: `line N more`), and the
// Details button runs that one, never the typed line again.
func TestWithDetailsRunsTheReadOnlyCommand(t *testing.T) {
	r := bot.Reply{Title: "Logged", Details: &bot.Reply{Title: "Logged"}, DetailsCommand: "line 7 more",
		Actions: []bot.Action{{Label: "Undo", Command: "drop #7"}}}
	got := WithDetails(r, "log Kai 1.90 o vz 4.3")
	if len(got.Actions) != 2 || got.Actions[1].Command != "line 7 more" || !got.Actions[1].Expand {
		t.Fatalf("actions %+v, want Undo then Details running line 7 more", got.Actions)
	}
}
