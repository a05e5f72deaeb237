package casefile

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// decoder walks the yaml.Node tree of one case file, collecting errors and
// warnings with their positions.
type decoder struct {
	file  string
	errs  []*Error
	warns []Warning
}

// pos returns the position of n.
func (d *decoder) pos(n *yaml.Node) Position {
	if n == nil {
		return Position{File: d.file}
	}
	return Position{File: d.file, Line: n.Line, Column: n.Column}
}

// fail records an error at n.
func (d *decoder) fail(n *yaml.Node, path, format string, args ...any) {
	if len(d.errs) >= MaxErrors {
		return
	}
	d.errs = append(d.errs, &Error{Position: d.pos(n), Path: path, Message: fmt.Sprintf(format, args...)})
}

// warn records a warning at n.
func (d *decoder) warn(n *yaml.Node, path, format string, args ...any) {
	d.warns = append(d.warns, Warning{Position: d.pos(n), Path: path, Message: fmt.Sprintf(format, args...)})
}

// join appends a key to a path.
func join(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// index appends a list index to a path.
func index(path string, i int) string { return fmt.Sprintf("%s[%d]", path, i) }

// nodeKind names a node kind for messages.
func nodeKind(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		if n.Tag == "!!null" {
			return "an empty value"
		}
		return fmt.Sprintf("the value %q", clip(n.Value))
	case yaml.AliasNode:
		return "an alias"
	}
	return "a document"
}

// clip shortens long values quoted in messages.
func clip(s string) string {
	if r := []rune(s); len(r) > 40 {
		return string(r[:37]) + "..."
	}
	return s
}

// entry is one key of a mapping with its nodes.
type entry struct {
	key   string
	kNode *yaml.Node
	vNode *yaml.Node
}

// mapping is a decoded YAML mapping whose keys were checked for
// duplicates.
type mapping struct {
	node    *yaml.Node
	path    string
	entries []entry // in file order
	byKey   map[string]int
}

// get returns the value node of key, or nil.
func (m *mapping) get(key string) *yaml.Node {
	if m == nil {
		return nil
	}
	if i, ok := m.byKey[key]; ok {
		return m.entries[i].vNode
	}
	return nil
}

// has reports whether key is present.
func (m *mapping) has(key string) bool { return m.get(key) != nil }

// keyNode returns the key node of key, or the mapping node.
func (m *mapping) keyNode(key string) *yaml.Node {
	if i, ok := m.byKey[key]; ok {
		return m.entries[i].kNode
	}
	return m.node
}

// mapping decodes n as a mapping with string keys, reporting repeated keys.
// When allowed is not nil, keys outside it are reported (with the allowed
// list) and dropped. It returns nil if n is not a mapping.
func (d *decoder) mapping(n *yaml.Node, path string, allowed []string) *mapping {
	if n.Kind != yaml.MappingNode {
		if allowed != nil {
			d.fail(n, path, "want a mapping with keys %s, got %s", strings.Join(allowed, ", "), nodeKind(n))
		} else {
			d.fail(n, path, "want a mapping, got %s", nodeKind(n))
		}
		return nil
	}
	m := &mapping{node: n, path: path, byKey: make(map[string]int)}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.Kind != yaml.ScalarNode || k.Tag == "!!null" || k.Value == "" {
			d.fail(k, path, "a key must be a plain word, got %s", nodeKind(k))
			continue
		}
		if j, dup := m.byKey[k.Value]; dup {
			d.fail(k, join(path, k.Value), "key %q repeated (first at line %d)", k.Value, m.entries[j].kNode.Line)
			continue
		}
		if allowed != nil && !slices.Contains(allowed, k.Value) {
			d.unknownKey(k, path, allowed)
			continue
		}
		m.byKey[k.Value] = len(m.entries)
		m.entries = append(m.entries, entry{key: k.Value, kNode: k, vNode: v})
	}
	return m
}

// unknownKey reports a key not in allowed, suggesting the nearest.
func (d *decoder) unknownKey(k *yaml.Node, path string, allowed []string) {
	msg := fmt.Sprintf("unknown key %q", k.Value)
	if s := nearest(k.Value, allowed); s != "" {
		msg += fmt.Sprintf(" (did you mean %q?)", s)
	}
	if len(allowed) == 0 {
		msg += "; no keys are allowed here"
	} else {
		msg += "; allowed: " + strings.Join(allowed, ", ")
	}
	d.fail(k, join(path, k.Value), "%s", msg)
}

// restrict reports keys of m outside allowed (used when the allowed keys
// depend on a value in the same mapping); what names the reason.
func (d *decoder) restrict(m *mapping, allowed []string, what string) {
	for _, e := range m.entries {
		if !slices.Contains(allowed, e.key) {
			d.fail(e.kNode, join(m.path, e.key), "key %q is not used %s; allowed: %s", e.key, what, strings.Join(allowed, ", "))
		}
	}
}

// nearest returns the allowed word within edit distance 2 of s (the first
// closest), or "".
func nearest(s string, allowed []string) string {
	best, bestD := "", 3
	for _, a := range allowed {
		if dd := editDistance(s, a); dd < bestD {
			best, bestD = a, dd
		}
	}
	return best
}

