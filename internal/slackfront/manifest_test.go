package slackfront

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// listUnder returns the "- item" lines right below the line "key:" in a
// YAML file (enough for the manifest's flat lists; no YAML library here).
func listUnder(lines []string, key string) []string {
	for i, l := range lines {
		if strings.TrimSpace(l) != key+":" {
			continue
		}
		var out []string
		for _, m := range lines[i+1:] {
			t := strings.TrimSpace(m)
			if t == "" || strings.HasPrefix(t, "#") {
				continue
			}
			if !strings.HasPrefix(t, "- ") {
				break
			}
			out = append(out, strings.TrimPrefix(t, "- "))
		}
		return out
	}
	return nil
}

// TestManifestMatchesFrontEnd: the app manifest grants every scope and
// event the front end relies on (Slack's scope and event names, from the
// Web API method pages; from memory).
func TestManifestMatchesFrontEnd(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("..", "..", "slack-manifest.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(raw), "\n")
	needScopes := map[string]string{
		"chat:write":        "chat.postMessage, chat.postEphemeral",
		"commands":          "the slash command",
		"app_mentions:read": "app_mention events",
		"im:history":        "message.im events",
		"im:read":           "direct message channels",
		"im:write":          "conversations.open for Reply.Direct",
		"users:read":        "users.info for display names",
		"files:write":       "files.getUploadURLExternal / completeUploadExternal",
		"files:read":        "downloading a CSV shared for import csv (url_private_download, files.info)",
		"channels:read":     "channel details for replies and uploads",
	}
	scopes := listUnder(lines, "bot")
	for s, why := range needScopes {
		if !slices.Contains(scopes, s) {
			t.Errorf("manifest lacks scope %s (needed for %s)", s, why)
		}
	}
	events := listUnder(lines, "bot_events")
	for _, e := range []string{"app_mention", "message.im"} {
		if !slices.Contains(events, e) {
			t.Errorf("manifest lacks bot event %s", e)
		}
	}
	for _, want := range []string{"socket_mode_enabled: true", "is_enabled: true", "- command: /lath", "should_escape: true", "messages_tab_enabled: true"} {
		if !strings.Contains(string(raw), want) {
			t.Errorf("manifest lacks %q", want)
		}
	}
}
