package store_test

import (
	"errors"
	"fmt"
	"math"
	"reflect"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

func TestTeamRoundTrip(t *testing.T) {
	db := openTemp(t)
	view(t, db, func(tx *store.Tx) error {
		got, err := tx.Team()
		if err != nil || !reflect.DeepEqual(got, record.Team{}) {
			t.Errorf("unset team: %+v, %v", got, err)
		}
		return nil
	})
	want := record.Team{Name: "Club", Units: record.Imperial, TZ: "Europe/Madrid", HasLocation: true, LatDeg: 40.4, AltM: 650,
		DigestDay: time.Monday, DigestMinute: 420, DigestChannel: "#jumps", DigestSet: true, BackupDir: "/b", BackupKeep: 7}
	update(t, db, func(tx *store.Tx) error { return tx.PutTeam(want) })
	view(t, db, func(tx *store.Tx) error {
		got, err := tx.Team()
		if err != nil || !reflect.DeepEqual(got, want) {
			t.Errorf("team: %+v, %v; want %+v", got, err, want)
		}
		return nil
	})
	st, err := db.Stats()
	if err != nil || !st.TeamSet {
		t.Errorf("stats after PutTeam: %+v %v", st, err)
	}
}

func TestAthleteRoundTrip(t *testing.T) {
	db := openTemp(t)
	local := time.FixedZone("UTC+2", 2*3600)
	in := []record.Athlete{
		{Name: "Zoe Marsh", StatureM: 1.78, MassKg: 62, Sex: record.SexFemale, TakeoffLeg: record.LegLeft, PersonalBestM: 1.81,
			BirthYear: 2008, Group: "youth", Notes: "n", Private: true, BodyDepthM: 0.11, Created: base.In(local)},
		{Name: "aaron Bell", StatureM: 1.90, Sex: record.SexMale, TakeoffLeg: record.LegRight, Created: base},
		{Name: "Élodie Durand", Created: base},
	}
	update(t, db, func(tx *store.Tx) error {
		for i := range in {
			if err := tx.PutAthlete(&in[i]); err != nil {
				return err
			}
		}
		return nil
	})
	for i, a := range in {
		if a.ID != uint64(i+1) {
			t.Errorf("athlete %d got id %d, want %d", i, a.ID, i+1)
		}
	}
	want := func(a record.Athlete) record.Athlete { a.Created = a.Created.UTC(); return a }
	view(t, db, func(tx *store.Tx) error {
		for _, a := range in {
			got, ok, err := tx.AthleteByID(a.ID)
			if err != nil || !ok || !reflect.DeepEqual(got, want(a)) {
				t.Errorf("AthleteByID(%d) = %+v, %v, %v; want %+v", a.ID, got, ok, err, want(a))
			}
		}
		for _, c := range []struct {
			name string
			id   uint64
		}{
			{"zoe marsh", 1}, {"ZOE MARSH", 1}, {"  Zoe   Marsh ", 1}, {"Aaron Bell", 2},
			{"élodie durand", 3}, {"ÉLODIE DURAND", 3}, {"Zoe", 0}, {"", 0},
		} {
			got, ok, err := tx.AthleteByName(c.name)
			if err != nil || ok != (c.id != 0) || got.ID != c.id {
				t.Errorf("AthleteByName(%q) = id %d, %v, %v; want id %d", c.name, got.ID, ok, err, c.id)
			}
		}
		if _, ok, err := tx.AthleteByID(99); ok || err != nil {
			t.Errorf("AthleteByID(99): ok %v err %v", ok, err)
		}
		list, err := tx.Athletes()
		if err != nil {
			return err
		}
		var names []string
		for _, a := range list {
			names = append(names, a.Name)
		}
		if wantNames := []string{"aaron Bell", "Zoe Marsh", "Élodie Durand"}; !reflect.DeepEqual(names, wantNames) {
			t.Errorf("Athletes order %q, want %q (folded-name byte order)", names, wantNames)
		}
		return nil
	})
}

func TestAthleteNames(t *testing.T) {
	cases := []struct {
		name    string
		put     record.Athlete // ID 1 is "Kai Moreno", ID 2 is "Sina Albers"
		wantErr error          // nil: success; errAny: any error
		found   []string       // names that must resolve to put.ID afterwards
		gone    []string       // names that must not resolve at all
	}{
		{name: "duplicate name, other case", put: record.Athlete{Name: "KAI MORENO"}, wantErr: store.ErrNameTaken},
		{name: "duplicate name, extra spaces", put: record.Athlete{Name: " kai  moreno"}, wantErr: store.ErrNameTaken},
		{name: "rename keeps the index in step", put: record.Athlete{ID: 1, Name: "Kai Moreno-Diaz"},
			found: []string{"kai moreno-diaz"}, gone: []string{"kai moreno"}},
		{name: "case-only rename", put: record.Athlete{ID: 1, Name: "kai moreno"}, found: []string{"KAI MORENO"}},
		{name: "rename onto another athlete", put: record.Athlete{ID: 1, Name: "sina albers"}, wantErr: store.ErrNameTaken},
		{name: "unknown id", put: record.Athlete{ID: 42, Name: "Nobody"}, wantErr: store.ErrNoAthlete},
		{name: "empty name", put: record.Athlete{Name: "   "}, wantErr: errAny},
		{name: "over-long name", put: record.Athlete{Name: string(make([]byte, 300))}, wantErr: errAny},
		{name: "new name", put: record.Athlete{Name: "Rui Costa"}, found: []string{"rui costa"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			db := openTemp(t)
			addAthlete(t, db, "Kai Moreno")
			addAthlete(t, db, "Sina Albers")
			before := checksum(t, db)
			put := c.put
			err := db.Update(t.Context(), func(tx *store.Tx) error { return tx.PutAthlete(&put) })
			switch {
			case c.wantErr == nil && err != nil:
				t.Fatalf("PutAthlete: %v", err)
			case c.wantErr != nil:
				if err == nil || (c.wantErr != errAny && !errors.Is(err, c.wantErr)) {
					t.Fatalf("PutAthlete: %v, want %v", err, c.wantErr)
				}
				if checksum(t, db) != before {
					t.Error("refused PutAthlete changed the data")
				}
				return
			}
			view(t, db, func(tx *store.Tx) error {
				for _, n := range c.found {
					if got, ok, err := tx.AthleteByName(n); !ok || err != nil || got.ID != put.ID {
						t.Errorf("%q: id %d ok %v err %v, want id %d", n, got.ID, ok, err, put.ID)
					}
				}
				for _, n := range c.gone {
					if got, ok, err := tx.AthleteByName(n); ok || err != nil {
						t.Errorf("%q still resolves to %d (err %v)", n, got.ID, err)
					}
				}
				return nil
			})
			st, err := db.Stats()
			if err != nil || st.Names != st.Athletes {
				t.Errorf("stats %+v %v: names and athletes differ", st, err)
			}
		})
	}
}

// errAny stands for "some error" in tables.
var errAny = errors.New("any error")

func attemptAt(id uint64, at time.Time, bar float64) record.Attempt {
	return record.Attempt{AthleteID: id, Time: at, BarM: bar, Outcome: record.Cleared, Number: 1}
}

func TestAttemptRoundTripAndSeq(t *testing.T) {
	db := openTemp(t)
	id := addAthlete(t, db, "Mara Quist")
	full := record.Attempt{AthleteID: id, Time: base.In(time.FixedZone("x", -5*3600)), Seq: 77, BarM: 1.75, Outcome: record.Failed,
		Number: 2, Meet: true, ApproachMS: 7.1, TakeoffDistM: 0.9, PeakM: 1.82, VzMS: 4.1, HasCoachMargin: true, CoachMarginM: -0.02,
		HasModelMargin: true, ModelMarginM: 0.01, LoggedBy: "U1", MessageID: "M1", LineID: "L1", Note: "brushed"}
	batch := []record.Attempt{full, attemptAt(id, base, 1.70), attemptAt(id, base, 1.72), attemptAt(id, base.Add(time.Nanosecond), 1.8)}
	update(t, db, func(tx *store.Tx) error { return tx.AddAttempts(batch) })
	if got := []uint32{batch[0].Seq, batch[1].Seq, batch[2].Seq, batch[3].Seq}; !reflect.DeepEqual(got, []uint32{0, 1, 2, 0}) {
		t.Errorf("assigned seqs %v, want [0 1 2 0]", got)
	}
	more := []record.Attempt{attemptAt(id, base, 1.74)}
	update(t, db, func(tx *store.Tx) error { return tx.AddAttempts(more) })
	if more[0].Seq != 3 {
		t.Errorf("next seq at the same time %d, want 3", more[0].Seq)
	}
	update(t, db, func(tx *store.Tx) error {
		return tx.DeleteAttempts([]record.Key{batch[1].Key(), {AthleteID: id, Time: base, Seq: 9}, {AthleteID: 999, Time: base}, {AthleteID: id}})
	})
	refill := []record.Attempt{attemptAt(id, base, 1.71)}
	update(t, db, func(tx *store.Tx) error { return tx.AddAttempts(refill) })
	if refill[0].Seq != 1 {
		t.Errorf("seq after deleting seq 1: %d, want the smallest unused, 1", refill[0].Seq)
	}

	var got []record.Attempt
	view(t, db, func(tx *store.Tx) error {
		return tx.Attempts(id, base, base.Add(time.Hour), func(a record.Attempt) error { got = append(got, a); return nil })
	})
	wantFull := full
	wantFull.Time = full.Time.UTC()
	wantFull.Seq = 0
	want := []record.Attempt{wantFull, refill[0], batch[2], more[0], batch[3]}
	if len(got) != len(want) {
		t.Fatalf("got %d attempts, want %d", len(got), len(want))
	}
	for i := range want {
		if !reflect.DeepEqual(got[i], want[i]) {
			t.Errorf("attempt %d: %+v\nwant %+v", i, got[i], want[i])
		}
	}
}

func TestAddAttemptsRefused(t *testing.T) {
	cases := []struct {
		name string
		a    func(id uint64) record.Attempt
		want error
	}{
		{"unknown athlete", func(id uint64) record.Attempt { return attemptAt(id+100, base, 1.7) }, store.ErrNoAthlete},
		{"athlete 0", func(uint64) record.Attempt { return attemptAt(0, base, 1.7) }, store.ErrNoAthlete},
		{"unset time", func(id uint64) record.Attempt { return attemptAt(id, time.Time{}, 1.7) }, store.ErrTimeRange},
		{"before 1970", func(id uint64) record.Attempt { return attemptAt(id, time.Unix(-1, 0), 1.7) }, store.ErrTimeRange},
		{"after 2262", func(id uint64) record.Attempt { return attemptAt(id, time.Date(2263, 1, 1, 0, 0, 0, 0, time.UTC), 1.7) }, store.ErrTimeRange},
		{"bad outcome", func(id uint64) record.Attempt { a := attemptAt(id, base, 1.7); a.Outcome = 'q'; return a }, errAny},
		{"NaN bar", func(id uint64) record.Attempt { return attemptAt(id, base, math.NaN()) }, errAny},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			db := openTemp(t)
			id := addAthlete(t, db, "Oskar Lind")
			before := checksum(t, db)
			// A good attempt first: the bad one must take it down too.
			err := db.Update(t.Context(), func(tx *store.Tx) error {
				return tx.AddAttempts([]record.Attempt{attemptAt(id, base, 1.6), c.a(id)})
			})
			if err == nil || (c.want != errAny && !errors.Is(err, c.want)) {
				t.Fatalf("AddAttempts: %v, want %v", err, c.want)
			}
			if checksum(t, db) != before {
				t.Error("refused AddAttempts changed the data")
			}
		})
	}
}

