import type { Range } from './source';
import { RULES, type RuleCode, type Severity } from '../findings/catalogue';

export interface RelatedInfo {
  file: string;
  range: Range;
  message: string;
}

/** A finding of any stage, tied to the line it belongs to. */
export interface Diagnostic {
  rule: RuleCode;
  severity: Severity;
  file: string;
  range: Range;
  message: string;
  /** Flat node name, for findings about a node. */
  node?: string;
  related?: RelatedInfo[];
  /** Set when an `accept` directive marks this finding as reviewed. */
  accepted?: { reason: string; file: string; range: Range };
}

export function diag(rule: RuleCode, file: string, range: Range, message: string, severity?: Severity): Diagnostic {
  return { rule, severity: severity ?? RULES[rule].severity, file, range, message };
}
