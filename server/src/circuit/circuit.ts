// The elaborated circuit: flat nets and devices with hierarchical names, each mapped back to the
// line that defined it. This is the interface every later stage reads; nothing later looks at
// syntax trees.

import type { Range } from '../core/source';
import type { DirectiveSet } from './directives';
import type { ModelCard } from './models';

/** Where an element or net was written: shared by every instance of that line. */
export interface Origin {
  file: string;
  range: Range;
  /** The defining subcircuit (lower case), or null at the top level. */
  subckt: string | null;
  /** The name as written inside that definition (lower case). */
  local: string;
}

export type NetKind = 'signal' | 'supply' | 'ground';

/** A flat net; its number is its place in `Circuit.nets` (not kept on it, so an edit that puts nets in moves none of these). */
export interface Net {
  /** Flat hierarchical name, lower case, '.' between levels. */
  name: string;
  kind: NetKind;
  global: boolean;
  origin: Origin;
}

export type Polarity = 'n' | 'p';

export interface Mosfet {
  name: string;
  polarity: Polarity;
  d: number;
  g: number;
  s: number;
  b: number;
  /** Drawn width and length in metres (per finger width is wM / nf). */
  wM: number;
  lM: number;
  /** Parallel multiplier (M, or CDL mult when M is absent). */
  m: number;
  nf: number;
  adM2?: number;
  asM2?: number;
  pdM?: number;
  psM?: number;
  /** Model name as written (lower case) and the card chosen for this W and L, if any. */
  model: string;
  card: ModelCard | undefined;
  origin: Origin;
}

/** What a MOSFET record holds besides its name, polarity, nets and line. */
export type MosfetSizes = Pick<Mosfet, 'wM' | 'lM' | 'm' | 'nf' | 'adM2' | 'asM2' | 'pdM' | 'psM' | 'model' | 'card'>;

/**
 * A MOSFET record, built field by field in the one shape the elaborator gives it (the optional
 * areas and perimeters only when present): copies made by spreading these records took V8's
 * slow path, about 1.8 us each, and edits copy up to every device of a circuit.
 */
export function mosfetRecord(name: string, polarity: Polarity, d: number, g: number, s: number, b: number, v: MosfetSizes, origin: Origin): Mosfet {
  const out: Mosfet = { name, polarity, d, g, s, b, wM: v.wM, lM: v.lM, m: v.m, nf: v.nf, model: v.model, card: v.card, origin };
  if (v.adM2 !== undefined) out.adM2 = v.adM2;
  if (v.asM2 !== undefined) out.asM2 = v.asM2;
  if (v.pdM !== undefined) out.pdM = v.pdM;
  if (v.psM !== undefined) out.psM = v.psM;
  return out;
}

export interface TwoTerminal {
  name: string;
  a: number;
  b: number;
  origin: Origin;
}

export interface Capacitor extends TwoTerminal {
  capacitanceF: number | undefined;
}

export interface Resistor extends TwoTerminal {
  /** 0 for a short (tie) element. */
  resistanceOhm: number | undefined;
}

export type Waveform =
  | { kind: 'dc'; volts: number | undefined }
  | { kind: 'pulse'; v1: number; v2: number; delayS: number; riseS: number; fallS: number; widthS: number; periodS: number }
  /** `repeatFromS`: ngspice `r=`, the waveform repeats from that time to its last point. */
  | { kind: 'pwl'; points: Array<[number, number]>; repeatFromS?: number; delayS?: number }
  | { kind: 'sin'; offset: number; amplitude: number; freqHz: number; delayS: number }
  | { kind: 'other'; name: string };

export interface Source {
  name: string;
  letter: 'v' | 'i';
  p: number;
  n: number;
  waveform: Waveform;
  origin: Origin;
}

export interface Diode extends TwoTerminal {
  model: string;
}

/** An element kept only for its connectivity (it conducts nothing in the analysis). */
export interface OtherElement {
  name: string;
  letter: string;
  nets: number[];
  origin: Origin;
}

export interface Instance {
  name: string;
  subckt: string;
  /** The flat nets its ports are bound to, in port order. */
  ports: number[];
  /** Where the instances below it sit in the circuit's list: [first, end) (depth first, so contiguous). Its MOSFETs: `Circuit.instanceMosfets`. */
  below: { instances: [number, number] };
  origin: Origin;
}

export type PortDirection = 'input' | 'output' | 'inout' | 'supply' | 'ground';

export interface Port {
  net: number;
  name: string;
  direction: PortDirection;
  /** How the direction was found. */
  from: 'pininfo' | 'directive' | 'inferred' | 'rail';
}

export interface Supply {
  net: number;
  /** Null when only the name says it is a supply and no voltage is known. */
  volts: number | null;
  from: 'source' | 'directive' | 'setting' | 'name';
}

export interface Circuit {
  /** The standalone subcircuit's name, or '(top)' for a deck with top-level elements. */
  name: string;
  standalone: boolean;
  nets: Net[];
  /**
   * How many nets come first, before every definition's own (elaborate numberNetsByScope):
   * globals, source terminals, rails by name and nets a directive or a setting names.
   */
  pinnedNets: number;
  netByName: Map<string, number>;
  mosfets: Mosfet[];
  capacitors: Capacitor[];
  resistors: Resistor[];
  inductors: TwoTerminal[];
  sources: Source[];
  diodes: Diode[];
  others: OtherElement[];
  instances: Instance[];
  /**
   * Where each instance's MOSFETs sit in `mosfets`: [first, end) of instance i at 2i and 2i + 1
   * (depth first, so contiguous). Kept apart from the instances so that devices put in or taken
   * out move these numbers and leave the instance objects as they are.
   */
  instanceMosfets: Int32Array;
  ports: Port[];
  supplies: Supply[];
  grounds: number[];
  /** Nets declared as inputs (directive) or by CDL pin direction. */
  inputs: number[];
  outputs: number[];
}

export interface Design {
  title: string | undefined;
  circuits: Circuit[];
  directives: DirectiveSet;
  /** Metres per written unit of W and L that was applied, and why. */
  geometryScale: { value: number; from: 'option' | 'directive' | 'setting' | 'assumed' | 'default' };
  tempC: number | undefined;
  files: string[];
  /** The model cards by name (every bin), for choosing a bin again after a size edit. */
  modelCards: ReadonlyMap<string, ModelCard[]>;
}
