package console

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// Handler is what the terminal needs of the engine.
type Handler interface {
	Handle(ctx context.Context, req bot.Request) bot.Reply
}

// Terminal reads commands from In and writes replies to Out.
type Terminal struct {
	Handler  Handler
	In       io.Reader
	Out      io.Writer
	UserID   string // who is typing: the operator, or the user named by --as
	UserName string
	FilesDir string // where attachments are written
	Prompt   bool   // print a prompt (standard input is a terminal)
	Now      func() time.Time
}

// Run handles lines until end of input or until ctx is cancelled. A line
// longer than 64 KiB is refused, not fatal.
func (t *Terminal) Run(ctx context.Context) error {
	lines := make(chan string)
	errc := make(chan error, 1)
	done := make(chan struct{})
	defer close(done)
	go func() {
		sc := bufio.NewScanner(t.In)
		sc.Buffer(make([]byte, 64*1024), 64*1024)
		for sc.Scan() {
			select {
			case lines <- sc.Text():
			case <-done:
				return
			}
		}
		errc <- sc.Err()
		close(lines)
	}()
	n := 0
	for {
		if t.Prompt {
			fmt.Fprint(t.Out, "lathmark> ")
		}
		select {
		case <-ctx.Done():
			return nil
		case line, ok := <-lines:
			if !ok {
				if err := <-errc; err != nil {
					return fmt.Errorf("read commands: %w", err)
				}
				return nil
			}
			n++
			if err := t.handle(ctx, line, n); err != nil {
				return err
			}
		}
	}
}

func (t *Terminal) handle(ctx context.Context, line string, n int) error {
	now := time.Now
	if t.Now != nil {
		now = t.Now
	}
	at := now()
	req := bot.Request{
		UserID: t.UserID, UserName: t.UserName, Direct: true, Text: line, Time: at,
		MessageID: "term-" + strconv.FormatInt(at.UnixNano(), 36) + "-" + strconv.Itoa(n), Local: true,
	}
	if isBlank(line) {
		return nil
	}
	var r bot.Reply
	if imp, ok := t.Handler.(Importer); ok && isImport(line) {
		r = imp.ImportCSVFile(ctx, req, importPath(line), t.progress)
	} else {
		r = t.Handler.Handle(ctx, req)
	}
	if err := Render(t.Out, r); err != nil {
		return fmt.Errorf("write reply: %w", err)
	}
	for _, f := range r.Files {
		path, err := t.writeFile(f)
		if err != nil {
			fmt.Fprintf(t.Out, "  could not write %s: %v\n", f.Name, err)
			continue
		}
		fmt.Fprintf(t.Out, "  written: %s\n", path)
	}
	return nil
}

// Importer is implemented by an engine that can report the progress of a
// CSV import; the terminal prints it as it goes.
type Importer interface {
	ImportCSVFile(ctx context.Context, req bot.Request, path string, progress func(done, total int)) bot.Reply
}

// isImport reports whether a line is an "import csv PATH" command.
func isImport(line string) bool {
	f := strings.Fields(strings.ToLower(line))
	return len(f) >= 3 && f[0] == "import" && f[1] == "csv"
}

// importPath is the PATH of an "import csv PATH" line, as typed.
func importPath(line string) string {
	f := strings.Fields(line)
	return strings.Trim(strings.Join(f[2:], " "), `"'`)
}

// progress prints how far an import has got, for imports of many rows.
func (t *Terminal) progress(done, total int) {
	if total < 1000 {
		return
	}
	fmt.Fprintf(t.Out, "  importing: %d of %d rows checked and written\n", done, total)
}

func isBlank(s string) bool {
	for _, r := range s {
		if r != ' ' && r != '\t' && r != '\r' {
			return false
		}
	}
	return true
}

// writeFile saves an attachment under FilesDir, readable by the user only.
func (t *Terminal) writeFile(f bot.File) (string, error) {
	dir := t.FilesDir
	if dir == "" {
		dir = filepath.Join(os.TempDir(), "lathmark-files")
	}
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return "", err
	}
	path := filepath.Join(dir, filepath.Base(f.Name))
	if err := os.WriteFile(path, f.Data, 0o600); err != nil {
		return "", err
	}
	return path, nil
}
