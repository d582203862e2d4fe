package slackfront

import (
	"crypto/hmac"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"net/http"
	"strconv"
	"strings"
	"time"
)

// Slack's request-signing headers and window (Slack, "Verifying requests
// from Slack", docs.slack.dev/authentication/verifying-requests-from-slack).
const (
	headerSignature = "X-Slack-Signature"
	headerTimestamp = "X-Slack-Request-Timestamp"
	headerRetryNum  = "X-Slack-Retry-Num"
	headerRetryWhy  = "X-Slack-Retry-Reason"
	maxClockSkew    = 5 * time.Minute
)

// Reasons a request is refused; all answer 401.
var (
	errMissingHeaders = errors.New("missing signature or timestamp header")
	errBadTimestamp   = errors.New("timestamp is not a Unix time")
	errStaleTimestamp = errors.New("timestamp more than 5 minutes from now")
	errBadSignature   = errors.New("signature does not match")
)

// Signature computes Slack's v0 request signature:
//
//	"v0=" + hex(HMAC-SHA256(signingSecret, "v0:" + timestamp + ":" + body))
//
// timestamp is the X-Slack-Request-Timestamp header (Unix seconds) and body
// the raw request body. Tests and tools use it to sign requests.
func Signature(signingSecret, timestamp string, body []byte) string {
	m := hmac.New(sha256.New, []byte(signingSecret))
	m.Write([]byte("v0:" + timestamp + ":"))
	m.Write(body)
	return "v0=" + hex.EncodeToString(m.Sum(nil))
}

// verifySignature checks a request's signature and timestamp against now
// (our Clock: slack-go's SecretsVerifier reads the wall clock, which tests
// cannot set). The timestamp must lie within 5 minutes of now either way,
// which bounds replays; the comparison is constant-time.
func verifySignature(h http.Header, body []byte, secret string, now time.Time) error {
	got, err := checkHeaders(h, now)
	if err != nil {
		return err
	}
	ts := h.Get(headerTimestamp)
	m := hmac.New(sha256.New, []byte(secret))
	m.Write([]byte("v0:" + ts + ":"))
	m.Write(body)
	if !hmac.Equal(m.Sum(nil), got) {
		return errBadSignature
	}
	return nil
}

// checkHeaders checks what can be checked before the body is read: both
// headers present, the timestamp a Unix time within 5 minutes of now, the
// signature of the v0 form (64 hex digits). It returns the signature's
// bytes. A request that fails here is refused with its body unread.
func checkHeaders(h http.Header, now time.Time) ([]byte, error) {
	sig, ts := h.Get(headerSignature), h.Get(headerTimestamp)
	if sig == "" || ts == "" {
		return nil, errMissingHeaders
	}
	secs, err := strconv.ParseInt(ts, 10, 64)
	if err != nil {
		return nil, errBadTimestamp
	}
	if d := now.Sub(time.Unix(secs, 0)); d > maxClockSkew || d < -maxClockSkew {
		return nil, errStaleTimestamp
	}
	hexSig, ok := strings.CutPrefix(sig, "v0=")
	if !ok {
		return nil, errBadSignature
	}
	got, err := hex.DecodeString(hexSig)
	if err != nil || len(got) != sha256.Size {
		return nil, errBadSignature
	}
	return got, nil
}
