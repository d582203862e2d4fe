package bot

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// Plausibility limits for profile values. Outside them the value is almost
// certainly a typo (or a unit slip) and is refused with the range.
const (
	minStatureM = 1.20
	maxStatureM = 2.30
	minMassKg   = 30
	maxMassKg   = 150
	minPBM      = 0.50
	maxPBM      = 2.60
	minBodyM    = 0.05 // body depth, midline to underside
	maxBodyM    = 0.25
	maxNameLen  = 24
)

const exampleAdd = "athlete add Mira height 1.78 mass 63 sex f pb 1.81"

// profileSpecs are the profile fields a coach may type, in any order.
var profileSpecs = []optionSpec{
	{Key: "height", Aliases: []string{"stature", "h", "ht"}, Kind: kindLength},
	{Key: "mass", Aliases: []string{"weight", "kg", "wt"}, Kind: kindMass},
	{Key: "sex", Aliases: []string{"gender"}, Kind: kindWord},
	{Key: "leg", Aliases: []string{"takeoff", "foot"}, Kind: kindWord},
	{Key: "pb", Aliases: []string{"best", "personal"}, Kind: kindLength},
	{Key: "born", Aliases: []string{"birth", "year", "by"}, Kind: kindNumber},
	{Key: "group", Aliases: []string{"squad"}, Kind: kindWord},
	{Key: "depth", Aliases: []string{"thickness"}, Kind: kindLength},
	{Key: "private", Kind: kindWord},
	{Key: "consent", Aliases: []string{"guardian"}, Kind: kindWord},
	{Key: "notes", Aliases: []string{"note"}, Kind: kindRest},
	{Key: "confirm", Kind: kindFlag},
}

func athleteCommands() []command {
	return []command{
		{name: "athlete add", aliases: []string{"add athlete", "new athlete"}, topic: "athletes", access: coachOnly,
			usage:   "athlete add NAME height H [mass KG] [sex m|f] [leg left|right] [pb BAR] [born YEAR] [group G] [private yes] [consent yes] [notes TEXT]",
			example: exampleAdd, summary: "add a profile (one-word name)", run: runAthleteAdd},
		{name: "athletes", aliases: []string{"squad", "roster"}, topic: "athletes", access: selfOrCoach,
			usage: "athletes [GROUP]", example: "athletes", summary: "list the squad", run: runAthleteList},
		{name: "athlete", aliases: []string{"profile"}, topic: "athletes", access: selfOrCoach,
			usage: "athlete NAME|me", example: "athlete Mira", summary: "show a profile", run: runAthleteShow},
		{name: "athlete set", aliases: []string{"athlete edit", "athlete change"}, topic: "athletes", access: coachOnly,
			usage:   "athlete set NAME FIELD VALUE [FIELD VALUE]...",
			example: "athlete set Mira pb 1.83 mass 62", summary: "change profile fields", run: runAthleteSet},
		{name: "athlete rename", topic: "athletes", access: coachOnly,
			usage: "athlete rename OLD NEW", example: "athlete rename Mira Mira-L", summary: "change a name", run: runAthleteRename},
		{name: "athlete remove", aliases: []string{"athlete delete"}, topic: "athletes", access: headOnly,
			usage:   "athlete remove NAME confirm",
			example: "athlete remove Mira confirm", summary: "delete a profile and all its jumps", run: runAthleteRemove},
		{name: "athlete link", topic: "athletes", access: coachOnly,
			usage: "athlete link NAME me|@user", example: "athlete link Mira @mira", summary: "tie a chat user to an athlete (for `me`)", run: runAthleteLink},
		{name: "athlete unlink", topic: "athletes", access: coachOnly,
			usage: "athlete unlink NAME", example: "athlete unlink Mira", summary: "untie the chat user from an athlete", run: runAthleteUnlink},
	}
}

