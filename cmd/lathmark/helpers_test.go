package main

import (
	"context"
	"io"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/digest"
)

func botReq(line string) bot.Request {
	return bot.Request{UserID: operatorID, Text: line, Time: time.Date(2026, 11, 25, 10, 0, 0, 0, time.UTC), Local: true}
}

func digestWeek(t *testing.T, s string) digest.Week {
	t.Helper()
	w, err := digest.ParseWeek(s)
	if err != nil {
		t.Fatal(err)
	}
	return w
}

type nopDedup struct{}

func (nopDedup) Seen(context.Context, string) (bool, error) { return false, nil }
func (nopDedup) MarkSeen(context.Context, string) error     { return nil }

// newDigestApp is the bot on a temporary data file with a digest channel
// and one athlete, closed at cleanup.
func newDigestApp(t *testing.T) *app {
	t.Helper()
	env := func(k string) string { return map[string]string{"TMPDIR": t.TempDir()}[k] }
	cfg, err := parseConfig([]string{"--data", filepath.Join(t.TempDir(), "d.db")}, env, io.Discard)
	if err != nil {
		t.Fatal(err)
	}
	a, err := newApp(context.Background(), cfg, stdio{strings.NewReader(""), io.Discard, io.Discard})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { a.Close() })
	for _, line := range []string{"digest channel C0JUMPS01", "athlete add Kai height 1.86"} {
		if r := a.engine.Handle(context.Background(), botReq(line)); !r.OK() {
			t.Fatalf("%s: %+v", line, r)
		}
	}
	return a
}
