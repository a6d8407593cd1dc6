package ingest

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"time"

	"gopkg.in/yaml.v3"
)

// The YAML documents of the archive are read strictly, through yaml.Node so
// that every refusal names its line: an unknown key, a duplicate key, a
// value of the wrong type, a missing required key, a schema other than 1 or
// an impossible value is a *Problem. All mistakes of one file are reported
// together (ProblemList), but one mistake gives one problem: a refused value
// is not checked again further down.

// SchemaVersion is the only `schema:` value this version reads.
const SchemaVersion = 1

// ProblemList is the error of a parser that found more than one mistake in
// one file.
type ProblemList []*Problem

func (l ProblemList) Error() string {
	s := make([]string, len(l))
	for i, p := range l {
		s[i] = p.Error()
	}
	return strings.Join(s, "\n")
}

// Problems unpacks the error of any ingest reader into its problems: a
// *Problem, a ProblemList, or any other error as one problem without a
// position. It returns nil for a nil error.
func Problems(err error) []*Problem {
	if err == nil {
		return nil
	}
	var l ProblemList
	if errors.As(err, &l) {
		return append([]*Problem(nil), l...)
	}
	var p *Problem
	if errors.As(err, &p) {
		return []*Problem{p}
	}
	return []*Problem{{Message: err.Error()}}
}

// yparser collects the problems of one YAML file.
type yparser struct {
	file  string
	probs ProblemList
}

func (p *yparser) errf(line int, format string, args ...any) {
	p.probs = append(p.probs, Problemf(p.file, line, format, args...))
}

// err returns nil, the single *Problem, or the list.
func (p *yparser) err() error {
	switch len(p.probs) {
	case 0:
		return nil
	case 1:
		return p.probs[0]
	}
	return p.probs
}

var yamlLineRe = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// document parses data and returns its top-level mapping, or nil after
// reporting why there is none.
func (p *yparser) document(data []byte, what string) *ymap {
	if strings.TrimSpace(string(data)) == "" {
		p.errf(0, "file is empty; expected a %s document starting with schema: %d", what, SchemaVersion)
		return nil
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	err := dec.Decode(&doc)
	if err == nil {
		// One document per file: a second one would be silently ignored.
		var extra yaml.Node
		if err2 := dec.Decode(&extra); err2 == nil {
			p.errf(extra.Line, "a second YAML document starts here; expected one %s document per file", what)
			return nil
		} else if err2 != io.EOF {
			err = err2
		}
	}
	if err != nil && err != io.EOF {
		msg := err.Error()
		if m := yamlLineRe.FindStringSubmatch(msg); m != nil {
			ln, _ := strconv.Atoi(m[1])
			p.errf(ln, "not valid YAML: %s", m[2])
		} else {
			p.errf(0, "not valid YAML: %s", strings.TrimPrefix(msg, "yaml: "))
		}
		return nil
	}
	if err == io.EOF || doc.Kind != yaml.DocumentNode || len(doc.Content) == 0 {
		p.errf(0, "file holds no YAML document; expected a %s document starting with schema: %d", what, SchemaVersion)
		return nil
	}
	return p.mapping(doc.Content[0], what)
}

// resolve follows aliases to the node they name.
func resolve(n *yaml.Node) *yaml.Node {
	for i := 0; n != nil && n.Kind == yaml.AliasNode && i < 16; i++ {
		n = n.Alias
	}
	return n
}

func kindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		if n.Tag == "!!null" {
			return "nothing"
		}
		return fmt.Sprintf("%q", n.Value)
	}
	return "an unexpected YAML node"
}

// ymap is one YAML mapping being decoded against a list of known keys.
type ymap struct {
	p      *yparser
	node   *yaml.Node
	what   string
	fields map[string]field
	vals   map[string]*yaml.Node
	keys   map[string]*yaml.Node
}

// mapping checks that n is a mapping; the known keys are declared later
// with expect and checked by check.
func (p *yparser) mapping(n *yaml.Node, what string) *ymap {
	n = resolve(n)
	if n == nil || n.Kind != yaml.MappingNode {
		line := 0
		found := "nothing"
		if n != nil {
			line, found = n.Line, kindName(n)
		}
		p.errf(line, "%s: found %s; expected a mapping of key: value lines", what, found)
		return nil
	}
	m := &ymap{p: p, node: n, what: what, fields: map[string]field{}, vals: map[string]*yaml.Node{}, keys: map[string]*yaml.Node{}}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := resolve(n.Content[i]), n.Content[i+1]
		if k == nil || k.Kind != yaml.ScalarNode {
			p.errf(n.Content[i].Line, "%s: a key is %s; expected a plain name", what, kindName(n.Content[i]))
			continue
		}
		if prev, dup := m.keys[k.Value]; dup {
			p.errf(k.Line, "%s: key %q is repeated (first on line %d); expected each key once", what, k.Value, prev.Line)
			continue
		}
		m.keys[k.Value] = k
		m.vals[k.Value] = v
	}
	return m
}

