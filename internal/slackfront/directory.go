package slackfront

import (
	"context"
	"sync"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// directoryTimeout bounds one users.list walk (200 members a page).
const directoryTimeout = 20 * time.Second

// memberDirectory is the bot.Directory of the workspace: users.list,
// remembered for ttl (Config.UserTTL), so `role coach sam` resolves a
// display name to one member id. Bots, Slackbot and deactivated accounts
// are left out. A failed listing is not remembered.
type memberDirectory struct {
	f     *Front
	ttl   time.Duration
	clock bot.Clock

	mu      sync.Mutex
	members []bot.Member
	expires time.Time
}

// Directory returns the workspace directory for the engine's role
// command (bot.Config.Directory).
func (f *Front) Directory() bot.Directory { return f.dir }

// Members lists the workspace's people, from the cache while it is fresh.
func (d *memberDirectory) Members(ctx context.Context) ([]bot.Member, bool, error) {
	now := d.clock.Now()
	d.mu.Lock()
	if d.members != nil && now.Before(d.expires) {
		ms := d.members
		d.mu.Unlock()
		return ms, true, nil
	}
	d.mu.Unlock()
	ctx, cancel := context.WithTimeout(ctx, directoryTimeout)
	defer cancel()
	var ms []bot.Member
	err := d.f.call(ctx, "users.list", func(ctx context.Context) error {
		us, err := d.f.api.GetUsersContext(ctx)
		if err != nil {
			return err
		}
		ms = ms[:0]
		for _, u := range us {
			if u.Deleted || u.IsBot || u.ID == "USLACKBOT" {
				continue
			}
			ms = append(ms, bot.Member{ID: u.ID, Name: u.Profile.DisplayName, RealName: u.RealName, Handle: u.Name})
		}
		return nil
	})
	if err != nil {
		return nil, true, err
	}
	if ms == nil {
		ms = []bot.Member{}
	}
	d.mu.Lock()
	d.members, d.expires = ms, now.Add(d.ttl)
	d.mu.Unlock()
	return ms, true, nil
}
