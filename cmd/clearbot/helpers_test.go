package main

import (
	"context"
	"testing"
	"time"

	"github.com/clearbot-team/clearbot/bot"
	"github.com/clearbot-team/clearbot/internal/digest"
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
