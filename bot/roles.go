package bot

import (
	"encoding/json"
	"fmt"
	"slices"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

func roleCommands() []command {
	return []command{
		{name: "role", topic: "roles", access: headOnly,
			usage: "role head|coach|athlete|none @user|NAME", example: "role coach @sam",
			summary: "grant or withdraw a role (head coaches only)", run: runRole},
		{name: "roles", topic: "roles", access: coachOnly,
			usage: "roles", example: "roles", summary: "who holds which role", run: runRoles},
		{name: "whoami", aliases: []string{"me"}, topic: "roles", access: anyone,
			usage: "whoami", example: "whoami", summary: "your role and linked athlete", run: runWhoami},
		{name: "audit", topic: "roles", access: coachOnly,
			usage: "audit [ATHLETE] [Nd]", example: "audit Mira 30d", summary: "the change log: who changed what, when", run: runAudit},
		{name: "forget", topic: "roles", access: headOnly,
			usage: "forget ATHLETE confirm", example: "forget Mira confirm",
			summary: "export an athlete's data to a file, then delete it all", run: runForget},
		{name: "cancel", topic: "help", access: anyone,
			usage: "cancel", example: "cancel", summary: "answer No to a question; nothing changes", run: func(*call) (Reply, error) {
				return Reply{Title: "Cancelled", Lines: []string{"Nothing was changed."}, Ephemeral: true}, nil
			}},
	}
}

func parseRole(w string) (record.Role, bool) {
	switch strings.ToLower(w) {
	case "head", "headcoach", "head-coach":
		return record.RoleHeadCoach, true
	case "coach":
		return record.RoleCoach, true
	case "athlete":
		return record.RoleAthlete, true
	case "none", "remove", "off", "nobody":
		return record.RoleNone, true
	}
	return "", false
}

// userRef turns a typed user (@mention, me, or a raw id) into a user id.
func (c *call) userRef(w string) string {
	switch {
	case strings.EqualFold(w, "me"):
		return c.user.ID
	case isMention(w):
		return mentionID(w)
	}
	return w
}

func runRole(c *call) (Reply, error) {
	const ex = "role coach @sam"
	c.args = joinHeadCoach(c.args)
	if len(c.args) != 2 {
		return Reply{}, usageErr(ex, "give a role (head, coach, athlete or none) and a chat user")
	}
	role, ok := parseRole(c.args[0].Raw)
	who := c.args[1].Raw
	if !ok {
		if r2, ok2 := parseRole(c.args[1].Raw); ok2 {
			role, who, ok = r2, c.args[0].Raw, true
		}
	}
	if !ok {
		return Reply{}, usageErr(ex, "%q is not a role; roles are head, coach, athlete and none", c.args[0].Raw)
	}
	m, err := c.resolveMember(who, ex)
	if err != nil {
		return Reply{}, err
	}
	uid := m.ID
	if slices.Contains(c.e.headCoaches, uid) && role != record.RoleHeadCoach {
		return Reply{}, conflictErr(ex, "%s is a head coach by the bot's configuration (LATHMARK_HEAD_COACH); change it there", uid)
	}
	var u record.User
	err = c.update(func(tx Tx) error {
		cur, ok, err := tx.User(uid)
		if err != nil {
			return err
		}
		if !ok {
			cur = record.User{ID: uid}
		}
		if cur.Role == record.RoleHeadCoach && role != record.RoleHeadCoach && len(c.e.headCoaches) == 0 {
			if n, err := countRole(tx, record.RoleHeadCoach); err != nil {
				return err
			} else if n <= 1 {
				return conflictErr("role head @someone", "%s is the last head coach; make someone else head coach first", uid)
			}
		}
		u = userOf(cur, m)
		u.Role = role
		if err := tx.PutUser(u); err != nil {
			return err
		}
		return c.audit(tx, "role", uid, cur, u)
	})
	if err != nil {
		return Reply{}, err
	}
	if role == record.RoleNone {
		return Reply{Title: "Role withdrawn", Lines: []string{memberLabel(m) + " may now use the calculations only."}}, nil
	}
	return Reply{Title: "Role granted", Lines: []string{fmt.Sprintf("%s is now %s.", memberLabel(m), withArticle(roleName(role)))}}, nil
}

// joinHeadCoach reads the two words "head coach" (in either place of the
// line) as the one role word "head", so `role head coach @sam` grants the
// head-coach role rather than stumbling over three words.
func joinHeadCoach(args []token) []token {
	for i := 0; i+1 < len(args); i++ {
		if args[i].Lower == "head" && (args[i+1].Lower == "coach" || args[i+1].Lower == "coaches") {
			out := append(append([]token(nil), args[:i+1]...), args[i+2:]...)
			return out
		}
	}
	return args
}

func countRole(tx Tx, r record.Role) (int, error) {
	us, err := tx.Users()
	if err != nil {
		return 0, err
	}
	n := 0
	for _, u := range us {
		if u.Role == r {
			n++
		}
	}
	return n, nil
}

func runRoles(c *call) (Reply, error) {
	if err := noArgs(c); err != nil {
		return Reply{}, err
	}
	var (
		us    []record.User
		names = map[uint64]string{}
	)
	err := c.view(func(tx Tx) error {
		var err error
		if us, err = tx.Users(); err != nil {
			return err
		}
		as, err := tx.Athletes()
		for _, a := range as {
			names[a.ID] = a.Name
		}
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	t := &Table{Header: []string{"user", "role", "athlete"}}
	for _, id := range c.e.headCoaches {
		t.Rows = append(t.Rows, []string{id, "head coach (configured)", ""})
	}
	for _, u := range us {
		if slices.Contains(c.e.headCoaches, u.ID) || (u.Role == record.RoleNone && u.AthleteID == 0) {
			continue
		}
		t.Rows = append(t.Rows, []string{userLabel(u), roleName(u.Role), names[u.AthleteID]})
	}
	return Reply{Title: "Roles", Table: t, Ephemeral: true, Lines: []string{"Head coaches grant roles with `role coach @user`."}}, nil
}

func runWhoami(c *call) (Reply, error) {
	if err := noArgs(c); err != nil {
		return Reply{}, err
	}
	r := Reply{Title: "You are " + withArticle(roleName(c.user.Role)), Ephemeral: true}
	if c.user.ID != "" {
		r.Fields = append(r.Fields, Field{"Chat user", c.user.ID})
	}
	if c.user.AthleteID != 0 {
		err := c.view(func(tx Tx) error {
			a, ok, err := tx.AthleteByID(c.user.AthleteID)
			if ok {
				r.Fields = append(r.Fields, Field{"Athlete", a.Name})
			}
			return err
		})
		if err != nil {
			return Reply{}, err
		}
	}
	return r, nil
}

func runAudit(c *call) (Reply, error) {
	const ex = "audit Mira 30d"
	days, subject := 7, ""
	for _, t := range c.args {
		if n, ok := parseCount(t.Lower, "d"); ok {
			if n < 1 || n > 3650 {
				return Reply{}, usageErr(ex, "%q: give 1d to 3650d", t.Raw)
			}
			days = n
			continue
		}
		if subject != "" {
			return Reply{}, usageErr(ex, "I don't understand %q; give one athlete and a number of days", t.Raw)
		}
		subject = t.Raw
	}
	since := c.now.AddDate(0, 0, -days)
	var entries []record.AuditEntry
	err := c.view(func(tx Tx) error {
		if subject == "" {
			return tx.AuditEntries(since, func(e record.AuditEntry) error {
				entries = append(entries, e)
				return nil
			})
		}
		a, err := c.findAthlete(tx, subject)
		if err != nil {
			return err
		}
		subject = a.Name
		entries, err = auditOf(tx, a, since)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	title := fmt.Sprintf("Audit: last %d days", days)
	if subject != "" {
		title += " for " + subject
	}
	if len(entries) == 0 {
		return Reply{Title: title, Lines: []string{"No changes recorded."}, Ephemeral: true}, nil
	}
	const maxShown = 40
	r := Reply{Title: title, Ephemeral: true, Table: &Table{Header: []string{"when (UTC)", "who", "what", "subject", "change"}}}
	start := max(0, len(entries)-maxShown)
	if start > 0 {
		r.Lines = append(r.Lines, fmt.Sprintf("%d changes; the newest %d are shown.", len(entries), maxShown))
	}
	for _, e := range entries[start:] {
		r.Table.Rows = append(r.Table.Rows, []string{e.Time.UTC().Format("2006-01-02 15:04"), e.Actor, e.Action, e.Subject, clip(auditChange(e), 60)})
	}
	return r, nil
}

// parseCount reads "30d" or "6w" style counts with the given suffix.
func parseCount(w, suffix string) (int, bool) {
	if !strings.HasSuffix(w, suffix) {
		return 0, false
	}
	var n int
	s := strings.TrimSuffix(w, suffix)
	if s == "" {
		return 0, false
	}
	for _, r := range s {
		if r < '0' || r > '9' {
			return 0, false
		}
		n = n*10 + int(r-'0')
		if n > 1e6 {
			return n, true
		}
	}
	return n, true
}

// forgetExport is the file handed over before an athlete's data is deleted.
type forgetExport struct {
	Exported time.Time        `json:"exported"`
	Athlete  record.Athlete   `json:"athlete"`
	Attempts []record.Attempt `json:"attempts"`
	Users    []record.User    `json:"linked_users"`
	// Sheets: the athlete's lines on the meet sheets, before forget took
	// the name off them.
	Sheets []sheetExcerpt `json:"meet_sheets,omitempty"`
}

func runForget(c *call) (Reply, error) {
	if len(c.args) != 2 || c.args[1].Lower != "confirm" {
		name := "Mira"
		if len(c.args) > 0 {
			name = c.args[0].Raw
		}
		return Reply{}, usageErr("forget "+name+" confirm", "forget deletes everything about an athlete after exporting it; add the word confirm")
	}
	var (
		exp forgetExport
		n   forgotten
	)
	err := c.update(func(tx Tx) error {
		a, err := c.findAthlete(tx, c.args[0].Raw)
		if err != nil {
			return err
		}
		exp, n, err = c.forgetInTx(tx, a)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	data, err := json.MarshalIndent(exp, "", "  ")
	if err != nil {
		return Reply{}, fmt.Errorf("forget: encode export: %w", err)
	}
	name := exp.Athlete.Name
	return Reply{
		Title:     "Forgot " + name,
		Lines:     []string{n.sentence(), "The export below is the only copy the bot keeps; hand it to the athlete or their guardian and keep it safe."},
		Ephemeral: true,
		Files:     []File{{Name: "lathmark-forget-" + strings.ToLower(name) + ".json", MIME: "application/json", Title: "Data of " + name, Data: data}},
		Caution:   "Backups made before today still hold this athlete's data; delete or let them expire as your data policy says. The audit trail keeps who changed what and when, without the athlete's name or values.",
	}, nil
}