// reservedNames cannot be athlete names: they mean something in commands.
var reservedNames = []string{"me", "all", "confirm", "cancel", "everyone", "team", "for", "by", "meet", "practice", "note", "since"}

// checkName validates a new athlete name: one word, a letter first, then
// letters, digits, hyphens, apostrophes or dots.
func checkName(name, example string) error {
	runes := []rune(name)
	if len(runes) == 0 {
		return usageErr(example, "a name is missing")
	}
	if len(runes) > maxNameLen {
		return usageErr(example, "the name %q is longer than %d letters", name, maxNameLen)
	}
	if !unicode.IsLetter(runes[0]) {
		return usageErr(example, "the name %q must start with a letter", name)
	}
	for _, r := range runes {
		if !unicode.IsLetter(r) && !unicode.IsDigit(r) && !strings.ContainsRune("-'.", r) {
			return usageErr(example, "the name %q may hold only letters, digits, - ' and . (one word, e.g. Mira-L)", name)
		}
	}
	if slices.Contains(reservedNames, strings.ToLower(name)) {
		return usageErr(example, "%q is a command word and cannot be a name", name)
	}
	for _, s := range profileSpecs {
		if strings.EqualFold(s.Key, name) || slices.Contains(s.Aliases, strings.ToLower(name)) {
			return usageErr(example, "%q is a profile field and cannot be a name", name)
		}
	}
	return nil
}

func runAthleteAdd(c *call) (Reply, error) {
	if len(c.args) == 0 {
		return Reply{}, usageErr(exampleAdd, "give a name and at least a height")
	}
	name := nfc(c.args[0].Raw)
	if err := checkName(name, exampleAdd); err != nil {
		return Reply{}, err
	}
	o, err := parseOptions(c.args[1:], profileSpecs, exampleAdd)
	if err != nil {
		return Reply{}, err
	}
	if len(o.rest) > 0 {
		return Reply{}, unknownWords(o.rest, exampleAdd, "profile fields are height, mass, sex, leg, pb, born, group, depth, private, consent, notes")
	}
	if err := c.mayRecordConsent(o); err != nil {
		return Reply{}, err
	}
	a := record.Athlete{Name: name, Created: c.now}
	if err := applyProfile(&a, o, c.now.Year(), exampleAdd, "athlete add "+joinRaw(c.args)); err != nil {
		return Reply{}, err
	}
	if a.StatureM == 0 {
		return Reply{}, usageErr(exampleAdd, "give the athlete's height (stature), e.g. height 1.78 or height 5-10")
	}
	var team record.Team
	err = c.update(func(tx Tx) error {
		if err := checkNewName(tx, name, 0, exampleAdd); err != nil {
			return err
		}
		if team, err = tx.Team(); err != nil {
			return err
		}
		if err := tx.PutAthlete(&a); err != nil {
			return err
		}
		return c.audit(tx, "athlete add", a.Name, nil, a)
	})
	if err != nil {
		return Reply{}, err
	}
	r := profileReply(a, team, nil, c.now.Year())
	r.Title = "Added " + a.Name
	r.Ephemeral = true // profile details never go to a channel
	if isMinor(a, c.now.Year()) {
		r.Caution = minorCaution
	}
	return r, nil
}

// minorCaution is shown when a minor's profile is created.
const minorCaution = "This athlete is under 18. Record their data only with a parent's or guardian's consent, as local law requires. Until a head coach records it (`athlete set NAME consent yes`) they appear in no channel reply; `athlete set NAME private yes` keeps them out for good."

// isMinor reports whether the athlete turns under 18 this year.
func isMinor(a record.Athlete, year int) bool { return a.BirthYear != 0 && year-a.BirthYear < 18 }

