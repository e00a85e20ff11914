package api

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	yaml "go.yaml.in/yaml/v3"
	"google.golang.org/protobuf/reflect/protoreflect"
)

// maxTextValues bounds the values a text may hold once its aliases are
// expanded, so that a few nested aliases cannot make a huge message.
const maxTextValues = 1_000_000

// textDecoder walks a YAML node tree against a message descriptor,
// writes the protojson text of what is valid, and collects every problem
// with its position.
type textDecoder struct {
	problems []TextProblem
	pos      TextPositions
	values   int
	tooLarge bool
}

func (d *textDecoder) bad(n *yaml.Node, path, format string, args ...any) {
	d.problems = append(d.problems, TextProblem{Line: n.Line, Column: n.Column, Field: path, Reason: fmt.Sprintf(format, args...)})
}

// resolve follows aliases and counts the value against the budget; nil
// means the walk must stop.
func (d *textDecoder) resolve(n *yaml.Node) *yaml.Node {
	for n.Kind == yaml.AliasNode && n.Alias != nil {
		n = n.Alias
	}
	if d.values++; d.values > maxTextValues {
		if !d.tooLarge {
			d.bad(n, "", "more than %d values once aliases are expanded", maxTextValues)
			d.tooLarge = true
		}
		return nil
	}
	return n
}

func isNull(n *yaml.Node) bool { return n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null" }

// kindName names a node's kind for messages.
func kindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	}
	return fmt.Sprintf("%q", n.Value)
}

// textPair is one key and value of a mapping; merged pairs come from a
// YAML merge key and yield to the mapping's own.
type textPair struct {
	key, value *yaml.Node
	merged     bool
}

// pairs lists a mapping's own pairs, then those of its merge keys.
func (d *textDecoder) pairs(n *yaml.Node, merged bool, depth int) []textPair {
	var own, more []textPair
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.ShortTag() != "!!merge" {
			own = append(own, textPair{k, v, merged})
			continue
		}
		srcs := []*yaml.Node{v}
		if r := d.resolve(v); r != nil && r.Kind == yaml.SequenceNode {
			srcs = r.Content
		}
		for _, s := range srcs {
			if s = d.resolve(s); s == nil {
				return nil
			}
			if s.Kind != yaml.MappingNode || depth > 32 {
				d.bad(s, "", "a merge key (<<) needs a mapping or a list of mappings")
				continue
			}
			more = append(more, d.pairs(s, true, depth+1)...)
		}
	}
	return append(own, more...)
}

// message writes the protojson object of mapping n as message md.
func (d *textDecoder) message(n *yaml.Node, md protoreflect.MessageDescriptor, path string, buf *bytes.Buffer) {
	if n = d.resolve(n); n == nil {
		return
	}
	d.pos[path] = TextPosition{n.Line, n.Column}
	if strings.HasPrefix(string(md.FullName()), "google.protobuf.") {
		d.generic(n, path, buf) // protojson checks the well-known types
		return
	}
	if n.Kind != yaml.MappingNode {
		d.bad(n, path, "must be a mapping of the fields of %s, got %s", md.Name(), kindName(n))
		return
	}
	fields := md.Fields()
	seen := map[protoreflect.FieldNumber]*yaml.Node{}
	oneofs := map[protoreflect.FullName]protoreflect.FieldDescriptor{}
	buf.WriteByte('{')
	first := true
	for _, p := range d.pairs(n, false, 0) {
		if d.tooLarge {
			return
		}
		k := p.key
		if k.Kind != yaml.ScalarNode {
			d.bad(k, path, "a field name must be text, got %s", kindName(k))
			continue
		}
		fd := fields.ByJSONName(k.Value)
		if fd == nil {
			fd = fields.ByName(protoreflect.Name(k.Value))
		}
		if fd == nil {
			d.bad(k, joinField(path, k.Value), "unknown field %q of %s; %s", k.Value, md.Name(), suggestField(fields, k.Value))
			continue
		}
		fpath := joinField(path, string(fd.Name()))
		if at, ok := seen[fd.Number()]; ok {
			if !p.merged {
				d.bad(k, fpath, "given twice (first at line %d, column %d)", at.Line, at.Column)
			}
			continue
		}
		seen[fd.Number()] = k
		v := d.resolve(p.value)
		if v == nil {
			return
		}
		if isNull(v) {
			continue
		}
		if o := fd.ContainingOneof(); o != nil && !o.IsSynthetic() {
			if other, ok := oneofs[o.FullName()]; ok {
				d.bad(k, fpath, "give only one of %s; %s is given too", oneofNames(o), other.Name())
				continue
			}
			oneofs[o.FullName()] = fd
		}
		if !first {
			buf.WriteByte(',')
		}
		first = false
		writeJSONString(buf, fd.JSONName())
		buf.WriteByte(':')
		d.field(v, fd, fpath, buf)
	}
	buf.WriteByte('}')
}

func joinField(path, name string) string {
	if path == "" {
		return name
	}
	return path + "." + name
}

