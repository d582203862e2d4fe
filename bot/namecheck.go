package bot

import (
	"slices"
	"strings"
	"unicode"

	"github.com/mtibben/confusables"
	"golang.org/x/text/unicode/norm"

	"github.com/lathmark-team/lathmark/internal/record"
)

// nfc returns a name in Unicode Normalization Form C (UAX #15), the form
// names are stored and compared in: "Zoë" typed with a combining diaeresis
// is the same name as "Zoë" typed with the precomposed letter.
func nfc(s string) string { return norm.NFC.String(s) }

// foldName is the form two names are compared in: NFC, lower case. Names
// stored before names were normalised compare equal to their NFC form.
func foldName(s string) string { return strings.ToLower(nfc(s)) }

// nameSkeletons are the confusable skeletons of a name (Unicode Technical
// Standard #39, section 4, through github.com/mtibben/confusables), of the
// name as typed and in lower case: two names that share one look alike on
// a phone ("Kai" in Cyrillic letters, "KaiI" and "Kail", "Rnira" and
// "Mira"). Both, because lower case hides a capital I that reads as l.
func nameSkeletons(s string) [2]string {
	return [2]string{confusables.Skeleton(nfc(s)), confusables.Skeleton(foldName(s))}
}

// lookAlike reports whether two names share a skeleton.
func lookAlike(a, b [2]string) bool {
	return a[0] == b[0] || a[1] == b[1] || a[0] == b[1] || a[1] == b[0]
}

// scriptSets are the mixes of scripts a name may use, after UTS #39's
// "highly restrictive" level (section 5.2) without its Latin mixes: one
// script, or Han with the Japanese kana, with Hangul or with Bopomofo.
var scriptSets = [][]string{
	{"Han", "Hiragana", "Katakana"},
	{"Han", "Hangul"},
	{"Han", "Bopomofo"},
}

// nameScripts lists the scripts of a name's letters (Common and Inherited
// characters, such as digits, - ' . and combining marks, belong to none).
func nameScripts(name string) []string {
	var out []string
	for _, r := range name {
		if !unicode.IsLetter(r) {
			continue
		}
		for s, table := range unicode.Scripts {
			if s != "Common" && s != "Inherited" && unicode.Is(table, r) {
				if !slices.Contains(out, s) {
					out = append(out, s)
				}
				break
			}
		}
	}
	slices.Sort(out)
	return out
}

// mixedScripts reports whether a name mixes scripts that no one writes
// together (Latin and Cyrillic, say), the usual form of a look-alike name.
func mixedScripts(name string) ([]string, bool) {
	ss := nameScripts(name)
	if len(ss) <= 1 {
		return ss, false
	}
	for _, set := range scriptSets {
		if !slices.ContainsFunc(ss, func(s string) bool { return !slices.Contains(set, s) }) {
			return ss, false
		}
	}
	return ss, true
}

// checkNewName refuses a new athlete name (athlete add, athlete rename) that
// mixes scripts, or that is confusable with an existing athlete's name other
// than self (0: none), naming the existing one.
func checkNewName(tx Tx, name string, self uint64, example string) error {
	if ss, mixed := mixedScripts(name); mixed {
		return usageErr(example, "the name %q mixes letters of different scripts (%s); type it in one script", name, strings.Join(ss, " and "))
	}
	all, err := tx.Athletes()
	if err != nil {
		return err
	}
	fold, skel := foldName(name), nameSkeletons(name)
	for _, a := range all {
		if a.ID == self {
			continue
		}
		if foldName(a.Name) == fold {
			return conflictErr("athlete "+a.Name, "there is already an athlete called %s; `athlete %s` shows the profile, or pick another name", a.Name, a.Name)
		}
		if lookAlike(nameSkeletons(a.Name), skel) {
			return conflictErr(example, "the name %q looks like %s, who is already in the squad; pick a name that reads differently", name, a.Name)
		}
	}
	return nil
}

// athleteByFoldedName finds an athlete whose stored name equals name once
// both are in NFC and lower case, for names stored before normalisation.
func athleteByFoldedName(all []record.Athlete, name string) (record.Athlete, bool) {
	f := foldName(name)
	for _, a := range all {
		if foldName(a.Name) == f {
			return a, true
		}
	}
	return record.Athlete{}, false
}
