package model

import (
	"context"
	"errors"
	"testing"
)

// NewEvaluatorContext stops preparing road cases when its context is
// done and returns the context's error, not an evaluator.
func TestNewEvaluatorContextStopsWhenDone(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	e, err := NewEvaluatorContext(ctx, demoCar(), demoCases(), EvaluatorOptions{})
	if !errors.Is(err, context.Canceled) || e != nil {
		t.Fatalf("NewEvaluatorContext with a done context: %v, %v; want context.Canceled and no evaluator", e, err)
	}
	// A live context prepares the same evaluator as NewEvaluator.
	e, err = NewEvaluatorContext(context.Background(), demoCar(), demoCases(), EvaluatorOptions{})
	if err != nil || e.Cases() != len(demoCases()) {
		t.Fatalf("NewEvaluatorContext: %v, %v", e, err)
	}
}
