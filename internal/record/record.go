// Package record defines the values lathmark keeps: athlete profiles,
// jump attempts, team settings, chat users with their roles, audit entries
// and digest bookkeeping. They are plain values in SI units (metres,
// kilograms, metres per second); storage, parsing and display live elsewhere.
package record

import (
	"fmt"
	"time"
)

// Sex selects the body-segment tables of the mechanics model.
type Sex string

// Sexes a profile may carry; SexUnset means the profile does not say.
const (
	SexUnset  Sex = ""
	SexMale   Sex = "m"
	SexFemale Sex = "f"
)

// Leg is a take-off leg.
type Leg string

// Take-off legs; LegUnset means the profile does not say.
const (
	LegUnset Leg = ""
	LegLeft  Leg = "left"
	LegRight Leg = "right"
)

// Athlete is one athlete's profile. Zero numeric fields mean "not given".
type Athlete struct {
	ID            uint64  `json:"id"`   // assigned by the store, never reused
	Name          string  `json:"name"` // unique, compared case-insensitively
	StatureM      float64 `json:"stature_m,omitempty"`
	MassKg        float64 `json:"mass_kg,omitempty"`
	Sex           Sex     `json:"sex,omitempty"`
	TakeoffLeg    Leg     `json:"leg,omitempty"`
	PersonalBestM float64 `json:"pb_m,omitempty"`
	BirthYear     int     `json:"birth_year,omitempty"`
	Group         string  `json:"group,omitempty"`
	Notes         string  `json:"notes,omitempty"`
	Private       bool    `json:"private,omitempty"`
	BodyDepthM    float64 `json:"body_depth_m,omitempty"` // midline to underside at the apex; 0 = model default
	// Consent records that a parent's or guardian's consent is on file for
	// an athlete under 18; set by a head coach, audited.
	Consent bool `json:"consent,omitempty"`
	// ChartStyle is the athlete's fixed colour-and-marker slot in charts
	// (1-based; 0 = not chosen yet).
	ChartStyle int       `json:"chart_style,omitempty"`
	Created    time.Time `json:"created"`
}

// Outcome is one attempt's result in the trade's notation.
type Outcome byte

// Outcomes: O cleared, X failed, - passed.
const (
	Cleared Outcome = 'o'
	Failed  Outcome = 'x'
	Passed  Outcome = '-'
)

// String returns the notation letter: "o", "x" or "-".
func (o Outcome) String() string { return string(rune(o)) }

// Valid reports whether o is one of the three outcomes.
func (o Outcome) Valid() bool { return o == Cleared || o == Failed || o == Passed }

// MarshalText writes the notation letter, so stored records read "o", "x", "-".
func (o Outcome) MarshalText() ([]byte, error) {
	if !o.Valid() {
		return nil, fmt.Errorf("record: invalid outcome %d", byte(o))
	}
	return []byte{byte(o)}, nil
}

// UnmarshalText reads a notation letter.
func (o *Outcome) UnmarshalText(b []byte) error {
	if len(b) != 1 || !Outcome(b[0]).Valid() {
		return fmt.Errorf("record: invalid outcome %q", b)
	}
	*o = Outcome(b[0])
	return nil
}

// Attempt is one jump at one bar height. Optional measurements are zero when
// not given (none of them can truly be zero); the coach's margin has its own
// flag because zero and negative margins are real.
type Attempt struct {
	AthleteID uint64    `json:"athlete"`
	Time      time.Time `json:"time"` // the message time
	Seq       uint32    `json:"seq"`  // orders attempts that share a Time; assigned by the store
	BarM      float64   `json:"bar_m"`
	Outcome   Outcome   `json:"outcome"`
	Number    int       `json:"n"` // attempt number at this height, 1..3
	Meet      bool      `json:"meet,omitempty"`

	ApproachMS   float64 `json:"approach_ms,omitempty"`
	TakeoffDistM float64 `json:"takeoff_m,omitempty"`
	PeakM        float64 `json:"peak_m,omitempty"`
	VzMS         float64 `json:"vz_ms,omitempty"`

	HasCoachMargin bool    `json:"has_coach_margin,omitempty"`
	CoachMarginM   float64 `json:"coach_margin_m,omitempty"` // coach's visual estimate; negative = knocked
	HasModelMargin bool    `json:"has_model_margin,omitempty"`
	ModelMarginM   float64 `json:"model_margin_m,omitempty"` // computed by the mechanics model

	LoggedBy  string `json:"by,omitempty"`  // chat user id of who logged it
	MessageID string `json:"msg,omitempty"` // chat message id; one message logs once
	LineID    string `json:"line,omitempty"`
	LineNo    uint64 `json:"line_no,omitempty"` // the line's Number (#12), 0 if none
	Note      string `json:"note,omitempty"`

	// Knock is the body part the coach saw touch the bar on a failure
	// ("head", "shoulders", "back", "hips", "thighs", "calves", "heels",
	// "hand"); "" when not said.
	Knock string `json:"knock,omitempty"`
	// Short marks an attempt from a short approach (take-off load counts).
	Short bool `json:"short,omitempty"`
	// RuleBreach, when not empty, says which competition rule the meet
	// line broke (stored after `confirm`); such an attempt never counts
	// for a best.
	RuleBreach string `json:"breach,omitempty"`

	// The crossing model's forecast for this attempt, stored beside the
	// coach's observation (Knock) when the line carried the measurements
	// the model needs (take-off distance and vz or a measured peak):
	// PredictedPart is the part it put lowest over the bar, and
	// PredictedClearanceM that part's clearance (negative: a touch).
	HasPrediction       bool    `json:"has_pred,omitempty"`
	PredictedPart       string  `json:"pred_part,omitempty"`
	PredictedClearanceM float64 `json:"pred_m,omitempty"`
	// BarDecimals is how many decimals of a metre the bar was typed to
	// (units.MetreDecimals: 2 for 1.80, 3 for 1.785, 5 for 5-4¼); 0 when
	// not known (attempts stored before it was kept).
	BarDecimals int `json:"bar_dp,omitempty"`
}

