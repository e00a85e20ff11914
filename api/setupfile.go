package api

import (
	"encoding/json"
	"fmt"
	"strings"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
)

// EncodeSetupText writes a setup as the YAML that DecodeText reads back to
// an equal message: header as # comment lines, then front and rear with
// their fields in protojson names, every double as protojson writes it
// (the shortest text that reads back to the same value); a list (the
// stages of a multi-stage curve) as protojson's compact JSON, which is
// YAML flow syntax, and left out when empty. The setup file of eval
// --setup and check --setup.
func EncodeSetupText(s *pb.Setup, header string) ([]byte, error) {
	var b strings.Builder
	for _, line := range strings.Split(strings.TrimRight(header, "\n"), "\n") {
		b.WriteString(strings.TrimRight("# "+line, " ") + "\n")
	}
	opts := protojson.MarshalOptions{EmitUnpopulated: true, UseProtoNames: true}
	for _, ax := range []struct {
		name string
		a    *pb.AxleDamping
	}{{"front", s.GetFront()}, {"rear", s.GetRear()}} {
		if ax.a == nil {
			continue
		}
		j, err := opts.Marshal(ax.a)
		if err != nil {
			return nil, err
		}
		// Field order of the message, number text as protojson wrote it.
		var fields map[string]json.RawMessage
		if err := json.Unmarshal(j, &fields); err != nil {
			return nil, fmt.Errorf("setup %s: %w", ax.name, err)
		}
		b.WriteString(ax.name + ":\n")
		fds := ax.a.ProtoReflect().Descriptor().Fields()
		for i := 0; i < fds.Len(); i++ {
			name := string(fds.Get(i).Name())
			if v, ok := fields[name]; ok && string(v) != "[]" {
				fmt.Fprintf(&b, "  %s: %s\n", name, v)
			}
		}
	}
	return []byte(b.String()), nil
}
