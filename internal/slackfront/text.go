package slackfront

import (
	"crypto/sha256"
	"encoding/hex"
	"strconv"
	"strings"
	"time"
)

// cleanText turns a Slack message text into a command line: mentions of
// the bot itself (<@UBOT> or <@UBOT|name>) are removed wherever they stand,
// with the colon or comma people put after a leading one ("@lathmark: help"),
// Slack's three entities (&amp; &lt; &gt;) are decoded, and each line is
// trimmed. Other mentions stay: the engine resolves <@U123> to a person.
func cleanText(text, botUserID string) string {
	if botUserID != "" {
		var b strings.Builder
		for {
			i := strings.Index(text, "<@")
			if i < 0 {
				break
			}
			end := strings.IndexByte(text[i:], '>')
			if end < 0 {
				break
			}
			token := text[i : i+end+1]
			id, _, _ := strings.Cut(strings.TrimSuffix(strings.TrimPrefix(token, "<@"), ">"), "|")
			leading := strings.TrimSpace(b.String()+text[:i]) == ""
			b.WriteString(text[:i])
			text = text[i+end+1:]
			if id != botUserID {
				b.WriteString(token)
				continue
			}
			b.WriteByte(' ')
			if leading {
				text = trimAddressMark(text)
			}
		}
		b.WriteString(text)
		text = b.String()
	}
	text = strings.NewReplacer("&lt;", "<", "&gt;", ">", "&amp;", "&").Replace(text)
	// Line breaks stay (a pasted block is one command a line, see
	// bot/block.go); blank lines go, and runs of spaces in a line become one.
	var lines []string
	for _, l := range strings.Split(text, "\n") {
		if l = strings.Join(strings.Fields(l), " "); l != "" {
			lines = append(lines, l)
		}
	}
	return strings.Join(lines, "\n")
}

// trimAddressMark removes the colon or comma that follows a leading
// mention of the bot: right after it ("<@UBOT>:help"), or after spaces when
// a space or the end follows ("<@UBOT> , help"), which keeps an emoji code
// such as ":x:" whole.
func trimAddressMark(text string) string {
	if strings.HasPrefix(text, ":") || strings.HasPrefix(text, ",") {
		return text[1:]
	}
	rest := strings.TrimLeft(text, " \t")
	if (strings.HasPrefix(rest, ":") || strings.HasPrefix(rest, ",")) &&
		(len(rest) == 1 || rest[1] == ' ' || rest[1] == '\t' || rest[1] == '\n') {
		return rest[1:]
	}
	return text
}

// tsTime converts a Slack timestamp ("1531420618.000200": Unix seconds and
// microseconds) to a time; ok is false when it is not one.
func tsTime(ts string) (time.Time, bool) {
	secs, frac, _ := strings.Cut(ts, ".")
	s, err := strconv.ParseInt(secs, 10, 64)
	if err != nil || s <= 0 {
		return time.Time{}, false
	}
	var ns int64
	if frac != "" {
		if len(frac) > 9 {
			frac = frac[:9]
		}
		f, err := strconv.ParseInt(frac, 10, 64)
		if err != nil || f < 0 {
			return time.Time{}, false
		}
		for range 9 - len(frac) {
			f *= 10
		}
		ns = f
	}
	return time.Unix(s, ns).UTC(), true
}

// hashID is a short stable id for deliveries that carry none of their own.
func hashID(parts ...string) string {
	h := sha256.New()
	for _, p := range parts {
		h.Write([]byte(p))
		h.Write([]byte{0})
	}
	return hex.EncodeToString(h.Sum(nil))[:32]
}

// isDirectChannel reports whether a channel id is a direct message (Slack
// gives direct-message conversations ids starting with D; common practice).
func isDirectChannel(id string) bool { return strings.HasPrefix(id, "D") }