// history stores one attempt per day for athlete id over days days ending at end.
func history(t *testing.T, db *store.DB, id uint64, end time.Time, days int) {
	t.Helper()
	as := make([]record.Attempt, 0, days)
	for d := days; d > 0; d-- {
		as = append(as, attemptAt(id, end.AddDate(0, 0, -d), 1.5+float64(d%20)/100))
	}
	update(t, db, func(tx *store.Tx) error { return tx.AddAttempts(as) })
}

func TestAttemptsWindow(t *testing.T) {
	db := openTemp(t)
	before := addAthlete(t, db, "Neighbour Before")
	id := addAthlete(t, db, "Window Athlete")
	after := addAthlete(t, db, "Neighbour After")
	// Neighbours in key space: every day of the same period.
	history(t, db, before, base, 60)
	history(t, db, after, base, 60)
	// The athlete: noon on days 1..30 of the period's end month, two at the same time on day 10.
	day := func(d int) time.Time { return time.Date(2025, 1, d, 12, 0, 0, 0, time.UTC) }
	var as []record.Attempt
	for d := 1; d <= 30; d++ {
		as = append(as, attemptAt(id, day(d), 1.6))
	}
	as = append(as, attemptAt(id, day(10), 1.65))
	update(t, db, func(tx *store.Tx) error { return tx.AddAttempts(as) })

	cases := []struct {
		name     string
		from, to time.Time
		want     int // attempts in the window
		firstDay int // day of the first attempt, 0 if none
	}{
		{"days 5 to 9 inclusive", day(5), day(10), 5, 5},
		{"from is inclusive, to exclusive", day(10), day(11), 2, 10},
		{"one nanosecond after day 10", day(10).Add(time.Nanosecond), day(11), 0, 0},
		{"whole history", time.Time{}, time.Date(3000, 1, 1, 0, 0, 0, 0, time.UTC), 31, 1},
		{"from before 1970", time.Unix(-1e9, 0), day(3), 2, 1},
		{"empty: to before from", day(20), day(10), 0, 0},
		{"empty: to equals from", day(20), day(20), 0, 0},
		{"after the last attempt", day(31), day(40), 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var got []record.Attempt
			view(t, db, func(tx *store.Tx) error {
				return tx.Attempts(id, c.from, c.to, func(a record.Attempt) error { got = append(got, a); return nil })
			})
			if len(got) != c.want {
				t.Fatalf("%d attempts, want %d", len(got), c.want)
			}
			for i, a := range got {
				if a.AthleteID != id || a.Time.Before(c.from) || !a.Time.Before(c.to) {
					t.Errorf("attempt %+v outside the window", a)
				}
				if i > 0 && (a.Time.Before(got[i-1].Time) || (a.Time.Equal(got[i-1].Time) && a.Seq <= got[i-1].Seq)) {
					t.Errorf("attempt %d out of order", i)
				}
			}
			if c.firstDay != 0 && got[0].Time.Day() != c.firstDay {
				t.Errorf("first attempt on day %d, want %d", got[0].Time.Day(), c.firstDay)
			}
		})
	}

	t.Run("ErrStop ends early", func(t *testing.T) {
		n := 0
		view(t, db, func(tx *store.Tx) error {
			err := tx.Attempts(id, day(1), day(31), func(record.Attempt) error {
				n++
				if n == 3 {
					return record.ErrStop
				}
				return nil
			})
			if err != nil || n != 3 {
				t.Errorf("err %v after %d calls, want nil after 3", err, n)
			}
			return nil
		})
	})
	t.Run("other errors come back unchanged", func(t *testing.T) {
		sentinel := errors.New("reader failed")
		view(t, db, func(tx *store.Tx) error {
			if err := tx.Attempts(id, day(1), day(31), func(record.Attempt) error { return sentinel }); err != sentinel {
				t.Errorf("err %v, want the sentinel unchanged", err)
			}
			return nil
		})
	})
}

