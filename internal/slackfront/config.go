package slackfront

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"net/url"
	"strings"
	"time"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// Handler runs one command. The engine (*bot.Engine) satisfies it.
type Handler interface {
	Handle(ctx context.Context, req bot.Request) bot.Reply
}

// HandlerFunc adapts a function to Handler.
type HandlerFunc func(ctx context.Context, req bot.Request) bot.Reply

// Handle calls f.
func (f HandlerFunc) Handle(ctx context.Context, req bot.Request) bot.Reply { return f(ctx, req) }

// Dedup remembers which deliveries were already handled. It must survive a
// restart (back it with the store), because Slack re-delivers an event that
// was not acknowledged in time, possibly to a freshly started bot.
type Dedup interface {
	// Seen reports whether id was marked before.
	Seen(ctx context.Context, id string) (bool, error)
	// MarkSeen records id.
	MarkSeen(ctx context.Context, id string) error
}

// Users maps a Slack user id to the name people see. The front end's own
// implementation asks users.info and caches answers in memory for
// Config.UserTTL.
type Users interface {
	DisplayName(ctx context.Context, userID string) (string, error)
}

// Poster posts a reply that nobody asked for in chat, such as the weekly
// digest. *Front implements it.
type Poster interface {
	// PostReply posts r in channel (a channel id), in the thread threadTS when
	// it is not empty, with its files and its direct messages. Ephemeral is
	// ignored: there is no asker to show it to. An error that wraps
	// ErrPartlyPosted means part of r did go out: do not post r again.
	PostReply(ctx context.Context, channel, threadTS string, r bot.Reply) error
}

// Mode says how Slack reaches the bot.
type Mode int

// The two ways in.
const (
	ModeSocket Mode = iota + 1 // websocket opened by the bot (SLACK_APP_TOKEN)
	ModeHTTP                   // Slack posts signed requests to HTTPAddr
)

// String names the mode for logs.
func (m Mode) String() string {
	switch m {
	case ModeSocket:
		return "socket"
	case ModeHTTP:
		return "http"
	default:
		return "unknown"
	}
}

// Config is everything the front end needs. Zero durations and counts take
// the defaults named beside each field.
type Config struct {
	BotToken      string // SLACK_BOT_TOKEN, xoxb-...; required
	AppToken      string // SLACK_APP_TOKEN, xapp-...; selects socket mode
	SigningSecret string // SLACK_SIGNING_SECRET; required with HTTPAddr
	// APIURL overrides the Web API base URL (SLACK_API_URL), for tests and
	// proxies; default https://slack.com/api/.
	APIURL string
	// HTTPAddr selects HTTP mode and is the address to listen on, e.g.
	// "127.0.0.1:8080" (--http ADDR). It wins over AppToken when both are set.
	HTTPAddr string

	Logger  *slog.Logger // nil discards
	Handler Handler      // required; the engine
	Dedup   Dedup        // required; store-backed
	// Inbox keeps every delivery from before its acknowledgement until it
	// has run, and is replayed at start. nil: work acknowledged but not yet
	// run is lost in a crash (tests, and the benchmark's floor).
	Inbox Inbox
	Users Users     // nil: users.info with an in-memory cache
	Clock bot.Clock // nil: the wall clock; signature windows, request times, caches

	Workers   int // concurrent commands; default 8
	QueueSize int // accepted but not yet started; default 32 per worker

	MaxAttempts  int           // tries of one Web API call when rate limited; default 4
	MaxRetryWait time.Duration // longest Retry-After honoured; default 30 s

	StartTimeout    time.Duration // auth.test at start; default 10 s
	ShutdownTimeout time.Duration // finishing accepted work after cancel; default 10 s
	PingInterval    time.Duration // socket mode: reconnect when Slack stays silent this long; default 30 s
	UserTTL         time.Duration // display-name cache; default 1 h
	MaxBodyBytes    int64         // HTTP request body limit; default 256 KiB (see defaultMaxBodyBytes)
	BodyTimeout     time.Duration // HTTP: reading one request body; default 5 s
	MaxConns        int           // HTTP: connections served at once; default 64
	// ResponseWindow is how long Slack accepts an answer through a
	// response_url (30 minutes); a delivery replayed at start that is
	// older is answered in a direct message instead. Default 30 min.
	ResponseWindow time.Duration

	// HTTPClient carries Web API calls; nil builds one with its own
	// transport (closed when Run returns) and a 30 s timeout.
	HTTPClient *http.Client
}

