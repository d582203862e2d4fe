package slackfront

import (
	"context"
	"fmt"
	"log/slog"
	"net/url"
	"slices"
	"strings"
)

// redacted stands in for a credential in logs and messages.
const redacted = "REDACTED"

// minSecretLen is the shortest credential replaced wherever it appears in
// a text; a shorter one (a one-letter user name, say) is masked only in the
// URL itself, or every such letter of a log line would go.
const minSecretLen = 3

// credentialParam reports whether a query parameter's name says it carries
// a credential: token, access_token, key, api_key, secret, password, auth,
// sig, signature (case-insensitive, by substring).
func credentialParam(name string) bool {
	n := strings.ToLower(name)
	for _, w := range []string{"token", "key", "secret", "pass", "auth", "sig"} {
		if strings.Contains(n, w) {
			return true
		}
	}
	return false
}

// URLSecrets lists the credentials inside a URL such as SLACK_API_URL: the
// user name and password of user:pass@host, and the values of query
// parameters named like credentials (credentialParam), each as written and
// as decoded. A URL that does not parse gives nothing (it is refused, and
// quoted redacted, by RedactURL).
func URLSecrets(raw string) []string {
	u, err := url.Parse(raw)
	if err != nil {
		return nil
	}
	var out []string
	add := func(s string) {
		for _, v := range []string{s, url.QueryEscape(s), url.PathEscape(s)} {
			if v != "" && !slices.Contains(out, v) {
				out = append(out, v)
			}
		}
	}
	if u.User != nil {
		add(u.User.Username())
		if p, ok := u.User.Password(); ok {
			add(p)
		}
	}
	for name, vs := range u.Query() {
		if credentialParam(name) {
			for _, v := range vs {
				add(v)
			}
		}
	}
	return out
}

// RedactURL returns a URL fit for a log line or a message: user:pass@
// becomes REDACTED@ and the value of each credential query parameter
// REDACTED; the scheme, host and path stay, so the reader still sees where
// the bot was pointed. Text that is not a URL is replaced whole when it
// holds an @ or a query (it may be a mistyped credential), else kept.
func RedactURL(raw string) string {
	u, err := url.Parse(raw)
	if err != nil {
		if strings.ContainsAny(raw, "@?") {
			return redacted
		}
		return raw
	}
	if u.User != nil {
		u.User = url.User(redacted)
	}
	if u.RawQuery != "" {
		q := u.Query()
		for name := range q {
			if credentialParam(name) {
				q[name] = []string{redacted}
			}
		}
		u.RawQuery = q.Encode()
	}
	return u.String()
}

// Redactor replaces known credentials in any text.
type Redactor struct {
	r *strings.Replacer
}

// NewRedactor returns a Redactor for the given credentials; those shorter
// than minSecretLen are ignored (see RedactURL for the URL itself).
func NewRedactor(secrets ...string) Redactor {
	var pairs []string
	// Longest first, so a secret that holds another is replaced whole.
	ss := slices.Clone(secrets)
	slices.SortFunc(ss, func(a, b string) int { return len(b) - len(a) })
	for _, s := range ss {
		if len(s) >= minSecretLen {
			pairs = append(pairs, s, redacted)
		}
	}
	if len(pairs) == 0 {
		return Redactor{}
	}
	return Redactor{r: strings.NewReplacer(pairs...)}
}

// String returns s with every credential replaced by REDACTED.
func (r Redactor) String(s string) string {
	if r.r == nil {
		return s
	}
	return r.r.Replace(s)
}

// Empty reports whether there is nothing to redact.
func (r Redactor) Empty() bool { return r.r == nil }

// redactError shows an error with its credentials replaced; errors.Is and
// errors.As still see the error it wraps.
type redactError struct {
	err error
	r   Redactor
}

func (e redactError) Error() string { return e.r.String(e.err.Error()) }
func (e redactError) Unwrap() error { return e.err }

// redactErr wraps err so that its text carries no credential (nil stays nil).
func (r Redactor) redactErr(err error) error {
	if err == nil || r.Empty() {
		return err
	}
	return redactError{err: err, r: r}
}

// RedactHandler is a slog.Handler that replaces credentials in the message
// and in every attribute (strings, errors, anything printed with %v) before
// the next handler writes the line.
type RedactHandler struct {
	next slog.Handler
	r    Redactor
}

// NewRedactHandler wraps next; with nothing to redact it returns next.
func NewRedactHandler(next slog.Handler, r Redactor) slog.Handler {
	if r.Empty() {
		return next
	}
	return RedactHandler{next: next, r: r}
}

// Enabled reports what the next handler reports.
func (h RedactHandler) Enabled(ctx context.Context, l slog.Level) bool {
	return h.next.Enabled(ctx, l)
}

// Handle redacts the record and passes it on.
func (h RedactHandler) Handle(ctx context.Context, rec slog.Record) error {
	out := slog.NewRecord(rec.Time, rec.Level, h.r.String(rec.Message), rec.PC)
	rec.Attrs(func(a slog.Attr) bool {
		out.AddAttrs(h.attr(a))
		return true
	})
	return h.next.Handle(ctx, out)
}

// WithAttrs redacts the attributes once, as they are added.
func (h RedactHandler) WithAttrs(as []slog.Attr) slog.Handler {
	out := make([]slog.Attr, len(as))
	for i, a := range as {
		out[i] = h.attr(a)
	}
	return RedactHandler{next: h.next.WithAttrs(out), r: h.r}
}

// WithGroup passes the group on.
func (h RedactHandler) WithGroup(name string) slog.Handler {
	return RedactHandler{next: h.next.WithGroup(name), r: h.r}
}

func (h RedactHandler) attr(a slog.Attr) slog.Attr {
	v := a.Value.Resolve()
	switch v.Kind() {
	case slog.KindString:
		return slog.String(a.Key, h.r.String(v.String()))
	case slog.KindGroup:
		g := v.Group()
		out := make([]any, len(g))
		for i, x := range g {
			out[i] = h.attr(x)
		}
		return slog.Group(a.Key, out...)
	case slog.KindAny:
		return slog.String(a.Key, h.r.String(fmt.Sprint(v.Any())))
	}
	return slog.Attr{Key: a.Key, Value: v}
}
