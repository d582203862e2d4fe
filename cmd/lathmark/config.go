package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/slackfront"
)

// stdio are the process's standard streams, passed down explicitly.
type stdio struct {
	In       io.Reader
	Out, Err io.Writer
}

// config is everything the process was told, from flags and environment.
type config struct {
	Sub      string // "", "backup", "restore", "check", "mend"
	SubArgs  []string
	DataPath string
	Demo     bool
	DemoPath string // the demo's own file, re-seeded each start
	As       string
	Heads    []string
	FilesDir string
	LockWait time.Duration
	LogLevel string

	HTTPAddr      string
	BotToken      string
	AppToken      string
	SigningSecret string
	APIURL        string
}

var errHelp = errors.New("help shown")

// parseConfig reads flags (which win) and environment variables. Tokens
// come from the environment or from files named by *_FILE variables, never
// from flags, so they stay out of shell history and process listings.
func parseConfig(args []string, getenv func(string) string, errOut io.Writer) (config, error) {
	var c config
	if len(args) > 0 && !strings.HasPrefix(args[0], "-") {
		switch args[0] {
		case "run", "backup", "restore", "check", "mend":
			c.Sub, args = args[0], args[1:]
			if c.Sub == "run" {
				c.Sub = ""
			}
		default:
			return c, fmt.Errorf("unknown subcommand %q; use run, backup, restore, check or mend (lathmark -h)", args[0])
		}
	}
	fs := flag.NewFlagSet("lathmark", flag.ContinueOnError)
	fs.SetOutput(errOut)
	fs.StringVar(&c.DataPath, "data", envOr(getenv, "LATHMARK_DATA", defaultDataPath(getenv)), "bbolt data file (env LATHMARK_DATA)")
	fs.BoolVar(&c.Demo, "demo", false, "run on a separate demo file, re-seeded with the invented Harbour Lane squad; never touches --data")
	fs.StringVar(&c.As, "as", getenv("LATHMARK_AS"), "terminal: act as this chat user id, with the roles the store gives it (default: the operator, a head coach)")
	heads := fs.String("head-coach", getenv("LATHMARK_HEAD_COACH"), "comma-separated chat user ids who are head coaches (env LATHMARK_HEAD_COACH)")
	fs.StringVar(&c.FilesDir, "files", envOr(getenv, "LATHMARK_FILES", filepath.Join(tempDir(getenv), "lathmark-files")), "terminal: folder for charts and exports")
	fs.DurationVar(&c.LockWait, "lock-wait", time.Second, "how long to wait for the data file's lock")
	fs.StringVar(&c.LogLevel, "log", envOr(getenv, "LATHMARK_LOG", "info"), "log level: debug, info, warn, error")
	fs.StringVar(&c.HTTPAddr, "http", getenv("LATHMARK_HTTP"), "Slack over HTTP: listen address, e.g. :8080 (needs SLACK_SIGNING_SECRET)")
	fs.Usage = func() {
		fmt.Fprintln(errOut, "usage: lathmark [run|backup FILE|restore FILE|check|mend] [flags]")
		fs.PrintDefaults()
		fmt.Fprintln(errOut, "\nSlack: SLACK_BOT_TOKEN with SLACK_APP_TOKEN (socket mode) or SLACK_SIGNING_SECRET and --http; SLACK_API_URL overrides the API base. Each may be given as NAME_FILE, a file holding the value.")
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return c, errHelp
		}
		return c, err
	}
	c.DemoPath = filepath.Join(tempDir(getenv), "lathmark-demo", "demo.db")
	c.SubArgs = fs.Args()
	if c.Sub == "" && len(c.SubArgs) > 0 {
		return c, fmt.Errorf("unexpected argument %q", c.SubArgs[0])
	}
	for _, h := range strings.Split(*heads, ",") {
		if h = strings.TrimSpace(h); h != "" {
			c.Heads = append(c.Heads, h)
		}
	}
	var err error
	if c.BotToken, err = secret(getenv, "SLACK_BOT_TOKEN"); err != nil {
		return c, err
	}
	if c.AppToken, err = secret(getenv, "SLACK_APP_TOKEN"); err != nil {
		return c, err
	}
	if c.SigningSecret, err = secret(getenv, "SLACK_SIGNING_SECRET"); err != nil {
		return c, err
	}
	c.APIURL = getenv("SLACK_API_URL")
	if c.HTTPAddr != "" && (c.SigningSecret == "" || c.BotToken == "") {
		return c, errors.New("--http needs SLACK_SIGNING_SECRET and SLACK_BOT_TOKEN in the environment")
	}
	if c.AppToken != "" && c.BotToken == "" {
		return c, errors.New("SLACK_APP_TOKEN is set but SLACK_BOT_TOKEN is not; socket mode needs both")
	}
	return c, nil
}

// slack reports whether a Slack workspace is configured.
func (c config) slack() bool { return c.BotToken != "" && (c.AppToken != "" || c.HTTPAddr != "") }

func envOr(getenv func(string) string, key, def string) string {
	if v := getenv(key); v != "" {
		return v
	}
	return def
}

// secret reads NAME from the environment, or from the file named by NAME_FILE.
func secret(getenv func(string) string, name string) (string, error) {
	if v := getenv(name); v != "" {
		return strings.TrimSpace(v), nil
	}
	path := getenv(name + "_FILE")
	if path == "" {
		return "", nil
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return "", fmt.Errorf("read %s_FILE: %w", name, err)
	}
	return strings.TrimSpace(string(b)), nil
}

// defaultDataPath is $XDG_DATA_HOME/lathmark/lathmark.db, or under
// ~/.local/share when XDG_DATA_HOME is unset.
func defaultDataPath(getenv func(string) string) string {
	base := getenv("XDG_DATA_HOME")
	if base == "" {
		home, err := os.UserHomeDir()
		if err != nil {
			home = "."
		}
		base = filepath.Join(home, ".local", "share")
	}
	return filepath.Join(base, "lathmark", "lathmark.db")
}

// tempDir is $TMPDIR, or the system's temporary folder.
func tempDir(getenv func(string) string) string {
	if d := getenv("TMPDIR"); d != "" {
		return d
	}
	return os.TempDir()
}

// redactingWriter replaces credentials in everything written through it:
// the process's log lines and error messages go to one such writer, so
// user:pass@ or a token parameter inside SLACK_API_URL (and the Slack
// tokens themselves) never reach the terminal or a log file. slog and
// fmt.Fprintln write a whole line per Write, so a credential is never
// split across two writes.
type redactingWriter struct {
	w io.Writer
	r slackfront.Redactor
}

func (w redactingWriter) Write(p []byte) (int, error) {
	if _, err := w.w.Write([]byte(w.r.String(string(p)))); err != nil {
		return 0, err
	}
	return len(p), nil
}

// redactOutput wraps w so that the credentials inside apiURL and the given
// tokens are replaced by REDACTED.
func redactOutput(w io.Writer, apiURL string, tokens ...string) io.Writer {
	r := slackfront.NewRedactor(append(slackfront.URLSecrets(apiURL), tokens...)...)
	if r.Empty() {
		return w
	}
	return redactingWriter{w: w, r: r}
}
