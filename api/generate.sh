#!/usr/bin/env bash
# Regenerates the Go code of the dampfront API (gen/dampfront/v1) from the
# protobuf definitions (proto/dampfront/v1) with buf and local plugins.
#
#   api/generate.sh                  lint, then regenerate gen/
#   api/generate.sh --install-tools  only install the pinned tools
#   api/generate.sh --out DIR        regenerate into DIR/gen instead
#
# The tools are pinned: buf, protoc-gen-go and protoc-gen-go-grpc at the
# versions below, installed with `go install` from the Go module proxy into
# $(go env GOPATH)/bin when missing or at another version. The output
# depends only on these versions and the .proto files.
set -euo pipefail

BUF_VERSION=1.75.0
PROTOC_GEN_GO_VERSION=1.36.12
PROTOC_GEN_GO_GRPC_VERSION=1.6.2

cd "$(dirname "$0")"
bin="$(go env GOBIN)"
if [ -z "$bin" ]; then
	bin="$(go env GOPATH)/bin"
fi
export PATH="$bin:$PATH"

# version_of prints a tool's version number, or nothing when it is missing.
version_of() {
	command -v "$1" >/dev/null 2>&1 || return 0
	"$1" --version 2>/dev/null | awk '{print $NF}' | sed 's/^v//'
}

install_tools() {
	if [ "$(version_of buf)" != "$BUF_VERSION" ]; then
		GOBIN="$bin" go install "github.com/bufbuild/buf/cmd/buf@v$BUF_VERSION"
	fi
	if [ "$(version_of protoc-gen-go)" != "$PROTOC_GEN_GO_VERSION" ]; then
		GOBIN="$bin" go install "google.golang.org/protobuf/cmd/protoc-gen-go@v$PROTOC_GEN_GO_VERSION"
	fi
	if [ "$(version_of protoc-gen-go-grpc)" != "$PROTOC_GEN_GO_GRPC_VERSION" ]; then
		GOBIN="$bin" go install "google.golang.org/grpc/cmd/protoc-gen-go-grpc@v$PROTOC_GEN_GO_GRPC_VERSION"
	fi
}

out=.
case "${1:-}" in
--install-tools)
	install_tools
	exit 0
	;;
--out)
	out="${2:?--out needs a directory}"
	;;
"") ;;
*)
	echo "usage: $0 [--install-tools | --out DIR]" >&2
	exit 2
	;;
esac

install_tools
buf lint
rm -rf "$out/gen/dampfront/v1"
buf generate --template buf.gen.yaml -o "$out"
