package api

import (
	"fmt"
	"math"

	"google.golang.org/protobuf/reflect/protoreflect"

	pb "dampfront/api/gen/dampfront/v1"
)

// finiteSolution is the guard that keeps NaN and infinities out of every
// reported and stored solution: a solution holding one anywhere (metrics,
// modes, curves) becomes an infeasible one with its genes and setup, and
// the reason names the first such value.
func finiteSolution(sol *pb.Solution) *pb.Solution {
	path, v, ok := firstNonFinite(sol.ProtoReflect(), "")
	if !ok {
		return sol
	}
	return &pb.Solution{
		Index: sol.Index, Genes: sol.Genes, Setup: sol.Setup,
		InfeasibleReason: fmt.Sprintf("evaluation failed: %s is %v; check the inputs for values out of scale", path, v),
	}
}

// firstNonFinite finds the first NaN or infinite double or float of m,
// depth first in field order, with its path.
func firstNonFinite(m protoreflect.Message, path string) (string, float64, bool) {
	var (
		at    string
		bad   float64
		found bool
	)
	check := func(p string, v protoreflect.Value, fd protoreflect.FieldDescriptor) bool {
		switch fd.Kind() {
		case protoreflect.DoubleKind, protoreflect.FloatKind:
			if f := v.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
				at, bad, found = p, f, true
			}
		case protoreflect.MessageKind:
			at, bad, found = firstNonFinite(v.Message(), p)
		}
		return !found
	}
	m.Range(func(fd protoreflect.FieldDescriptor, v protoreflect.Value) bool {
		p := joinField(path, string(fd.Name()))
		switch {
		case fd.IsList():
			l := v.List()
			for i := 0; i < l.Len() && !found; i++ {
				check(fmt.Sprintf("%s[%d]", p, i), l.Get(i), fd)
			}
			return !found
		case fd.IsMap():
			v.Map().Range(func(k protoreflect.MapKey, mv protoreflect.Value) bool {
				return check(fmt.Sprintf("%s[%q]", p, k.String()), mv, fd.MapValue())
			})
			return !found
		}
		return check(p, v, fd)
	})
	return at, bad, found
}
