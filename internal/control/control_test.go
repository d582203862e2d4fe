package control

import (
	"context"
	"errors"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

type fakeBackuper struct{ calls []string }

func (f *fakeBackuper) BackupToFile(path string) (int64, error) {
	f.calls = append(f.calls, path)
	if filepath.Base(path) == "fail.db" {
		return 0, errors.New("disk full")
	}
	return 42, os.WriteFile(path, []byte("copy"), 0o600)
}

func TestBackupThroughSocket(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "lathmark.db")
	fb := &fakeBackuper{}
	s, err := Listen(data, fb, slog.New(slog.NewTextHandler(io.Discard, nil)))
	if err != nil {
		t.Fatal(err)
	}
	st, err := os.Stat(SocketPath(data))
	if err != nil || st.Mode().Perm() != 0o600 {
		t.Fatalf("socket mode: %v %v", st, err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	n, err := Backup(ctx, data, filepath.Join(dir, "copy.db"))
	if err != nil || n != 42 {
		t.Fatalf("Backup = %d, %v; want 42", n, err)
	}
	if _, err := Backup(ctx, data, filepath.Join(dir, "fail.db")); err == nil || !contains(err.Error(), "disk full") {
		t.Fatalf("failed backup error = %v, want the bot's reason", err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(SocketPath(data)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("socket left behind after Close: %v", err)
	}
	if _, err := Backup(ctx, data, filepath.Join(dir, "copy2.db")); !errors.Is(err, ErrNoServer) {
		t.Errorf("Backup with no server = %v, want ErrNoServer", err)
	}
	if len(fb.calls) != 2 {
		t.Errorf("backuper called %d times, want 2", len(fb.calls))
	}
}

func contains(s, sub string) bool { return strings.Contains(s, sub) }