// field writes the value of one field: a list, a map or a single value.
func (d *textDecoder) field(n *yaml.Node, fd protoreflect.FieldDescriptor, path string, buf *bytes.Buffer) {
	d.pos[path] = TextPosition{n.Line, n.Column}
	switch {
	case fd.IsList():
		if !d.shaped(n, yaml.SequenceNode, path, buf) {
			return
		}
		d.list(n, path, buf, func(e *yaml.Node, ep string) {
			if isNull(e) {
				d.bad(e, ep, "a list element must not be null")
				buf.WriteString("null")
				return
			}
			d.pos[ep] = TextPosition{e.Line, e.Column}
			d.single(e, fd, ep, buf)
		})
	case fd.IsMap():
		if !d.shaped(n, yaml.MappingNode, path, buf) {
			return
		}
		buf.WriteByte('{')
		seen := map[string]*yaml.Node{}
		first := true
		for _, p := range d.pairs(n, false, 0) {
			v := d.resolve(p.value)
			if v == nil {
				return
			}
			kp := fmt.Sprintf("%s[%q]", path, p.key.Value)
			if at, ok := seen[p.key.Value]; ok {
				if !p.merged {
					d.bad(p.key, kp, "key given twice (first at line %d, column %d)", at.Line, at.Column)
				}
				continue
			}
			seen[p.key.Value] = p.key
			if !first {
				buf.WriteByte(',')
			}
			first = false
			writeJSONString(buf, p.key.Value)
			buf.WriteByte(':')
			d.pos[kp] = TextPosition{v.Line, v.Column}
			d.single(v, fd.MapValue(), kp, buf)
		}
		buf.WriteByte('}')
	default:
		d.single(n, fd, path, buf)
	}
}

// list writes the JSON array of sequence n, each element (aliases
// followed) by write with its path.
func (d *textDecoder) list(n *yaml.Node, path string, buf *bytes.Buffer, write func(e *yaml.Node, path string)) {
	buf.WriteByte('[')
	for i, e := range n.Content {
		if e = d.resolve(e); e == nil {
			return
		}
		if i > 0 {
			buf.WriteByte(',')
		}
		write(e, fmt.Sprintf("%s[%d]", path, i))
	}
	buf.WriteByte(']')
}

// shaped reports whether n is a list or a mapping as kind asks; if not it
// records the problem and writes an empty one.
func (d *textDecoder) shaped(n *yaml.Node, kind yaml.Kind, path string, buf *bytes.Buffer) bool {
	if n.Kind == kind {
		return true
	}
	if kind == yaml.SequenceNode {
		d.bad(n, path, "must be a list, got %s", kindName(n))
		buf.WriteString("[]")
	} else {
		d.bad(n, path, "must be a mapping, got %s", kindName(n))
		buf.WriteString("{}")
	}
	return false
}

// single writes one value of fd's kind.
func (d *textDecoder) single(n *yaml.Node, fd protoreflect.FieldDescriptor, path string, buf *bytes.Buffer) {
	if fd.Kind() == protoreflect.MessageKind || fd.Kind() == protoreflect.GroupKind {
		d.message(n, fd.Message(), path, buf)
		return
	}
	if n.Kind != yaml.ScalarNode {
		d.bad(n, path, "must be a single value, got %s", kindName(n))
		buf.WriteString("null")
		return
	}
	switch fd.Kind() {
	case protoreflect.EnumKind:
		d.enum(n, fd.Enum(), path, buf)
	case protoreflect.BoolKind:
		if n.ShortTag() != "!!bool" {
			d.bad(n, path, "must be true or false, got %q", n.Value)
		}
		buf.WriteString(strconv.FormatBool(n.Value == "true" || n.Value == "True" || n.Value == "TRUE"))
	case protoreflect.StringKind, protoreflect.BytesKind:
		writeJSONString(buf, n.Value)
	case protoreflect.FloatKind, protoreflect.DoubleKind:
		buf.WriteString(d.float(n, path, fd.Kind() == protoreflect.FloatKind))
	default:
		buf.WriteString(d.integer(n, fd.Kind(), path))
	}
}

// enum writes an enum value given by name or number.
func (d *textDecoder) enum(n *yaml.Node, ed protoreflect.EnumDescriptor, path string, buf *bytes.Buffer) {
	if ev := ed.Values().ByName(protoreflect.Name(n.Value)); ev != nil {
		writeJSONString(buf, n.Value)
		return
	}
	if i, err := strconv.ParseInt(n.Value, 10, 32); err == nil {
		buf.WriteString(strconv.FormatInt(i, 10))
		return
	}
	var names []string
	for i := 0; i < ed.Values().Len(); i++ {
		if v := ed.Values().Get(i); v.Number() != 0 {
			names = append(names, string(v.Name()))
		}
	}
	d.bad(n, path, "unknown %s value %q; valid values: %s", ed.Name(), n.Value, strings.Join(names, ", "))
	buf.WriteString("0")
}

