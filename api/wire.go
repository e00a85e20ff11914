package api

import (
	"context"
	"fmt"
	"strings"
	"unicode/utf8"

	"google.golang.org/grpc"
	"google.golang.org/grpc/encoding"
	"google.golang.org/grpc/mem"
	"google.golang.org/protobuf/encoding/protowire"
	"google.golang.org/protobuf/proto"
	"google.golang.org/protobuf/reflect/protoreflect"
)

// A request whose bytes do not decode (invalid UTF-8 in a text field, a
// truncated or malformed message) would be answered Internal by gRPC with
// no field named: its codec's errors all become Internal. The server's
// codec therefore does not fail: it empties the message, records the
// problem in it as an unknown field of a reserved number, and the
// interceptors answer InvalidArgument naming the field. Recording it in
// the message itself ties it to that request and to nothing else.

// wireProblemField is the field number that carries a decoding problem:
// the largest valid number, which no message of the API uses.
const wireProblemField = protowire.MaxValidNumber

// wireCodec is the protobuf codec with that behaviour.
type wireCodec struct{ base encoding.CodecV2 }

func newWireCodec() *wireCodec { return &wireCodec{base: encoding.GetCodecV2("proto")} }

func (c *wireCodec) Name() string                           { return c.base.Name() }
func (c *wireCodec) Marshal(v any) (mem.BufferSlice, error) { return c.base.Marshal(v) }
func (c *wireCodec) Unmarshal(data mem.BufferSlice, v any) error {
	err := c.base.Unmarshal(data, v)
	m, ok := v.(proto.Message)
	if err == nil || !ok {
		return err
	}
	field, reason := locateWireProblem(data.Materialize(), m.ProtoReflect().Descriptor(), "", 0)
	if field == "" {
		field, reason = string(m.ProtoReflect().Descriptor().Name()), err.Error()
	}
	proto.Reset(m)
	b := protowire.AppendTag(nil, wireProblemField, protowire.BytesType)
	b = protowire.AppendString(b, field+"\x00"+reason)
	m.ProtoReflect().SetUnknown(b)
	return nil
}

// wireProblem returns the InvalidArgument status of a request the codec
// could not decode, or nil.
func wireProblem(req any) error {
	m, ok := req.(proto.Message)
	if !ok {
		return nil
	}
	b := m.ProtoReflect().GetUnknown()
	for len(b) > 0 {
		num, typ, n := protowire.ConsumeTag(b)
		if n < 0 {
			return nil
		}
		b = b[n:]
		n = protowire.ConsumeFieldValue(num, typ, b)
		if n < 0 {
			return nil
		}
		if num == wireProblemField && typ == protowire.BytesType {
			v, _ := protowire.ConsumeString(b[:n])
			field, reason, _ := strings.Cut(v, "\x00")
			return invalidArgument(problems{{Field: field, Reason: reason}})
		}
		b = b[n:]
	}
	return nil
}

// maxWireDepth bounds the nesting locateWireProblem follows.
const maxWireDepth = 100

// locateWireProblem finds the first field of b (a message md at path)
// that does not decode and says why; "" when it finds none.
func locateWireProblem(b []byte, md protoreflect.MessageDescriptor, path string, depth int) (field, reason string) {
	if depth > maxWireDepth {
		return path, "is nested too deeply"
	}
	count := map[protoreflect.FieldNumber]int{}
	for len(b) > 0 {
		num, typ, n := protowire.ConsumeTag(b)
		if n < 0 {
			return pathOrRoot(path, md), "the message is truncated or malformed: " + protowire.ParseError(n).Error()
		}
		b = b[n:]
		fd := md.Fields().ByNumber(num)
		fpath := fmt.Sprintf("%s#%d", path, num)
		if fd != nil {
			fpath = joinField(path, string(fd.Name()))
			if fd.IsList() {
				fpath = fmt.Sprintf("%s[%d]", fpath, count[num])
				count[num]++
			}
		}
		n = protowire.ConsumeFieldValue(num, typ, b)
		if n < 0 {
			return fpath, "the message is truncated or malformed here: " + protowire.ParseError(n).Error()
		}
		val := b[:n]
		b = b[n:]
		if fd == nil || typ != protowire.BytesType {
			continue
		}
		content, _ := protowire.ConsumeBytes(val)
		switch {
		case fd.Kind() == protoreflect.StringKind && !utf8.Valid(content):
			return fpath, "is not valid UTF-8 text"
		case fd.IsMap():
			if f, r := locateWireProblem(content, fd.Message(), fpath, depth+1); f != "" {
				return fpath, strings.TrimPrefix(strings.TrimPrefix(f, fpath), ".") + " " + r
			}
		case fd.Kind() == protoreflect.MessageKind:
			if f, r := locateWireProblem(content, fd.Message(), fpath, depth+1); f != "" {
				return f, r
			}
		}
	}
	return "", ""
}

func pathOrRoot(path string, md protoreflect.MessageDescriptor) string {
	if path == "" {
		return string(md.Name())
	}
	return path
}

// wireUnary answers a request the codec could not decode.
func wireUnary(ctx context.Context, req any, _ *grpc.UnaryServerInfo, handler grpc.UnaryHandler) (any, error) {
	if err := wireProblem(req); err != nil {
		return nil, err
	}
	return handler(ctx, req)
}

// wireStream does the same for each message a stream receives.
func wireStream(srv any, ss grpc.ServerStream, _ *grpc.StreamServerInfo, handler grpc.StreamHandler) error {
	return handler(srv, wireServerStream{ss})
}

type wireServerStream struct{ grpc.ServerStream }

func (s wireServerStream) RecvMsg(m any) error {
	if err := s.ServerStream.RecvMsg(m); err != nil {
		return err
	}
	return wireProblem(m)
}
