package bot

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

func teamCommands() []command {
	return []command{
		{name: "team", aliases: []string{"settings"}, topic: "team", access: anyone,
			usage: "team", example: "team", summary: "show the team settings", run: runTeamShow},
		{name: "team units", topic: "team", access: headOnly,
			usage: "team units metric|imperial", example: "team units imperial", summary: "metres or feet-inches in replies", run: runTeamUnits},
		{name: "team tz", aliases: []string{"team timezone", "team zone"}, topic: "team", access: headOnly,
			usage: "team tz ZONE", example: "team tz Europe/Madrid", summary: "the team's time zone (IANA name); days and the digest follow it", run: runTeamTZ},
		{name: "team location", aliases: []string{"team venue"}, topic: "team", access: headOnly,
			usage: "team location lat DEG [alt M] | team location off", example: "team location lat 40.4 alt 650",
			summary: "the venue, for local gravity (WGS84 normal gravity); alt in metres, or in feet as 2100ft", run: runTeamLocation},
		{name: "team name", topic: "team", access: headOnly,
			usage: "team name TEXT", example: "team name Harbour Lane AC", summary: "the name shown on the digest", run: runTeamName},
		{name: "team backup", topic: "team", access: headOnly,
			usage: "team backup DIR [keep N] | team backup off", example: "team backup /srv/lathmark/backups keep 14",
			summary: "a nightly backup (02:30 team time) into DIR, keeping the last N", run: runTeamBackup},
	}
}

// teamAndZone reads the team settings and loads the time zone they name.
func teamAndZone(tx Tx) (record.Team, *time.Location, error) {
	t, err := tx.Team()
	if err != nil {
		return t, nil, err
	}
	return t, t.Location(), nil
}

// updateTeam loads the settings, lets change edit them, stores them and
// audits the change, all in one transaction.
func (c *call) updateTeam(action string, change func(t *record.Team) error) (record.Team, error) {
	var after record.Team
	err := c.update(func(tx Tx) error {
		before, err := tx.Team()
		if err != nil {
			return err
		}
		after = before
		if err := change(&after); err != nil {
			return err
		}
		if err := tx.PutTeam(after); err != nil {
			return err
		}
		return c.audit(tx, action, "team", before, after)
	})
	if err == nil && c.e.onTeam != nil {
		c.e.onTeam(withDigestDefaults(after))
	}
	return after, err
}

func runTeamShow(c *call) (Reply, error) {
	if len(c.args) > 0 {
		subs := []string{"units", "tz", "location", "name", "backup"}
		if s, ok := nearest(c.args[0].Lower, subs); ok {
			return Reply{}, usageErr("team "+s+" "+joinRaw(c.args[1:]), "I don't know %q after team. Did you mean team %s?", c.args[0].Raw, s)
		}
		return Reply{}, usageErr("team units imperial", "I don't know %q after team; team settings are units, tz, location, name and backup", c.args[0].Raw)
	}
	var t record.Team
	if err := c.view(func(tx Tx) error { var err error; t, err = tx.Team(); return err }); err != nil {
		return Reply{}, err
	}
	return teamReply("Team settings", t), nil
}

func teamReply(title string, t record.Team) Reply {
	r := Reply{Title: title}
	add := func(l, v string) { r.Fields = append(r.Fields, Field{l, v}) }
	if t.Name != "" {
		add("Name", t.Name)
	}
	units := "metric"
	if t.Units == record.Imperial {
		units = "imperial (feet-inches)"
	}
	add("Units", units)
	tz := t.TZ
	if tz == "" {
		tz = "UTC (not set)"
	}
	add("Time zone", tz)
	if t.HasLocation {
		add("Venue", fmt.Sprintf("latitude %.2f°, altitude %s (local gravity)", t.LatDeg, altitudeText(t.AltM, imperial(t))))
	} else {
		add("Venue", "not set (standard gravity 9.80665 m/s²)")
	}
	if t.BackupDir != "" {
		add("Backups", fmt.Sprintf("nightly to %s, keeping %d", t.BackupDir, t.BackupsKept()))
	} else {
		add("Backups", "off")
	}
	return r
}

