package slackfront

import (
	"encoding/json"
	"fmt"
	"strings"
	"testing"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// TestRenderShapes checks which block each part of a reply becomes.
func TestRenderShapes(t *testing.T) {
	r := bot.Reply{
		Title:       "Margin for Kai at 2.00 m",
		Lines:       []string{"Clears by a little.", "Bar <2.00> & more"},
		Fields:      []bot.Field{{Label: "Margin", Value: "+4.1 ± 2.3 cm"}, {Label: "Peak c.m.", Value: "2.05 m"}},
		Table:       &bot.Table{Header: []string{"Bar", "Result"}, Rows: [][]string{{"1.95 m", "o"}, {"2.00 m", "xo"}}},
		Notes:       []string{"Best 2.00 m."},
		Assumptions: []string{"take-off c.m. height assumed 1.28 m = 0.69 x stature; add h0 to set it"},
		Caution:     "A model estimate; the coach decides.",
		Example:     "margin 2.00 for Kai v 4.4",
		Actions:     []bot.Action{{Label: "Undo", Command: "undo", Style: "danger"}, {Label: "History", Command: "history Kai 6w"}},
	}
	blocks, fallback := Render(r)
	if fallback != "Margin for Kai at 2.00 m" {
		t.Fatalf("fallback %q", fallback)
	}
	var types []string
	for _, b := range blocks {
		types = append(types, string(b.BlockType()))
	}
	want := "header section section section section context context actions"
	if got := strings.Join(types, " "); got != want {
		t.Fatalf("blocks %s, want %s", got, want)
	}
	if s := blocks[1].(*slack.SectionBlock).Text.Text; s != "Clears by a little.\nBar &lt;2.00&gt; &amp; more" {
		t.Fatalf("lines section %q", s)
	}
	fields := blocks[2].(*slack.SectionBlock).Fields
	if len(fields) != 2 || fields[0].Text != "*Margin*\n+4.1 ± 2.3 cm" {
		t.Fatalf("fields %+v", fields)
	}
	table := blocks[3].(*slack.SectionBlock).Text.Text
	if table != "```\nBar     Result\n1.95 m  o\n2.00 m  xo\n```" {
		t.Fatalf("table %q", table)
	}
	if notes := blocks[4].(*slack.SectionBlock).Text.Text; notes != "Best 2.00 m." {
		t.Fatalf("notes after the table %q", notes)
	}
	ctx := blocks[6].(*slack.ContextBlock).ContextElements.Elements
	if len(ctx) != 2 || !strings.HasPrefix(ctx[0].(*slack.TextBlockObject).Text, "_Assumed:_ take-off") ||
		!strings.HasPrefix(ctx[1].(*slack.TextBlockObject).Text, ":warning: A model") {
		t.Fatalf("context %+v", ctx)
	}
	buttons := blocks[7].(*slack.ActionBlock).Elements.ElementSet
	b0 := buttons[0].(*slack.ButtonBlockElement)
	b1 := buttons[1].(*slack.ButtonBlockElement)
	if b0.ActionID != "lathmark_cmd:0" || b0.Value != "undo" || b0.Style != slack.StyleDanger || b1.ActionID != "lathmark_cmd:1" {
		t.Fatalf("buttons %+v %+v", b0, b1)
	}
	if _, err := json.Marshal(slack.Blocks{BlockSet: blocks}); err != nil {
		t.Fatal(err)
	}

	// A refusal is marked; a wide table becomes one line per row.
	blocks, fallback = Render(bot.Reply{Kind: bot.KindNotFound, Title: "Not done",
		Table: &bot.Table{Header: []string{"Date", "Bar", "Result", "Approach", "Meet"}, Rows: [][]string{{"2026-05-02", "1.95 m", "xxo", "7.6 m/s", "Harbour Lane Open"}}}})
	if fallback != ":x: Not done" || blocks[0].(*slack.HeaderBlock).Text.Text != ":x: Not done" {
		t.Fatalf("refusal %q", fallback)
	}
	if s := blocks[1].(*slack.SectionBlock).Text.Text; s != "Date: *2026-05-02* · Bar: 1.95 m · Result: xxo · Approach: 7.6 m/s · Meet: Harbour Lane Open" {
		t.Fatalf("wide table %q", s)
	}
}

// bigReplies are replies far past every Block Kit limit.
func bigReplies() map[string]bot.Reply {
	word := func(prefix string, n int) string {
		ws := make([]string, n)
		for i := range ws {
			ws[i] = fmt.Sprintf("%s%05d", prefix, i)
		}
		return strings.Join(ws, " ")
	}
	var fields []bot.Field
	for i := range 137 {
		fields = append(fields, bot.Field{Label: fmt.Sprintf("F%03d", i), Value: fmt.Sprintf("v%03d m", i)})
	}
	var rows [][]string
	for i := range 400 {
		rows = append(rows, []string{fmt.Sprintf("r%03d", i), "1.95 m", "xo"})
	}
	var wideRows [][]string
	for i := range 300 {
		wideRows = append(wideRows, []string{fmt.Sprintf("w%03d", i), "2026-05-02", "1.95 m", "xxo", "Harbour Lane Open Meeting"})
	}
	var actions []bot.Action
	for i := range 60 {
		actions = append(actions, bot.Action{Label: fmt.Sprintf("Run %02d", i), Command: fmt.Sprintf("history A%02d 6w", i)})
	}
	actions = append(actions,
		bot.Action{Label: word("lab", 20), Command: "athletes"},
		bot.Action{Label: "Huge", Command: "log " + word("cmd", 400)})
	var assumptions []string
	for i := range 40 {
		assumptions = append(assumptions, word(fmt.Sprintf("as%02d_", i), 30))
	}
	return map[string]bot.Reply{
		"long title":     {Title: word("title", 40)},
		"long lines":     {Title: "Lines", Lines: []string{word("line", 2000), "short", word("x&<>", 900)}},
		"one huge line":  {Lines: []string{strings.Repeat("é🙂&", 4000)}},
		"many fields":    {Title: "Fields", Fields: fields},
		"huge field":     {Fields: []bot.Field{{Label: "Notes", Value: word("fv", 900)}, {Label: "Bar", Value: "2.00 m"}}},
		"tall table":     {Title: "History", Table: &bot.Table{Header: []string{"Id", "Bar", "Res"}, Rows: rows}},
		"wide table":     {Title: "History", Table: &bot.Table{Header: []string{"Id", "Date", "Bar", "Result", "Meet"}, Rows: wideRows}},
		"many actions":   {Title: "Pick one", Actions: actions},
		"assumptions":    {Title: "Calc", Assumptions: assumptions, Caution: word("caution", 700), Example: word("ex", 600)},
		"everything big": {Title: word("t", 30), Lines: []string{word("l", 3000)}, Notes: []string{word("n", 3000)}, Fields: fields, Table: &bot.Table{Header: []string{"Id", "Bar", "Res"}, Rows: rows}, Assumptions: assumptions, Actions: actions},
	}
}

// TestRenderStaysInsideBlockKitLimits renders huge replies and checks each
// message against Slack's published limits (Slack Block Kit reference:
// 50 blocks a message, section text 3000, header 150, 10 fields of 2000,
// button text 75 and value 2000, 25 elements an actions block, 10 a context
// block), and that no word of the reply went missing.
func TestRenderStaysInsideBlockKitLimits(t *testing.T) {
	for name, r := range bigReplies() {
		t.Run(name, func(t *testing.T) {
			msgs := Messages(r)
			if len(msgs) == 0 {
				t.Fatal("no message")
			}
			var all strings.Builder
			for i, m := range msgs {
				if n := len(m.Blocks); n == 0 || n > maxBlocksPerMessage {
					t.Fatalf("message %d has %d blocks", i, n)
				}
				if m.Text == "" || utf16Len(m.Text) > 3000 {
					t.Fatalf("message %d fallback length %d", i, utf16Len(m.Text))
				}
				ids := map[string]bool{}
				for _, b := range m.Blocks {
					checkBlock(t, b, ids, &all)
				}
				if _, err := json.Marshal(slack.Blocks{BlockSet: m.Blocks}); err != nil {
					t.Fatal(err)
				}
			}
			text := unescape(all.String())
			for _, w := range words(r) {
				if !strings.Contains(text, w) {
					t.Fatalf("%q is missing from the rendered messages", w)
				}
			}
		})
	}
}

func checkBlock(t *testing.T, b slack.Block, ids map[string]bool, all *strings.Builder) {
	t.Helper()
	text := func(o *slack.TextBlockObject, limit int, what string) {
		t.Helper()
		if o == nil {
			return
		}
		if n := utf16Len(o.Text); n == 0 || n > limit {
			t.Fatalf("%s text length %d, limit %d", what, n, limit)
		}
		if err := o.Validate(); err != nil {
			t.Fatalf("%s: %v", what, err)
		}
		all.WriteString(o.Text + "\n")
	}
	btn := func(e *slack.ButtonBlockElement) {
		t.Helper()
		text(e.Text, maxButtonText, "button")
		if n := utf16Len(e.Value); n == 0 || n > maxButtonValue {
			t.Fatalf("button value length %d", n)
		}
		if ids[e.ActionID] || !isOurAction(e.ActionID) {
			t.Fatalf("action id %q repeated or foreign", e.ActionID)
		}
		ids[e.ActionID] = true
		all.WriteString(e.Value + "\n")
	}
	switch b := b.(type) {
	case *slack.HeaderBlock:
		text(b.Text, maxHeaderText, "header")
	case *slack.SectionBlock:
		if b.Text == nil && len(b.Fields) == 0 {
			t.Fatal("empty section")
		}
		text(b.Text, maxSectionText, "section")
		if len(b.Fields) > maxSectionFields {
			t.Fatalf("%d fields", len(b.Fields))
		}
		for _, f := range b.Fields {
			text(f, maxFieldText, "field")
		}
		if b.Accessory != nil && b.Accessory.ButtonElement != nil {
			btn(b.Accessory.ButtonElement)
		}
	case *slack.ContextBlock:
		els := b.ContextElements.Elements
		if len(els) == 0 || len(els) > maxContextElements {
			t.Fatalf("%d context elements", len(els))
		}
		for _, e := range els {
			text(e.(*slack.TextBlockObject), maxContextText, "context")
		}
	case *slack.ActionBlock:
		els := b.Elements.ElementSet
		if len(els) == 0 || len(els) > maxActionElements {
			t.Fatalf("%d action elements", len(els))
		}
		for _, e := range els {
			btn(e.(*slack.ButtonBlockElement))
		}
	default:
		t.Fatalf("unexpected block %T", b)
	}
}

func unescape(s string) string {
	return strings.NewReplacer("&lt;", "<", "&gt;", ">", "&amp;", "&").Replace(s)
}

// words lists the reply's words (split at spaces), each of which must show.
func words(r bot.Reply) []string {
	var texts []string
	texts = append(texts, r.Title, r.Caution, r.Example)
	texts = append(texts, r.Lines...)
	texts = append(texts, r.Notes...)
	texts = append(texts, r.Assumptions...)
	for _, f := range r.Fields {
		texts = append(texts, f.Label, f.Value)
	}
	if r.Table != nil {
		texts = append(texts, r.Table.Header...)
		for _, row := range r.Table.Rows {
			texts = append(texts, row...)
		}
	}
	for _, a := range r.Actions {
		texts = append(texts, a.Label, a.Command)
	}
	var out []string
	for _, s := range texts {
		for _, w := range strings.Fields(s) {
			// A word longer than a block is split between characters.
			if utf16Len(w) <= 100 {
				out = append(out, w)
			}
		}
	}
	return out
}

// TestRenderSplitsHugeWord: a word longer than a block is split between
// characters and nothing is lost (a surrogate pair is never cut).
func TestRenderSplitsHugeWord(t *testing.T) {
	w := strings.Repeat("é🙂&", 4000)
	var got strings.Builder
	for _, m := range Messages(bot.Reply{Lines: []string{w}}) {
		for _, b := range m.Blocks {
			got.WriteString(b.(*slack.SectionBlock).Text.Text)
		}
	}
	if unescape(got.String()) != w {
		t.Fatal("the split word does not join back to the original")
	}
}

// TestMessagesEmpty: a reply with nothing says Done; one with only files
// gets no message (the upload carries it).
func TestMessagesEmpty(t *testing.T) {
	if m := Messages(bot.Reply{}); len(m) != 1 || m[0].Text != "Done." {
		t.Fatalf("empty reply: %+v", m)
	}
	if m := Messages(bot.Reply{Files: []bot.File{{Name: "a.csv", Data: []byte("x")}}}); len(m) != 0 {
		t.Fatalf("files only: %d messages", len(m))
	}
}
