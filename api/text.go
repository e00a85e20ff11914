package api

import (
	"fmt"
	"strings"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"
	"sigs.k8s.io/yaml"

	pb "dampfront/api/gen/dampfront/v1"
)

// DecodeText fills m from YAML or JSON text: the protojson form of the
// message (proto field names, enum value names, unknown fields refused),
// which YAML reaches through sigs.k8s.io/yaml, so anchors and comments
// may be used. Spec, setup and vehicle files all go through here.
func DecodeText(b []byte, m proto.Message) error {
	j, err := yaml.YAMLToJSON(b)
	if err != nil {
		return fmt.Errorf("not YAML or JSON: %w", err)
	}
	if err := protojson.Unmarshal(j, m); err != nil {
		return fmt.Errorf("not a %s: %w", m.ProtoReflect().Descriptor().FullName(), err)
	}
	return nil
}

// EncodeSetupText writes a setup as the YAML that DecodeText reads back to
// an equal message (protojson field names, every double as the shortest
// text that reads back to the same value), after header as # comment
// lines: the setup file of eval --setup and check --setup.
func EncodeSetupText(s *pb.Setup, header string) ([]byte, error) {
	j, err := protojson.MarshalOptions{EmitUnpopulated: true}.Marshal(s)
	if err != nil {
		return nil, err
	}
	y, err := yaml.JSONToYAML(j)
	if err != nil {
		return nil, err
	}
	var b []byte
	for _, line := range strings.Split(strings.TrimRight(header, "\n"), "\n") {
		b = append(b, strings.TrimRight("# "+line, " ")...)
		b = append(b, '\n')
	}
	return append(b, y...), nil
}
