// `npm run bench [-- --large]`: bundles the benchmarks with esbuild and runs them: engine stages
// on generated netlists, then the edit latency through the real language server.
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';

const common = { bundle: true, platform: 'node', target: 'node20', format: 'cjs', logLevel: 'error' };
await build({ ...common, entryPoints: ['scripts/bench-main.ts'], outfile: '.bench/bench.js' });
await build({ ...common, entryPoints: ['scripts/bench-edit.ts'], outfile: '.bench/bench-edit.js' });
const r = spawnSync(process.execPath, ['--max-old-space-size=8192', '.bench/bench.js', ...process.argv.slice(2)], { stdio: 'inherit' });
if (r.status !== 0) process.exit(r.status ?? 1);
const e = spawnSync(process.execPath, ['.bench/bench-edit.js'], { stdio: 'inherit' });
process.exit(e.status ?? 1);
