package slackfront

import (
	"fmt"
	"slices"
	"strings"
	"unicode/utf8"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// ActionID marks lathmark's buttons. Slack wants action ids unique inside
// a message, so each button gets ActionID + ":" + its index; a press of any
// id equal to ActionID or starting with ActionID + ":" runs the button's
// value as a command.
const ActionID = "lathmark_cmd"

// ExpandActionID marks buttons whose command's reply replaces the message
// they are on (bot.Action.Expand), such as Details; ids are numbered as
// for ActionID.
const ExpandActionID = "lathmark_expand"

// detailsLabel is the text of the button under a reply that has details.
const detailsLabel = "Details"

// WithDetails adds a Details button to a reply that has a full read-out
// behind it (bot.Reply.Details): pressing it runs the same command line
// with "more" at the end (or the reply's own read-only DetailsCommand, for
// a command that writes) and expands the message in place. text is the
// command line as the asker typed it.
func WithDetails(r bot.Reply, text string) bot.Reply {
	text = strings.TrimSpace(text)
	if r.Details == nil || text == "" {
		return r
	}
	cmd := text + " more"
	if r.DetailsCommand != "" {
		cmd = r.DetailsCommand
	}
	r.Actions = append(slices.Clone(r.Actions), bot.Action{Label: detailsLabel, Command: cmd, Expand: true})
	return r
}

// Block Kit limits for messages, from Slack's Block Kit reference
// (docs.slack.dev/reference/block-kit: blocks, block elements, composition
// objects), as quoted in the slack-blocks crate documentation (docs.rs) and
// slack-go's TextBlockObject.Validate (3000). Lengths are counted in UTF-16
// code units, which is never less than Slack's character count.
const (
	maxBlocksPerMessage = 50
	maxSectionText      = 3000
	maxHeaderText       = 150
	maxSectionFields    = 10
	maxFieldText        = 2000
	maxButtonText       = 75
	maxButtonValue      = 2000
	maxActionElements   = 25
	maxContextElements  = 10
	maxContextText      = 3000 // the text object limit
	maxFallbackText     = 300  // our own choice: a notification line, not the content
)

// phoneColumns is how wide a preformatted table may be and still read on a
// phone held upright without wrapping (common practice for monospace text
// in Slack's mobile apps); wider tables become one line per row.
const phoneColumns = 40

// Message is one chat message: blocks plus the plain fallback text Slack
// shows in notifications and in clients without Block Kit.
type Message struct {
	Blocks []slack.Block
	Text   string
}

// Render turns a reply into Block Kit blocks and a fallback text. It is pure
// and keeps every block inside Slack's limits by splitting text into more
// blocks, never by cutting it; the block list itself may be longer than one
// message allows (Messages splits it). Order: header (Title), sections
// (Lines), section fields (Fields), the table, sections (Notes), the example, a context block
// for Assumptions and Caution, then the buttons (Actions). Files and Direct
// are not blocks: the front end uploads and sends them separately.
func Render(r bot.Reply) ([]slack.Block, string) {
	var bs []slack.Block
	section := func(text string) {
		bs = append(bs, slack.NewSectionBlock(mrkdwn(text), nil, nil))
	}
	context := func(elements []string) {
		for len(elements) > 0 {
			n := min(len(elements), maxContextElements)
			mixed := make([]slack.MixedElement, n)
			for i, e := range elements[:n] {
				mixed[i] = mrkdwn(e)
			}
			bs = append(bs, slack.NewContextBlock("", mixed...))
			elements = elements[n:]
		}
	}

	if title := r.Title; title != "" {
		if !r.OK() {
			title = ":x: " + title
		}
		if utf16Len(title) <= maxHeaderText {
			bs = append(bs, slack.NewHeaderBlock(slack.NewTextBlockObject(slack.PlainTextType, title, true, false)))
		} else {
			// Too long for a header: a bold section instead, split as needed.
			for _, p := range splitEscaped(escapeText(title), maxSectionText-2) {
				section("*" + p + "*")
			}
		}
	}

	for _, t := range pack(escapeAll(r.Lines), maxSectionText) {
		section(t)
	}

	var fields []*slack.TextBlockObject
	flushFields := func() {
		if len(fields) > 0 {
			bs = append(bs, slack.NewSectionBlock(nil, fields, nil))
			fields = nil
		}
	}
	for _, f := range r.Fields {
		t := escapeText(f.Value)
		if f.Label != "" {
			t = "*" + escape(f.Label) + "*\n" + t
		}
		if t == "" {
			continue
		}
		if utf16Len(t) <= maxFieldText {
			fields = append(fields, mrkdwn(t))
			if len(fields) == maxSectionFields {
				flushFields()
			}
			continue
		}
		// Too long for a field: its own sections, in order.
		flushFields()
		for _, p := range splitEscaped(t, maxSectionText) {
			section(p)
		}
	}
	flushFields()

	if r.Table != nil {
		for _, t := range tableTexts(*r.Table) {
			section(t)
		}
	}
	for _, t := range pack(escapeAll(r.Notes), maxSectionText) {
		section(t)
	}

	if r.Example != "" {
		context(pack([]string{"e.g. `" + escape(r.Example) + "`"}, maxContextText))
	}

	var notes []string
	for _, a := range r.Assumptions {
		if a != "" {
			notes = append(notes, "_Assumed:_ "+escape(a))
		}
	}
	elements := pack(notes, maxContextText)
	if r.Caution != "" {
		elements = append(elements, pack([]string{":warning: " + escape(r.Caution)}, maxContextText)...)
	}
	context(elements)

	var buttons []slack.BlockElement
	flushButtons := func() {
		if len(buttons) > 0 {
			bs = append(bs, slack.NewActionBlock("", buttons...))
			buttons = nil
		}
	}
	for i, a := range r.Actions {
		id := fmt.Sprintf("%s:%d", ActionID, i)
		if a.Expand {
			id = fmt.Sprintf("%s:%d", ExpandActionID, i)
		}
		label := strings.TrimSpace(a.Label)
		if label == "" {
			label = a.Command
		}
		if a.Command == "" || utf16Len(a.Command) > maxButtonValue {
			// Not a button Slack would take: say what to type instead.
			flushButtons()
			text := escape(label)
			if a.Command != "" {
				text = "type: `" + escape(a.Command) + "`"
				if label != a.Command {
					text = escape(label) + ", " + text
				}
			}
			context(pack([]string{text}, maxContextText))
			continue
		}
		if utf16Len(label) <= maxButtonText {
			buttons = append(buttons, button(id, label, a))
			if len(buttons) == maxActionElements {
				flushButtons()
			}
			continue
		}
		// A label too long for a button: the label as text, with a short
		// button beside its last part.
		flushButtons()
		parts := splitEscaped(escape(label), maxSectionText)
		for _, p := range parts[:len(parts)-1] {
			section(p)
		}
		bs = append(bs, slack.NewSectionBlock(mrkdwn(parts[len(parts)-1]), nil,
			slack.NewAccessory(button(id, "Run", a))))
	}
	flushButtons()

	return bs, fallbackText(r)
}

// Messages renders a reply as one or more messages of at most 50 blocks.
// Later messages repeat the fallback text with "(continued, i of n)". A reply
// with nothing to show and nothing to send gets a one-word "Done." message;
// one with only files or direct messages gets no message at all.
func Messages(r bot.Reply) []Message {
	blocks, text := Render(r)
	if len(blocks) == 0 {
		if len(r.Files) > 0 || len(r.Direct) > 0 {
			return nil
		}
		return []Message{{Blocks: []slack.Block{slack.NewSectionBlock(mrkdwn("Done."), nil, nil)}, Text: "Done."}}
	}
	n := (len(blocks) + maxBlocksPerMessage - 1) / maxBlocksPerMessage
	out := make([]Message, 0, n)
	for i := range n {
		end := min(len(blocks), (i+1)*maxBlocksPerMessage)
		t := text
		if i > 0 {
			t = fmt.Sprintf("%s (continued, %d of %d)", text, i+1, n)
		}
		out = append(out, Message{Blocks: blocks[i*maxBlocksPerMessage : end], Text: t})
	}
	return out
}

func button(id, label string, a bot.Action) *slack.ButtonBlockElement {
	b := slack.NewButtonBlockElement(id, a.Command, slack.NewTextBlockObject(slack.PlainTextType, label, true, false))
	switch a.Style {
	case "primary":
		b.Style = slack.StylePrimary
	case "danger":
		b.Style = slack.StyleDanger
	}
	return b
}

func mrkdwn(text string) *slack.TextBlockObject {
	return slack.NewTextBlockObject(slack.MarkdownType, text, false, false)
}

// fallbackText is the notification line: the title, else the first line or
// field, shortened at a word to maxFallbackText with an ellipsis (the blocks
// carry the whole reply).
func fallbackText(r bot.Reply) string {
	s := r.Title
	if s == "" && len(r.Lines) > 0 {
		s = r.Lines[0]
	}
	if s == "" && len(r.Fields) > 0 {
		s = r.Fields[0].Label + ": " + r.Fields[0].Value
	}
	if s == "" {
		s = "lathmark"
	}
	if !r.OK() {
		s = ":x: " + s
	}
	s = escape(s)
	if utf16Len(s) > maxFallbackText {
		s = splitEscaped(s, maxFallbackText-1)[0] + "…"
	}
	return s
}

// tableTexts renders a table as section texts. A table that fits
// phoneColumns is preformatted (```), its header repeated in every part; a
// wider one becomes one line per row, "header: *first cell* · header: cell",
// which wraps cleanly on a phone.
func tableTexts(t bot.Table) []string {
	cols := len(t.Header)
	for _, row := range t.Rows {
		cols = max(cols, len(row))
	}
	if cols == 0 {
		return nil
	}
	widths := make([]int, cols)
	for _, row := range append([][]string{t.Header}, t.Rows...) {
		for i, c := range row {
			widths[i] = max(widths[i], utf8.RuneCountInString(c))
		}
	}
	total := 2 * (cols - 1)
	for _, w := range widths {
		total += w
	}
	if total <= phoneColumns {
		line := func(row []string) string {
			var b strings.Builder
			for i, c := range row {
				if i > 0 {
					b.WriteString("  ")
				}
				b.WriteString(escapeText(c))
				if i < len(row)-1 {
					b.WriteString(strings.Repeat(" ", widths[i]-utf8.RuneCountInString(c)))
				}
			}
			return strings.TrimRight(b.String(), " ")
		}
		head := ""
		if len(t.Header) > 0 {
			head = line(t.Header) + "\n"
		}
		rows := make([]string, 0, len(t.Rows))
		for _, r := range t.Rows {
			rows = append(rows, line(r))
		}
		const fence = "```"
		overhead := utf16Len(fence+"\n"+head+"\n"+fence) + 1
		var out []string
		for _, chunk := range pack(rows, maxSectionText-overhead) {
			out = append(out, fence+"\n"+head+chunk+"\n"+fence)
		}
		if len(out) == 0 && head != "" {
			out = append(out, fence+"\n"+strings.TrimSuffix(head, "\n")+"\n"+fence)
		}
		return out
	}
	rows := make([]string, 0, len(t.Rows))
	for _, row := range t.Rows {
		var parts []string
		for i, c := range row {
			v := escapeText(c)
			if i == 0 {
				v = "*" + v + "*"
			}
			if i < len(t.Header) && t.Header[i] != "" {
				v = escape(t.Header[i]) + ": " + v
			}
			parts = append(parts, v)
		}
		rows = append(rows, strings.Join(parts, " · "))
	}
	if len(rows) == 0 {
		rows = append(rows, escape(strings.Join(t.Header, " · ")))
	}
	return pack(rows, maxSectionText)
}

// escape makes our own running text safe for Slack mrkdwn: &, < and >
// become entities (Slack's message formatting rules) and a run of three
// backticks (which only typed text brings in) cannot open a code block.
// Typed text in cells and fields goes through escapeText instead.
func escape(s string) string {
	s = breakFences(s)
	if !strings.ContainsAny(s, "&<>") {
		return s
	}
	var b strings.Builder
	for _, r := range s {
		if !writeEntity(&b, r) {
			b.WriteRune(r)
		}
	}
	return b.String()
}

func escapeAll(ss []string) []string {
	out := make([]string, 0, len(ss))
	for _, s := range ss {
		if s != "" {
			out = append(out, escape(s))
		}
	}
	return out
}

// utf16Len counts UTF-16 code units.
func utf16Len(s string) int {
	n := 0
	for _, r := range s {
		if r >= 0x10000 {
			n += 2
		} else {
			n++
		}
	}
	return n
}

// pack joins escaped units with newlines into texts of at most limit UTF-16
// units, splitting any unit that is longer by itself. Nothing is dropped but
// the newline or space at a split.
func pack(units []string, limit int) []string {
	var (
		out []string
		cur strings.Builder
		n   int
	)
	for _, u := range units {
		for _, p := range splitEscaped(u, limit) {
			pl := utf16Len(p)
			if n > 0 && n+1+pl > limit {
				out = append(out, cur.String())
				cur.Reset()
				n = 0
			}
			if n > 0 {
				cur.WriteByte('\n')
				n++
			}
			cur.WriteString(p)
			n += pl
		}
	}
	if n > 0 {
		out = append(out, cur.String())
	}
	return out
}

// splitEscaped cuts escaped text into pieces of at most limit UTF-16 units.
// It breaks at the last newline or space that fits (dropping that one
// character), else between characters, never inside an entity such as
// &amp;. limit must be at least 5.
func splitEscaped(s string, limit int) []string {
	var out []string
	for utf16Len(s) > limit {
		n, cut, brk := 0, len(s), -1
		for i := 0; i < len(s); {
			w, c := atom(s[i:])
			if n+c > limit {
				cut = i
				break
			}
			n += c
			if s[i] == '\n' || s[i] == ' ' {
				brk = i
			}
			i += w
		}
		if brk > 0 {
			out = append(out, s[:brk])
			s = s[brk+1:]
		} else {
			out = append(out, s[:cut])
			s = s[cut:]
		}
	}
	return append(out, s)
}

// atom is the next unsplittable piece of escaped text: an entity or one
// character. It returns its width in bytes and its length in UTF-16 units.
func atom(s string) (width, units int) {
	if s[0] == '&' {
		for _, e := range [...]string{"&amp;", "&lt;", "&gt;"} {
			if strings.HasPrefix(s, e) {
				return len(e), len(e)
			}
		}
	}
	r, w := utf8.DecodeRuneInString(s)
	if r >= 0x10000 {
		return w, 2
	}
	return w, 1
}