func runTeamUnits(c *call) (Reply, error) {
	const ex = "team units imperial"
	if len(c.args) != 1 {
		return Reply{}, usageErr(ex, "say metric or imperial")
	}
	var u record.Units
	switch c.args[0].Lower {
	case "metric", "m", "si", "metres", "meters", "cm":
		u = record.Metric
	case "imperial", "ft", "feet", "inches", "us":
		u = record.Imperial
	default:
		return Reply{}, usageErr(ex, "units %q: say metric or imperial", c.args[0].Raw)
	}
	t, err := c.updateTeam("team units", func(t *record.Team) error { t.Units = u; return nil })
	if err != nil {
		return Reply{}, err
	}
	return teamReply("Units set", t), nil
}

func runTeamTZ(c *call) (Reply, error) {
	const ex = "team tz Europe/Madrid"
	if len(c.args) != 1 {
		return Reply{}, usageErr(ex, "give one IANA time-zone name")
	}
	typed := c.args[0].Raw
	name, ok := resolveZone(typed)
	if !ok {
		if city, found := zoneForCity(typed); found {
			return Reply{}, usageErr("team tz "+city, "%q is not a time-zone name; did you mean %s?", typed, city)
		}
		return Reply{}, usageErr(ex, "%q is not a time zone I know; use an IANA name like Europe/Madrid or America/Chicago", typed)
	}
	t, err := c.updateTeam("team tz", func(t *record.Team) error { t.TZ = name; return nil })
	if err != nil {
		return Reply{}, err
	}
	return teamReply("Time zone set", t), nil
}

func runTeamLocation(c *call) (Reply, error) {
	const ex = "team location lat 40.4 alt 650"
	if len(c.args) == 1 && c.args[0].Lower == "off" {
		t, err := c.updateTeam("team location", func(t *record.Team) error {
			t.HasLocation, t.LatDeg, t.AltM = false, 0, 0
			return nil
		})
		if err != nil {
			return Reply{}, err
		}
		return teamReply("Venue cleared", t), nil
	}
	o, err := parseOptions(c.args, []optionSpec{
		{Key: "lat", Aliases: []string{"latitude"}, Kind: kindNumber},
		{Key: "alt", Aliases: []string{"altitude", "elevation"}, Kind: kindWord},
	}, ex)
	if err != nil {
		return Reply{}, err
	}
	if len(o.rest) > 0 {
		return Reply{}, unknownWords(o.rest, ex, "give lat DEG and optionally alt M")
	}
	lat, ok := o.num("lat")
	if !ok {
		return Reply{}, usageErr(ex, "give the latitude in degrees (north positive)")
	}
	if lat < -90 || lat > 90 {
		return Reply{}, usageErr(ex, "lat %g is outside -90 to 90 degrees", lat)
	}
	var alt float64
	if w, ok := o.word("alt"); ok {
		if alt, err = parseAltitude(w); err != nil {
			return Reply{}, usageErr(ex, "alt %s: %v", w, err)
		}
	}
	if alt < -500 || alt > 5000 {
		w, _ := o.word("alt")
		return Reply{}, usageErr(ex, "alt %s is outside -500 to 5000 m (-1640 to 16404 ft)", w)
	}
	t, err := c.updateTeam("team location", func(t *record.Team) error {
		t.HasLocation, t.LatDeg, t.AltM = true, lat, alt
		return nil
	})
	if err != nil {
		return Reply{}, err
	}
	return teamReply("Venue set", t), nil
}

// resolveZone finds the IANA zone a coach meant: as typed, then with the
// usual capitals ("europe/madrid" is Europe/Madrid, "america/new_york" is
// America/New_York), then in capitals ("cet", "utc"). "Local" is refused:
// it would follow the bot's computer, not the team.
func resolveZone(typed string) (string, bool) {
	if typed == "" || strings.EqualFold(typed, "local") {
		return "", false
	}
	for _, name := range []string{typed, zoneCapitals(typed), strings.ToUpper(typed)} {
		if _, err := time.LoadLocation(name); err == nil {
			return name, true
		}
	}
	return "", false
}