// named renames the mapping after the text value of key, when it has one,
// so that messages say `beam "b00"` rather than `beam 1`.
func (m *ymap) named(key, format string) *ymap {
	if m == nil {
		return nil
	}
	if v := resolve(m.vals[key]); v != nil && v.Kind == yaml.ScalarNode && v.Tag != "!!null" && strings.TrimSpace(v.Value) != "" {
		m.what = fmt.Sprintf(format, v.Value)
	}
	return m
}

// expect declares the known keys, then reports unknown and missing keys.
func (m *ymap) expect(fields ...field) *ymap {
	if m == nil {
		return nil
	}
	names := make([]string, 0, len(fields))
	for _, f := range fields {
		m.fields[f.key] = f
		names = append(names, f.key)
	}
	sort.Strings(names)
	// Unknown keys in file order, so messages follow the file.
	for i := 0; i+1 < len(m.node.Content); i += 2 {
		k := resolve(m.node.Content[i])
		if k == nil || k.Kind != yaml.ScalarNode {
			continue
		}
		if _, ok := m.fields[k.Value]; !ok && m.keys[k.Value] == k {
			m.p.errf(k.Line, "%s: unknown key %q; expected one of %s", m.what, k.Value, strings.Join(names, ", "))
		}
	}
	for _, f := range fields {
		if !f.req {
			continue
		}
		if v, ok := m.vals[f.key]; !ok {
			m.p.errf(m.node.Line, "%s: missing required key %q; expected %s", m.what, f.key, f.expect)
		} else if isNull(v) {
			m.p.errf(m.keys[f.key].Line, "%s: %s has no value; expected %s", m.what, f.key, f.expect)
		}
	}
	return m
}

func isNull(n *yaml.Node) bool {
	n = resolve(n)
	return n == nil || (n.Kind == yaml.ScalarNode && n.Tag == "!!null")
}

// has reports whether key is present with a non-null value.
func (m *ymap) has(key string) bool {
	if m == nil {
		return false
	}
	v, ok := m.vals[key]
	return ok && !isNull(v)
}

// value returns the node of key, or nil when absent or null (a missing
// required key was already reported by expect).
func (m *ymap) value(key string) *yaml.Node {
	if !m.has(key) {
		return nil
	}
	return resolve(m.vals[key])
}

// line returns the line of key's value, or of the mapping when absent.
func (m *ymap) line(key string) int {
	if m == nil {
		return 0
	}
	if v, ok := m.vals[key]; ok && v != nil {
		return v.Line
	}
	return m.node.Line
}

func (m *ymap) bad(key string, n *yaml.Node) {
	m.p.errf(n.Line, "%s: %s is %s; expected %s", m.what, key, kindName(n), m.fields[key].expect)
}

// invalid reports an impossible value of key.
func (m *ymap) invalid(key string, format string, args ...any) {
	m.p.errf(m.line(key), "%s: %s %s; expected %s", m.what, key, fmt.Sprintf(format, args...), m.fields[key].expect)
}

// str returns a scalar as text (free text and identifiers: a number-looking
// serial such as 00017 stays text).
func (m *ymap) str(key string) (string, bool) {
	n := m.value(key)
	if n == nil {
		return "", false
	}
	if n.Kind != yaml.ScalarNode {
		m.bad(key, n)
		return "", false
	}
	if strings.TrimSpace(n.Value) == "" {
		m.invalid(key, "is empty")
		return "", false
	}
	return n.Value, true
}

// ident returns an identifier (serial, product, station or reference id,
// beam id): text that CheckIdentifier accepts, since it becomes a folder or
// file name of the site.
func (m *ymap) ident(key string) (string, bool) {
	s, ok := m.str(key)
	if !ok {
		return "", false
	}
	if err := CheckIdentifier(s); err != nil {
		m.p.errf(m.line(key), "%s: %s %v", m.what, key, err)
		return "", false
	}
	return s, true
}

// oneOf returns a text value that must be one of choices.
func (m *ymap) oneOf(key string, choices ...string) (string, bool) {
	s, ok := m.str(key)
	if !ok {
		return "", false
	}
	for _, c := range choices {
		if s == c {
			return s, true
		}
	}
	m.invalid(key, "%q is not allowed", s)
	return "", false
}

// numberNode reads a number scalar; text such as "abc" or "1,5" is refused.
func (p *yparser) numberNode(n *yaml.Node) (float64, bool) {
	if n.Kind != yaml.ScalarNode || (n.Tag != "!!int" && n.Tag != "!!float") {
		return 0, false
	}
	var f float64
	if err := n.Decode(&f); err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, false
	}
	return f, true
}

