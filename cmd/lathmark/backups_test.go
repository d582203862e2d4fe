package main

import (
	"context"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

type fixedTeam record.Team

func (f fixedTeam) Team(context.Context) (record.Team, error) { return record.Team(f), nil }

func TestNightlyBackupKeepsNewest(t *testing.T) {
	dir := t.TempDir()
	db, err := store.Open(filepath.Join(dir, "live.db"), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	backups := filepath.Join(dir, "backups")
	if err := os.MkdirAll(backups, 0o700); err != nil {
		t.Fatal(err)
	}
	other := filepath.Join(backups, "notes.txt") // not ours: never pruned
	if err := os.WriteFile(other, []byte("keep me"), 0o600); err != nil {
		t.Fatal(err)
	}
	team := fixedTeam{BackupDir: backups, BackupKeep: 3}
	log := slog.New(slog.NewTextHandler(io.Discard, nil))
	start := time.Date(2026, 11, 1, 2, 30, 0, 0, time.UTC)
	for d := 0; d < 5; d++ {
		if err := nightlyBackup(context.Background(), db, team, start.AddDate(0, 0, d), log); err != nil {
			t.Fatal(err)
		}
	}
	entries, _ := os.ReadDir(backups)
	var got []string
	for _, e := range entries {
		got = append(got, e.Name())
	}
	want := []string{"lathmark-20261103-023000.db", "lathmark-20261104-023000.db", "lathmark-20261105-023000.db", "notes.txt"}
	if len(got) != len(want) {
		t.Fatalf("backups %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("backups %v, want %v", got, want)
		}
	}
	if err := store.Check(filepath.Join(backups, want[2])); err != nil {
		t.Errorf("newest backup fails its check: %v", err)
	}
}

func TestNightlyBackupOff(t *testing.T) {
	dir := t.TempDir()
	db, err := store.Open(filepath.Join(dir, "live.db"), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if err := nightlyBackup(context.Background(), db, fixedTeam{}, time.Now(), slog.New(slog.DiscardHandler)); err != nil {
		t.Fatal(err)
	}
}

func TestPruneSeen(t *testing.T) {
	db, err := store.Open(filepath.Join(t.TempDir(), "live.db"), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	now := time.Date(2026, 12, 1, 2, 30, 0, 0, time.UTC)
	ctx := context.Background()
	if err := db.Update(ctx, func(tx *store.Tx) error {
		if err := tx.MarkSeen("old", now.Add(-31*24*time.Hour)); err != nil {
			return err
		}
		return tx.MarkSeen("recent", now.Add(-time.Hour))
	}); err != nil {
		t.Fatal(err)
	}
	if err := pruneSeen(ctx, db, now, slog.New(slog.DiscardHandler)); err != nil {
		t.Fatal(err)
	}
	db.View(ctx, func(tx *store.Tx) error {
		if seen, _ := tx.Seen("old"); seen {
			t.Error("an id from 31 days ago is still remembered")
		}
		if seen, _ := tx.Seen("recent"); !seen {
			t.Error("an id from an hour ago was forgotten")
		}
		return nil
	})
}
