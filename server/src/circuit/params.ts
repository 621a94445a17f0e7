// Parameter scopes: global `.param`, subcircuit defaults overridden by instance values, and
// `.param` inside a subcircuit. Values are evaluated lazily, once, with cycle detection; every
// failure becomes one `param-error` on the line that wrote the value.

import type { ValueItem } from '../syntax/tree';
import type { Range } from '../core/source';
import { parseSpiceNumber } from './numbers';
import { evaluateExpr, EvalError, parseExpression } from './expr';

export interface ParamReport {
  (file: string, range: Range, message: string): void;
}

interface Entry {
  item: ValueItem;
  file: string;
  /** The scope the value is evaluated in (the caller's, for an instance override). */
  evalScope: ParamScope | undefined;
  state: 'pending' | 'evaluating' | 'done';
  value: number | undefined;
}

/** The numeric value of a value item in a scope, or undefined after reporting why not. */
export function evaluateValue(item: ValueItem, file: string, scope: ParamScope | undefined, report: ParamReport): number | undefined {
  let text: string;
  switch (item.kind) {
    case 'word': {
      const n = parseSpiceNumber(item.text);
      if (n !== undefined) return n;
      text = item.text;
      break;
    }
    case 'expr':
      text = item.text;
      break;
    case 'string':
      report(file, item.range, `'"${item.text}"' is text, not a number`);
      return undefined;
    case 'group':
      report(file, item.range, 'a number is expected here, not a parenthesised list');
      return undefined;
  }
  const parsed = parseExpression(text);
  if (!parsed.ok) {
    report(file, item.range, parsed.message);
    return undefined;
  }
  try {
    const v = evaluateExpr(parsed.node, (name) => scope?.lookup(name, report));
    if (!Number.isFinite(v)) {
      report(file, item.range, `'${text}' evaluates to ${v}`);
      return undefined;
    }
    return v;
  } catch (e) {
    if (e instanceof DependencyError) return undefined;
    if (e instanceof RangeError) {
      report(file, item.range, 'expression is too deeply nested to evaluate');
      return undefined;
    }
    if (e instanceof CycleError) {
      report(file, item.range, e.message);
      return undefined;
    }
    if (e instanceof EvalError) {
      report(file, item.range, `${e.message} in '${text}'`);
      return undefined;
    }
    throw e;
  }
}

class CycleError extends Error {}
/** A value that depends on a parameter whose own failure was already reported. */
class DependencyError extends Error {}

export class ParamScope {
  private readonly entries = new Map<string, Entry>();

  constructor(readonly parent: ParamScope | undefined) {}

  /** Defines (or overrides) a parameter; `evalScope` defaults to this scope. */
  define(name: string, item: ValueItem, file: string, evalScope: ParamScope | undefined = this): void {
    this.entries.set(name.toLowerCase(), { item, file, evalScope, state: 'pending', value: undefined });
  }

  /** Defines a parameter with a value already known. */
  defineValue(name: string, value: number): void {
    this.entries.set(name.toLowerCase(), {
      item: { kind: 'word', text: String(value), range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } } },
      file: '',
      evalScope: undefined,
      state: 'done',
      value,
    });
  }

  has(name: string): boolean {
    return this.entries.has(name) || (this.parent?.has(name) ?? false);
  }

  ownNames(): string[] {
    return [...this.entries.keys()];
  }

  /** Like lookup, but a failure already reported is undefined instead of an exception. */
  tryLookup(name: string, report: ParamReport): number | undefined {
    try {
      return this.lookup(name, report);
    } catch (e) {
      if (e instanceof DependencyError || e instanceof CycleError) return undefined;
      throw e;
    }
  }

  /**
   * The value of `name` seen from this scope: undefined when no scope defines it. A parameter
   * whose own value failed throws, so the failure is reported once, where it is.
   */
  lookup(name: string, report: ParamReport): number | undefined {
    const e = this.entries.get(name);
    if (!e) return this.parent?.lookup(name, report);
    if (e.state === 'done') return valueOrFail(e);
    if (e.state === 'evaluating') throw new CycleError(`parameter '${name}' depends on itself`);
    e.state = 'evaluating';
    try {
      e.value = evaluateValue(e.item, e.file, e.evalScope, report);
    } finally {
      e.state = 'done';
    }
    return valueOrFail(e);
  }
}

function valueOrFail(e: Entry): number {
  if (e.value === undefined) throw new DependencyError();
  return e.value;
}