// num returns a finite number.
func (m *ymap) num(key string) (float64, bool) {
	n := m.value(key)
	if n == nil {
		return 0, false
	}
	f, ok := m.p.numberNode(n)
	if !ok {
		m.bad(key, n)
	}
	return f, ok
}

// numPtr returns a pointer to the number, nil when absent or refused.
func (m *ymap) numPtr(key string) *float64 {
	f, ok := m.num(key)
	if !ok {
		return nil
	}
	return &f
}

// positive returns a number that must be > 0.
func (m *ymap) positive(key string) (float64, bool) {
	f, ok := m.num(key)
	if ok && f <= 0 {
		m.invalid(key, "%s is not above 0", m.value(key).Value)
		return 0, false
	}
	return f, ok
}

// schema checks `schema: 1`.
func (m *ymap) schema() int {
	n := m.value("schema")
	if n == nil {
		return 0
	}
	if n.Kind != yaml.ScalarNode || n.Tag != "!!int" {
		m.bad("schema", n)
		return 0
	}
	v, err := strconv.Atoi(n.Value)
	if err != nil || v != SchemaVersion {
		m.p.errf(n.Line, "%s: schema %s is not supported; this version of the tool reads schema %d", m.what, n.Value, SchemaVersion)
		return 0
	}
	return v
}

// date reads a calendar date YYYY-MM-DD.
func (m *ymap) date(key string) (time.Time, bool) {
	n := m.value(key)
	if n == nil {
		return time.Time{}, false
	}
	if n.Kind == yaml.ScalarNode {
		if t, err := time.Parse("2006-01-02", n.Value); err == nil {
			return t, true
		}
	}
	m.bad(key, n)
	return time.Time{}, false
}

// instant reads an RFC 3339 time.
func (m *ymap) instant(key string) (time.Time, bool) {
	n := m.value(key)
	if n == nil {
		return time.Time{}, false
	}
	if n.Kind == yaml.ScalarNode {
		if t, err := time.Parse(time.RFC3339, n.Value); err == nil {
			return t, true
		}
	}
	m.bad(key, n)
	return time.Time{}, false
}

// seq returns the items of a list value.
func (m *ymap) seq(key string) ([]*yaml.Node, bool) {
	n := m.value(key)
	if n == nil {
		return nil, false
	}
	if n.Kind != yaml.SequenceNode {
		m.bad(key, n)
		return nil, false
	}
	return n.Content, true
}

// sub returns a nested mapping.
func (m *ymap) sub(key, what string) *ymap {
	n := m.value(key)
	if n == nil {
		return nil
	}
	if n.Kind != yaml.MappingNode {
		m.bad(key, n)
		return nil
	}
	return m.p.mapping(n, what)
}

// numbers reads a list of exactly count numbers (a table row, a band).
func (p *yparser) numbers(n *yaml.Node, count int, what, expect string) ([]float64, bool) {
	n = resolve(n)
	if n == nil || n.Kind != yaml.SequenceNode || len(n.Content) != count {
		line, found := 0, "nothing"
		if n != nil {
			line, found = n.Line, kindName(n)
			if n.Kind == yaml.SequenceNode {
				found = fmt.Sprintf("a list of %d", len(n.Content))
			}
		}
		p.errf(line, "%s is %s; expected %s", what, found, expect)
		return nil, false
	}
	out := make([]float64, count)
	for i, c := range n.Content {
		c = resolve(c)
		f, ok := p.numberNode(c)
		if !ok {
			p.errf(c.Line, "%s: item %d is %s; expected %s", what, i+1, kindName(c), expect)
			return nil, false
		}
		out[i] = f
	}
	return out, true
}

// strings reads a list of text items, each from choices when given.
func (m *ymap) strList(key string, choices ...string) ([]string, bool) {
	items, ok := m.seq(key)
	if !ok {
		return nil, false
	}
	if len(items) == 0 {
		m.invalid(key, "is an empty list")
		return nil, false
	}
	out := make([]string, 0, len(items))
	seen := map[string]bool{}
	for _, it := range items {
		it = resolve(it)
		if it.Kind != yaml.ScalarNode || it.Tag == "!!null" || strings.TrimSpace(it.Value) == "" {
			m.p.errf(it.Line, "%s: %s item is %s; expected %s", m.what, key, kindName(it), m.fields[key].expect)
			return nil, false
		}
		if len(choices) > 0 && !contains(choices, it.Value) {
			m.p.errf(it.Line, "%s: %s item %q is not allowed; expected %s", m.what, key, it.Value, m.fields[key].expect)
			return nil, false
		}
		if seen[it.Value] {
			m.p.errf(it.Line, "%s: %s item %q is repeated; expected each once", m.what, key, it.Value)
			return nil, false
		}
		seen[it.Value] = true
		out = append(out, it.Value)
	}
	return out, true
}

func contains(list []string, s string) bool {
	for _, c := range list {
		if c == s {
			return true
		}
	}
	return false
}
