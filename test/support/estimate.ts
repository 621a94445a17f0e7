// Runs Tidemark's whole pipeline on a netlist text and returns the estimate of one node.
import { analyse } from '../../server/src/engine';
import { memoryHost } from '../../server/src/core/host';
import type { EngineOptions } from '../../server/src/core/options';

export function tidemarkEstimate(text: string, node: string, options: EngineOptions = {}) {
  const r = analyse(memoryHost({ '/ref.sp': text }), '/ref.sp', options);
  const a = r.circuits[0]!;
  const id = a.circuit.netByName.get(node);
  if (id === undefined) throw new Error(`no net ${node}`);
  const e = a.estimates?.get(id);
  if (!e) throw new Error(`no estimate for ${node}: ${JSON.stringify(r.diagnostics.map((d) => d.message))}`);
  return { estimate: e, result: r, circuit: a.circuit };
}
