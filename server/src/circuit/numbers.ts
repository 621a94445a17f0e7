// SPICE numeric literals as ngspice reads them: a decimal number with an optional exponent, then
// an optional scale factor, then any letters, which are ignored (`10fF`, `1.2V`, `4.7kOhm`).
// Scale factors are case-insensitive; `m` is milli, `meg` mega, `mil` a thousandth of an inch.
// Source: ngspice User Manual, section 2.3 (numbers and scale factors); checked against ngspice
// itself in test/values.test.ts.

const NUMBER_PREFIX = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/;

/** Single-letter scale factors; `meg` and `mil` are matched before `m`. */
const SINGLE_SCALE: Readonly<Record<string, number>> = {
  t: 1e12,
  g: 1e9,
  k: 1e3,
  m: 1e-3,
  u: 1e-6,
  n: 1e-9,
  p: 1e-12,
  f: 1e-15,
  a: 1e-18,
};

export interface NumberScan {
  value: number;
  /** Characters consumed, including the scale factor and any trailing letters. */
  length: number;
}

/** Reads a SPICE number at the start of `text`; undefined if it does not start with one. */
export function scanSpiceNumber(text: string, from = 0): NumberScan | undefined {
  const rest = from === 0 ? text : text.slice(from);
  const m = NUMBER_PREFIX.exec(rest);
  if (!m) return undefined;
  let value = Number(m[0]);
  let i = m[0].length;
  if (i < rest.length) {
    const c0 = rest.charCodeAt(i) | 0x20; // lower-case ASCII letters
    if (c0 >= 97 && c0 <= 122) {
      const c1 = rest.charCodeAt(i + 1) | 0x20;
      const c2 = rest.charCodeAt(i + 2) | 0x20;
      let factor = 1;
      let len = 1;
      if (c0 === 109 /* m */ && c1 === 101 /* e */ && c2 === 103 /* g */) (factor = 1e6), (len = 3);
      else if (c0 === 109 && c1 === 105 /* i */ && c2 === 108 /* l */) (factor = 25.4e-6), (len = 3);
      else {
        const f = SINGLE_SCALE[String.fromCharCode(c0)];
        if (f !== undefined) factor = f;
        else len = 0;
      }
      value *= factor;
      i += len;
      while (i < rest.length) {
        const c = rest.charCodeAt(i) | 0x20;
        if (c < 97 || c > 122) break;
        i++;
      }
    }
  }
  return { value, length: i };
}

/** The whole text as one SPICE number, or undefined (`1u` yes, `1u2`, `abc` or `1+2` no). */
export function parseSpiceNumber(text: string): number | undefined {
  const s = scanSpiceNumber(text);
  return s && s.length === text.length ? s.value : undefined;
}

/** Formats a value with an engineering suffix for messages (`4.2f`, `1.5meg`). */
export function formatEng(value: number, unit = ''): string {
  if (value === 0) return `0${unit}`;
  if (!Number.isFinite(value)) return `${value}${unit}`;
  const prefixes: Array<[number, string]> = [
    [1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'u'], [1e-9, 'n'], [1e-12, 'p'], [1e-15, 'f'], [1e-18, 'a'],
  ];
  const a = Math.abs(value);
  for (const [f, p] of prefixes) {
    if (a >= f * 0.9995) return `${Number((value / f).toPrecision(3))}${p}${unit}`;
  }
  return `${value.toExponential(2)}${unit}`;
}

/**
 * A strength ratio for a message: two decimals, or two significant digits under 0.1, so a long
 * keeper's 0.0043 does not read as 0.00.
 */
export function formatRatio(r: number): string {
  return r === 0 || !Number.isFinite(r) || Math.abs(r) >= 0.1 ? r.toFixed(2) : String(Number(r.toPrecision(2)));
}
