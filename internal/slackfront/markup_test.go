package slackfront

import (
	"strings"
	"testing"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// escapeText: every mrkdwn markup character of typed text is fenced by
// zero-width spaces, &, < and > become Slack's entities (Slack message
// formatting rules), and removing the zero-width spaces and decoding the
// entities gives back what was typed (nothing is lost).
func TestEscapeText(t *testing.T) {
	for _, in := range []string{
		"```", "*bold*", "_it_", "~strike~", "`code`", "<!channel>", "a&b", "> quote", "Mira", "u18_girls", "",
		"```\nend of table\n```", "*_~`<>&",
	} {
		got := escapeText(in)
		if strings.Contains(got, "``") || strings.ContainsAny(strings.NewReplacer("&amp;", "", "&lt;", "", "&gt;", "").Replace(got), "<>&") {
			t.Errorf("escapeText(%q) = %q still holds markup", in, got)
		}
		for i, r := range got {
			if strings.ContainsRune("`*_~", r) && (!strings.HasSuffix(got[:i], zwsp) || !strings.HasPrefix(got[i+1:], zwsp)) {
				t.Errorf("escapeText(%q) = %q: %q at %d not fenced", in, got, r, i)
			}
		}
		back := strings.NewReplacer(zwsp, "", "&lt;", "<", "&gt;", ">", "&amp;", "&").Replace(got)
		if back != in {
			t.Errorf("escapeText(%q) decodes to %q", in, back)
		}
		if strings.HasPrefix(in, ">") && strings.HasPrefix(got, "&gt;") {
			t.Errorf("escapeText(%q) = %q can start a quote", in, got)
		}
	}
}

// A group called ``` (and names and notes full of markup) cannot break the
// squad table: each table section is one code block, opened and closed by
// our own fences only; field values and the wide form are escaped too.
func TestTypedMarkupCannotBreakATable(t *testing.T) {
	r := bot.Reply{
		Title:  "Squad: 2 athletes",
		Table:  &bot.Table{Header: []string{"name", "group"}, Rows: [][]string{{"Mira", "```"}, {"Kai", "*x*_y_"}}},
		Fields: []bot.Field{{Label: "Notes", Value: "```\n*loud* <!here>"}},
	}
	blocks, _ := Render(r)
	var tables, fields int
	for _, b := range blocks {
		s, ok := b.(*slack.SectionBlock)
		if !ok {
			continue
		}
		if s.Text != nil && strings.HasPrefix(s.Text.Text, "```") {
			tables++
			if n := strings.Count(s.Text.Text, "```"); n != 2 || !strings.HasSuffix(s.Text.Text, "```") {
				t.Errorf("table section has %d fences:\n%q", n, s.Text.Text)
			}
		}
		for _, f := range s.Fields {
			fields++
			if strings.Contains(f.Text, "```") || strings.Contains(f.Text, "*loud*") || strings.Contains(f.Text, "<!here>") {
				t.Errorf("field keeps markup: %q", f.Text)
			}
		}
	}
	if tables != 1 || fields != 1 {
		t.Fatalf("%d table sections, %d fields:\n%+v", tables, fields, blocks)
	}
	wide := bot.Reply{Table: &bot.Table{Header: []string{"name", "group", "notes"}, Rows: [][]string{{"Mira", "```", strings.Repeat("*bold* ", 8)}}}}
	blocks, _ = Render(wide)
	for _, b := range blocks {
		if s, ok := b.(*slack.SectionBlock); ok && s.Text != nil {
			if strings.Contains(s.Text.Text, "```") || strings.Contains(s.Text.Text, "*bold*") {
				t.Errorf("wide table keeps typed markup: %q", s.Text.Text)
			}
		}
	}
}
