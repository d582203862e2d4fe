package slackfront

import (
	"crypto/hmac"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"net/http"
	"strconv"
	"testing"
	"time"

	"github.com/slack-go/slack"
)

// Slack's worked example, from "Verifying requests from Slack"
// (api.slack.com/authentication/verifying-requests-from-slack, Slack
// Technologies): signing secret, timestamp, body and the signature Slack
// computed for them.
const (
	docSecret    = "8f742231b10e8888abcd99yyyzzz85a5"
	docTimestamp = "1531420618"
	docBody      = "token=xyzz0WbapA4vBCDEFasx0q6G&team_id=T1DC2JH3J&team_domain=testteamnow&channel_id=G8PSS9T3V&channel_name=foobar&user_id=U2CERLKJA&user_name=roadrunner&command=%2Fwebhook-collect&text=&response_url=https%3A%2F%2Fhooks.slack.com%2Fcommands%2FT1DC2JH3J%2F397700885554%2F96rGlfmibIGlgcZRskXaIFfN&trigger_id=398738663015.47445629121.803a0bc887a14d10d2c447fce8b6703c"
	docSignature = "v0=a2114d57b48eac39b9ad189dd8316235a7b4a8d21a10bd27519666489c69b503"
)

// TestSlackDocExampleHMAC checks the published example at the HMAC level,
// with the standard library alone (independent of our code).
func TestSlackDocExampleHMAC(t *testing.T) {
	m := hmac.New(sha256.New, []byte(docSecret))
	m.Write([]byte("v0:" + docTimestamp + ":" + docBody))
	if got := "v0=" + hex.EncodeToString(m.Sum(nil)); got != docSignature {
		t.Fatalf("HMAC of Slack's example = %s, Slack's documentation says %s", got, docSignature)
	}
	// Our Signature helper must give the same value (source as above).
	if got := Signature(docSecret, docTimestamp, []byte(docBody)); got != docSignature {
		t.Fatalf("Signature = %s, want %s (Slack's worked example)", got, docSignature)
	}
}

// TestVerifyDocExampleWithClock runs our verifier on Slack's example with
// the clock set near the example's timestamp (slack-go's verifier cannot
// do this: it reads the wall clock).
func TestVerifyDocExampleWithClock(t *testing.T) {
	secs, _ := strconv.ParseInt(docTimestamp, 10, 64)
	stamp := time.Unix(secs, 0)
	h := http.Header{}
	h.Set(headerTimestamp, docTimestamp)
	h.Set(headerSignature, docSignature)
	tests := []struct {
		name string
		now  time.Time
		body string
		want error
	}{
		{"at the stamp", stamp, docBody, nil},
		{"4m59s later", stamp.Add(4*time.Minute + 59*time.Second), docBody, nil},
		{"exactly 5 minutes later", stamp.Add(5 * time.Minute), docBody, nil},
		{"5m01s later", stamp.Add(5*time.Minute + time.Second), docBody, errStaleTimestamp},
		{"5m01s earlier", stamp.Add(-5*time.Minute - time.Second), docBody, errStaleTimestamp},
		{"body changed", stamp, docBody + "x", errBadSignature},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := verifySignature(h, []byte(tt.body), docSecret, tt.now)
			if !errors.Is(err, tt.want) {
				t.Fatalf("verifySignature = %v, want %v", err, tt.want)
			}
		})
	}
}

// TestVerifyAgreesWithSlackGo checks our verifier against slack-go's
// SecretsVerifier (a reference implementation) with fresh timestamps, since
// slack-go reads the wall clock.
func TestVerifyAgreesWithSlackGo(t *testing.T) {
	body := []byte(`{"type":"event_callback","event_id":"Ev1"}`)
	now := time.Now()
	fresh := strconv.FormatInt(now.Unix(), 10)
	stale := strconv.FormatInt(now.Add(-6*time.Minute).Unix(), 10)
	tests := []struct {
		name       string
		stamp, sig string
		body       []byte
		ok         bool
	}{
		{"valid", fresh, Signature(testSecret, fresh, body), body, true},
		{"other secret", fresh, Signature("another-secret", fresh, body), body, false},
		{"tampered body", fresh, Signature(testSecret, fresh, body), append([]byte("x"), body...), false},
		{"stale", stale, Signature(testSecret, stale, body), body, false},
		{"no v0 prefix", fresh, Signature(testSecret, fresh, body)[3:], body, false},
		{"short signature", fresh, "v0=abcd", body, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			h := http.Header{}
			h.Set(headerTimestamp, tt.stamp)
			h.Set(headerSignature, tt.sig)
			ours := verifySignature(h, tt.body, testSecret, now) == nil
			theirs := false
			if sv, err := slack.NewSecretsVerifier(h, testSecret); err == nil {
				_, _ = sv.Write(tt.body)
				theirs = sv.Ensure() == nil
			}
			if ours != tt.ok || theirs != tt.ok {
				t.Fatalf("ours=%v slack-go=%v, want %v", ours, theirs, tt.ok)
			}
		})
	}
}
