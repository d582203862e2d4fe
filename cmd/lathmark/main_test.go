package main

import (
	"bytes"
	"context"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/store"
)

// runLines runs the terminal bot on data with the given input and returns
// what it printed and its exit code.
func runLines(t *testing.T, input string, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	env := map[string]string{"TMPDIR": t.TempDir()}
	code := run(context.Background(), args, stdio{strings.NewReader(input), &out, &errb}, func(k string) string { return env[k] })
	return out.String(), errb.String(), code
}

// The foundation's promise: a profile survives a restart, and refusals
// (duplicate, out of range, typo) change nothing stored.
func TestTerminalProfileSurvivesRestart(t *testing.T) {
	data := filepath.Join(t.TempDir(), "x.db")
	out, errs, code := runLines(t, "athlete add Mira height 1.78 mass 63 sex f pb 1.81\nathlete Mira\n", "--data", data)
	if code != 0 || !strings.Contains(out, "Added Mira") || !strings.Contains(out, "1.81 m") {
		t.Fatalf("first run (code %d):\n%s\n%s", code, out, errs)
	}
	sum := checksum(t, data)
	out, _, code = runLines(t, "athlete Mira\nathlete add Mira height 1.78\nathlete add Zed height 9\nathlete Mria\n", "--data", data)
	if code != 0 {
		t.Fatalf("second run exit %d", code)
	}
	for _, want := range []string{"Personal best:  1.81 m", "already an athlete called Mira", "outside 1.20–2.30 m", "Did you mean Mira?"} {
		if !strings.Contains(out, want) {
			t.Errorf("second run lacks %q:\n%s", want, out)
		}
	}
	if checksum(t, data) != sum {
		t.Error("refusals changed the data file")
	}
}

func checksum(t *testing.T, path string) [32]byte {
	t.Helper()
	db, err := store.Open(path, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	s, err := db.Checksum()
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// The demo's digest writes a chart whose path the reply gives, and the
// real data file is never touched.
func TestDemoDigestWritesChart(t *testing.T) {
	files := t.TempDir()
	data := filepath.Join(t.TempDir(), "real.db")
	out, errs, code := runLines(t, "athletes\ndigest now\n", "--demo", "--data", data, "--files", files)
	if code != 0 {
		t.Fatalf("exit %d:\n%s\n%s", code, out, errs)
	}
	if !strings.Contains(out, "Harbour Lane") && !strings.Contains(out, "Mira") {
		t.Errorf("demo squad missing:\n%s", out)
	}
	m := regexp.MustCompile(`written: (\S+\.png)`).FindStringSubmatch(out)
	if m == nil {
		t.Fatalf("no chart path in:\n%s", out)
	}
	f, err := os.Open(m[1])
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("chart is not a PNG: %v", err)
	}
	if b := img.Bounds(); b.Dx() < 600 || b.Dy() < 600 {
		t.Errorf("chart is only %v", b)
	}
	if _, err := os.Stat(data); !os.IsNotExist(err) {
		t.Errorf("--demo created or touched the real data file: %v", err)
	}
}

// A second process on a held data file gets a clear error, not a hang;
// `lathmark backup` reaches the running bot through its control socket and
// the copy passes the consistency check; restore refuses the live file.
func TestBackupWhileRunningAndLock(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "live.db")
	inR, inW := io.Pipe()
	var out, errb syncBuffer
	done := make(chan int)
	go func() {
		done <- run(context.Background(), []string{"--data", data}, stdio{inR, &out, &errb}, func(string) string { return "" })
	}()
	io.WriteString(inW, "athlete add Mira height 1.78\n")
	waitFor(t, func() bool { return strings.Contains(out.String(), "Added Mira") })

	_, errs, code := runLines(t, "athletes\n", "--data", data, "--lock-wait", "100ms")
	if code != 1 || !strings.Contains(errs, "in use by another lathmark process") {
		t.Errorf("second bot on a held file: exit %d, %q", code, errs)
	}
	copyPath := filepath.Join(dir, "copy.db")
	bout, berr, code := runLines(t, "", "backup", "--data", data, copyPath)
	if code != 0 || !strings.Contains(bout, "by the running bot") {
		t.Fatalf("backup while running: exit %d\n%s\n%s", code, bout, berr)
	}
	if err := store.Check(copyPath); err != nil {
		t.Errorf("backup fails its check: %v", err)
	}
	_, rerr, code := runLines(t, "", "restore", "--data", data, copyPath)
	if code == 0 {
		t.Errorf("restore over a live data file succeeded: %s", rerr)
	}
	inW.Close()
	select {
	case c := <-done:
		if c != 0 {
			t.Errorf("bot exit %d: %s", c, errb.String())
		}
	case <-time.After(10 * time.Second):
		t.Fatal("bot did not stop at end of input")
	}
	// With the bot gone, the copy restores, and the old file is kept.
	if _, rerr, code := runLines(t, "", "restore", "--data", data, copyPath); code != 0 {
		t.Fatalf("restore: %s", rerr)
	}
	if _, err := os.Stat(data + ".before-restore"); err != nil {
		t.Errorf("previous file not kept: %v", err)
	}
	if out, _, _ := runLines(t, "athlete Mira\n", "--data", data); !strings.Contains(out, "1.78 m") {
		t.Errorf("restored file lacks Mira:\n%s", out)
	}
}

func waitFor(t *testing.T, cond func() bool) {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatal("timed out")
		}
		time.Sleep(10 * time.Millisecond)
	}
}
