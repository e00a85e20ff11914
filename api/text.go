package api

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"

	yaml "go.yaml.in/yaml/v3"
	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"
)

// DecodeText fills m from YAML or JSON text: the protojson form of the
// message (proto field names or their JSON names, enum value names).
// Spec, setup and vehicle files all go through here. Anchors, aliases,
// merge keys and comments may be used in YAML.
//
// Every problem is reported at once, each with the line and column the
// user wrote and the field's path: unknown fields (with the nearest
// known name), a field given twice, a bad enum value (with the valid
// ones), a number that is not finite (.nan, .inf, "NaN", 1e999) or not of
// the field's type, two members of one oneof, a second document or text
// after the JSON document, and invalid UTF-8. The error is a *TextError.
func DecodeText(b []byte, m proto.Message) error {
	_, err := DecodeTextPositions(b, m)
	return err
}

// DecodeTextPositions is DecodeText that also returns where each field
// was written, so that problems found later (by the server's validation)
// can be shown at the user's line.
func DecodeTextPositions(b []byte, m proto.Message) (TextPositions, error) {
	md := m.ProtoReflect().Descriptor()
	bufs, pos, err := decodeWalk(b, string(md.FullName()), func(d *textDecoder, root *yaml.Node) []*bytes.Buffer {
		var buf bytes.Buffer
		d.message(root, md, "", &buf)
		return []*bytes.Buffer{&buf}
	})
	if err != nil {
		return nil, err
	}
	if err := unmarshalWalked(bufs[0], m); err != nil {
		return nil, err
	}
	return pos, nil
}

// DecodeTextList is DecodeTextPositions for a file holding a list of
// messages (a road case list, say), each made by newM; the positions'
// paths start with the element's index ("[2].speed_m_per_s").
func DecodeTextList[M proto.Message](b []byte, newM func() M) ([]M, TextPositions, error) {
	md := newM().ProtoReflect().Descriptor()
	bufs, pos, err := decodeWalk(b, "list of "+string(md.FullName()), func(d *textDecoder, root *yaml.Node) []*bytes.Buffer {
		if root = d.resolve(root); root == nil {
			return nil
		}
		if root.Kind != yaml.SequenceNode {
			d.bad(root, "", "must be a list of %s, got %s", md.Name(), kindName(root))
			return nil
		}
		d.pos[""] = TextPosition{root.Line, root.Column}
		bufs := make([]*bytes.Buffer, len(root.Content))
		for i, e := range root.Content {
			bufs[i] = &bytes.Buffer{}
			d.message(e, md, fmt.Sprintf("[%d]", i), bufs[i])
		}
		return bufs
	})
	if err != nil {
		return nil, nil, err
	}
	out := make([]M, len(bufs))
	for i, buf := range bufs {
		out[i] = newM()
		if err := unmarshalWalked(buf, out[i]); err != nil {
			return nil, nil, err
		}
	}
	return out, pos, nil
}

// decodeWalk parses b and walks it with walk, which writes the protojson
// text of each message into a buffer; name is what the text should be,
// for errors.
func decodeWalk(b []byte, name string, walk func(d *textDecoder, root *yaml.Node) []*bytes.Buffer) ([]*bytes.Buffer, TextPositions, error) {
	root, err := parseText(b)
	if err != nil {
		if te, ok := err.(*TextError); ok {
			te.Message = name
		}
		return nil, nil, err
	}
	d := textDecoder{pos: TextPositions{}}
	bufs := walk(&d, root)
	if len(d.problems) > 0 {
		return nil, nil, &TextError{Message: name, Problems: d.problems}
	}
	return bufs, d.pos, nil
}

// unmarshalWalked fills m from the protojson text the walk wrote.
func unmarshalWalked(buf *bytes.Buffer, m proto.Message) error {
	if err := protojson.Unmarshal(buf.Bytes(), m); err != nil {
		// The walk checks what protojson checks; this is a fallback.
		name := string(m.ProtoReflect().Descriptor().FullName())
		return &TextError{Message: name, Problems: []TextProblem{{Reason: err.Error()}}}
	}
	return nil
}

// TextProblem is one problem of a text, at the line and column (from 1)
// where it was written; Field is the path of the field in the message
// ("" for the text as a whole).
type TextProblem struct {
	Line, Column int
	Field        string
	Reason       string
}

func (p TextProblem) String() string {
	var b strings.Builder
	if p.Line > 0 {
		fmt.Fprintf(&b, "line %d, column %d: ", p.Line, p.Column)
	}
	if p.Field != "" {
		b.WriteString(p.Field + ": ")
	}
	b.WriteString(p.Reason)
	return b.String()
}

// TextError lists every problem DecodeText found.
type TextError struct {
	Message  string // full name of the message decoded
	Problems []TextProblem
}

func (e *TextError) Error() string {
	if len(e.Problems) == 1 {
		return "not a " + e.Message + ": " + e.Problems[0].String()
	}
	var b strings.Builder
	fmt.Fprintf(&b, "not a %s, %d problems:", e.Message, len(e.Problems))
	for _, p := range e.Problems {
		b.WriteString("\n  " + p.String())
	}
	return b.String()
}

// TextPosition is where a value was written: line and column from 1.
type TextPosition struct{ Line, Column int }

