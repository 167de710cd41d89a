// Package yamlfile reads pitcard's YAML files (car.yaml, track.yaml,
// schedule.yaml, pitcard.yaml) with the checks YAML itself does not make and
// the messages a racer can act on: a non-finite number (.nan, .inf) is
// refused with its file, line and key; a value YAML 1.2 reads as text but a
// person meant as a yes/no (chute: yes) is pointed out; an unknown key or a
// value of the wrong type is said in plain words with the keys the file may
// hold, never in Go's type names.
//
// It does not know what a key means: each file's reader checks its values.
package yamlfile

import (
	"errors"
	"fmt"
	"io"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"pitcard/weather"
)

// Doc is a parsed YAML file: its keys' lines (dotted paths, "sessions[0].call")
// and what a person should hear about it.
type Doc struct {
	File     string
	Lines    map[string]int // key path → line
	Warnings []string       // e.g. a yes/no written as text
	root     *yaml.Node
}

// Parse parses data and checks every value: a non-finite number is an
// *weather.InputError naming the file, line and key.
func Parse(data []byte, file string) (*Doc, error) {
	d := &Doc{File: file, Lines: map[string]int{}}
	var root yaml.Node
	if err := yaml.Unmarshal(data, &root); err != nil {
		return nil, d.plain(err, nil)
	}
	d.root = &root
	if err := d.walk(&root, ""); err != nil {
		return nil, err
	}
	return d, nil
}

var nonFinite = regexp.MustCompile(`^[-+]?\.(nan|NaN|NAN|inf|Inf|INF)$`)

// yesNo are the words YAML 1.1 read as booleans and YAML 1.2 (which pitcard
// reads) takes as text.
var yesNo = map[string]bool{"yes": true, "no": true, "on": true, "off": true, "y": true, "n": true}

func (d *Doc) walk(n *yaml.Node, path string) error {
	switch n.Kind {
	case yaml.DocumentNode:
		for _, c := range n.Content {
			if err := d.walk(c, path); err != nil {
				return err
			}
		}
	case yaml.MappingNode:
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			p := k.Value
			if path != "" {
				p = path + "." + k.Value
			}
			d.Lines[p] = k.Line
			if err := d.walk(v, p); err != nil {
				return err
			}
		}
	case yaml.SequenceNode:
		for i, c := range n.Content {
			p := fmt.Sprintf("%s[%d]", path, i)
			d.Lines[p] = c.Line
			if err := d.walk(c, p); err != nil {
				return err
			}
		}
	case yaml.AliasNode:
		if n.Alias != nil {
			return d.walk(n.Alias, path)
		}
	case yaml.ScalarNode:
		if n.Style == 0 && nonFinite.MatchString(n.Value) {
			return &weather.InputError{File: d.File, Line: n.Line, Field: orValue(path), Value: n.Value,
				Reason: "is not a finite number (write a number, or leave the key out)"}
		}
		if n.Style == 0 && n.Tag == "!!float" {
			if f, err := strconv.ParseFloat(n.Value, 64); err == nil && (f > 1e15 || f < -1e15) {
				return &weather.InputError{File: d.File, Line: n.Line, Field: orValue(path), Value: n.Value,
					Reason: "is not a number pitcard can use (far beyond any range)"}
			}
		}
		if n.Style == 0 && yesNo[strings.ToLower(n.Value)] {
			d.Warnings = append(d.Warnings, fmt.Sprintf("%s line %d: %s: %s is read as the text %q, not as yes/no; write true or false if a rule checks it",
				d.File, n.Line, orValue(path), n.Value, n.Value))
		}
	}
	return nil
}

func orValue(path string) string {
	if path == "" {
		return "value"
	}
	return path
}

// Decode decodes the document into v. With known set, a key not in v is
// refused, and the message lists the keys the file may hold.
func (d *Doc) Decode(v any, known bool) error {
	if d.root == nil || len(d.root.Content) == 0 {
		return nil
	}
	var buf strings.Builder
	enc := yaml.NewEncoder(&buf)
	if err := enc.Encode(d.root); err != nil {
		return err
	}
	dec := yaml.NewDecoder(strings.NewReader(buf.String()))
	dec.KnownFields(known)
	if err := dec.Decode(v); err != nil && !errors.Is(err, io.EOF) {
		return d.plain(err, v)
	}
	return nil
}

// Line is the line of key (a dotted path), or 0.
func (d *Doc) Line(key string) int { return d.Lines[key] }

// At puts the line of an InputError's key on it when it has none.
func (d *Doc) At(err error) error {
	var ie *weather.InputError
	if errors.As(err, &ie) && ie.Line == 0 {
		if l := d.Lines[ie.Field]; l > 0 {
			cp := *ie
			cp.File, cp.Line = d.File, l
			return &cp
		}
	}
	return err
}

var (
	lineRe    = regexp.MustCompile(`^line (\d+): (.*)$`)
	unknownRe = regexp.MustCompile(`^field (\S+) not found in type \S+$`)
	typeRe    = regexp.MustCompile("^cannot unmarshal !!(\\w+) `(.*)` into (\\S+)$")
)

// plain turns a YAML decoder's error into words with the file and line.
func (d *Doc) plain(err error, v any) error {
	msgs := []string{strings.TrimPrefix(err.Error(), "yaml: ")}
	var te *yaml.TypeError
	if errors.As(err, &te) && len(te.Errors) > 0 {
		msgs = te.Errors
	}
	m := msgs[0]
	line := 0
	if g := lineRe.FindStringSubmatch(m); g != nil {
		line, _ = strconv.Atoi(g[1])
		m = g[2]
	}
	if g := unknownRe.FindStringSubmatch(m); g != nil {
		reason := "is not a key of this file"
		if keys := Keys(v); len(keys) > 0 {
			reason += " (keys: " + strings.Join(keys, ", ") + ")"
		}
		return &weather.InputError{File: d.File, Line: line, Field: "key", Value: g[1], Reason: reason}
	}
	if g := typeRe.FindStringSubmatch(m); g != nil {
		key := d.keyAt(line)
		return &weather.InputError{File: d.File, Line: line, Field: orValue(key), Value: g[2], Reason: "is not " + goTypeWords(g[3])}
	}
	return &weather.InputError{File: d.File, Line: line, Field: "yaml", Reason: "is not valid YAML: " + m}
}

// keyAt is the key written on a line.
func (d *Doc) keyAt(line int) string {
	best := ""
	for k, l := range d.Lines {
		if l == line && (best == "" || len(k) > len(best)) {
			best = k
		}
	}
	return best
}

func goTypeWords(t string) string {
	switch {
	case strings.HasPrefix(t, "float"), strings.HasPrefix(t, "int"), strings.HasPrefix(t, "uint"):
		return "a number"
	case t == "bool":
		return "true or false"
	case t == "string" || strings.HasSuffix(t, "Induction"):
		return "a word or text"
	case strings.HasPrefix(t, "[]"):
		return "a list"
	case strings.HasPrefix(t, "map"), strings.HasPrefix(t, "struct"):
		return "a set of keys"
	}
	return "of the right kind"
}

// Keys are the YAML keys of a struct (its yaml tags), sorted.
func Keys(v any) []string {
	if v == nil {
		return nil
	}
	out, err := yaml.Marshal(v)
	if err != nil {
		return nil
	}
	var m map[string]any
	if yaml.Unmarshal(out, &m) != nil {
		return nil
	}
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}