// nonFiniteWords are the spellings of NaN and the infinities in YAML and
// in protojson's strings.
var nonFiniteWords = map[string]bool{".nan": true, ".inf": true, "+.inf": true, "-.inf": true, "nan": true, "infinity": true, "-infinity": true, "+infinity": true, "inf": true, "-inf": true, "+inf": true}

// float checks a number and returns its JSON text.
func (d *textDecoder) float(n *yaml.Node, path string, single bool) string {
	if nonFiniteWords[strings.ToLower(n.Value)] {
		d.bad(n, path, "must be a finite number, got %s", n.Value)
		return "0"
	}
	f, err := strconv.ParseFloat(n.Value, 64)
	if err != nil {
		i, ierr := strconv.ParseInt(n.Value, 0, 64)
		if ierr != nil || n.ShortTag() != "!!int" {
			if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
				d.bad(n, path, "must be a finite number, got %s (out of range)", n.Value)
			} else {
				d.bad(n, path, "must be a number, got %q", n.Value)
			}
			return "0"
		}
		f = float64(i)
	}
	if single && math.Abs(f) > math.MaxFloat32 {
		d.bad(n, path, "must be a finite number, got %s (out of range)", n.Value)
		return "0"
	}
	return strconv.FormatFloat(f, 'g', -1, 64)
}

// integer checks an integer of the field's kind and returns its text.
func (d *textDecoder) integer(n *yaml.Node, k protoreflect.Kind, path string) string {
	bits, unsigned := 64, false
	switch k {
	case protoreflect.Int32Kind, protoreflect.Sint32Kind, protoreflect.Sfixed32Kind:
		bits = 32
	case protoreflect.Uint32Kind, protoreflect.Fixed32Kind:
		bits, unsigned = 32, true
	case protoreflect.Uint64Kind, protoreflect.Fixed64Kind:
		unsigned = true
	}
	v := n.Value
	if f, err := strconv.ParseFloat(v, 64); err == nil && f == math.Trunc(f) && math.Abs(f) < 1<<53 {
		v = strconv.FormatFloat(f, 'f', -1, 64) // 48.0 and 1e3 are integers too
	}
	var err error
	if unsigned {
		_, err = strconv.ParseUint(v, 0, bits)
	} else {
		_, err = strconv.ParseInt(v, 0, bits)
	}
	if err != nil {
		kind := "an integer"
		if unsigned {
			kind = "a non-negative integer"
		}
		d.bad(n, path, "must be %s of %d bits, got %q", kind, bits, n.Value)
		return "0"
	}
	if u, err := strconv.ParseUint(v, 0, 64); err == nil {
		return strconv.FormatUint(u, 10)
	}
	i, _ := strconv.ParseInt(v, 0, 64)
	return strconv.FormatInt(i, 10)
}

// generic writes any node as JSON (for well-known types, which protojson
// then checks).
func (d *textDecoder) generic(n *yaml.Node, path string, buf *bytes.Buffer) {
	switch n.Kind {
	case yaml.MappingNode:
		buf.WriteByte('{')
		for i, p := range d.pairs(n, false, 0) {
			v := d.resolve(p.value)
			if v == nil {
				return
			}
			if i > 0 {
				buf.WriteByte(',')
			}
			writeJSONString(buf, p.key.Value)
			buf.WriteByte(':')
			d.generic(v, joinField(path, p.key.Value), buf)
		}
		buf.WriteByte('}')
	case yaml.SequenceNode:
		d.list(n, path, buf, func(e *yaml.Node, ep string) { d.generic(e, ep, buf) })
	default:
		switch n.ShortTag() {
		case "!!null":
			buf.WriteString("null")
		case "!!bool":
			buf.WriteString(strconv.FormatBool(n.Value == "true"))
		case "!!int", "!!float":
			buf.WriteString(d.float(n, path, false))
		default:
			writeJSONString(buf, n.Value)
		}
	}
}

func writeJSONString(buf *bytes.Buffer, s string) {
	b, _ := json.Marshal(s) // a string always marshals
	buf.Write(b)
}

// oneofNames lists a oneof's members.
func oneofNames(o protoreflect.OneofDescriptor) string {
	var names []string
	for i := 0; i < o.Fields().Len(); i++ {
		names = append(names, string(o.Fields().Get(i).Name()))
	}
	return strings.Join(names, ", ")
}

// suggestField names the closest known field, or lists them all.
func suggestField(fields protoreflect.FieldDescriptors, name string) string {
	var names []string
	best, bestD := "", 4
	for i := 0; i < fields.Len(); i++ {
		f := string(fields.Get(i).Name())
		names = append(names, f)
		if len(name) > 2*len(f) {
			continue // far too long to be a slip of this name
		}
		if dist := editDistance(strings.ToLower(name), f); dist < bestD {
			best, bestD = f, dist
		}
	}
	if best != "" {
		return fmt.Sprintf("did you mean %s?", best)
	}
	sort.Strings(names)
	return "known fields: " + strings.Join(names, ", ")
}

// editDistance is the Levenshtein distance of a and b (bytes).
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