// Defaults.
const (
	defaultWorkers         = 8
	defaultQueuePerWorker  = 32
	defaultMaxAttempts     = 4
	defaultMaxRetryWait    = 30 * time.Second
	defaultStartTimeout    = 10 * time.Second
	defaultShutdownTimeout = 10 * time.Second
	defaultPingInterval    = 30 * time.Second
	defaultUserTTL         = time.Hour
	// defaultMaxBodyBytes bounds a request body. Measured
	// (cmd/lathmark TestLargestPayloads): a button press under our largest
	// reply on the demo squad 5.3 KB form-encoded (the payload repeats the
	// message, blocks included); a slash command of 4,000 characters
	// 4.4 KB; a mention at Slack's longest message (40,000 characters,
	// carried twice, as text and rich_text blocks) 80 KB. 256 KiB is three
	// times the largest; a body past it is refused, unread when declared.
	defaultMaxBodyBytes   = 256 << 10
	defaultBodyTimeout    = 5 * time.Second
	defaultMaxConns       = 64
	defaultResponseWindow = 30 * time.Minute
	defaultHTTPTimeout    = 30 * time.Second
)

// withDefaults checks cfg and fills in defaults. The messages name the
// environment variables and flags people set.
func (cfg Config) withDefaults() (Config, Mode, error) {
	var errs []error
	if cfg.BotToken == "" {
		errs = append(errs, errors.New("SLACK_BOT_TOKEN is not set (the bot token, xoxb-...)"))
	} else if !strings.HasPrefix(cfg.BotToken, "xoxb-") {
		errs = append(errs, errors.New("SLACK_BOT_TOKEN does not look like a bot token: it should start with xoxb-"))
	}
	if cfg.Handler == nil {
		errs = append(errs, errors.New("no Handler"))
	}
	if cfg.Dedup == nil {
		errs = append(errs, errors.New("no Dedup"))
	}
	var mode Mode
	switch {
	case cfg.HTTPAddr != "":
		mode = ModeHTTP
		if cfg.SigningSecret == "" {
			errs = append(errs, errors.New("--http needs SLACK_SIGNING_SECRET (Basic Information → App Credentials → Signing Secret)"))
		}
	case cfg.AppToken != "":
		mode = ModeSocket
		if !strings.HasPrefix(cfg.AppToken, "xapp-") {
			errs = append(errs, errors.New("SLACK_APP_TOKEN does not look like an app-level token: it should start with xapp- (Basic Information → App-Level Tokens, scope connections:write)"))
		}
	default:
		errs = append(errs, errors.New("no way in: set SLACK_APP_TOKEN (xapp-...) for socket mode, or run with --http ADDR and SLACK_SIGNING_SECRET"))
	}
	if cfg.APIURL == "" {
		cfg.APIURL = slack.APIURL
	}
	if u, err := url.Parse(cfg.APIURL); err != nil || (u.Scheme != "http" && u.Scheme != "https") || u.Host == "" {
		errs = append(errs, fmt.Errorf("SLACK_API_URL %q is not an http(s) URL", RedactURL(cfg.APIURL)))
	}
	if !strings.HasSuffix(cfg.APIURL, "/") {
		cfg.APIURL += "/"
	}
	if len(errs) > 0 {
		return cfg, 0, fmt.Errorf("slack: %w", errors.Join(errs...))
	}
	if cfg.Logger == nil {
		cfg.Logger = slog.New(slog.DiscardHandler)
	}
	if cfg.Clock == nil {
		cfg.Clock = bot.ClockFunc(time.Now)
	}
	if cfg.Workers <= 0 {
		cfg.Workers = defaultWorkers
	}
	if cfg.QueueSize <= 0 {
		cfg.QueueSize = cfg.Workers * defaultQueuePerWorker
	}
	if cfg.MaxAttempts <= 0 {
		cfg.MaxAttempts = defaultMaxAttempts
	}
	if cfg.MaxRetryWait <= 0 {
		cfg.MaxRetryWait = defaultMaxRetryWait
	}
	if cfg.StartTimeout <= 0 {
		cfg.StartTimeout = defaultStartTimeout
	}
	if cfg.ShutdownTimeout <= 0 {
		cfg.ShutdownTimeout = defaultShutdownTimeout
	}
	if cfg.PingInterval <= 0 {
		cfg.PingInterval = defaultPingInterval
	}
	if cfg.UserTTL <= 0 {
		cfg.UserTTL = defaultUserTTL
	}
	if cfg.MaxBodyBytes <= 0 {
		cfg.MaxBodyBytes = defaultMaxBodyBytes
	}
	if cfg.BodyTimeout <= 0 {
		cfg.BodyTimeout = defaultBodyTimeout
	}
	if cfg.MaxConns <= 0 {
		cfg.MaxConns = defaultMaxConns
	}
	if cfg.ResponseWindow <= 0 {
		cfg.ResponseWindow = defaultResponseWindow
	}
	return cfg, mode, nil
}