// TestAttemptsScanTouchesOnlyWindow counts the keys the cursor visits: an
// 8-week window over 2 years of daily history visits the window's attempts
// plus the one key that ends the scan, nothing before or after.
func TestAttemptsScanTouchesOnlyWindow(t *testing.T) {
	db := openTemp(t)
	long := addAthlete(t, db, "Two Years")
	short := addAthlete(t, db, "Eight Weeks")
	history(t, db, long, base, 730)
	history(t, db, short, base, 56)
	from, to := base.AddDate(0, 0, -56), base.AddDate(0, 0, -28)
	for _, id := range []uint64{long, short} {
		view(t, db, func(tx *store.Tx) error {
			n := 0
			if err := tx.Attempts(id, from, to, func(record.Attempt) error { n++; return nil }); err != nil {
				return err
			}
			if n != 28 {
				t.Errorf("athlete %d: %d attempts in 4 weeks, want 28", id, n)
			}
			if steps := store.ScanSteps(tx); steps != n+1 {
				t.Errorf("athlete %d: scan visited %d keys for %d attempts, want %d", id, steps, n, n+1)
			}
			return nil
		})
	}
}

func TestLines(t *testing.T) {
	db := openTemp(t)
	id := addAthlete(t, db, "Hana Ito")
	keys := []record.Key{{AthleteID: id, Time: base, Seq: 0}, {AthleteID: id, Time: base, Seq: 1}}
	l1 := record.Line{ID: "L1", LoggedBy: "U1", Time: base, AthleteID: id, Attempts: keys, Text: "log hana 1.70 o"}
	l2 := record.Line{ID: "L2", LoggedBy: "U1", Time: base.Add(time.Minute), AthleteID: id, Text: "log hana 1.75 x"}
	l2same := record.Line{ID: "L2b", LoggedBy: "U1", Time: base.Add(time.Minute), Text: "same time, other line"}
	other := record.Line{ID: "L9", LoggedBy: "U10", Time: base.Add(time.Hour), Text: "user U10, later"}
	earlier := record.Line{ID: "L0", LoggedBy: "U0", Time: base.Add(2 * time.Hour), Text: "user U0"}
	update(t, db, func(tx *store.Tx) error {
		for _, l := range []record.Line{l1, l2, l2same, other, earlier, l1} { // l1 twice: stored once
			if err := tx.PutLine(l); err != nil {
				return err
			}
		}
		return nil
	})
	st, err := db.Stats()
	if err != nil || st.Lines != 5 {
		t.Errorf("stats %+v %v, want 5 lines", st, err)
	}
	last := func(by string) (record.Line, bool) {
		var l record.Line
		var ok bool
		view(t, db, func(tx *store.Tx) error {
			var err error
			l, ok, err = tx.LastLine(by)
			return err
		})
		return l, ok
	}
	if got, ok := last("U1"); !ok || got.ID != "L2b" {
		t.Errorf("LastLine(U1) = %q %v, want L2b (last stored at the latest time)", got.ID, ok)
	}
	for _, c := range []struct{ by, want string }{{"U10", "L9"}, {"U0", "L0"}, {"U", ""}, {"U2", ""}, {"", ""}} {
		got, ok := last(c.by)
		if ok != (c.want != "") || got.ID != c.want {
			t.Errorf("LastLine(%q) = %q %v, want %q", c.by, got.ID, ok, c.want)
		}
	}
	update(t, db, func(tx *store.Tx) error {
		if err := tx.DeleteLine(l2same); err != nil {
			return err
		}
		if err := tx.DeleteLine(l2); err != nil {
			return err
		}
		return tx.DeleteLine(record.Line{ID: "nope", LoggedBy: "U1", Time: base})
	})
	got, ok := last("U1")
	if !ok || !reflect.DeepEqual(got, l1) {
		t.Errorf("after undoing two lines LastLine(U1) = %+v %v, want %+v", got, ok, l1)
	}

	for _, bad := range []record.Line{
		{ID: "x", LoggedBy: "", Time: base},
		{ID: "x", LoggedBy: "U\x001", Time: base},
		{ID: "x", LoggedBy: "U1"},
		{ID: "x", LoggedBy: "U1", Time: base, AthleteID: 999},
	} {
		sum := checksum(t, db)
		if err := db.Update(t.Context(), func(tx *store.Tx) error { return tx.PutLine(bad) }); err == nil {
			t.Errorf("PutLine(%+v) accepted", bad)
		}
		if checksum(t, db) != sum {
			t.Errorf("refused PutLine(%+v) changed the data", bad)
		}
	}
}

