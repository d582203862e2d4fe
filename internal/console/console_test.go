package console

import (
	"bytes"
	"context"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

func TestRenderAllParts(t *testing.T) {
	r := bot.Reply{
		Title:       "Margin at 1.80 m",
		Lines:       []string{"clears"},
		Fields:      []bot.Field{{Label: "Margin", Value: "+4.0 cm"}, {Label: "C.m. peak", Value: "1.92 m"}},
		Table:       &bot.Table{Header: []string{"bar", "tries"}, Rows: [][]string{{"1.70", "o"}, {"1.75", "xxo"}}},
		Notes:       []string{"best 1.75 m"},
		Assumptions: []string{"arch 90°", "h0 1.25 m"},
		Example:     "margin 1.80 v 4.3",
		Caution:     "estimates only",
		Actions:     []bot.Action{{Label: "Undo", Command: "undo"}},
		Files:       []bot.File{{Name: "a.png", MIME: "image/png", Data: []byte("x")}},
		Direct:      []bot.Direct{{UserID: "U1", Reply: bot.Reply{Title: "private"}}},
	}
	var b bytes.Buffer
	if err := Render(&b, r); err != nil {
		t.Fatal(err)
	}
	want := `Margin at 1.80 m
  clears
  Margin:     +4.0 cm
  C.m. peak:  1.92 m
  bar   tries
  1.70  o
  1.75  xxo
  best 1.75 m
  assumed: arch 90°; h0 1.25 m
  e.g.  margin 1.80 v 4.3
  ! estimates only
  [Undo] type: undo
  file: a.png (image/png, 1 bytes)
  (sent privately to U1: private)
`
	if b.String() != want {
		t.Errorf("got:\n%s\nwant:\n%s", b.String(), want)
	}
	b.Reset()
	Render(&b, bot.Reply{Kind: bot.KindUsage, Title: "Not done"})
	if !strings.HasPrefix(b.String(), "✗ Not done") {
		t.Errorf("refusal not marked: %q", b.String())
	}
}

type echo struct{ reqs []bot.Request }

func (e *echo) Handle(_ context.Context, req bot.Request) bot.Reply {
	e.reqs = append(e.reqs, req)
	return bot.Reply{Title: "got " + req.Text, Files: []bot.File{{Name: "../../escape.csv", MIME: "text/csv", Data: []byte("a,b\n")}}}
}

func TestTerminalRun(t *testing.T) {
	h := &echo{}
	dir := t.TempDir()
	var out bytes.Buffer
	term := &Terminal{Handler: h, In: strings.NewReader("help\n\n   \nathletes\n"), Out: &out, UserID: "operator", FilesDir: dir}
	if err := term.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	if len(h.reqs) != 2 || h.reqs[0].Text != "help" || h.reqs[1].Text != "athletes" {
		t.Fatalf("requests %+v", h.reqs)
	}
	if h.reqs[0].MessageID == h.reqs[1].MessageID || !h.reqs[0].Local || h.reqs[0].UserID != "operator" {
		t.Errorf("requests need distinct ids, Local, the operator: %+v", h.reqs)
	}
	// Attachments land inside FilesDir whatever their name says.
	path := filepath.Join(dir, "escape.csv")
	if _, err := os.Stat(path); err != nil {
		t.Errorf("file not written inside FilesDir: %v\n%s", err, out.String())
	}
	if !strings.Contains(out.String(), "written: "+path) {
		t.Errorf("path not reported:\n%s", out.String())
	}
}

func TestTerminalStopsOnCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r, w := io.Pipe()
	defer w.Close()
	term := &Terminal{Handler: &echo{}, In: r, Out: &bytes.Buffer{}}
	if err := term.Run(ctx); err != nil {
		t.Fatal(err)
	}
}
