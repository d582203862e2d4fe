package slackfront

import (
	"context"
	"errors"
	"fmt"
	"sync"
	"time"

	"github.com/slack-go/slack"
)

// call runs one Web API call, retrying while Slack answers 429 with
// Retry-After (*slack.RateLimitedError): at most Config.MaxAttempts tries in
// all, and only when the wait asked for is no longer than
// Config.MaxRetryWait. Other errors are not retried: the call may have taken
// effect. Errors are wrapped with the method name.
func (f *Front) call(ctx context.Context, method string, fn func(context.Context) error) error {
	for attempt := 1; ; attempt++ {
		if err := f.gate.wait(ctx, method); err != nil {
			return fmt.Errorf("slack %s: %w", method, err)
		}
		err := fn(ctx)
		if err == nil {
			return nil
		}
		var rl *slack.RateLimitedError
		if !errors.As(err, &rl) {
			return fmt.Errorf("slack %s: %w", method, err)
		}
		if attempt >= f.cfg.MaxAttempts {
			return fmt.Errorf("slack %s: still rate limited after %d attempts: %w", method, attempt, err)
		}
		if rl.RetryAfter > f.cfg.MaxRetryWait {
			return fmt.Errorf("slack %s: rate limited for %s, longer than the %s we wait: %w", method, rl.RetryAfter, f.cfg.MaxRetryWait, err)
		}
		f.gate.hold(method, rl.RetryAfter)
		f.log.Warn("rate limited by Slack; waiting before trying again", "method", method, "retry_after", rl.RetryAfter, "attempt", attempt)
	}
}

// rateGate remembers, per Web API method, until when Slack asked us to
// wait, so that one 429 holds back every worker using that method (Slack
// rate-limits per method and workspace). It measures real time: it paces
// real requests.
type rateGate struct {
	mu    sync.Mutex
	until map[string]time.Time
}

func (g *rateGate) hold(method string, d time.Duration) {
	g.mu.Lock()
	defer g.mu.Unlock()
	if g.until == nil {
		g.until = make(map[string]time.Time)
	}
	if t := time.Now().Add(d); t.After(g.until[method]) {
		g.until[method] = t
	}
}

func (g *rateGate) wait(ctx context.Context, method string) error {
	g.mu.Lock()
	t := g.until[method]
	g.mu.Unlock()
	d := time.Until(t)
	if d <= 0 {
		return ctx.Err()
	}
	timer := time.NewTimer(d)
	defer timer.Stop()
	select {
	case <-timer.C:
		return nil
	case <-ctx.Done():
		return ctx.Err()
	}
}
