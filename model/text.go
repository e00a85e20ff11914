package model

import (
	"fmt"
	"strings"
	"unicode"
)

// ControlRune reports whether r is a character that a terminal or a
// viewer acts on instead of showing: a Unicode control character (general
// category Cc: C0, DEL and C1, which covers ESC and CSI, the starts of
// terminal escape sequences, ECMA-48 section 5) or a bidirectional
// formatting character (Bidi_Control, Unicode Standard Annex #9), which
// reorders the text that follows it.
func ControlRune(r rune) bool {
	return unicode.IsControl(r) || unicode.Is(unicode.Bidi_Control, r)
}

// TextProblem says why s cannot be a name or label shown to people (it
// holds a ControlRune), or returns "" when it can.
func TextProblem(s string) string {
	i := strings.IndexFunc(s, ControlRune)
	if i < 0 {
		return ""
	}
	return fmt.Sprintf("must not contain control characters, found %U at byte %d", []rune(s[i:])[0], i)
}

// text refuses a name that TextProblem refuses.
func (p *problems) text(field, s string) {
	if why := TextProblem(s); why != "" {
		p.add(field, "%s", why)
	}
}
