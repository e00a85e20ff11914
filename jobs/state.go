package jobs

// State is the life-cycle state of a job (a resource state in the sense of
// Google's AIP-216).
//
//	queued --> running --> succeeded
//	   |          |------> failed
//	   |          '------> cancelled (partial front kept)
//	   '-----------------> cancelled (empty front)
//
// A running job stays running between its slices; succeeded, failed and
// cancelled are terminal.
type State string

// The job states.
const (
	StateQueued    State = "queued"
	StateRunning   State = "running"
	StateSucceeded State = "succeeded"
	StateFailed    State = "failed"
	StateCancelled State = "cancelled"
)

// States lists every state in life-cycle order.
var States = []State{StateQueued, StateRunning, StateSucceeded, StateFailed, StateCancelled}

// Valid reports whether s is one of States.
func (s State) Valid() bool {
	switch s {
	case StateQueued, StateRunning, StateSucceeded, StateFailed, StateCancelled:
		return true
	}
	return false
}

// Terminal reports whether no further transition leaves s.
func (s State) Terminal() bool {
	return s == StateSucceeded || s == StateFailed || s == StateCancelled
}
