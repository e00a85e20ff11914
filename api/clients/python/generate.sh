#!/usr/bin/env bash
# Regenerates the Python message code of the dampfront API
# (dampfront/v1/*_pb2.py beside this script) from the protobuf definitions
# in api/proto, with Debian's protoc (apt-get install protobuf-compiler).
#
#   api/clients/python/generate.sh             regenerate dampfront/v1/
#   api/clients/python/generate.sh --out DIR   regenerate into DIR/dampfront/v1 instead
#
# protoc is pinned to 3.21.12, Debian 12's, whose output the committed
# files are; the runtime is Debian's python3-protobuf of the same release.
# Only message code is generated: the script calls the service with
# grpcio's generic channel methods, so no gRPC plugin is needed.
set -euo pipefail

PROTOC_VERSION=3.21.12

cd "$(dirname "$0")"
out=.
case "${1:-}" in
--out)
	out="${2:?--out needs a directory}"
	;;
"") ;;
*)
	echo "usage: $0 [--out DIR]" >&2
	exit 2
	;;
esac

have="$(protoc --version 2>/dev/null | awk '{print $NF}')" || true
if [ "$have" != "$PROTOC_VERSION" ]; then
	echo "protoc ${have:-is missing}; want $PROTOC_VERSION (Debian 12: apt-get install protobuf-compiler)" >&2
	exit 1
fi
rm -rf "$out/dampfront/v1"
mkdir -p "$out/dampfront/v1"
protoc -I ../../proto --python_out="$out" ../../proto/dampfront/v1/*.proto
