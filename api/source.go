package api

import (
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// requestSource splits the `source` oneof of a request that names its car
// and roads either by a spec it carries or by a stored job
// (EvaluateSetupsRequest, VerifySetupRequest): the spec, or the job's
// name, or neither when the oneof is unset. It is sourcePlan's input.
func requestSource(req proto.Message) (spec *pb.JobSpec, job *string) {
	m := req.ProtoReflect()
	od := m.Descriptor().Oneofs().ByName("source")
	if od == nil {
		panic("api: requestSource of a message without a source oneof")
	}
	fd := m.WhichOneof(od)
	if fd == nil {
		return nil, nil
	}
	switch fd.Name() {
	case "spec":
		return m.Get(fd).Message().Interface().(*pb.JobSpec), nil
	case "job":
		name := m.Get(fd).String()
		return nil, &name
	}
	panic("api: requestSource: unknown member " + string(fd.Name()) + " of the source oneof")
}
