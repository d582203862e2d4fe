package main

import (
	"context"
	"errors"
)

// runSlack serves the Slack workspace until ctx ends.
func (a *app) runSlack(ctx context.Context) error {
	return errors.New("slack front end not wired yet")
}
