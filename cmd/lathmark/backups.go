package main

import (
	"context"
	"fmt"
	"log/slog"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// backupMinute is when the nightly backup runs: 02:30 team time.
const backupMinute = 2*60 + 30

// backupPrefix and backupSuffix name nightly backup files, so pruning only
// ever touches files the bot wrote itself.
const (
	backupPrefix = "lathmark-"
	backupSuffix = ".db"
)

// seenKeep is how long handled message ids are remembered. Slack
// re-delivers within minutes; a month covers any retry after an outage. A CSV
// import of older rows still skips duplicates by comparing the attempts.
const seenKeep = 30 * 24 * time.Hour

// pruneSeen forgets message ids handled longer ago than seenKeep, so the
// record does not grow without end.
func pruneSeen(ctx context.Context, db *store.DB, now time.Time, log *slog.Logger) error {
	var n int
	err := db.Update(ctx, func(tx *store.Tx) error {
		var err error
		n, err = tx.PruneSeen(now.Add(-seenKeep))
		return err
	})
	if err != nil {
		return fmt.Errorf("prune handled message ids: %w", err)
	}
	log.Info("handled message ids pruned", "removed", n)
	return nil
}

// teamReader gives the current team settings.
type teamReader interface {
	Team(ctx context.Context) (record.Team, error)
}

// nightlyBackup writes a hot copy of the data file into the team's backup
// folder, checks it, and keeps only the newest copies. It does nothing when
// no folder is set.
func nightlyBackup(ctx context.Context, db *store.DB, teams teamReader, now time.Time, log *slog.Logger) error {
	team, err := teams.Team(ctx)
	if err != nil || team.BackupDir == "" {
		return err
	}
	if err := os.MkdirAll(team.BackupDir, 0o700); err != nil {
		return fmt.Errorf("nightly backup: %w", err)
	}
	path := filepath.Join(team.BackupDir, backupPrefix+now.UTC().Format("20060102-150405")+backupSuffix)
	n, err := db.BackupToFile(path)
	if err != nil {
		return fmt.Errorf("nightly backup: %w", err)
	}
	if err := store.Check(path); err != nil {
		return fmt.Errorf("nightly backup %s fails its check: %w", path, err)
	}
	removed, err := pruneBackups(team.BackupDir, team.BackupsKept())
	log.Info("nightly backup written", "path", path, "bytes", n, "pruned", removed)
	return err
}

// pruneBackups removes the oldest nightly backups in dir beyond keep. Names
// sort by time because they carry a UTC timestamp.
func pruneBackups(dir string, keep int) (int, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return 0, fmt.Errorf("prune backups: %w", err)
	}
	var names []string
	for _, e := range entries {
		n := e.Name()
		if e.Type().IsRegular() && strings.HasPrefix(n, backupPrefix) && strings.HasSuffix(n, backupSuffix) {
			names = append(names, n)
		}
	}
	slices.Sort(names)
	removed := 0
	for len(names) > keep {
		if err := os.Remove(filepath.Join(dir, names[0])); err != nil {
			return removed, fmt.Errorf("prune backups: %w", err)
		}
		names = names[1:]
		removed++
	}
	return removed, nil
}
