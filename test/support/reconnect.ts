// Random reconnections for the tests of the reconnection path: one node word of an element line
// moved to another name already used as a node in its scope.

/** Node words of element lines: [line, word index] for M, R, C (their nodes) and X (all but the last word) lines. */
function nodeWords(lines: string[]): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  lines.forEach((l, i) => {
    const w = l.trim().split(/\s+/);
    const c = w[0]?.[0]?.toLowerCase();
    const nodes = c === 'm' ? 4 : c === 'r' || c === 'c' ? 2 : c === 'x' ? w.findIndex((x, k) => k > 0 && x.includes('=')) - 2 : 0;
    const count = c === 'x' && nodes < 0 ? w.length - 2 : nodes;
    for (let k = 1; k <= count && k < w.length; k++) out.push([i, k]);
  });
  return out;
}

/** Lines of the same scope as line i (the subcircuit body holding it, or the top level). */
export function scopeLines(lines: string[], i: number): number[] {
  let open = -1;
  for (let k = 0; k <= i; k++) {
    if (/^\.subckt\b/i.test(lines[k]!)) open = k;
    if (/^\.ends\b/i.test(lines[k]!)) open = -1;
  }
  if (open >= 0) {
    const end = lines.findIndex((l, j) => j > open && /^\.ends\b/i.test(l));
    return lines.map((_, k) => k).filter((k) => k > open && k < end);
  }
  const inside = new Set<number>();
  let at = -1;
  lines.forEach((l, k) => {
    if (/^\.subckt\b/i.test(l)) at = k;
    if (at >= 0) inside.add(k);
    if (/^\.ends\b/i.test(l)) at = -1;
  });
  return lines.map((_, k) => k).filter((k) => !inside.has(k));
}

/** One node word moved to another name already used as a node in its scope. */
export function reconnect(text: string, pick: number, to: number): string {
  const lines = text.split('\n');
  const words = nodeWords(lines);
  if (!words.length) return text;
  const [line, k] = words[pick % words.length]!;
  const names = new Set<string>();
  const scope = new Set(scopeLines(lines, line));
  for (const [j, m] of words) if (scope.has(j)) names.add(lines[j]!.trim().split(/\s+/)[m]!);
  const header = lines.slice(0, line).reverse().find((l) => /^\.(subckt|ends)\b/i.test(l));
  if (header && /^\.subckt\b/i.test(header)) for (const p of header.trim().split(/\s+/).slice(2)) if (!p.includes('=')) names.add(p);
  const choices = [...names].sort();
  const target = choices[to % choices.length]!;
  lines[line] = lines[line]!.split(/(\s+)/).map((x, j) => (j === 2 * k ? target : x)).join('');
  return lines.join('\n');
}


/** One node word moved to a name its scope does not use yet (a new net). */
export function reconnectToNewNet(text: string, pick: number, tag: number): string {
  const lines = text.split('\n');
  const words = nodeWords(lines);
  if (!words.length) return text;
  const [line, k] = words[pick % words.length]!;
  const name = `nn${tag}x`;
  if (new RegExp(`\\b${name}\\b`, 'i').test(text)) return text;
  lines[line] = lines[line]!.split(/(\s+)/).map((x, j) => (j === 2 * k ? name : x)).join('');
  return lines.join('\n');
}

/**
 * The only use of a net in its scope (not a port) moved to another name the scope uses: the
 * net is left unused and goes. The same as `reconnect` when no such word is found.
 */
export function reconnectLastUse(text: string, pick: number, to: number): string {
  const lines = text.split('\n');
  const words = nodeWords(lines);
  const wordAt = ([j, m]: [number, number]) => lines[j]!.trim().split(/\s+/)[m]!.toLowerCase();
  const single = words.filter(([line, k]) => {
    const scope = new Set(scopeLines(lines, line));
    const name = wordAt([line, k]);
    const header = lines.slice(0, line).reverse().find((l) => /^\.(subckt|ends)\b/i.test(l));
    if (header && /^\.subckt\b/i.test(header) && header.toLowerCase().trim().split(/\s+/).slice(2).includes(name)) return false;
    return words.filter(([j, m]) => scope.has(j) && wordAt([j, m]) === name).length === 1 && name !== '0';
  });
  if (!single.length) return text;
  const [line, k] = single[pick % single.length]!;
  const target = reconnect(text, words.findIndex(([j, m]) => j === line && m === k), to);
  return target;
}