func TestUsers(t *testing.T) {
	db := openTemp(t)
	id := addAthlete(t, db, "Pia Sorensen")
	users := []record.User{
		{ID: "U2", Name: "Coach B", Role: record.RoleCoach},
		{ID: "U1", Name: "Head", Role: record.RoleHeadCoach, AthleteID: 0},
		{ID: "U3", Name: "Pia", Role: record.RoleAthlete, AthleteID: id},
	}
	update(t, db, func(tx *store.Tx) error {
		for _, u := range users {
			if err := tx.PutUser(u); err != nil {
				return err
			}
		}
		return nil
	})
	view(t, db, func(tx *store.Tx) error {
		for _, u := range users {
			got, ok, err := tx.User(u.ID)
			if err != nil || !ok || !reflect.DeepEqual(got, u) {
				t.Errorf("User(%s) = %+v %v %v", u.ID, got, ok, err)
			}
		}
		if _, ok, err := tx.User("U9"); ok || err != nil {
			t.Errorf("User(U9): ok %v err %v", ok, err)
		}
		list, err := tx.Users()
		if err != nil {
			return err
		}
		if want := []record.User{users[1], users[0], users[2]}; !reflect.DeepEqual(list, want) {
			t.Errorf("Users() = %+v, want id order %+v", list, want)
		}
		return nil
	})
	update(t, db, func(tx *store.Tx) error {
		if err := tx.DeleteUser("U2"); err != nil {
			return err
		}
		return tx.DeleteUser("U404")
	})
	view(t, db, func(tx *store.Tx) error {
		if _, ok, _ := tx.User("U2"); ok {
			t.Error("U2 still there after DeleteUser")
		}
		return nil
	})
	for _, bad := range []record.User{{ID: ""}, {ID: "U5", AthleteID: 999}} {
		if err := db.Update(t.Context(), func(tx *store.Tx) error { return tx.PutUser(bad) }); err == nil {
			t.Errorf("PutUser(%+v) accepted", bad)
		} else if bad.AthleteID != 0 && !errors.Is(err, store.ErrNoAthlete) {
			t.Errorf("PutUser(%+v): %v, want ErrNoAthlete", bad, err)
		}
	}
}

