package bot

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"github.com/lathmark-team/lathmark/internal/units"
)

// valueKind says how an option's value is read.
type valueKind int

const (
	kindFlag    valueKind = iota // no value: "meet"
	kindLength                   // metres: 1.78, 178cm, 5-10
	kindSigned                   // a signed small length: 3cm, -2cm
	kindSpeed                    // m/s
	kindAngle                    // degrees
	kindSeconds                  // s
	kindMass                     // kg
	kindWord                     // one word as typed
	kindRest                     // the rest of the line as typed
	kindNumber                   // a plain number
)

// optionSpec is one keyword a command accepts, with the words that mean the same.
type optionSpec struct {
	Key     string
	Aliases []string
	Kind    valueKind
}

// options holds what parseOptions found. Numbers are SI.
type options struct {
	nums  map[string]float64
	words map[string]string
	flags map[string]bool
	rest  []token // tokens that matched no keyword, in order
}

func (o options) has(key string) bool {
	_, n := o.nums[key]
	_, w := o.words[key]
	return n || w || o.flags[key]
}

func (o options) num(key string) (float64, bool) { v, ok := o.nums[key]; return v, ok }

func (o options) word(key string) (string, bool) { v, ok := o.words[key]; return v, ok }

// parseOptions reads "keyword value" pairs in any order. Tokens that are not
// keywords are returned in rest for the command to interpret (names, bar
// heights, attempt notation). A keyword given twice, or without a readable
// value, is a usage error naming the word; example is shown with it.
// "key=value" and "key:value" are accepted as well as "key value".
func parseOptions(ts []token, specs []optionSpec, example string) (options, error) {
	o := options{nums: map[string]float64{}, words: map[string]string{}, flags: map[string]bool{}}
	lookup := map[string]optionSpec{}
	for _, s := range specs {
		lookup[s.Key] = s
		for _, a := range s.Aliases {
			lookup[a] = s
		}
	}
	for i := 0; i < len(ts); i++ {
		t := ts[i]
		word, inline, hasInline := t.Lower, "", false
		if j := strings.IndexAny(t.Lower, "=:"); j > 0 && j < len(t.Lower)-1 {
			if _, known := lookup[t.Lower[:j]]; known {
				word, inline, hasInline = t.Lower[:j], t.Raw[j+1:], true
			}
		}
		spec, ok := lookup[word]
		if !ok {
			o.rest = append(o.rest, t)
			continue
		}
		if o.has(spec.Key) {
			return o, usageErr(example, "%q is given twice", t.Raw)
		}
		if spec.Kind == kindFlag {
			o.flags[spec.Key] = true
			continue
		}
		if spec.Kind == kindRest {
			rest := joinRaw(ts[i+1:])
			if hasInline {
				rest = strings.TrimSpace(inline + " " + rest)
			}
			o.words[spec.Key] = rest
			break
		}
		val := inline
		if !hasInline {
			if i+1 >= len(ts) {
				return o, usageErr(example, "%q needs a value after it", t.Raw)
			}
			i++
			val = ts[i].Raw
		}
		if err := o.set(spec, val); err != nil {
			return o, usageErr(example, "%s %s: %v", t.Raw, val, err)
		}
	}
	return o, nil
}

func (o options) set(spec optionSpec, val string) error {
	var (
		v   float64
		err error
	)
	switch spec.Kind {
	case kindWord:
		o.words[spec.Key] = val
		return nil
	case kindLength:
		v, err = units.ParseLength(val)
	case kindSigned:
		v, err = units.ParseSignedLength(val)
	case kindSpeed:
		v, err = units.ParseSpeed(val)
	case kindAngle:
		v, err = units.ParseAngle(val)
	case kindSeconds:
		v, err = units.ParseSeconds(val)
	case kindMass:
		v, err = units.ParseMass(val)
	case kindNumber:
		v, err = strconv.ParseFloat(strings.ReplaceAll(val, ",", "."), 64)
		if err == nil && (v != v || v > 1e12 || v < -1e12) {
			err = fmt.Errorf("not a number")
		}
	}
	if err != nil {
		var ue *units.Error
		if errors.As(err, &ue) {
			return fmt.Errorf("%s", ue.Reason)
		}
		return fmt.Errorf("not a number")
	}
	o.nums[spec.Key] = v
	return nil
}
