#!/usr/bin/env node
// A long fuzzing run for local use (the test suite runs the same properties with a fixed seed and a bounded
// count): every reader and the annotations reader, with many more runs and a seed of your choice.
// Usage: node scripts/fuzz-long.mjs [runs] [seed]      (defaults: 20000 runs, seed from the clock)
import { spawnSync } from 'node:child_process';

const runs = process.argv[2] ?? '20000';
const seed = process.argv[3] ?? String(Date.now() % 2147483647);
console.log(`fuzzing with ${runs} runs per property, seed ${seed} (rerun a failure with the same seed)`);
const env = { ...process.env, VS_FUZZ_RUNS: runs, VS_FUZZ_SEED: seed, VALLEYSCOPE_FUZZ_RUNS: runs, VALLEYSCOPE_FUZZ_SEED: seed };
const r = spawnSync(
  process.execPath,
  ['node_modules/mocha/bin/mocha.js', '--timeout', '0', 'test/unit/formats/readerFuzz.test.ts', 'test/unit/annotations/fuzz.test.ts'],
  { stdio: 'inherit', env },
);
process.exit(r.status ?? 1);
