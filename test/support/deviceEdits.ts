// Random transistor lines added and deleted, for the tests of the splice path: a copy of a MOSFET
// line under a new name (as written, with drain and source swapped, or with its gate on another
// of its nodes) put in before an element line of the same scope or before its `.ends`, and a
// MOSFET line deleted or commented out.

import { scopeLines } from './reconnect';

const isElement = (l: string) => /^[a-z]/i.test(l.trim()) && !l.trim().startsWith('.');
const isMosfet = (l: string) => /^m/i.test(l.trim());

function mosfetLines(lines: string[]): number[] {
  return lines.flatMap((l, i) => (isMosfet(l) && !lines[i + 1]?.trim().startsWith('+') ? [i] : []));
}

/** A copy of a MOSFET line, changed by `variant`, put in at `where` among its scope's element lines. */
export function addDevice(text: string, pick: number, where: number, variant: number): string {
  const lines = text.split('\n');
  const ms = mosfetLines(lines);
  if (!ms.length) return text;
  const i = ms[pick % ms.length]!;
  const w = lines[i]!.trim().split(/\s+/);
  w[0] = `${w[0]}_x${pick % 89}`;
  if (variant % 4 === 1) [w[1], w[3]] = [w[3]!, w[1]!];
  if (variant % 4 === 2) w[2] = w[1 + (where % 4)]!;
  const scope = scopeLines(lines, i);
  const places = scope.filter((k) => isElement(lines[k]!));
  const ends = lines.findIndex((l, k) => k > i && /^\.ends\b/i.test(l));
  if (ends >= 0 && scope.includes(ends - 1)) places.push(ends);
  const at = places[where % places.length]!;
  const added = variant % 4 === 3 ? ['* a device added', w.join(' ')] : [w.join(' ')];
  lines.splice(at, 0, ...added);
  return lines.join('\n');
}

/** A MOSFET line deleted, or commented out (the lines after it stay where they are). */
export function deleteDevice(text: string, pick: number, commentOut: boolean): string {
  const lines = text.split('\n');
  const ms = mosfetLines(lines);
  if (!ms.length) return text;
  const i = ms[pick % ms.length]!;
  if (commentOut) lines[i] = `* ${lines[i]}`;
  else lines.splice(i, 1);
  return lines.join('\n');
}

/**
 * A copy of a MOSFET line with a name its scope does not use yet on a terminal (drain, source,
 * gate, or drain and source: `variant`), put in as `addDevice` puts it: a transistor that makes
 * a new node, as one put in series does.
 */
export function addDeviceOnNewNet(text: string, pick: number, where: number, variant: number): string {
  const tag = `nq${pick % 61}`;
  if (new RegExp(`\\b${tag}[ds]?\\b`, 'i').test(text)) return text;
  const withNew = addDevice(text, pick, where, 0);
  if (withNew === text) return text;
  // the line put in is the one addDevice named with the suffix
  const suffix = `_x${pick % 89}`;
  const lines = withNew.split('\n');
  const k = lines.findIndex((l) => {
    const w = l.trim().split(/\s+/);
    return w[0]!.endsWith(suffix) && /^m/i.test(w[0]!) && !text.split('\n').includes(l);
  });
  if (k < 0) return text;
  const w = lines[k]!.trim().split(/\s+/);
  const v = variant % 4;
  if (v === 0 || v === 3) w[1] = `${tag}d`;
  if (v === 1 || v === 3) w[3] = `${tag}s`;
  if (v === 2) w[2] = `${tag}`;
  lines[k] = w.join(' ');
  return lines.join('\n');
}
