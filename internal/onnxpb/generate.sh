#!/usr/bin/env bash
# Regenerates onnx.pb.go from onnx.proto. Not run by CI or by the tests: the
# generated file is committed.
#
# onnx.proto is copied unchanged from Debian 12's python3-onnx 1.12.0-2+b4
# (/usr/lib/python3/dist-packages/onnx/onnx.proto: ONNX 1.12, IR version 8,
# default-domain opsets up to 17). It was made with
#
#   apt-get install protobuf-compiler           # protoc, libprotoc 3.21.12
#   GOBIN=/tmp/onnx-gobin go install google.golang.org/protobuf/cmd/protoc-gen-go@v1.36.12
#
# and then this script, run from this folder.
set -euo pipefail
cd "$(dirname "$0")"
PATH="${GOBIN:-/tmp/onnx-gobin}:$PATH"
protoc --proto_path=. \
  --go_out=. --go_opt=paths=source_relative \
  --go_opt=Monnx.proto=github.com/seine-ml/seine/internal/onnxpb \
  onnx.proto
