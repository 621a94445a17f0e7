// Random net renames, for the tests of the rename path and the edit chains: a node word of an
// M or X line renamed in its whole scope (subcircuit body or top level), or on its line only.

/** Node words of element lines: [line, word index] for M (4 nodes) and X (all but the last word) lines. */
function nodeWords(lines: string[]): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  lines.forEach((l, i) => {
    const w = l.trim().split(/\s+/);
    const c = w[0]?.[0]?.toLowerCase();
    if (c === 'm') for (let k = 1; k <= 4 && k < w.length; k++) out.push([i, k]);
    if (c === 'x') for (let k = 1; k < w.length - 1 && !w[k]!.includes('='); k++) out.push([i, k]);
  });
  return out;
}

/** The lines of the scope (subcircuit body or top level) holding line i. */
function scopeOf(lines: string[], i: number): number[] {
  let start = 0;
  let end = lines.length;
  for (let k = i; k >= 0; k--) {
    if (/^\.ends\b/i.test(lines[k]!) && k !== i) break;
    if (/^\.subckt\b/i.test(lines[k]!)) {
      start = k + 1;
      end = lines.findIndex((l, j) => j > k && /^\.ends\b/i.test(l));
      break;
    }
  }
  if (start === 0) return lines.map((_, k) => k).filter((k) => !insideSubckt(lines, k));
  return lines.map((_, k) => k).filter((k) => k >= start && k < end);
}

function insideSubckt(lines: string[], k: number): boolean {
  let depth = 0;
  for (let j = 0; j <= k; j++) {
    if (/^\.subckt\b/i.test(lines[j]!)) depth++;
    if (/^\.ends\b/i.test(lines[j]!) && j !== k) depth--;
  }
  return depth > 0 || /^\.ends\b/i.test(lines[k]!);
}

/** A net of an element line renamed `<name>_tern`: in its whole scope, or (`whole` false) on that line only (a reconnection). */
export function rename(text: string, pick: number, whole: boolean): string {
  const lines = text.split('\n');
  const words = nodeWords(lines);
  if (!words.length) return text;
  const [line, k] = words[pick % words.length]!;
  const w = lines[line]!.trim().split(/\s+/);
  const name = w[k]!;
  const fresh = `${name}_tern`;
  const swap = (l: string) => l.replace(/\S+/g, (x, at: number) => (x.toLowerCase() === name.toLowerCase() && at > 0 ? fresh : x));
  if (!whole) lines[line] = lines[line]!.split(/(\s+)/).map((x, j) => (j === 2 * k && x === name ? fresh : x)).join('');
  else for (const j of scopeOf(lines, line)) if (/^[mx]/i.test(lines[j]!)) lines[j] = swap(lines[j]!);
  return lines.join('\n');
}
