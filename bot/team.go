package bot

import (
	"fmt"
	"strings"
	"time"

	"github.com/clearbot-team/clearbot/internal/record"
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
			summary: "the venue, for local gravity (WGS84 normal gravity)", run: runTeamLocation},
		{name: "team name", topic: "team", access: headOnly,
			usage: "team name TEXT", example: "team name Harbour Lane AC", summary: "the name shown on the digest", run: runTeamName},
		{name: "team backup", topic: "team", access: headOnly,
			usage: "team backup DIR [keep N] | team backup off", example: "team backup /srv/clearbot/backups keep 14",
			summary: "a nightly backup (02:30 team time) into DIR, keeping the last N", run: runTeamBackup},
	}
}

// teamAndZone reads the team settings and loads the time zone they name.
func teamAndZone(tx Tx) (record.Team, *time.Location, error) {
	t, err := tx.Team()
	if err != nil {
		return t, nil, err
	}
	loc, err := logLocation(t)
	return t, loc, err
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
		add("Venue", fmt.Sprintf("latitude %.2f°, altitude %.0f m (local gravity)", t.LatDeg, t.AltM))
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
	name := c.args[0].Raw
	if strings.EqualFold(name, "utc") {
		name = "UTC"
	}
	if _, err := time.LoadLocation(name); err != nil || name == "" || name == "Local" {
		return Reply{}, usageErr(ex, "%q is not a time zone I know; use an IANA name like Europe/Madrid or America/Chicago", name)
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
		{Key: "alt", Aliases: []string{"altitude", "elevation"}, Kind: kindNumber},
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
	alt, _ := o.num("alt")
	if alt < -500 || alt > 5000 {
		return Reply{}, usageErr(ex, "alt %g m is outside -500 to 5000 m", alt)
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
	const ex = "team backup /srv/clearbot/backups keep 14"
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