// applyProfile copies parsed fields into a profile, checking each against its
// plausibility range; typed is the whole line as typed, for the confirm a
// personal best above the world record asks for.
func applyProfile(a *record.Athlete, o options, year int, example, typed string) error {
	if v, ok := o.num("height"); ok {
		if v < minStatureM || v > maxStatureM {
			return usageErr(example, "height %s is outside %.2f–%.2f m; give metres (1.78), centimetres (178cm) or feet-inches (5-10)", fmtM(v), minStatureM, maxStatureM)
		}
		a.StatureM = v
	}
	if v, ok := o.num("mass"); ok {
		if v < minMassKg || v > maxMassKg {
			return usageErr(example, "mass %.1f kg is outside %d–%d kg; give kg (63) or pounds (139lb)", v, minMassKg, maxMassKg)
		}
		a.MassKg = v
	}
	if w, ok := o.word("sex"); ok {
		switch strings.ToLower(w) {
		case "m", "male", "man", "boy":
			a.Sex = record.SexMale
		case "f", "female", "woman", "girl", "w":
			a.Sex = record.SexFemale
		case "-", "none", "unset":
			a.Sex = record.SexUnset
		default:
			return usageErr(example, "sex %q: use m or f (it picks the body-segment table)", w)
		}
	}
	if w, ok := o.word("leg"); ok {
		switch strings.ToLower(w) {
		case "l", "left":
			a.TakeoffLeg = record.LegLeft
		case "r", "right":
			a.TakeoffLeg = record.LegRight
		default:
			return usageErr(example, "leg %q: use left or right (the take-off leg)", w)
		}
	}
	if v, ok := o.num("pb"); ok {
		if v < minPBM || v > maxPBM {
			return usageErr(example, "pb %s is outside %.2f–%.2f m", fmtM(v), minPBM, maxPBM)
		}
		if wr := worldRecordM(a.Sex); higherBar(v, wr) && !o.has("confirm") {
			return conflictErr(typed+" confirm", "pb %s is above the world record %s (from memory); check the number; nothing was saved (if it is right, add confirm).", fmtM(v), fmtM(wr))
		}
		a.PersonalBestM = v
	}
	if v, ok := o.num("born"); ok {
		y := int(v)
		if float64(y) != v || y < 1900 || y > year {
			return usageErr(example, "born %v: give a four-digit birth year up to %d, e.g. born 2009", v, year)
		}
		a.BirthYear = y
	}
	if w, ok := o.word("group"); ok {
		w = nfc(w)
		if len(w) > 32 {
			return usageErr(example, "group %q is longer than 32 letters", w)
		}
		a.Group = w
	}
	if v, ok := o.num("depth"); ok {
		if v < minBodyM || v > maxBodyM {
			return usageErr(example, "depth %s is outside %.0f–%.0f cm (midline to the body's underside at the apex)", fmtM(v), minBodyM*100, maxBodyM*100)
		}
		a.BodyDepthM = v
	}
	if w, ok := o.word("private"); ok {
		b, err := yesNo(w)
		if err != nil {
			return usageErr(example, "private %q: use yes or no", w)
		}
		a.Private = b
	}
	if w, ok := o.word("consent"); ok {
		b, err := yesNo(w)
		if err != nil {
			return usageErr(example, "consent %q: use yes or no (a parent's or guardian's consent is on file)", w)
		}
		a.Consent = b
	}
	if w, ok := o.word("notes"); ok {
		if len(w) > 500 {
			return usageErr(example, "notes are longer than 500 characters")
		}
		a.Notes = w
	}
	return nil
}

func yesNo(w string) (bool, error) {
	switch strings.ToLower(w) {
	case "yes", "y", "on", "true", "1":
		return true, nil
	case "no", "n", "off", "false", "0":
		return false, nil
	}
	return false, fmt.Errorf("not yes or no")
}

// fmtM formats metres for an error message, whatever the unit system.
func fmtM(v float64) string {
	if math.Abs(v) < 10 {
		return fmt.Sprintf("%.2f m", v)
	}
	return fmt.Sprintf("%.0f m", v)
}

// unknownWords refuses leftover words, naming the first.
func unknownWords(rest []token, example, hint string) error {
	return usageErr(example, "I don't understand %q here; %s", rest[0].Raw, hint)
}

