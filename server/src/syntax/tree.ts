// The syntax tree: what the netlist says, line by line, before any meaning is given to names.
// Every item keeps its range in the file, through '+' continuations.

import type { Range } from '../core/source';
import type { Diagnostic } from '../core/diagnostics';

export interface WordItem {
  kind: 'word';
  /** As written (case preserved; the circuit stage lower-cases names). */
  text: string;
  range: Range;
}

export interface ExprItem {
  kind: 'expr';
  /** The expression inside the braces or quotes. */
  text: string;
  delimiter: '{' | "'";
  range: Range;
}

export interface StringItem {
  kind: 'string';
  text: string;
  range: Range;
}

export interface GroupItem {
  kind: 'group';
  items: Item[];
  range: Range;
}

export interface AssignItem {
  kind: 'assign';
  name: WordItem;
  /** Missing when the line stops after '=' (reported as a syntax error). */
  value: ValueItem | undefined;
  range: Range;
}

export type ValueItem = WordItem | ExprItem | StringItem | GroupItem;
export type Item = ValueItem | AssignItem;

/** One logical line: an element (`M1 ...`) or a card (`.model ...`). */
export interface Statement {
  head: WordItem;
  items: Item[];
  range: Range;
}

/** A `* tidemark: verb args...` comment. */
export interface DirectiveLine {
  verb: string;
  /** The words after the verb, split at white space, with their ranges. */
  args: WordItem[];
  range: Range;
  /** How many statements of the file come before it (places it inside a subcircuit or not). */
  statementIndex: number;
}

/** A CDL `*.PININFO a:I b:O` comment. */
export interface PinInfoLine {
  pins: { name: string; direction: 'input' | 'output' | 'inout'; range: Range }[];
  range: Range;
  statementIndex: number;
}

export interface SyntaxFile {
  file: string;
  /** The first line when the file is a top-level deck (an included file has none). */
  title: string | undefined;
  statements: Statement[];
  /**
   * The indices of the statements that are dot cards (head starting with '.'), ascending: every
   * other statement is an element line, which the deck passes on without reading it.
   */
  cardIndices: number[];
  directives: DirectiveLine[];
  pinInfos: PinInfoLine[];
  diagnostics: Diagnostic[];
  /** Number of lines in the text, so later stages can clamp ranges. */
  lineCount: number;
}
