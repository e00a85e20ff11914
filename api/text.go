package api

import (
	"fmt"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"
	"sigs.k8s.io/yaml"
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
