// Bundles the three entry points into dist/ with esbuild (type checking is `tsc --noEmit`).
import { build } from 'esbuild';

const quiet = process.argv.includes('--quiet');
const common = {
  bundle: true,
  platform: 'node',
  target: 'node20',
  format: 'cjs',
  sourcemap: true,
  logLevel: quiet ? 'error' : 'info',
};

await Promise.all([
  build({ ...common, entryPoints: ['server/src/cli/main.ts'], outfile: 'dist/cli.js', banner: { js: '#!/usr/bin/env node' } }),
  build({ ...common, entryPoints: ['server/src/lsp/main.ts'], outfile: 'dist/server.js' }),
  build({ ...common, entryPoints: ['client/src/extension.ts'], outfile: 'dist/extension.js', external: ['vscode'] }),
]);
