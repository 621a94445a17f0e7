// Text (for people) and SARIF 2.1.0 (for code-scanning tools) renderings of a report.

import { RULES, type RuleCode } from '../findings/catalogue';
import type { Report } from '../findings/report';
import { TOOL_VERSION } from '../findings/report';

const COLOURS = { error: '\x1b[31m', warning: '\x1b[33m', info: '\x1b[36m', dim: '\x1b[2m', bold: '\x1b[1m', reset: '\x1b[0m' };

/** Phases named on a netlist's line in the text output; more are counted. */
const MAX_PHASES_LISTED = 6;

export function formatText(report: Report, colour: boolean): string {
  const c = (k: keyof typeof COLOURS, s: string) => (colour ? COLOURS[k] + s + COLOURS.reset : s);
  const lines: string[] = [];
  for (const n of report.netlists) {
    const devices = n.circuits.reduce((a, x) => a + x.mosfets, 0);
    const nets = n.circuits.reduce((a, x) => a + x.nets, 0);
    const what = n.circuits.length === 1 ? `circuit ${n.circuits[0]!.name}` : `${n.circuits.length} standalone subcircuits`;
    // the phases by name, so the ones the findings quote can be told apart
    const phases = report.phases.filter((p) => p.file === n.file).map((p) => (n.circuits.length > 1 ? `${p.circuit}: ${p.name}` : p.name));
    const shown = phases.length > MAX_PHASES_LISTED ? `${phases.slice(0, MAX_PHASES_LISTED).join(', ')}, ... (${phases.length} in all)` : phases.join(', ');
    lines.push(c('bold', n.file) + c('dim', `  ${what}, ${devices} transistors, ${nets} nets${phases.length ? `; phases ${shown}` : ''}`));
  }
  const supplies = report.supplies.filter((s, i, a) => a.findIndex((x) => x.net === s.net && x.volts === s.volts) === i);
  if (supplies.length) lines.push(c('dim', 'supplies: ' + supplies.map((s) => `${s.net}${s.volts === null ? ' (voltage unknown)' : `=${s.volts}V`}`).join(', ')));
  lines.push('');
  const open = report.diagnostics.filter((d) => !d.accepted);
  const accepted = report.diagnostics.filter((d) => d.accepted);
  for (const d of open) {
    const sev = d.severity === 'error' ? c('error', 'error') : d.severity === 'warning' ? c('warning', 'warning') : c('info', 'info');
    lines.push(`${d.file}:${d.line}:${d.column}: ${sev} ${c('dim', `[${d.rule}]`)} ${d.message}`);
  }
  if (accepted.length) {
    lines.push('');
    for (const d of accepted) lines.push(c('dim', `${d.file}:${d.line}:${d.column}: accepted [${d.rule}] ${d.node}: "${d.accepted!.reason}" (${d.accepted!.file}:${d.accepted!.line})`));
  }
  const count = (s: string) => open.filter((d) => d.severity === s).length;
  lines.push('');
  lines.push(`${count('error')} error(s), ${count('warning')} warning(s), ${count('info')} note(s)${accepted.length ? `, ${accepted.length} accepted` : ''}`);
  lines.push(c('dim', 'Tidemark estimates are a screening aid, not sign-off.'));
  return lines.join('\n') + '\n';
}

export function formatSarif(report: Report): string {
  const used = [...new Set(report.diagnostics.map((d) => d.rule))] as RuleCode[];
  const rules = used.map((id) => ({
    id,
    name: id.replace(/-(.)/g, (_, x: string) => x.toUpperCase()),
    shortDescription: { text: RULES[id].title },
    fullDescription: { text: RULES[id].explanation },
    defaultConfiguration: { level: sarifLevel(RULES[id].severity) },
  }));
  const sarif = {
    $schema: 'https://json.schemastore.org/sarif-2.1.0.json',
    version: '2.1.0',
    runs: [
      {
        tool: { driver: { name: 'Tidemark', version: TOOL_VERSION, rules } },
        results: report.diagnostics.map((d) => ({
          ruleId: d.rule,
          ruleIndex: used.indexOf(d.rule as RuleCode),
          level: sarifLevel(d.severity),
          message: { text: d.message },
          ...(d.accepted ? { suppressions: [{ kind: 'inSource', justification: d.accepted.reason }] } : {}),
          locations: [
            {
              physicalLocation: {
                artifactLocation: { uri: d.file.split('\\').join('/') },
                region: { startLine: d.line, startColumn: d.column, endLine: d.end_line, endColumn: d.end_column },
              },
            },
          ],
        })),
      },
    ],
  };
  return JSON.stringify(sarif, null, 2) + '\n';
}

function sarifLevel(sev: string): 'error' | 'warning' | 'note' {
  return sev === 'error' ? 'error' : sev === 'warning' ? 'warning' : 'note';
}
