// The machine-readable report (`--format json`). The keys named in the interface contract are
// stable: add keys freely, never rename or remove them.

import type { Diagnostic } from '../core/diagnostics';
import type { AnalysisResult } from '../engine';

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
  states?: unknown[];
  float_window_s?: number | null;
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
  netlists: { file: string; title: string | null; circuits: { name: string; standalone: boolean; nets: number; mosfets: number; instances: number }[]; geometry_scale: number; geometry_scale_from: string }[];
  supplies: { net: string; volts: number | null; circuit: string; file: string; from: string }[];
  corners: { temp_C: number }[];
  budget_V: number | null;
  phases: unknown[];
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
    circuits: design.circuits.map((c) => ({ name: c.name, standalone: c.standalone, nets: c.nets.length, mosfets: c.mosfets.length, instances: c.instances.length })),
    geometry_scale: design.geometryScale.value,
    geometry_scale_from: design.geometryScale.from,
  });
  for (const c of design.circuits) {
    for (const s of c.supplies) report.supplies.push({ net: c.nets[s.net]!.name, volts: s.volts, circuit: c.name, file, from: s.from });
    if (options.allNodes) {
      for (const n of c.nets) {
        report.nodes.push({
          name: n.name,
          circuit: c.name,
          subckt: n.origin.subckt,
          local: n.origin.local,
          file: n.origin.file,
          line: n.origin.range.start.line + 1,
          kind: n.kind,
        });
      }
    }
  }
  for (const d of result.diagnostics) report.diagnostics.push(reportDiagnostic(d));
}