// profileReply shows a profile in the team's units. linked lists the chat
// users tied to the athlete.
func profileReply(a record.Athlete, team record.Team, linked []record.User, year int) Reply {
	imp := imperial(team)
	r := Reply{Title: a.Name}
	add := func(label, value string) { r.Fields = append(r.Fields, Field{label, value}) }
	if a.StatureM > 0 {
		add("Height", units.Length(a.StatureM, imp))
	}
	if a.MassKg > 0 {
		add("Mass", units.Mass(a.MassKg, imp))
	}
	switch a.Sex {
	case record.SexMale:
		add("Sex", "m")
	case record.SexFemale:
		add("Sex", "f")
	}
	if a.TakeoffLeg != record.LegUnset {
		add("Take-off leg", string(a.TakeoffLeg))
	}
	if a.PersonalBestM > 0 {
		add("Personal best", units.Length(a.PersonalBestM, imp))
	}
	if a.BirthYear > 0 {
		add("Born", strconv.Itoa(a.BirthYear))
	}
	if a.Group != "" {
		add("Group", a.Group)
	}
	if a.BodyDepthM > 0 {
		add("Body depth", units.SmallAbs(a.BodyDepthM, imp))
	}
	if a.Private {
		add("Private", "yes: shown in no channel reply")
	}
	if isMinor(a, year) {
		if a.Consent {
			add("Guardian consent", "recorded")
		} else {
			add("Guardian consent", "not recorded: shown in no channel reply")
		}
	}
	for _, u := range linked {
		add("Chat user", userLabel(u))
	}
	if a.Notes != "" {
		add("Notes", a.Notes)
	}
	return r
}

// userLabel names a chat user in a reply.
func userLabel(u record.User) string {
	if u.Name != "" && u.Name != u.ID {
		return u.Name + " (" + u.ID + ")"
	}
	return u.ID
}

// linkedUsers lists the chat users tied to an athlete.
func linkedUsers(tx Tx, id uint64) ([]record.User, error) {
	us, err := tx.Users()
	if err != nil {
		return nil, err
	}
	var out []record.User
	for _, u := range us {
		if u.AthleteID == id {
			out = append(out, u)
		}
	}
	return out, nil
}

