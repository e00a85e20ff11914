package main

import (
	"strings"
	"testing"

	"dampfront/model"
)

// The caution keeps its words when wrapped: the same fields as the
// model's, no line over 76 characters.
func TestCautionWrapped(t *testing.T) {
	t.Parallel()
	if strings.Join(strings.Fields(caution), " ") != model.Caution {
		t.Errorf("wrapped caution lost words: %q", caution)
	}
	for _, l := range strings.Split(caution, "\n") {
		if len(l) > 76 {
			t.Errorf("line of %d characters: %q", len(l), l)
		}
	}
}
