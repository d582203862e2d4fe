package slackfront

import (
	"context"
	"sync"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// maxCachedUsers bounds the display-name cache; a team has far fewer people.
const maxCachedUsers = 10000

// userCache is the built-in Users: users.info, remembered for ttl. Failed
// lookups are not remembered.
type userCache struct {
	f     *Front
	ttl   time.Duration
	clock bot.Clock

	mu      sync.Mutex
	entries map[string]userEntry
}

type userEntry struct {
	name    string
	expires time.Time
}

func newUserCache(f *Front, ttl time.Duration, clock bot.Clock) *userCache {
	return &userCache{f: f, ttl: ttl, clock: clock, entries: make(map[string]userEntry)}
}

// DisplayName returns the profile's display name, else the real name, else
// the account name.
func (c *userCache) DisplayName(ctx context.Context, userID string) (string, error) {
	now := c.clock.Now()
	c.mu.Lock()
	e, ok := c.entries[userID]
	c.mu.Unlock()
	if ok && now.Before(e.expires) {
		return e.name, nil
	}
	var name string
	err := c.f.call(ctx, "users.info", func(ctx context.Context) error {
		u, err := c.f.api.GetUserInfoContext(ctx, userID)
		if err != nil {
			return err
		}
		switch {
		case u.Profile.DisplayName != "":
			name = u.Profile.DisplayName
		case u.Profile.RealName != "":
			name = u.Profile.RealName
		case u.RealName != "":
			name = u.RealName
		default:
			name = u.Name
		}
		return nil
	})
	if err != nil {
		return "", err
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if len(c.entries) >= maxCachedUsers {
		for id, e := range c.entries {
			if !now.Before(e.expires) {
				delete(c.entries, id)
			}
		}
		if len(c.entries) >= maxCachedUsers {
			clear(c.entries)
		}
	}
	c.entries[userID] = userEntry{name: name, expires: now.Add(c.ttl)}
	return name, nil
}