func TestSeen(t *testing.T) {
	db := openTemp(t)
	update(t, db, func(tx *store.Tx) error {
		for i, id := range []string{"m1", "m2", "m3", "m4"} {
			if err := tx.MarkSeen(id, base.Add(time.Duration(i)*time.Hour)); err != nil {
				return err
			}
		}
		return nil
	})
	view(t, db, func(tx *store.Tx) error {
		for _, c := range []struct {
			id   string
			want bool
		}{{"m1", true}, {"m4", true}, {"m5", false}, {"", false}} {
			if got, err := tx.Seen(c.id); err != nil || got != c.want {
				t.Errorf("Seen(%q) = %v %v, want %v", c.id, got, err, c.want)
			}
		}
		return nil
	})
	var pruned int
	update(t, db, func(tx *store.Tx) error {
		var err error
		pruned, err = tx.PruneSeen(base.Add(2 * time.Hour)) // m1, m2 went before; m3 is at the bound
		return err
	})
	if pruned != 2 {
		t.Errorf("PruneSeen removed %d, want 2", pruned)
	}
	view(t, db, func(tx *store.Tx) error {
		for id, want := range map[string]bool{"m1": false, "m2": false, "m3": true, "m4": true} {
			if got, _ := tx.Seen(id); got != want {
				t.Errorf("after prune Seen(%q) = %v, want %v", id, got, want)
			}
		}
		return nil
	})
	if err := db.Update(t.Context(), func(tx *store.Tx) error { return tx.MarkSeen("", base) }); err == nil {
		t.Error("MarkSeen with an empty id accepted")
	}
	if err := db.Update(t.Context(), func(tx *store.Tx) error { return tx.MarkSeen("m9", time.Time{}) }); !errors.Is(err, store.ErrTimeRange) {
		t.Errorf("MarkSeen at the zero time: %v, want ErrTimeRange", err)
	}
}

