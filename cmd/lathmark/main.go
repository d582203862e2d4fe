// Command lathmark is the high-jump coaching bot. With Slack credentials in
// the environment it serves the team's Slack workspace; without them it runs
// in the terminal, one command a line.
//
//	lathmark [flags]              run (terminal, or Slack when configured)
//	lathmark backup [flags] FILE  hot copy of the data file
//	lathmark restore [flags] FILE put a backup in place of the data file
//	lathmark check [flags]        verify the data file's consistency
//	lathmark mend [flags] [FILE]  rebuild one damaged meta page from the other
package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"syscall"
	"time"
	_ "time/tzdata" // time zones on machines without a zone database

	"github.com/lathmark-team/lathmark/store"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], stdio{os.Stdin, os.Stdout, os.Stderr}, os.Getenv)
	stop()
	os.Exit(code)
}

// run parses the command line and runs the chosen subcommand, returning the
// process exit code: 0 done, 1 failed, 2 bad usage.
func run(ctx context.Context, args []string, io stdio, getenv func(string) string) int {
	cfg, err := parseConfig(args, getenv, io.Err)
	if err != nil {
		if err == errHelp {
			return 0
		}
		fmt.Fprintln(io.Err, "lathmark:", err)
		return 2
	}
	switch cfg.Sub {
	case "backup":
		err = runBackup(ctx, cfg, io)
	case "restore":
		err = runRestore(cfg, io)
	case "check":
		err = checkData(cfg, io)
	case "mend":
		err = mendData(cfg, io, time.Now())
	default:
		err = runBot(ctx, cfg, io)
	}
	if err != nil {
		fmt.Fprintln(io.Err, "lathmark:", err)
		if errors.Is(err, store.ErrDamaged) && cfg.Sub == "" && !cfg.Demo {
			// The file was refused at open or a read met damage.
			if errors.Is(err, store.ErrMetaDamaged) {
				fmt.Fprintf(io.Err, "One of the file's two meta pages is damaged (a write cut off, as by a power cut, or a bad disk block). `lathmark mend --data %s` rebuilds it from the other and keeps a copy of the file as it was; at most the change saved last may be missing. Or restore the newest backup:\n", cfg.DataPath)
			}
			fmt.Fprintln(io.Err, damageAdvice(cfg.DataPath))
		}
		return 1
	}
	return 0
}