// Key identifies an attempt in the store: athlete, time, sequence.
type Key struct {
	AthleteID uint64    `json:"athlete"`
	Time      time.Time `json:"time"`
	Seq       uint32    `json:"seq"`
}

// Key returns the attempt's store key.
func (a Attempt) Key() Key { return Key{a.AthleteID, a.Time, a.Seq} }

// Line is one logged command line: what undo removes as a whole.
type Line struct {
	ID        string    `json:"id"`
	LoggedBy  string    `json:"by"`
	Time      time.Time `json:"time"`
	AthleteID uint64    `json:"athlete"`
	Attempts  []Key     `json:"attempts"`
	Text      string    `json:"text"` // the command as typed, for the undo reply
	// Number is the line's number shown by history (#12) and taken by
	// fix and drop; 0 for lines stored before lines were numbered.
	Number uint64 `json:"no,omitempty"`
	// Seeded marks the invented demo data: never undone.
	Seeded bool `json:"seeded,omitempty"`
}

// Units chooses how replies show lengths.
type Units string

// Unit systems for replies.
const (
	Metric   Units = "metric"
	Imperial Units = "imperial"
)

// Team holds the team-wide settings.
type Team struct {
	Name  string `json:"name,omitempty"`
	Units Units  `json:"units,omitempty"` // "" means metric
	TZ    string `json:"tz,omitempty"`    // IANA zone name; "" means UTC

	HasLocation bool    `json:"has_location,omitempty"` // venue set: use local gravity
	LatDeg      float64 `json:"lat_deg,omitempty"`
	AltM        float64 `json:"alt_m,omitempty"`

	DigestOff     bool         `json:"digest_off,omitempty"`
	DigestDay     time.Weekday `json:"digest_day"`    // default Monday, set by the bot
	DigestMinute  int          `json:"digest_minute"` // minutes after local midnight
	DigestChannel string       `json:"digest_channel,omitempty"`
	DigestSet     bool         `json:"digest_set,omitempty"` // day and minute were chosen by a coach

	// JumpBudget is the practice jump budget per athlete and session that
	// `plan` keeps to (0 = none).
	JumpBudget int `json:"jump_budget,omitempty"`

	BackupDir  string `json:"backup_dir,omitempty"`
	BackupKeep int    `json:"backup_keep,omitempty"`
}

// Location is the team's time zone: UTC when none is set. Zone names are
// checked when a coach sets them and the zone database is embedded in the
// binary, so a stored name always loads; one that does not is read as UTC.
func (t Team) Location() *time.Location {
	if t.TZ == "" {
		return time.UTC
	}
	loc, err := time.LoadLocation(t.TZ)
	if err != nil {
		return time.UTC
	}
	return loc
}

// DefaultBackupKeep is how many nightly backups are kept when a coach did
// not say.
const DefaultBackupKeep = 7

// BackupsKept is how many nightly backups to keep.
func (t Team) BackupsKept() int {
	if t.BackupKeep > 0 {
		return t.BackupKeep
	}
	return DefaultBackupKeep
}

// Role is what a chat user may do.
type Role string

// Roles, from most to least allowed. RoleNone is anyone else in the workspace.
const (
	RoleHeadCoach Role = "head"
	RoleCoach     Role = "coach"
	RoleAthlete   Role = "athlete"
	RoleNone      Role = ""
)

// User is a chat user the bot knows.
type User struct {
	ID        string `json:"id"`
	Name      string `json:"name,omitempty"` // display name, cached
	Role      Role   `json:"role,omitempty"`
	AthleteID uint64 `json:"athlete,omitempty"` // linked athlete ("me"), 0 none
}

// AuditEntry records one change: who, when, what, and the record before and after (JSON, may be empty).
type AuditEntry struct {
	Time    time.Time `json:"time"`
	Actor   string    `json:"actor"`
	Action  string    `json:"action"`
	Subject string    `json:"subject,omitempty"` // athlete name (at the time) or setting
	// AthleteID is the athlete the change concerns (0: none, or an entry
	// written before entries carried it); a rename keeps the trail.
	AthleteID uint64 `json:"athlete,omitempty"`
	Before    string `json:"before,omitempty"`
	After     string `json:"after,omitempty"`
	// Seeded marks changes made by seeding the invented demo data; undo
	// never takes them back.
	Seeded bool `json:"seeded,omitempty"`
	// Forgotten marks an entry `forget` pseudonymised: its subject is the
	// neutral label, its values are gone, and undo cannot take it back.
	Forgotten bool `json:"forgotten,omitempty"`
}

// ErrStop, returned from an iteration callback, ends the iteration early;
// the iterating function then returns nil.
var ErrStop = stopError{}

type stopError struct{}

func (stopError) Error() string { return "stop iteration" }
