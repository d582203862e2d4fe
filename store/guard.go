package store

import (
	"errors"
	"fmt"
	"log/slog"
	"runtime"
	"runtime/debug"
	"strings"
	"sync/atomic"
	"syscall"
)

// txGuard turns what a damaged file does to a transaction into errors the
// bot can answer with, and logs the first of them.
//
// Every View, Update and Batch function runs with
// runtime/debug.SetPanicOnFault(true) on its goroutine, so a SIGBUS or
// SIGSEGV while reading the memory-mapped file (pages past a truncated end,
// a damaged page pointing anywhere) becomes a panic, and catch recovers it
// into an error matching ErrDamaged. A panic raised inside bbolt's own code
// (an index out of range while it walks a damaged page) is treated the same.
// Any other panic (a bug in the caller's function) is passed on unchanged.
type txGuard struct {
	log     *slog.Logger
	path    string
	damaged atomic.Bool // the first damage was logged
	full    atomic.Bool // the disk was full at the last commit
}

// catch is deferred as
//
//	defer g.catch(&err, "view", debug.SetPanicOnFault(true))
//
// It restores the goroutine's previous fault setting, recovers a fault or a
// panic inside bbolt into *err, and logs the first damage this DB meets
// (also a checksum mismatch returned as an error).
func (g *txGuard) catch(err *error, what string, oldPanicOnFault bool) {
	debug.SetPanicOnFault(oldPanicOnFault)
	if r := recover(); r != nil {
		if !isDamagePanic(r) {
			panic(r)
		}
		*err = fmt.Errorf("store: %s %s: reading the file failed (%v): %w", what, g.path, r, ErrDamaged)
	}
	if *err != nil && errors.Is(*err, ErrDamaged) && g.damaged.CompareAndSwap(false, true) && g.log != nil {
		g.log.Error("the data file is damaged: the bot answers what it can read; run `lathmark check` and restore from a backup (logged once)", "path", g.path, "err", *err)
	}
}

// commitFailed wraps a commit error, marking a full disk with ErrDiskFull
// (logged when the disk becomes full, not at every refused write).
func (g *txGuard) commitFailed(err error) error {
	if !isDiskFull(err) {
		return fmt.Errorf("store: commit: %w", err)
	}
	if g.full.CompareAndSwap(false, true) && g.log != nil {
		g.log.Error("the disk holding the data file is full: writes are refused until there is room", "path", g.path, "err", err)
	}
	return fmt.Errorf("store: commit %s: %w (%w)", g.path, ErrDiskFull, err)
}

// committed notes a successful commit: the disk has room again.
func (g *txGuard) committed() { g.full.Store(false) }

// isDiskFull reports a write or sync refused for lack of space or quota.
func isDiskFull(err error) bool {
	return errors.Is(err, syscall.ENOSPC) || errors.Is(err, syscall.EDQUOT)
}

// isDamagePanic reports a panic that comes from reading the file: a memory
// fault at an address (the runtime gives those an Addr method; a nil
// dereference has none), or any panic raised in bbolt's code.
func isDamagePanic(r any) bool {
	if _, ok := r.(interface{ Addr() uintptr }); ok {
		return true
	}
	return panickedIn("go.etcd.io/bbolt")
}

// panickedIn reports whether the function that panicked (the first frame
// outside the runtime below runtime.gopanic) is in the package pkg. It is
// called from a deferred function while the panic unwinds.
func panickedIn(pkg string) bool {
	pcs := make([]uintptr, 64)
	frames := runtime.CallersFrames(pcs[:runtime.Callers(2, pcs)])
	seenPanic := false
	for {
		f, more := frames.Next()
		switch {
		case f.Function == "runtime.gopanic":
			seenPanic = true
		case seenPanic && !strings.HasPrefix(f.Function, "runtime."):
			return strings.HasPrefix(f.Function, pkg+".") || strings.HasPrefix(f.Function, pkg+"/")
		}
		if !more {
			return false
		}
	}
}
