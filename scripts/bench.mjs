// `npm run bench [-- --large]`: bundles the benchmark with esbuild and runs it.
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';

await build({ entryPoints: ['scripts/bench-main.ts'], outfile: '.bench/bench.js', bundle: true, platform: 'node', target: 'node20', format: 'cjs', logLevel: 'error' });
const r = spawnSync(process.execPath, ['--max-old-space-size=8192', '.bench/bench.js', ...process.argv.slice(2)], { stdio: 'inherit' });
process.exit(r.status ?? 1);
