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
	if err := rememberBackupDir(db.Path(), team.BackupDir); err != nil {
		log.Warn("could not note the backup folder beside the data file; a damaged file will not name its newest backup", "err", err)
	}
	removed, err := pruneBackups(team.BackupDir, team.BackupsKept())
	log.Info("nightly backup written", "path", path, "bytes", n, "pruned", removed)
	return err
}

// backupDirSuffix names the small file beside the data file that holds the
// backup folder's path: the folder is a team setting inside the data file,
// which cannot be read once the file is damaged.
const backupDirSuffix = ".backup-dir"

// rememberBackupDir notes dir beside the data file (mode 0600), unless it
// is already noted.
func rememberBackupDir(dataPath, dir string) error {
	note := dataPath + backupDirSuffix
	if old, err := os.ReadFile(note); err == nil && string(old) == dir {
		return nil
	}
	tmp := note + ".tmp"
	if err := os.WriteFile(tmp, []byte(dir), 0o600); err != nil {
		return err
	}
	return os.Rename(tmp, note)
}

// newestBackup finds the most recently written backup of the data file: a
// nightly backup in the noted backup folder or beside the data file, or the
// file kept by the last restore. ok is false when there is none.
func newestBackup(dataPath string) (path string, at time.Time, ok bool) {
	dirs := []string{filepath.Dir(dataPath)}
	if dir, err := os.ReadFile(dataPath + backupDirSuffix); err == nil && len(dir) > 0 {
		dirs = append(dirs, string(dir))
	}
	var candidates []string
	for _, dir := range dirs {
		entries, err := os.ReadDir(dir)
		if err != nil {
			continue
		}
		for _, e := range entries {
			if n := e.Name(); e.Type().IsRegular() && strings.HasPrefix(n, backupPrefix) && strings.HasSuffix(n, backupSuffix) {
				candidates = append(candidates, filepath.Join(dir, n))
			}
		}
	}
	candidates = append(candidates, dataPath+store.BeforeRestoreSuffix)
	for _, c := range candidates {
		fi, err := os.Stat(c)
		if err != nil || !fi.Mode().IsRegular() || c == dataPath {
			continue
		}
		if !ok || fi.ModTime().After(at) {
			path, at, ok = c, fi.ModTime(), true
		}
	}
	return path, at, ok
}

// damageAdvice tells the operator of a damaged data file what to restore.
func damageAdvice(dataPath string) string {
	p, at, ok := newestBackup(dataPath)
	if !ok {
		return fmt.Sprintf("No backup of %s was found (none beside it, none noted from `team backup DIR`): copy the damaged file aside before anything else.", dataPath)
	}
	return fmt.Sprintf("The newest backup is %s (written %s). Stop the bot, then put it back with:\n  lathmark restore --data %s %s", p, at.UTC().Format("2006-01-02 15:04 UTC"), dataPath, p)
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
