// A small Boolean expression reader for test expectations and Liberty strings:
// `!a`, `a'`, `a & b`, `a * b`, `a | b`, `a + b`, `(...)`, `0`, `1`.

export type BoolFn = (env: Record<string, 0 | 1>) => boolean;

export function parseBool(text: string): { fn: BoolFn; vars: string[] } {
  const tokens = text.match(/[A-Za-z_][\w.#$]*|[!&|*+()']|[01]/g) ?? [];
  let i = 0;
  const vars = new Set<string>();
  const peek = () => tokens[i];
  const orExpr = (): BoolFn => {
    let l = andExpr();
    while (peek() === '|' || peek() === '+') {
      i++;
      const a = l;
      const b = andExpr();
      l = (e) => a(e) || b(e);
    }
    return l;
  };
  const andExpr = (): BoolFn => {
    let l = unary();
    while (peek() === '&' || peek() === '*' || (peek() !== undefined && /^[A-Za-z_(!01]/.test(peek()!))) {
      if (peek() === '&' || peek() === '*') i++;
      const a = l;
      const b = unary();
      l = (e) => a(e) && b(e);
    }
    return l;
  };
  const unary = (): BoolFn => {
    if (peek() === '!') {
      i++;
      const a = unary();
      return (e) => !a(e);
    }
    let p = primary();
    while (peek() === "'") {
      i++;
      const a = p;
      p = (e) => !a(e);
    }
    return p;
  };
  const primary = (): BoolFn => {
    const t = tokens[i++];
    if (t === '(') {
      const e = orExpr();
      if (tokens[i++] !== ')') throw new Error(`')' expected in ${text}`);
      return e;
    }
    if (t === '0') return () => false;
    if (t === '1') return () => true;
    if (!t || !/^[A-Za-z_]/.test(t)) throw new Error(`cannot read '${text}'`);
    const name = t.toLowerCase();
    vars.add(name);
    return (e) => {
      const v = e[name];
      if (v === undefined) throw new Error(`no value for ${name}`);
      return v === 1;
    };
  };
  const fn = orExpr();
  if (i !== tokens.length) throw new Error(`cannot read '${text}' past '${tokens[i]}'`);
  return { fn, vars: [...vars] };
}

/** True when the cubes cover exactly the assignments over `vars` where `fn` holds. */
export function coverMatches(cubes: Array<Record<string, 0 | 1>>, fn: BoolFn, vars: string[]): string[] {
  const all = [...new Set([...vars, ...cubes.flatMap((c) => Object.keys(c))])];
  const problems: string[] = [];
  for (let a = 0; a < 1 << all.length; a++) {
    const env: Record<string, 0 | 1> = {};
    all.forEach((v, k) => (env[v] = ((a >> k) & 1) as 0 | 1));
    const covered = cubes.some((c) => Object.entries(c).every(([k, v]) => env[k] === v));
    let expected: boolean;
    try {
      expected = fn(env);
    } catch (e) {
      problems.push(String(e));
      return problems;
    }
    if (covered !== expected) problems.push(`${JSON.stringify(env)}: expected ${expected ? 'float' : 'no float'}, got ${covered ? 'float' : 'no float'}`);
  }
  return problems;
}
