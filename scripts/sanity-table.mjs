// Bundles and runs scripts/sanity-main.ts (needs eecircuit-engine, a dev dependency).
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';

await build({ entryPoints: ['scripts/sanity-main.ts'], outfile: '.bench/sanity.mjs', bundle: true, platform: 'node', target: 'node20', format: 'esm', mainFields: ['module', 'main'], logLevel: 'error', banner: { js: "import { createRequire } from 'module'; const require = createRequire(import.meta.url);" } });
const r = spawnSync(process.execPath, ['.bench/sanity.mjs'], { stdio: ['ignore', 'inherit', 'ignore'] });
process.exit(r.status ?? 1);
