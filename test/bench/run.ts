// `npm run bench [-- --json] [-- --only NAME,…]`: runs every test/bench/*.bench.ts in its own
// process (so one benchmark's heap and JIT state do not colour the next), each with --json,
// and merges their objects into one. Human-readable lines go to stderr as each finishes.
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { cpus, totalmem } from 'node:os';

const dir = import.meta.dirname;
const args = process.argv.slice(2);
const json = args.includes('--json');
const onlyIdx = args.indexOf('--only');
const only = onlyIdx >= 0 ? new Set(args[onlyIdx + 1].split(',')) : null;
const benches = readdirSync(dir).filter((f) => f.endsWith('.bench.ts')).sort()
  .filter((f) => !only || only.has(f.replace('.bench.ts', '')));

const merged: Record<string, unknown> = {
  machine: { cpu: cpus()[0]?.model ?? 'unknown', cores: cpus().length, memoryGiB: Math.round(totalmem() / 2 ** 30), node: process.version },
  date: new Date().toISOString(),
};
let failed = 0;
for (const f of benches) {
  const t0 = performance.now();
  process.stderr.write(`bench ${f} … `);
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(dir, f), '--json'], { encoding: 'utf8', maxBuffer: 64 << 20, timeout: 15 * 60_000 });
  const last = r.stdout.trim().split('\n').pop() ?? '';
  try {
    Object.assign(merged, JSON.parse(last));
    process.stderr.write(`${((performance.now() - t0) / 1000).toFixed(0)} s\n`);
  } catch {
    failed++;
    process.stderr.write(`failed (exit ${r.status})\n${r.stderr.slice(-2000)}\n`);
  }
}
if (json) process.stdout.write(JSON.stringify(merged) + '\n');
else process.stdout.write(JSON.stringify(merged, null, 2) + '\n');
process.exitCode = failed ? 1 : 0;