func TestAudit(t *testing.T) {
	db := openTemp(t)
	entries := []record.AuditEntry{
		{Time: base.Add(time.Hour), Actor: "U1", Action: "athlete.add", Subject: "Kai", After: `{"name":"Kai"}`},
		{Time: base, Actor: "U2", Action: "team.tz", Subject: "tz", Before: "UTC", After: "Europe/Madrid"},
		{Time: base.Add(time.Hour), Actor: "U1", Action: "athlete.set", Subject: "Kai"},
		{Time: base.Add(2 * time.Hour).In(time.FixedZone("x", 3600)), Actor: "U3", Action: "log"},
	}
	update(t, db, func(tx *store.Tx) error {
		for _, e := range entries {
			if err := tx.Audit(e); err != nil {
				return err
			}
		}
		return nil
	})
	collect := func(since time.Time, stopAfter int) []string {
		var got []string
		view(t, db, func(tx *store.Tx) error {
			return tx.AuditEntries(since, func(e record.AuditEntry) error {
				got = append(got, e.Action)
				if len(got) == stopAfter {
					return record.ErrStop
				}
				return nil
			})
		})
		return got
	}
	for _, c := range []struct {
		name      string
		since     time.Time
		stopAfter int
		want      []string
	}{
		{"all, oldest first, append order within a time", time.Time{}, 0, []string{"team.tz", "athlete.add", "athlete.set", "log"}},
		{"since is inclusive", base.Add(time.Hour), 0, []string{"athlete.add", "athlete.set", "log"}},
		{"after the last", base.Add(3 * time.Hour), 0, nil},
		{"ErrStop", time.Time{}, 2, []string{"team.tz", "athlete.add"}},
	} {
		if got := collect(c.since, c.stopAfter); !reflect.DeepEqual(got, c.want) {
			t.Errorf("%s: %q, want %q", c.name, got, c.want)
		}
	}
	view(t, db, func(tx *store.Tx) error {
		return tx.AuditEntries(base.Add(2*time.Hour), func(e record.AuditEntry) error {
			want := entries[3]
			want.Time = want.Time.UTC()
			if !reflect.DeepEqual(e, want) {
				t.Errorf("entry %+v, want %+v", e, want)
			}
			return nil
		})
	})
}

