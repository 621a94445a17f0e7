// The machine-readable report (`--format json`). The keys named in the interface contract are
// stable: add keys freely, never rename or remove them.

import type { Diagnostic } from '../core/diagnostics';
import type { AnalysisResult } from '../engine';
import { nodeFloatWindow } from '../analysis/classify';

export interface ReportState {
  phase: string;
  state: string;
  when?: Record<string, 0 | 1>;
  float_cover?: Array<Record<string, 0 | 1>>;
  contention_when?: Record<string, 0 | 1>;
  kept_level?: 0 | 1;
  exact?: boolean;
  cut_off?: string[];
}

export interface ReportNode {
  name: string;
  circuit: string;
  subckt: string | null;
  local: string;
  file: string;
  line: number;
  kind: string;
  role?: 'storage' | 'internal';
  capacitance_F?: number | null;
  states?: ReportState[];
  float_window_s?: number | null;
  /** True when it floats in every phase of the cycle: never restored. */
  float_unbounded?: boolean;
}

export interface ReportPhase {
  name: string;
  circuit: string;
  file: string;
  start_s: number | null;
  duration_s: number | null;
  clocks: Record<string, 0 | 1>;
  standby: boolean;
}

export interface ReportDiagnostic {
  rule: string;
  severity: string;
  node?: string;
  file: string;
  line: number;
  column: number;
  end_line: number;
  end_column: number;
  message: string;
}

export interface Report {
  schema: 1;
  tool: { name: 'tidemark'; version: string };
  netlists: {
    file: string;
    title: string | null;
    circuits: {
      name: string;
      standalone: boolean;
      nets: number;
      mosfets: number;
      instances: number;
      /** Channel-connected groups with more free gate inputs than the enumeration limit. */
      wide_groups?: number;
      /** Groups whose witnesses could not be checked against their driving logic. */
      unchecked_groups?: number;
    }[];
    geometry_scale: number;
    geometry_scale_from: string;
  }[];
  supplies: { net: string; volts: number | null; circuit: string; file: string; from: string }[];
  corners: { temp_C: number }[];
  budget_V: number | null;
  phases: ReportPhase[];
  nodes: ReportNode[];
  diagnostics: ReportDiagnostic[];
}

export const TOOL_VERSION = '0.1.0';

export function reportDiagnostic(d: Diagnostic): ReportDiagnostic {
  const r: ReportDiagnostic = {
    rule: d.rule,
    severity: d.severity,
    file: d.file,
    line: d.range.start.line + 1,
    column: d.range.start.character + 1,
    end_line: d.range.end.line + 1,
    end_column: d.range.end.character + 1,
    message: d.message,
  };
  if (d.node) r.node = d.node;
  return r;
}

export interface ReportOptions {
  allNodes: boolean;
}

export function emptyReport(): Report {
  return { schema: 1, tool: { name: 'tidemark', version: TOOL_VERSION }, netlists: [], supplies: [], corners: [], budget_V: null, phases: [], nodes: [], diagnostics: [] };
}

/** Adds one analysed netlist to the report. */
export function addToReport(report: Report, file: string, result: AnalysisResult, options: ReportOptions): void {
  const { design } = result;
  report.netlists.push({
    file,
    title: design.title ?? null,
    circuits: design.circuits.map((c, i) => {
      const cl = result.circuits[i]?.classification;
      return {
        name: c.name,
        standalone: c.standalone,
        nets: c.nets.length,
        mosfets: c.mosfets.length,
        instances: c.instances.length,
        ...(cl ? { wide_groups: cl.wideComponents, unchecked_groups: cl.uncheckedComponents } : {}),
      };
    }),
    geometry_scale: design.geometryScale.value,
    geometry_scale_from: design.geometryScale.from,
  });
  design.circuits.forEach((c, ci) => {
    for (const s of c.supplies) report.supplies.push({ net: c.nets[s.net]!.name, volts: s.volts, circuit: c.name, file, from: s.from });
    const analysis = result.circuits[ci];
    if (analysis) {
      for (const p of analysis.plan.phases) {
        report.phases.push({
          name: p.name,
          circuit: c.name,
          file,
          start_s: p.startS,
          duration_s: p.durationS,
          clocks: Object.fromEntries([...p.clocks].map(([n, v]) => [c.nets[n]!.name, v])),
          standby: p.standby,
        });
      }
    }
    for (const n of c.nets) {
      const cl = analysis?.classification;
      const strong = cl ? cl.network.role[n.id] !== 0 : n.kind !== 'signal';
      const states: ReportState[] = [];
      let risky = false;
      if (cl && !strong) {
        cl.plan.phases.forEach((p, i) => {
          const r = cl.perPhase[i]!.get(n.id);
          const st: ReportState = { phase: p.name, state: r?.state ?? 'driven' };
          if (r) {
            risky = true;
            if (r.when) st.when = r.when;
            if (r.floatCover && r.state !== 'floating') st.float_cover = r.floatCover;
            if (r.contentionWhen) st.contention_when = r.contentionWhen;
            if (r.keptLevel !== undefined) st.kept_level = r.keptLevel;
            if (!r.exact) st.exact = false;
            if (r.cutOff?.length) st.cut_off = r.cutOff.map((m) => c.mosfets[m]!.name);
          }
          states.push(st);
        });
      }
      if (!options.allNodes && !risky) continue;
      const node: ReportNode = {
        name: n.name,
        circuit: c.name,
        subckt: n.origin.subckt,
        local: n.origin.local,
        file: n.origin.file,
        line: n.origin.range.start.line + 1,
        kind: n.kind,
      };
      if (cl && !strong) {
        node.role = cl.storage[n.id] ? 'storage' : 'internal';
        node.states = states;
        const w = nodeFloatWindow(cl, n.id);
        node.float_window_s = w === Infinity ? null : w;
        if (w === Infinity) node.float_unbounded = true;
      }
      report.nodes.push(node);
    }
  });
  for (const d of result.diagnostics) report.diagnostics.push(reportDiagnostic(d));
}
