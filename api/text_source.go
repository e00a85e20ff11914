package api

import (
	"fmt"
	"strings"
)

// TextSource is a file whose text was decoded into part of a request:
// Prefix is the path of that part in the request ("spec",
// "spec.vehicle", "spec.road_cases", "setups[1]") and Positions are
// where the file wrote its fields, relative to that part.
type TextSource struct {
	File      string
	Prefix    string
	Positions TextPositions
}

// TextSources are the files a request was built from.
type TextSources []TextSource

// Locate returns "FILE:LINE:COL" for a field path of the request (as the
// server names it in a field violation): the position of the field in
// the file it came from, or of its nearest enclosing field written there
// when the field itself was left out. When several files hold parts, the
// one with the longest prefix holding the field wins (a car file given
// beside a spec file holds "spec.vehicle..."). ok is false when no file
// holds the field.
func (s TextSources) Locate(field string) (string, bool) {
	best := -1
	for i, src := range s {
		if _, ok := src.rest(field); ok && (best < 0 || len(src.Prefix) > len(s[best].Prefix)) {
			best = i
		}
	}
	if best < 0 {
		return "", false
	}
	rest, _ := s[best].rest(field)
	at, ok := s[best].Positions.Of(rest)
	if !ok {
		return "", false
	}
	return fmt.Sprintf("%s:%d:%d", s[best].File, at.Line, at.Column), true
}

// rest is field relative to the source's part: "vehicle.mass" of
// "spec.vehicle.mass" for prefix "spec", "[0].speed" of
// "spec.road_cases[0].speed" for prefix "spec.road_cases".
func (src TextSource) rest(field string) (string, bool) {
	if src.Prefix == "" {
		return field, true
	}
	r, ok := strings.CutPrefix(field, src.Prefix)
	switch {
	case !ok:
		return "", false
	case r == "" || r[0] == '[':
		return r, true
	case r[0] == '.':
		return r[1:], true
	}
	return "", false // "spec.vehicles" is not under "spec.vehicle"
}

// Add records a file that filled the request's part at prefix; a nil s
// records nothing.
func (s *TextSources) Add(file, prefix string, pos TextPositions) {
	if s != nil {
		*s = append(*s, TextSource{File: file, Prefix: prefix, Positions: pos})
	}
}
