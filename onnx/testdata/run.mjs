// Evaluates exported ONNX models with the ONNX runtime's WebAssembly build
// for Node (npm package onnxruntime-web; .ci/run pins the version), for the
// Go tests of package onnx.
//
//   node run.mjs NODE_MODULES JOB.json
//
// NODE_MODULES is the folder where `npm install onnxruntime-web@VERSION` ran.
// JOB.json is {"cases": [{"model": FILE, "out": FILE, "inputs": {NAME:
// {"type": "float64" | "string", "dims": [...], "data": [...]}}}]}, where a
// null in float64 data stands for NaN (JSON has no NaN). Each case's out
// file receives {"probabilities": {"dims", "data"}, "label": {"dims",
// "data"}, "labels" (multi-label models only), "runtime": VERSION}, NaN
// again written as null. Numbers are
// written by JSON.stringify, the shortest text that reads back to the same
// float64.
import { createRequire } from 'node:module';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const [nodeModules, jobFile] = process.argv.slice(2);
if (!nodeModules || !jobFile) {
  console.error('usage: node run.mjs NODE_MODULES JOB.json');
  process.exit(2);
}
const require = createRequire(join(nodeModules, 'noop.js'));
const ort = require('onnxruntime-web');
const version = JSON.parse(readFileSync(join(nodeModules, 'onnxruntime-web', 'package.json'), 'utf8')).version;
ort.env.wasm.numThreads = 1; // deterministic and within the machine's two cores

function tensor(spec) {
  if (spec.type === 'float64') {
    return new ort.Tensor('float64', Float64Array.from(spec.data, (v) => (v === null ? NaN : v)), spec.dims);
  }
  if (spec.type === 'string') {
    return new ort.Tensor('string', spec.data, spec.dims);
  }
  throw new Error(`unknown input type ${spec.type}`);
}

function plain(t) {
  const data = Array.from(t.data, (v) => (typeof v === 'bigint' ? Number(v) : Number.isNaN(v) ? null : v));
  return { dims: t.dims, data };
}

const job = JSON.parse(readFileSync(jobFile, 'utf8'));
for (const c of job.cases) {
  const session = await ort.InferenceSession.create(readFileSync(c.model));
  const feeds = {};
  for (const [name, spec] of Object.entries(c.inputs)) feeds[name] = tensor(spec);
  const r = await session.run(feeds);
  const out = { probabilities: plain(r.probabilities), label: plain(r.label), runtime: version };
  if (r.labels) out.labels = plain(r.labels); // multi-label models only
  writeFileSync(c.out, JSON.stringify(out));
  await session.release();
}
