"""Runs the ONNX project's checker with full checks on exported models.

Used by the Go tests of package onnx with Debian's python3-onnx (ONNX
1.12.0):  /usr/bin/python3 check.py MODEL.onnx ...
Prints one line per model and exits 1 on the first model it rejects.
"""
import sys

import onnx
import onnx.checker

for path in sys.argv[1:]:
    model = onnx.load(path)
    try:
        onnx.checker.check_model(model, full_check=True)
    except onnx.checker.ValidationError as e:
        print(f"{path}: rejected by onnx {onnx.__version__}: {e}")
        sys.exit(1)
    print(f"{path}: ok (onnx {onnx.__version__}, ir {model.ir_version}, opset {model.opset_import[0].version})")