// editDistance is the Levenshtein distance (Wagner–Fischer dynamic
// programme), capped for long inputs.
func editDistance(a, b string) int {
	if len(a) > 64 || len(b) > 64 {
		return 99
	}
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := prev[j-1]
			if a[i-1] != b[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

// scalar checks that n is a non-empty scalar and returns its text.
func (d *decoder) scalar(n *yaml.Node, path, want string) (string, bool) {
	if n.Kind != yaml.ScalarNode || n.Tag == "!!null" {
		d.fail(n, path, "want %s, got %s", want, nodeKind(n))
		return "", false
	}
	return n.Value, true
}

// str decodes a string.
func (d *decoder) str(n *yaml.Node, path string) (string, bool) {
	return d.scalar(n, path, "a text")
}

// word decodes one of choices.
func (d *decoder) word(n *yaml.Node, path string, choices []string) (string, bool) {
	s, ok := d.scalar(n, path, "one of "+strings.Join(choices, ", "))
	if !ok {
		return "", false
	}
	if !slices.Contains(choices, s) {
		msg := fmt.Sprintf("%q is not one of %s", clip(s), strings.Join(choices, ", "))
		if sug := nearest(s, choices); sug != "" {
			msg += fmt.Sprintf(" (did you mean %q?)", sug)
		}
		d.fail(n, path, "%s", msg)
		return "", false
	}
	return s, true
}

// integer decodes an integer in [lo, hi].
func (d *decoder) integer(n *yaml.Node, path string, lo, hi int) (int, bool) {
	s, ok := d.scalar(n, path, "an integer")
	if !ok {
		return 0, false
	}
	v, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil {
		d.fail(n, path, "want an integer, got %q", clip(s))
		return 0, false
	}
	if v < lo || v > hi {
		d.fail(n, path, "%d is out of range; want %d to %d", v, lo, hi)
		return 0, false
	}
	return v, true
}

// quantity decodes a number in SI units of kind k, or a number with a
// unit of k's dimension. Non-finite values are rejected.
func (d *decoder) quantity(n *yaml.Node, path string, k kind) (float64, bool) {
	want := "a number"
	if k.dim != dimNone {
		want = fmt.Sprintf("a %s (a number in %s, or a number with a unit)", k.name, k.example)
	}
	s, ok := d.scalar(n, path, want)
	if !ok {
		return 0, false
	}
	q, err := parseQuantity(s, k.temperature)
	if err != nil {
		d.fail(n, path, "%v", err)
		return 0, false
	}
	if q.unit != "" && q.dim != k.dim {
		d.fail(n, path, "unit %q has dimension %s, want %s (e.g. %s)", q.unit, q.dim, k.dim, k.example)
		return 0, false
	}
	if math.IsNaN(q.value) || math.IsInf(q.value, 0) {
		d.fail(n, path, "%q is not finite", clip(s))
		return 0, false
	}
	return q.value, true
}

// positive decodes a positive quantity.
func (d *decoder) positive(n *yaml.Node, path string, k kind) (float64, bool) {
	v, ok := d.quantity(n, path, k)
	if ok && !(v > 0) {
		d.fail(n, path, "%s is not positive", asWritten(n, v))
		return 0, false
	}
	return v, ok
}

// nonNegative decodes a quantity >= 0.
func (d *decoder) nonNegative(n *yaml.Node, path string, k kind) (float64, bool) {
	v, ok := d.quantity(n, path, k)
	if ok && v < 0 {
		d.fail(n, path, "%s is negative", asWritten(n, v))
		return 0, false
	}
	return v, ok
}

// vector decodes a list of two quantities of kind k.
func (d *decoder) vector(n *yaml.Node, path string, k kind) ([2]float64, bool) {
	var v [2]float64
	if n.Kind != yaml.SequenceNode || len(n.Content) != 2 {
		d.fail(n, path, "want a list of two %ss [x, y], got %s", k.name, describeList(n))
		return v, false
	}
	ok := true
	for i, c := range n.Content {
		x, good := d.quantity(c, index(path, i), k)
		v[i] = x
		ok = ok && good
	}
	return v, ok
}

// describeList names a node, giving the length of a list.
func describeList(n *yaml.Node) string {
	if n.Kind == yaml.SequenceNode {
		return fmt.Sprintf("a list of %d", len(n.Content))
	}
	return nodeKind(n)
}

// sequence checks that n is a list.
func (d *decoder) sequence(n *yaml.Node, path, want string) ([]*yaml.Node, bool) {
	if n.Kind != yaml.SequenceNode {
		d.fail(n, path, "want a list of %s, got %s", want, nodeKind(n))
		return nil, false
	}
	return n.Content, true
}

// checkAliases reports every alias in the tree: aliases and merge keys are
// not part of the case format (they would also let a small file expand
// into a huge tree).
func (d *decoder) checkAliases(n *yaml.Node, depth int) bool {
	if n == nil {
		return true
	}
	if depth > maxDepth {
		d.fail(n, "", "the file nests deeper than %d levels", maxDepth)
		return false
	}
	if n.Kind == yaml.AliasNode {
		d.fail(n, "", "aliases (*%s) are not supported; repeat the value", clip(n.Value))
		return false
	}
	ok := true
	for _, c := range n.Content {
		ok = d.checkAliases(c, depth+1) && ok
	}
	return ok
}

// maxDepth bounds the nesting of the YAML tree.
const maxDepth = 32

// child returns the value of key in the mapping node n (the first, if
// repeated), or n itself when there is none.
func child(n *yaml.Node, key string) *yaml.Node {
	if n.Kind == yaml.MappingNode {
		for i := 0; i+1 < len(n.Content); i += 2 {
			if n.Content[i].Value == key {
				return n.Content[i+1]
			}
		}
	}
	return n
}

// asWritten returns the scalar of n as the case writes it and, when it
// carries a unit, its SI value v: "-300 degC (-26.85 in SI units)".
func asWritten(n *yaml.Node, v float64) string {
	text := strings.TrimSpace(n.Value)
	if _, err := strconv.ParseFloat(text, 64); err == nil {
		return fmt.Sprintf("%.10g", v)
	}
	return fmt.Sprintf("%s (%.10g in SI units)", clip(text), v)
}