// zoneCapitals writes each word of a zone name with a capital first letter
// and the rest small: "america/port_of_spain" becomes America/Port_Of_Spain
// (IANA keeps "of" small, so that one is still not found; most are).
func zoneCapitals(s string) string {
	b := []byte(strings.ToLower(s))
	up := true
	for i, ch := range b {
		if up && ch >= 'a' && ch <= 'z' {
			b[i] = ch - 'a' + 'A'
		}
		up = ch == '/' || ch == '_' || ch == '-'
	}
	return string(b)
}

// zoneForCity finds a zone for a city typed alone ("Madrid"), under the
// IANA regions, so the refusal can suggest the full name. The suggestion is
// never applied silently: two regions may hold the same city name.
func zoneForCity(typed string) (string, bool) {
	if strings.Contains(typed, "/") {
		return "", false
	}
	city := zoneCapitals(typed)
	for _, region := range []string{"Europe", "America", "Africa", "Asia", "Australia", "Pacific", "Atlantic", "Indian"} {
		if _, err := time.LoadLocation(region + "/" + city); err == nil {
			return region + "/" + city, true
		}
	}
	return "", false
}

// parseAltitude reads a venue altitude: metres bare or with m ("650",
// "650m"), or feet with ft or ' ("2100ft"); metres out.
func parseAltitude(w string) (float64, error) {
	s := strings.ToLower(strings.TrimSpace(w))
	factor := 1.0
	switch {
	case strings.HasSuffix(s, "ft"):
		s, factor = strings.TrimSuffix(s, "ft"), units.MetresPerFoot
	case strings.HasSuffix(s, "'"):
		s, factor = strings.TrimSuffix(s, "'"), units.MetresPerFoot
	case strings.HasSuffix(s, "m"):
		s = strings.TrimSuffix(s, "m")
	}
	v, err := strconv.ParseFloat(strings.ReplaceAll(s, ",", "."), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not an altitude; give metres (650 or 650m) or feet (2100ft)")
	}
	return v * factor, nil
}

// altitudeText is a venue altitude: "650 m", or in imperial "2133 ft = 650 m"
// so that the metres the command takes stay visible.
func altitudeText(altM float64, imp bool) string {
	if imp {
		return fmt.Sprintf("%.0f ft = %.0f m", altM/units.MetresPerFoot, altM)
	}
	return fmt.Sprintf("%.0f m", altM)
}

func runTeamName(c *call) (Reply, error) {
	name := joinRaw(c.args)
	if name == "" || len(name) > 60 {
		return Reply{}, usageErr("team name Harbour Lane AC", "give a name of 1 to 60 characters")
	}
	t, err := c.updateTeam("team name", func(t *record.Team) error { t.Name = name; return nil })
	if err != nil {
		return Reply{}, err
	}
	return teamReply("Team name set", t), nil
}

func runTeamBackup(c *call) (Reply, error) {
	const ex = "team backup /srv/lathmark/backups keep 14"
	if len(c.args) == 1 && c.args[0].Lower == "off" {
		t, err := c.updateTeam("team backup", func(t *record.Team) error { t.BackupDir, t.BackupKeep = "", 0; return nil })
		if err != nil {
			return Reply{}, err
		}
		return teamReply("Nightly backups off", t), nil
	}
	o, err := parseOptions(c.args, []optionSpec{{Key: "keep", Kind: kindNumber}}, ex)
	if err != nil {
		return Reply{}, err
	}
	if len(o.rest) != 1 {
		return Reply{}, usageErr(ex, "give one folder (an absolute path on the bot's computer), then optionally keep N")
	}
	dir := o.rest[0].Raw
	if !strings.HasPrefix(dir, "/") {
		return Reply{}, usageErr(ex, "the folder %q must be an absolute path", dir)
	}
	keep := record.DefaultBackupKeep
	if v, ok := o.num("keep"); ok {
		if v < 1 || v > 365 || v != float64(int(v)) {
			return Reply{}, usageErr(ex, "keep %g: give a whole number from 1 to 365", v)
		}
		keep = int(v)
	}
	t, err := c.updateTeam("team backup", func(t *record.Team) error { t.BackupDir, t.BackupKeep = dir, keep; return nil })
	if err != nil {
		return Reply{}, err
	}
	return teamReply("Nightly backups on", t), nil
}
