package main

import (
	"bytes"
	"context"
	"encoding/binary"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/store"
)

// A damaged data file: `check` lists the damage, names the newest backup
// and exits 1; the bot answers a read of the damaged record with the
// damage and goes on serving the rest; a file cut short is refused at open
// with the newest backup named; restoring that backup gives a sound file.
func TestCheckAndOpenOnDamagedFile(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "live.db")
	out, errs, code := runLines(t, "athlete add Mira height 1.78 mass 63 sex f pb 1.81\nathlete add Kai height 1.90 mass 75 sex m pb 2.05\n", "--data", data)
	if code != 0 {
		t.Fatalf("setup exit %d:\n%s\n%s", code, out, errs)
	}
	backups := filepath.Join(dir, "backups")
	db, err := store.Open(data, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := nightlyBackup(context.Background(), db, fixedTeam{BackupDir: backups, BackupKeep: 3}, time.Date(2026, 11, 30, 2, 30, 0, 0, time.UTC), slog.New(slog.NewTextHandler(io.Discard, nil))); err != nil {
		t.Fatal(err)
	}
	db.Close()
	newest := filepath.Join(backups, "lathmark-20261130-023000.db")

	raw, err := os.ReadFile(data)
	if err != nil {
		t.Fatal(err)
	}
	bad := bytes.ReplaceAll(raw, []byte(`"stature_m":1.78`), []byte(`"stature_m":1.88`))
	if bytes.Equal(bad, raw) {
		t.Fatal("profile not found in the file")
	}
	if err := os.WriteFile(data, bad, 0o600); err != nil {
		t.Fatal(err)
	}

	out, errs, code = runLines(t, "", "check", "--data", data)
	if code != 1 {
		t.Errorf("check on a damaged file: exit %d, want 1", code)
	}
	for _, want := range []string{"DAMAGED", "checksum", newest, "lathmark restore --data " + data + " " + newest} {
		if !strings.Contains(out+errs, want) {
			t.Errorf("check output lacks %q:\n%s\n%s", want, out, errs)
		}
	}

	out, errs, code = runLines(t, "athlete Mira\nathlete Kai\n", "--data", data)
	if code != 0 || !strings.Contains(out, "The data file is damaged; run `lathmark check`") || !strings.Contains(out, "1.90 m") || strings.Contains(out, "1.88") {
		t.Errorf("bot on a file with one damaged record (exit %d):\n%s\n%s", code, out, errs)
	}

	if err := os.Truncate(data, 3*4096); err != nil {
		t.Fatal(err)
	}
	_, errs, code = runLines(t, "athletes\n", "--data", data)
	if code != 1 || !strings.Contains(errs, "cut short") || !strings.Contains(errs, newest) {
		t.Errorf("bot on a file cut short: exit %d:\n%s", code, errs)
	}
	if _, errs, code := runLines(t, "", "check", "--data", data); code != 1 {
		t.Errorf("check on a file cut short: exit %d\n%s", code, errs)
	}

	if out, errs, code := runLines(t, "", "restore", "--data", data, newest); code != 0 {
		t.Fatalf("restore: exit %d\n%s\n%s", code, out, errs)
	}
	out, errs, code = runLines(t, "", "check", "--data", data)
	if code != 0 || !strings.Contains(out, "consistency check passed") {
		t.Errorf("check after restore: exit %d\n%s\n%s", code, out, errs)
	}
}

// A file with one damaged meta page, end to end from the command line: the
// bot refuses it at start and names `lathmark mend`; mend keeps a copy,
// rebuilds the page and checks the file; the bot then serves it. bbolt
// writes its two meta pages in turn (commit txid to page txid mod 2,
// go.etcd.io/bbolt db.go), so damaging the older page loses nothing.
func TestMendFromTheCommandLine(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "live.db")
	out, errs, code := runLines(t, "athlete add Mira height 1.78 mass 63 sex f pb 1.81\nathlete add Kai height 1.90 mass 75 sex m pb 2.05\n", "--data", data)
	if code != 0 {
		t.Fatalf("setup exit %d:\n%s\n%s", code, out, errs)
	}
	raw, err := os.ReadFile(data)
	if err != nil {
		t.Fatal(err)
	}
	ps := os.Getpagesize()
	txid := func(k int) uint64 { return binary.NativeEndian.Uint64(raw[k*ps+16+48:]) }
	older := 0
	if txid(0) > txid(1) {
		older = 1
	}
	raw[older*ps+16+56] ^= 0x01 // one bit of the older meta page's checksum
	if err := os.WriteFile(data, raw, 0o600); err != nil {
		t.Fatal(err)
	}
	_, errs, code = runLines(t, "athletes\n", "--data", data)
	if code != 1 || !strings.Contains(errs, "fails its checksum") || !strings.Contains(errs, "lathmark mend --data "+data) {
		t.Fatalf("bot on a file with a damaged meta page: exit %d:\n%s", code, errs)
	}
	out, errs, code = runLines(t, "", "mend", "--data", data)
	if code != 0 || !strings.Contains(out, "mended. Meta page") || !strings.Contains(out, "consistency check passed") {
		t.Fatalf("mend: exit %d:\n%s\n%s", code, out, errs)
	}
	copies, _ := filepath.Glob(data + ".before-mend-*")
	if len(copies) != 1 {
		t.Errorf("copies kept: %q, want one", copies)
	}
	out, errs, code = runLines(t, "athletes\n", "--data", data)
	if code != 0 || !strings.Contains(out, "Mira") || !strings.Contains(out, "Kai") {
		t.Errorf("bot after the mend: exit %d:\n%s\n%s", code, out, errs)
	}
	out, _, code = runLines(t, "", "mend", "--data", data)
	if code != 0 || !strings.Contains(out, "nothing to mend") {
		t.Errorf("mend of a sound file: exit %d:\n%s", code, out)
	}
}
