package bot

import (
	"context"
	"fmt"
	"slices"
	"strings"
)

// A pasted block: one chat message holding several command lines (a coach
// copying a session from notes). Each non-blank line runs as its own
// command, in order, in its own transaction, with the message id extended
// by the line's number ("…#3"): a re-delivered message runs no line twice,
// and a bad line stops nothing else. The reply is one message: a verdict
// line per command, with the refused lines named by number, what was wrong
// and a correct example.
//
// The block's reply has no Details: a Details button reruns the message
// with "more", which would run every line again. A line that ends in
// "more" is shown in full instead.

// maxBlockLines is the most command lines one message may hold; a longer
// block runs nothing (a pasted file belongs in `import csv`).
const maxBlockLines = 30

// blockLine is one command line of a block and its number among the
// block's non-blank lines (1-based).
type blockLine struct {
	n    int
	text string
}

// blockLines splits a message into its non-blank lines, trimmed.
func blockLines(text string) []blockLine {
	var out []blockLine
	for _, l := range strings.Split(text, "\n") {
		if l = strings.TrimSpace(l); l != "" {
			out = append(out, blockLine{n: len(out) + 1, text: l})
		}
	}
	return out
}

// isBlock reports whether a message holds more than one command line.
func isBlock(text string) bool {
	return strings.Contains(text, "\n") && len(blockLines(text)) > 1
}

// handleBlock runs every line of a block and combines the replies.
func (e *Engine) handleBlock(ctx context.Context, req Request) Reply {
	lines := blockLines(req.Text)
	if len(lines) > maxBlockLines {
		return Reply{Kind: KindUsage, Title: "Not done", Ephemeral: true, Example: "log Mira 1.70 o 1.75 xo",
			Lines: []string{fmt.Sprintf("one message may hold up to %d command lines; this one has %d. Nothing was run: send it in parts, or a file with `import csv`.", maxBlockLines, len(lines))}}
	}
	replies := make([]Reply, len(lines))
	for i, l := range lines {
		sub := req
		sub.Text = l.text
		if i < len(lines)-1 {
			// Only the last line forgets the stored delivery: a crash
			// part-way leaves it stored, and the replay reruns the block,
			// where the lines already logged are known by their ids.
			sub.InboxID = ""
		}
		if req.MessageID != "" {
			sub.MessageID = fmt.Sprintf("%s#%d", req.MessageID, l.n)
		}
		replies[i] = e.Handle(ctx, sub)
	}
	return combineBlock(lines, replies)
}

// combineBlock builds the one reply to a block from the replies to its
// lines.
func combineBlock(lines []blockLine, replies []Reply) Reply {
	done, refusedKind := 0, KindOK
	private := false
	for _, r := range replies {
		if r.OK() {
			done++
			private = private || r.Ephemeral
		} else if refusedKind == KindOK {
			refusedKind = r.Kind
		}
	}
	out := Reply{Title: fmt.Sprintf("%s: %d done, %d not done", plural(len(lines), "line"), done, len(lines)-done)}
	if done == 0 {
		out.Kind, out.Ephemeral = refusedKind, true
	} else {
		// An answer shown only to the asker stays private in the
		// combined reply.
		out.Ephemeral = private
	}
	seen := map[string]int{} // command -> index in out.Actions
	var cautions []string
	for i, r := range replies {
		if r.Caution != "" && !slices.Contains(cautions, r.Caution) {
			cautions = append(cautions, r.Caution)
		}
		l := lines[i]
		out.Lines = append(out.Lines, blockVerdict(l, r)...)
		for _, a := range r.Actions {
			if a.Expand {
				continue
			}
			a.Label = fmt.Sprintf("%s (line %d)", a.Label, l.n)
			// The same command from two lines acts once, on the later one
			// (a logged line's Undo carries its own line: drop #N).
			if j, ok := seen[a.Command]; ok {
				out.Actions[j] = a
				continue
			}
			seen[a.Command] = len(out.Actions)
			out.Actions = append(out.Actions, a)
		}
		out.Files = append(out.Files, r.Files...)
		out.Direct = append(out.Direct, r.Direct...)
	}
	out.Caution = strings.Join(cautions, " ")
	if done < len(lines) {
		out.Notes = append(out.Notes, "The other lines ran; send a corrected line on its own.")
	}
	return out
}

// blockVerdict is a line's part of the combined reply: "3 ✓ title" for an
// answer (in full when the line asked for `more`), or "3 ✗ `text`: what was
// wrong, e.g. `example`" for a refusal.
func blockVerdict(l blockLine, r Reply) []string {
	if !r.OK() {
		why := strings.Join(r.Lines, " ")
		if why == "" {
			why = r.Title
		}
		s := fmt.Sprintf("%d ✗ `%s`: %s", l.n, l.text, why)
		if r.Example != "" {
			s += fmt.Sprintf(" e.g. `%s`", r.Example)
		}
		return []string{s}
	}
	title := r.Title
	if title == "" && len(r.Lines) > 0 {
		title = r.Lines[0]
	}
	out := []string{fmt.Sprintf("%d ✓ %s", l.n, title)}
	if ts := tokenize(l.text); len(ts) > 1 && ts[len(ts)-1].Lower == "more" {
		for _, s := range flattenReply(r) {
			out = append(out, "   "+s)
		}
	}
	return out
}

// flattenReply writes the body of a reply (everything but the title and
// the buttons) as plain lines.
func flattenReply(r Reply) []string {
	out := slices.Clone(r.Lines)
	for _, f := range r.Fields {
		out = append(out, f.Label+": "+f.Value)
	}
	if r.Table != nil {
		out = append(out, strings.Join(r.Table.Header, " | "))
		for _, row := range r.Table.Rows {
			out = append(out, strings.Join(row, " | "))
		}
	}
	out = append(out, r.Notes...)
	if len(r.Assumptions) > 0 {
		out = append(out, "assumed: "+strings.Join(r.Assumptions, "; "))
	}
	if r.Caution != "" {
		out = append(out, "! "+r.Caution)
	}
	return out
}
