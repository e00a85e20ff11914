package api

import (
	"slices"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// ModelObjectiveKind is the model's kind of an objective kind of the API,
// 0 (no kind of the model) for one it does not know.
func ModelObjectiveKind(k pb.ObjectiveKind) model.ObjectiveKind { return objectiveKinds[k] }

// ModelConstraintKind is the model's kind of a constraint kind of the API,
// 0 for one it does not know.
func ModelConstraintKind(k pb.ConstraintKind) model.ConstraintKind { return constraintKinds[k] }

// ModelCorner is the model's corner index (model.FL ... model.RR) of a
// corner position, -1 for CORNER_POSITION_UNSPECIFIED or an unknown value.
func ModelCorner(c pb.CornerPosition) int { return slices.Index(cornerPositions[:], c) }
