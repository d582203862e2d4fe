// Package console is lathmark's terminal front end: it reads one command a
// line, hands it to the engine as the terminal's user, and prints each Reply
// as plain text. Attachments (charts, CSV exports) are written to a folder
// and the reply says where.
package console

import (
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"github.com/lathmark-team/lathmark/bot"
)

// Render writes a reply as plain text. Files are listed by name only; the
// Terminal writes them and prints their paths. The output is stable, so
// golden tests use it.
func Render(w io.Writer, r bot.Reply) error {
	var b strings.Builder
	mark := ""
	if !r.OK() {
		mark = "✗ "
	}
	if r.Title != "" {
		fmt.Fprintf(&b, "%s%s\n", mark, r.Title)
	}
	for _, l := range r.Lines {
		fmt.Fprintf(&b, "  %s\n", l)
	}
	width := 0
	for _, f := range r.Fields {
		width = max(width, utf8.RuneCountInString(f.Label)+1)
	}
	for _, f := range r.Fields {
		fmt.Fprintf(&b, "  %-*s  %s\n", width, f.Label+":", f.Value)
	}
	if r.Table != nil {
		writeTable(&b, *r.Table)
	}
	for _, l := range r.Notes {
		fmt.Fprintf(&b, "  %s\n", l)
	}
	if len(r.Assumptions) > 0 {
		fmt.Fprintf(&b, "  assumed: %s\n", strings.Join(r.Assumptions, "; "))
	}
	if r.Example != "" {
		fmt.Fprintf(&b, "  e.g.  %s\n", r.Example)
	}
	if r.Caution != "" {
		fmt.Fprintf(&b, "  ! %s\n", r.Caution)
	}
	for _, a := range r.Actions {
		fmt.Fprintf(&b, "  [%s] type: %s\n", a.Label, a.Command)
	}
	for _, f := range r.Files {
		fmt.Fprintf(&b, "  file: %s (%s, %d bytes)\n", f.Name, f.MIME, len(f.Data))
	}
	for _, d := range r.Direct {
		fmt.Fprintf(&b, "  (sent privately to %s: %s)\n", d.UserID, d.Reply.Title)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// writeTable aligns a table in columns, two spaces apart.
func writeTable(b *strings.Builder, t bot.Table) {
	widths := make([]int, len(t.Header))
	grow := func(row []string) {
		for i, c := range row {
			if i >= len(widths) {
				widths = append(widths, 0)
			}
			widths[i] = max(widths[i], utf8.RuneCountInString(c))
		}
	}
	grow(t.Header)
	for _, r := range t.Rows {
		grow(r)
	}
	line := func(row []string) {
		var cells []string
		for i, c := range row {
			pad := widths[i] - utf8.RuneCountInString(c)
			if i == len(row)-1 {
				pad = 0
			}
			cells = append(cells, c+strings.Repeat(" ", pad))
		}
		fmt.Fprintf(b, "  %s\n", strings.TrimRight(strings.Join(cells, "  "), " "))
	}
	if len(t.Header) > 0 {
		line(t.Header)
	}
	for _, r := range t.Rows {
		line(r)
	}
}