// TextPositions maps field paths ("vehicle.corners[2].tyre_rate_n_per_m")
// to where their values were written.
type TextPositions map[string]TextPosition

// Of returns the position of path, or of the nearest enclosing field that
// was written (a field left out is reported at its parent); ok is false
// when none was.
func (p TextPositions) Of(path string) (TextPosition, bool) {
	for path != "" {
		if at, ok := p[path]; ok {
			return at, true
		}
		i := strings.LastIndexAny(path, ".[")
		if i < 0 {
			break
		}
		path = path[:i]
	}
	at, ok := p[""]
	return at, ok
}

// textProblem is a whole-text problem at the given byte offset.
func textProblem(b []byte, off int, format string, args ...any) error {
	line, col := lineColumn(b, off)
	return &TextError{Problems: []TextProblem{{Line: line, Column: col, Reason: fmt.Sprintf(format, args...)}}}
}

// lineColumn converts a byte offset to a line and a column (from 1; the
// column counts characters).
func lineColumn(b []byte, off int) (line, col int) {
	off = min(max(off, 0), len(b))
	line = 1 + bytes.Count(b[:off], []byte{'\n'})
	start := bytes.LastIndexByte(b[:off], '\n') + 1
	return line, 1 + utf8.RuneCount(b[start:off])
}

// parseText parses one YAML or JSON document into a node tree. JSON (a
// text starting with '{' or '[') is read by encoding/json, which knows
// JSON's escapes and refuses text after the document; YAML by yaml.v3,
// which refuses a second document here.
func parseText(b []byte) (*yaml.Node, error) {
	if !utf8.Valid(b) {
		off := 0
		for off < len(b) {
			r, n := utf8.DecodeRune(b[off:])
			if r == utf8.RuneError && n <= 1 {
				break
			}
			off += n
		}
		return nil, textProblem(b, off, "not valid UTF-8 text (byte 0x%02x at offset %d)", b[off], off)
	}
	trimmed := bytes.TrimLeft(b, " \t\r\n\ufeff")
	if len(trimmed) > 0 && (trimmed[0] == '{' || trimmed[0] == '[') {
		return parseJSON(b)
	}
	dec := yaml.NewDecoder(bytes.NewReader(b))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, textProblem(b, 0, "the text holds no document")
		}
		return nil, &TextError{Problems: []TextProblem{{Reason: "not YAML or JSON: " + err.Error()}}}
	}
	var next yaml.Node
	switch err := dec.Decode(&next); {
	case errors.Is(err, io.EOF):
	case err != nil:
		return nil, &TextError{Problems: []TextProblem{{Reason: "not YAML or JSON after the first document: " + err.Error()}}}
	default:
		return nil, &TextError{Problems: []TextProblem{{Line: next.Line, Column: next.Column, Reason: "a second document starts here; give one document"}}}
	}
	if len(doc.Content) == 0 {
		return nil, textProblem(b, 0, "the text holds no document")
	}
	return doc.Content[0], nil
}

// parseJSON reads one JSON value into yaml.Node form, with positions, and
// refuses anything after it.
func parseJSON(b []byte) (*yaml.Node, error) {
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.UseNumber()
	p := jsonParser{b: b, dec: dec}
	n, err := p.value()
	if err != nil {
		return nil, err
	}
	if off := len(b) - len(bytes.TrimLeft(b[dec.InputOffset():], " \t\r\n")); off < len(b) {
		return nil, textProblem(b, off, "text after the end of the JSON document; give one document")
	}
	return n, nil
}

type jsonParser struct {
	b   []byte
	dec *json.Decoder
}

// start is the offset of the next token: past white space, ',' and ':'.
func (p *jsonParser) start() int {
	off := int(p.dec.InputOffset())
	for off < len(p.b) && strings.IndexByte(" \t\r\n,:", p.b[off]) >= 0 {
		off++
	}
	return off
}

func (p *jsonParser) value() (*yaml.Node, error) {
	off := p.start()
	tok, err := p.dec.Token()
	if err != nil {
		return nil, textProblem(p.b, off, "not JSON: %v", err)
	}
	line, col := lineColumn(p.b, off)
	n := &yaml.Node{Kind: yaml.ScalarNode, Line: line, Column: col}
	switch t := tok.(type) {
	case json.Delim:
		n.Kind, n.Tag = yaml.SequenceNode, "!!seq"
		if t == '{' {
			n.Kind, n.Tag = yaml.MappingNode, "!!map"
		}
		for p.dec.More() {
			if n.Kind == yaml.MappingNode {
				k, err := p.value()
				if err != nil {
					return nil, err
				}
				n.Content = append(n.Content, k)
			}
			v, err := p.value()
			if err != nil {
				return nil, err
			}
			n.Content = append(n.Content, v)
		}
		if _, err := p.dec.Token(); err != nil {
			return nil, textProblem(p.b, p.start(), "not JSON: %v", err)
		}
	case string:
		n.Tag, n.Value = "!!str", t
	case json.Number:
		n.Tag, n.Value = "!!float", t.String()
	case bool:
		n.Tag, n.Value = "!!bool", strconv.FormatBool(t)
	case nil:
		n.Tag, n.Value = "!!null", "null"
	}
	return n, nil
}
