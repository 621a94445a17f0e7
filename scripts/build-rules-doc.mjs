// Regenerates docs/rules.md from the rule catalogue.
import { build } from 'esbuild';
import { writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';

await build({ entryPoints: ['scripts/rules-doc.ts'], outfile: '.bench/rules-doc.js', bundle: true, platform: 'node', format: 'cjs', logLevel: 'error' });
const { rulesMarkdown } = createRequire(import.meta.url)('../.bench/rules-doc.js');
writeFileSync('docs/rules.md', rulesMarkdown());
console.log('wrote docs/rules.md');
