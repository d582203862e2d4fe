package main

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"sync"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/digest"
	"github.com/lathmark-team/lathmark/internal/inboxstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/slackfront"
	"github.com/lathmark-team/lathmark/internal/weekly"
)

// inboxLimit bounds the deliveries acknowledged but not yet run; past it
// the bot answers "busy, nothing was done" rather than take more.
const inboxLimit = 10000

// runSlack serves the Slack workspace until ctx ends, with the weekly digest
// and the nightly backup on the team's schedule.
func (a *app) runSlack(ctx context.Context) error {
	front, err := slackfront.New(slackfront.Config{
		BotToken: a.cfg.BotToken, AppToken: a.cfg.AppToken, SigningSecret: a.cfg.SigningSecret,
		APIURL: a.cfg.APIURL, HTTPAddr: a.cfg.HTTPAddr, Logger: a.log,
		Handler: a.engine, Dedup: botstore.Dedup{DB: a.db},
		Inbox: inboxstore.Inbox{DB: a.db, Limit: inboxLimit},
	})
	if err != nil {
		return err
	}
	dir := front.Directory()
	a.dir.p.Store(&dir)
	defer a.dir.p.Store(nil)
	team, err := a.engine.Team(ctx)
	if err != nil {
		return err
	}
	sched, err := weekly.New(weekly.Config{
		Day: team.DigestDay, Minute: team.DigestMinute, Loc: team.Location(), Off: team.DigestOff,
		Job:    digestJob{engine: a.engine, poster: front, log: a.log, waits: []time.Duration{time.Minute, 5 * time.Minute, 15 * time.Minute}},
		Ledger: ledger{a.engine}, Logger: a.log,
	})
	if err != nil {
		return err
	}
	if err := sched.AddDaily("nightly backup", backupMinute, func(ctx context.Context) error {
		now := time.Now()
		return errors.Join(pruneSeen(ctx, a.db, now, a.log), nightlyBackup(ctx, a.db, a.engine, now, a.log))
	}); err != nil {
		return err
	}
	follow := followTeam(sched, a.log)
	a.onTeam.Store(&follow)
	defer a.onTeam.Store(nil)

	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		if err := sched.Run(ctx); err != nil {
			a.log.Error("digest scheduler", "err", err)
		}
	}()
	a.log.Info("lathmark serving Slack", "mode", front.Mode().String(), "data", a.db.Path(), "digest", fmt.Sprintf("%s %02d:%02d %s", team.DigestDay, team.DigestMinute/60, team.DigestMinute%60, team.Location()))
	err = front.Run(ctx)
	cancel()
	wg.Wait()
	return err
}

// followTeam moves the scheduler to changed team settings. The on/off
// switch goes first: Reschedule starts a catch-up check at once, which must
// see the new switch (after `digest on`, a digest due within the catch-up
// window goes out). A change that arrives while the bot shuts down finds
// the scheduler stopped; the next start reads the settings anyway.
func followTeam(sched *weekly.Scheduler, log *slog.Logger) func(record.Team) {
	return func(t record.Team) {
		sched.SetOff(t.DigestOff)
		if err := sched.Reschedule(t.DigestDay, t.DigestMinute, t.Location()); err != nil && !errors.Is(err, weekly.ErrStopped) {
			log.Error("digest: reschedule", "err", err)
		}
	}
}

// digestJob posts a week's digest through the front end, at most once, and
// tries again after a pause when the post fails (rate limits that outlast
// the front end's own retries, a Slack outage).
type digestJob struct {
	engine *bot.Engine
	poster slackfront.Poster
	log    *slog.Logger
	waits  []time.Duration
}

// PostDigest implements weekly.Job.
func (j digestJob) PostDigest(ctx context.Context, week digest.Week, scheduledAt time.Time, late bool) error {
	post := func(ctx context.Context, channel string, r bot.Reply) error {
		err := j.poster.PostReply(ctx, channel, "", r)
		if errors.Is(err, slackfront.ErrPartlyPosted) {
			// The digest is in the channel but a chart or a private
			// message failed. An error here would make the engine release
			// the week and the retries below post the digest again, so the
			// week counts as posted and the failure is only logged.
			j.log.Error("digest posted in part; not posting it again", "week", week.String(), "err", err)
			return nil
		}
		return err
	}
	for attempt := 0; ; attempt++ {
		posted, err := j.engine.PostDigest(ctx, week, scheduledAt, late, post)
		switch {
		case err == nil:
			if posted {
				j.log.Info("digest posted", "week", week.String(), "late", late)
			}
			return nil
		case errors.Is(err, bot.ErrNoDigestChannel), attempt >= len(j.waits):
			return err
		}
		j.log.Warn("digest post failed; will try again", "week", week.String(), "in", j.waits[attempt], "err", err)
		select {
		case <-ctx.Done():
			return ctx.Err()
		case <-time.After(j.waits[attempt]):
		}
	}
}

// ledger tells the scheduler which weeks already went out.
type ledger struct{ engine *bot.Engine }

// Posted implements weekly.Ledger.
func (l ledger) Posted(week digest.Week) (bool, error) {
	return l.engine.DigestPosted(context.Background(), week)
}