func TestDigests(t *testing.T) {
	db := openTemp(t)
	at := base.Add(123 * time.Nanosecond)
	update(t, db, func(tx *store.Tx) error { return tx.MarkDigestPosted("2025-W10", at) })
	view(t, db, func(tx *store.Tx) error {
		got, ok, err := tx.DigestPosted("2025-W10")
		if err != nil || !ok || !got.Equal(at) {
			t.Errorf("DigestPosted = %v %v %v, want %v", got, ok, err, at)
		}
		if _, ok, err := tx.DigestPosted("2025-W11"); ok || err != nil {
			t.Errorf("unposted week: ok %v err %v", ok, err)
		}
		return nil
	})
	if err := db.Update(t.Context(), func(tx *store.Tx) error { return tx.MarkDigestPosted("", at) }); err == nil {
		t.Error("empty week accepted")
	}
}

func TestDeleteAthlete(t *testing.T) {
	db := openTemp(t)
	gone := addAthlete(t, db, "Leaving Athlete")
	stays := addAthlete(t, db, "Staying Athlete")
	history(t, db, gone, base, 40)
	history(t, db, stays, base, 30)
	update(t, db, func(tx *store.Tx) error {
		for _, l := range []record.Line{
			{ID: "a", LoggedBy: "U1", Time: base, AthleteID: gone},
			{ID: "b", LoggedBy: "U2", Time: base, AthleteID: gone},
			{ID: "c", LoggedBy: "U1", Time: base.Add(time.Second), AthleteID: stays},
			{ID: "d", LoggedBy: "U1", Time: base.Add(2 * time.Second)},
		} {
			if err := tx.PutLine(l); err != nil {
				return err
			}
		}
		for _, u := range []record.User{{ID: "U1", AthleteID: gone}, {ID: "U2", AthleteID: stays}, {ID: "U3"}} {
			if err := tx.PutUser(u); err != nil {
				return err
			}
		}
		for i := range 3 {
			if err := tx.Audit(record.AuditEntry{Time: base.Add(time.Duration(i) * time.Second), Actor: "U1", Action: "x"}); err != nil {
				return err
			}
		}
		return nil
	})
	stBefore, err := db.Stats()
	if err != nil {
		t.Fatal(err)
	}
	var removed int
	update(t, db, func(tx *store.Tx) error {
		var err error
		removed, err = tx.DeleteAthlete(gone)
		return err
	})
	if want := 1 + 40 + 2 + 1; removed != want { // profile, attempts, lines, unlinked user
		t.Errorf("removed %d, want %d", removed, want)
	}
	st, err := db.Stats()
	if err != nil {
		t.Fatal(err)
	}
	want := stBefore
	want.Athletes, want.Names, want.Attempts, want.Lines = 1, 1, 30, 2
	want.FileBytes = st.FileBytes
	if st != want {
		t.Errorf("stats after delete %+v, want %+v (audit and users kept)", st, want)
	}
	view(t, db, func(tx *store.Tx) error {
		if _, ok, _ := tx.AthleteByName("leaving athlete"); ok {
			t.Error("name still indexed")
		}
		if u, _, _ := tx.User("U1"); u.AthleteID != 0 {
			t.Errorf("U1 still linked to %d", u.AthleteID)
		}
		if u, _, _ := tx.User("U2"); u.AthleteID != stays {
			t.Errorf("U2 link changed to %d", u.AthleteID)
		}
		n := 0
		_ = tx.Attempts(gone, time.Time{}, base.AddDate(1, 0, 0), func(record.Attempt) error { n++; return nil })
		if n != 0 {
			t.Errorf("%d attempts left", n)
		}
		if l, ok, _ := tx.LastLine("U2"); ok {
			t.Errorf("line %q of the deleted athlete left", l.ID)
		}
		return nil
	})
	again := record.Athlete{Name: "Leaving Athlete"}
	update(t, db, func(tx *store.Tx) error { return tx.PutAthlete(&again) })
	if again.ID <= stays {
		t.Errorf("re-added athlete got id %d: ids must not be reused", again.ID)
	}
	update(t, db, func(tx *store.Tx) error {
		n, err := tx.DeleteAthlete(12345)
		if n != 0 {
			t.Errorf("deleting an unknown athlete removed %d", n)
		}
		return err
	})
}

