// The machine-readable report (`--format json`). The keys named in the interface contract are
// stable: add keys freely, never rename or remove them.

import type { Diagnostic } from '../core/diagnostics';
import type { AnalysisResult } from '../engine';
import { nodeFloatWindow } from '../analysis/classify';
import type { NodeEstimate } from '../analysis/electrical/estimate';
import type { Circuit } from '../circuit/circuit';

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
  capacitance?: { gate_F: number; diffusion_F: number; overlap_F: number; explicit_F: number; coupling_F: number; estimated_geometry: boolean };
  stored?: Array<{ level: 0 | 1; volts: number; phase: string; corners: Array<{ temp_C: number; leakage_A: number; retention_s: number | null; held: boolean; contributors: Array<{ device: string; mechanism: string; current_A: number }> }> }>;
  charge_share_droop_V?: number;
  charge_share?: { when: Record<string, 0 | 1>; joined: string[]; shared_F: number };
  coupling_droop_V?: number;
  aggressors?: Array<{ net: string; capacitance_F: number; droop_V: number; via: string }>;
  qcrit_C?: number;
  min_clock_Hz?: number | null;
  max_float_s?: number | null;
  keeper?: { devices: string[]; hold_current_A: number; hot_leakage_A: number; strength_ratio: number };
  suggested_keeper?: { polarity: string; w_m: number; l_m: number; model: string; inverter: Record<string, string | number>; hold_current_A: number; strength_ratio: number; reasoning: string[] };
  suggested_holder?: { kind: 'holder' | 'feedback'; existing_output?: string; pull_up: ReportHolderHalf; pull_down: ReportHolderHalf; reasoning: string[] };
  notes?: string[];
}

export interface ReportHolderHalf {
  w_m: number;
  l_m: number;
  model: string;
  hold_current_A: number;
  strength_ratio: number;
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
  /** Present when an `accept` directive marks the finding as reviewed. */
  accepted?: { reason: string; file: string; line: number };
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
  /** The supply the estimates assumed and where it came from (netlist, setting, fallback). */
  supply_assumed_V?: number;
  supply_from?: string;
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
  if (d.accepted) r.accepted = { reason: d.accepted.reason, file: d.accepted.file, line: d.accepted.range.start.line + 1 };
  return r;
}

export interface ReportOptions {
  allNodes: boolean;
}

function addEstimate(node: ReportNode, e: NodeEstimate, c: Circuit): void {
  const cap = e.capacitance;
  node.capacitance_F = cap.totalF;
  node.capacitance = { gate_F: cap.gateF, diffusion_F: cap.diffusionF, overlap_F: cap.overlapF, explicit_F: cap.explicitF, coupling_F: cap.couplingF, estimated_geometry: cap.estimatedGeometry };
  node.stored = e.stored.map((s) => ({
    level: s.level,
    volts: s.volts,
    phase: s.phase,
    corners: s.corners.map((k) => ({
      temp_C: k.tempC,
      leakage_A: k.leakageA,
      retention_s: k.retentionS,
      held: k.held,
      contributors: k.contributors.map((x) => ({ device: c.mosfets[e.devices[x.pos]!]!.name, mechanism: x.mechanism, current_A: x.currentA })),
    })),
  }));
  node.charge_share_droop_V = e.chargeSharing?.droopV ?? 0;
  if (e.chargeSharing && e.chargeSharing.droopV > 0) node.charge_share = { when: e.chargeSharing.when, joined: e.chargeSharing.joined.map((j) => c.nets[j]!.name), shared_F: e.chargeSharing.sharedF };
  node.coupling_droop_V = e.coupling.droopV;
  if (e.coupling.aggressors.length) node.aggressors = e.coupling.aggressors.map((a) => ({ net: a.net, capacitance_F: a.capacitanceF, droop_V: a.droopV, via: a.via }));
  node.qcrit_C = e.qcritC;
  node.min_clock_Hz = e.minClockHz;
  node.max_float_s = e.maxFloatS;
  if (e.keeper) node.keeper = { devices: e.keeper.devices.map((i) => c.mosfets[i]!.name), hold_current_A: e.keeper.holdCurrentA, hot_leakage_A: e.keeper.hotLeakageA, strength_ratio: e.keeper.ratio };
  if (e.suggestedKeeper) {
    const k = e.suggestedKeeper;
    const inverter: Record<string, string | number> = {};
    if (k.inverter.existingOutput) inverter['existing_output'] = k.inverter.existingOutput;
    if (k.inverter.newWnM) inverter['new_wn_m'] = k.inverter.newWnM;
    if (k.inverter.newWpM) inverter['new_wp_m'] = k.inverter.newWpM;
    if (k.inverter.newLM) inverter['new_l_m'] = k.inverter.newLM;
    node.suggested_keeper = { polarity: k.polarity, w_m: k.wM, l_m: k.lM, model: k.model, inverter, hold_current_A: k.holdCurrentA, strength_ratio: k.strengthRatio, reasoning: k.reasoning };
  }
  if (e.suggestedHolder) {
    const h = e.suggestedHolder;
    const half = (k: typeof h.pullUp) => ({ w_m: k.wM, l_m: k.lM, model: k.model, hold_current_A: k.holdCurrentA, strength_ratio: k.strengthRatio });
    node.suggested_holder = { kind: h.kind, ...(h.forward.existingOutput ? { existing_output: h.forward.existingOutput } : {}), pull_up: half(h.pullUp), pull_down: half(h.pullDown), reasoning: [...h.pullUp.reasoning, ...h.pullDown.reasoning] };
  }
  if (e.notes.length) node.notes = e.notes;
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
    for (let id = 0; id < c.nets.length; id++) {
      const n = c.nets[id]!;
      const cl = analysis?.classification;
      const strong = cl ? cl.network.role[id] !== 0 : n.kind !== 'signal';
      const states: ReportState[] = [];
      let risky = false;
      if (cl && !strong) {
        cl.plan.phases.forEach((p, i) => {
          const r = cl.perPhase[i]!.get(id);
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
        node.role = cl.storage[id] ? 'storage' : 'internal';
        node.states = states;
        const w = nodeFloatWindow(cl, id);
        node.float_window_s = w === Infinity ? null : w;
        if (w === Infinity) node.float_unbounded = true;
      }
      const e = analysis?.estimates?.get(id);
      if (e) addEstimate(node, e, c);
      report.nodes.push(node);
    }
  });
  const first = result.circuits.find((a) => a.electrical)?.electrical;
  if (first && report.budget_V === null) {
    report.budget_V = first.budgetV;
    report.corners = first.corners.map((k) => ({ temp_C: k.tempC }));
    report.supply_assumed_V = first.vddV;
    report.supply_from = first.vddFrom;
  }
  for (const d of result.diagnostics) report.diagnostics.push(reportDiagnostic(d));
}
