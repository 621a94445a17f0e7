// Reviewed findings: an `accept <node> <rule> reason="..."` directive marks the matching finding
// as accepted (still listed, with its reason, but not counted or failed on). Written at the top
// level it names the flat node; written inside a subcircuit it names the cell's local node, so it
// covers every instance. An accept that matches nothing is reported, so stale reviews show up.

import { diag, type Diagnostic } from '../core/diagnostics';
import type { Circuit } from '../circuit/circuit';
import type { AcceptDirective } from '../circuit/directives';

export function applyAccepts(diagnostics: Diagnostic[], circuits: readonly Circuit[], accepts: readonly AcceptDirective[]): Diagnostic[] {
  if (accepts.length === 0) return diagnostics;
  const used = new Set<AcceptDirective>();
  const origin = (node: string) => {
    for (const c of circuits) {
      const id = c.netByName.get(node);
      if (id !== undefined) return c.nets[id]!.origin;
    }
    return undefined;
  };
  // marked on copies: the findings are a stage's results, kept and shared by the analyses after an edit
  const out = diagnostics.map((d) => {
    if (!d.node) return d;
    const o = origin(d.node);
    const a = accepts.find((x) => x.rule === d.rule && (x.subckt ? o?.subckt === x.subckt && o.local === x.node : x.node === d.node));
    if (!a) return d;
    used.add(a);
    return { ...d, accepted: { reason: a.reason, file: a.file, range: a.range } };
  });
  for (const a of accepts) {
    if (used.has(a)) continue;
    out.push(diag('directive', a.file, a.range, `accept ${a.node} ${a.rule} matches no finding${a.subckt ? ` in subcircuit ${a.subckt}` : ''} (fixed, renamed, or a misspelt node or rule?)`, 'info'));
  }
  return out;
}

/** Findings that count: not accepted. */
export function reported(diagnostics: readonly Diagnostic[]): Diagnostic[] {
  return diagnostics.filter((d) => !d.accepted);
}