// Line numbers come from the lines bucket's sequence: 1, 2, 3, never
// reused, and LineByNumber finds a line by its number whoever logged it.
func TestLineNumbers(t *testing.T) {
	db := openTemp(t)
	id := addAthlete(t, db, "Hana Ito")
	var nums []uint64
	update(t, db, func(tx *store.Tx) error {
		for i, by := range []string{"U1", "U2", "U1"} {
			n, err := tx.NextLineNumber()
			if err != nil {
				return err
			}
			nums = append(nums, n)
			l := record.Line{ID: fmt.Sprintf("L%d", i), LoggedBy: by, Time: base.Add(time.Duration(i) * time.Minute), AthleteID: id, Number: n}
			if err := tx.PutLine(l); err != nil {
				return err
			}
		}
		return nil
	})
	if !reflect.DeepEqual(nums, []uint64{1, 2, 3}) {
		t.Errorf("numbers %v, want 1 2 3", nums)
	}
	view(t, db, func(tx *store.Tx) error {
		for _, c := range []struct {
			n  uint64
			id string
		}{{1, "L0"}, {2, "L1"}, {3, "L2"}, {4, ""}, {0, ""}} {
			l, ok, err := tx.LineByNumber(c.n)
			if err != nil || ok != (c.id != "") || l.ID != c.id {
				t.Errorf("LineByNumber(%d) = %q %v %v, want %q", c.n, l.ID, ok, err, c.id)
			}
		}
		last, err := tx.LastLineNumber()
		if err != nil || last != 3 {
			t.Errorf("LastLineNumber %d %v, want 3", last, err)
		}
		return nil
	})
	// A deleted line's number is not handed out again.
	update(t, db, func(tx *store.Tx) error {
		l, _, err := tx.LineByNumber(3)
		if err != nil {
			return err
		}
		if err := tx.DeleteLine(l); err != nil {
			return err
		}
		n, err := tx.NextLineNumber()
		if n != 4 {
			t.Errorf("next number after a delete %d, want 4", n)
		}
		return err
	})
}
