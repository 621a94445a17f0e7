// Writes docs/rules.md from the rule catalogue (the one source of rule text).
// `node scripts/build-rules-doc.mjs` regenerates it; a test fails when it is stale.
import { RULES } from '../server/src/findings/catalogue';

export function rulesMarkdown(): string {
  const lines = ['# Tidemark rules', '', 'Generated from `server/src/findings/catalogue.ts`; do not edit by hand.', ''];
  for (const [code, r] of Object.entries(RULES)) {
    lines.push(`## ${code}`, '', `*${r.title}* — default severity: ${r.severity}.`, '', r.explanation, '');
  }
  return lines.join('\n');
}