func runAthleteShow(c *call) (Reply, error) {
	if len(c.args) != 1 {
		if len(c.args) > 1 {
			if _, ok := nearest(c.args[0].Lower, []string{"add", "set", "rename", "remove", "link", "unlink"}); ok {
				return Reply{}, usageErr("athlete set Mira pb 1.83", "I don't know %q after athlete; did you mean one of add, set, rename, remove, link?", c.args[0].Raw)
			}
		}
		return Reply{}, usageErr("athlete Mira", "name one athlete, or type `athletes` for the list")
	}
	var (
		a      record.Athlete
		team   record.Team
		linked []record.User
	)
	err := c.view(func(tx Tx) error {
		var err error
		if a, err = c.athleteFor(tx, c.args[0].Raw); err != nil {
			return err
		}
		if team, err = tx.Team(); err != nil {
			return err
		}
		linked, err = linkedUsers(tx, a.ID)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	r := profileReply(a, team, linked, c.now.Year())
	r.Ephemeral = true // birth year, notes and mass never go to a channel
	return r, nil
}

func runAthleteSet(c *call) (Reply, error) {
	const ex = "athlete set Mira pb 1.83 mass 62"
	if len(c.args) < 3 {
		return Reply{}, usageErr(ex, "give a name, then a field and its new value")
	}
	o, err := parseOptions(c.args[1:], profileSpecs, ex)
	if err != nil {
		return Reply{}, err
	}
	if len(o.rest) > 0 {
		return Reply{}, unknownWords(o.rest, ex, "fields are height, mass, sex, leg, pb, born, group, depth, private, consent, notes")
	}
	if err := c.mayRecordConsent(o); err != nil {
		return Reply{}, err
	}
	var (
		after record.Athlete
		team  record.Team
	)
	err = c.update(func(tx Tx) error {
		before, err := c.findAthlete(tx, c.args[0].Raw)
		if err != nil {
			return err
		}
		after = before
		if err := applyProfile(&after, o, c.now.Year(), ex, "athlete set "+joinRaw(c.args)); err != nil {
			return err
		}
		if team, err = tx.Team(); err != nil {
			return err
		}
		if err := tx.PutAthlete(&after); err != nil {
			return err
		}
		return c.audit(tx, "athlete set", after.Name, before, after)
	})
	if err != nil {
		return Reply{}, err
	}
	r := profileReply(after, team, nil, c.now.Year())
	r.Title = "Updated " + after.Name
	r.Ephemeral = true // profile details never go to a channel
	if isMinor(after, c.now.Year()) && setsBorn(c.args) {
		r.Caution = minorCaution // the same reminder as athlete add
	}
	return r, nil
}

func runAthleteRename(c *call) (Reply, error) {
	const ex = "athlete rename Mira Mira-L"
	if len(c.args) != 2 {
		return Reply{}, usageErr(ex, "give the old name and the new one")
	}
	newName := nfc(c.args[1].Raw)
	if err := checkName(newName, ex); err != nil {
		return Reply{}, err
	}
	var oldName string
	err := c.update(func(tx Tx) error {
		a, err := c.findAthlete(tx, c.args[0].Raw)
		if err != nil {
			return err
		}
		oldName = a.Name
		if err := checkNewName(tx, newName, a.ID, ex); err != nil {
			return err
		}
		before := a
		a.Name = newName
		if err := tx.PutAthlete(&a); err != nil {
			return err
		}
		return c.audit(tx, "athlete rename", newName, before, a)
	})
	if err != nil {
		return Reply{}, err
	}
	return Reply{Title: "Renamed " + oldName + " to " + newName, Lines: []string{"Jumps and links stay with the athlete."}}, nil
}

func runAthleteRemove(c *call) (Reply, error) {
	if len(c.args) == 0 || len(c.args) > 2 {
		return Reply{}, usageErr("athlete remove Mira confirm", "name one athlete, then the word confirm")
	}
	name := c.args[0].Raw
	confirmed := len(c.args) == 2 && c.args[1].Lower == "confirm"
	if len(c.args) == 2 && !confirmed {
		return Reply{}, usageErr("athlete remove "+name+" confirm", "the second word must be confirm, not %q", c.args[1].Raw)
	}
	if !confirmed {
		var a record.Athlete
		err := c.view(func(tx Tx) error {
			var err error
			a, err = c.findAthlete(tx, name)
			return err
		})
		if err != nil {
			return Reply{}, err
		}
		return Reply{
			Title:     "Remove " + a.Name + "?",
			Lines:     []string{"This deletes the profile, every logged jump and the chat links. It cannot be undone (backups aside). The audit trail keeps a record that it happened."},
			Example:   "athlete remove " + a.Name + " confirm",
			Ephemeral: true,
			Actions: []Action{
				{Label: "Remove " + a.Name, Command: "athlete remove " + a.Name + " confirm", Style: "danger"},
				{Label: "Cancel", Command: "cancel"},
			},
		}, nil
	}
	var (
		gone    record.Athlete
		removed int
		sheets  []sheetExcerpt
	)
	err := c.update(func(tx Tx) error {
		var err error
		if gone, err = c.findAthlete(tx, name); err != nil {
			return err
		}
		if removed, err = tx.DeleteAthlete(gone.ID); err != nil {
			return err
		}
		// The open sheet loses the name too; filed sheets are the meet's
		// record and keep it (forget takes it off them).
		if sheets, err = scrubSheets(tx, gone.ID, false); err != nil {
			return err
		}
		return c.audit(tx, "athlete remove", gone.Name, gone, nil)
	})
	if err != nil {
		return Reply{}, err
	}
	lines := []string{fmt.Sprintf("%d records deleted (profile, jumps, links).", removed)}
	if len(sheets) > 0 {
		lines = append(lines, fmt.Sprintf("On the open meet sheet as %q now; the other places are unchanged.", meetsheet.RemovedLabel))
	}
	return Reply{Title: "Removed " + gone.Name, Lines: lines}, nil
}

func runAthleteLink(c *call) (Reply, error) {
	const ex = "athlete link Mira @mira"
	if len(c.args) != 2 {
		return Reply{}, usageErr(ex, "give an athlete and a chat user (me, or a mention)")
	}
	name, who := c.args[0].Raw, c.args[1].Raw
	if isUserWord(name) && !isUserWord(who) {
		// "athlete link @mira Mira" or "athlete link me Kai": the same link.
		name, who = who, name
	}
	m, err := c.resolveMember(who, ex) // the same person as `role athlete NAME`
	if err != nil {
		return Reply{}, err
	}
	uid := m.ID
	var (
		a        record.Athlete
		replaced string // the athlete this chat user was linked to before
	)
	err = c.update(func(tx Tx) error {
		var err error
		if a, err = c.findAthlete(tx, name); err != nil {
			return err
		}
		u, ok, err := tx.User(uid)
		if err != nil {
			return err
		}
		if !ok {
			u = record.User{ID: uid}
			if uid == c.user.ID {
				u.Name = c.user.Name
			}
		}
		before := u
		if u.AthleteID != 0 && u.AthleteID != a.ID {
			if old, found, err := tx.AthleteByID(u.AthleteID); err != nil {
				return err
			} else if found {
				replaced = old.Name
			}
		}
		u.AthleteID = a.ID
		if u.Role == record.RoleNone {
			u.Role = record.RoleAthlete
		}
		if err := tx.PutUser(u); err != nil {
			return err
		}
		return c.audit(tx, "athlete link", a.Name, before, u)
	})
	if err != nil {
		return Reply{}, err
	}
	r := Reply{Title: "Linked " + a.Name, Lines: []string{fmt.Sprintf("Chat user %s is now %s: `me` means %s for them, and they may log their own jumps.", uid, a.Name, a.Name)}}
	if replaced != "" {
		r.Lines = append(r.Lines, fmt.Sprintf("%s was linked to %s until now; a chat user is one athlete, so that link is gone (`athlete link %s %s` puts it back).", uid, replaced, replaced, who))
	}
	return r, nil
}

// isUserWord reports whether a word names a chat user (me or a mention)
// rather than an athlete.
func isUserWord(w string) bool {
	return strings.EqualFold(w, "me") || isMention(w) || strings.HasPrefix(w, "@")
}

func runAthleteUnlink(c *call) (Reply, error) {
	if len(c.args) != 1 {
		return Reply{}, usageErr("athlete unlink Mira", "name one athlete")
	}
	var (
		a   record.Athlete
		ids []string
	)
	err := c.update(func(tx Tx) error {
		var err error
		if a, err = c.findAthlete(tx, c.args[0].Raw); err != nil {
			return err
		}
		linked, err := linkedUsers(tx, a.ID)
		if err != nil {
			return err
		}
		if len(linked) == 0 {
			return notFoundErr("athlete link "+a.Name+" @user", "%s is not linked to any chat user", a.Name)
		}
		for _, u := range linked {
			before := u
			u.AthleteID = 0
			if err := tx.PutUser(u); err != nil {
				return err
			}
			if err := c.audit(tx, "athlete unlink", a.Name, before, u); err != nil {
				return err
			}
			ids = append(ids, u.ID)
		}
		return nil
	})
	if err != nil {
		return Reply{}, err
	}
	return Reply{Title: "Unlinked " + a.Name, Lines: []string{"No longer linked: " + strings.Join(ids, ", ")}}, nil
}
