// Package control is the local socket through which the lathmark command
// line asks a running bot for work that needs the open data file: a hot
// backup. bbolt lets only one process open the file for writing, so while
// the bot runs, `lathmark backup FILE` cannot open the file itself; it sends
// one line over a Unix socket beside the data file (mode 0600) and the bot
// makes the copy inside a read transaction, without stopping writers.
//
// The protocol is one request line and one answer line:
//
//	backup /absolute/path/to/copy.db   →   ok 123456    or    error MESSAGE
package control

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"time"
)

// Backuper makes a consistent copy of the open data file at path and
// reports its size in bytes.
type Backuper interface {
	BackupToFile(path string) (int64, error)
}

// SocketPath is where the control socket of the data file at dataPath lives.
func SocketPath(dataPath string) string { return dataPath + ".ctl" }

// Server answers control requests until Close.
type Server struct {
	ln   net.Listener
	path string
	b    Backuper
	log  *slog.Logger
	wg   sync.WaitGroup
}

// Listen opens the control socket for dataPath. A stale socket left by a
// crashed bot is removed first (the caller already holds the data file's
// lock, so no other bot can be using it).
func Listen(dataPath string, b Backuper, log *slog.Logger) (*Server, error) {
	path := SocketPath(dataPath)
	if err := os.Remove(path); err != nil && !errors.Is(err, os.ErrNotExist) {
		return nil, fmt.Errorf("control: remove stale socket: %w", err)
	}
	ln, err := net.Listen("unix", path)
	if err != nil {
		return nil, fmt.Errorf("control: listen on %s: %w", path, err)
	}
	if err := os.Chmod(path, 0o600); err != nil {
		ln.Close()
		return nil, fmt.Errorf("control: chmod %s: %w", path, err)
	}
	s := &Server{ln: ln, path: path, b: b, log: log}
	s.wg.Add(1)
	go s.serve()
	return s, nil
}

func (s *Server) serve() {
	defer s.wg.Done()
	for {
		conn, err := s.ln.Accept()
		if err != nil {
			return // closed
		}
		s.wg.Add(1)
		go func() {
			defer s.wg.Done()
			s.handle(conn)
		}()
	}
}

func (s *Server) handle(conn net.Conn) {
	defer conn.Close()
	conn.SetDeadline(time.Now().Add(5 * time.Minute))
	line, err := bufio.NewReader(conn).ReadString('\n')
	if err != nil {
		return
	}
	cmd, arg, _ := strings.Cut(strings.TrimSpace(line), " ")
	switch {
	case cmd == "backup" && filepath.IsAbs(arg):
		n, err := s.b.BackupToFile(arg)
		if err != nil {
			s.log.Error("control: backup failed", "to", arg, "err", err)
			fmt.Fprintf(conn, "error %s\n", oneLine(err.Error()))
			return
		}
		s.log.Info("control: backup written", "to", arg, "bytes", n)
		fmt.Fprintf(conn, "ok %d\n", n)
	default:
		fmt.Fprintf(conn, "error unknown request; expected: backup /absolute/path\n")
	}
}

func oneLine(s string) string { return strings.ReplaceAll(s, "\n", " ") }

// Close stops listening, waits for requests in flight and removes the socket.
func (s *Server) Close() error {
	err := s.ln.Close()
	s.wg.Wait()
	os.Remove(s.path)
	return err
}

// ErrNoServer means no bot is listening for the data file.
var ErrNoServer = errors.New("no running lathmark for this data file")

// Backup asks the bot running on dataPath to copy its data file to dest.
// It returns ErrNoServer when no bot answers, so the caller can open the
// file itself.
func Backup(ctx context.Context, dataPath, dest string) (int64, error) {
	abs, err := filepath.Abs(dest)
	if err != nil {
		return 0, err
	}
	var d net.Dialer
	conn, err := d.DialContext(ctx, "unix", SocketPath(dataPath))
	if err != nil {
		return 0, ErrNoServer
	}
	defer conn.Close()
	if dl, ok := ctx.Deadline(); ok {
		conn.SetDeadline(dl)
	}
	if _, err := fmt.Fprintf(conn, "backup %s\n", abs); err != nil {
		return 0, fmt.Errorf("control: send: %w", err)
	}
	answer, err := bufio.NewReader(conn).ReadString('\n')
	if err != nil {
		return 0, fmt.Errorf("control: no answer from the running bot: %w", err)
	}
	status, rest, _ := strings.Cut(strings.TrimSpace(answer), " ")
	if status != "ok" {
		return 0, fmt.Errorf("the running bot could not back up: %s", rest)
	}
	n, err := strconv.ParseInt(rest, 10, 64)
	if err != nil {
		return 0, fmt.Errorf("control: bad answer %q", answer)
	}
	return n, nil
}
