// The TextMate grammar (syntaxes/spice.tmLanguage.json), tokenised with vscode-textmate and
// the Oniguruma WebAssembly build, as VS Code itself does.
import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it, beforeAll } from 'vitest';
import * as vsctm from 'vscode-textmate';
import * as oniguruma from 'vscode-oniguruma';

let grammar: vsctm.IGrammar;

beforeAll(async () => {
  const wasm = fs.readFileSync(path.join(__dirname, '../node_modules/vscode-oniguruma/release/onig.wasm'));
  await oniguruma.loadWASM(wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength));
  const registry = new vsctm.Registry({
    onigLib: Promise.resolve({ createOnigScanner: (p: string[]) => new oniguruma.OnigScanner(p), createOnigString: (s: string) => new oniguruma.OnigString(s) }),
    loadGrammar: async () => vsctm.parseRawGrammar(fs.readFileSync(path.join(__dirname, '../syntaxes/spice.tmLanguage.json'), 'utf8'), 'spice.tmLanguage.json'),
  });
  grammar = (await registry.loadGrammar('source.spice'))!;
});

function scopesOf(line: string): Array<[string, string]> {
  const r = grammar.tokenizeLine(line, vsctm.INITIAL);
  return r.tokens.map((t) => [line.slice(t.startIndex, t.endIndex), t.scopes[t.scopes.length - 1]!]);
}

function scopeAt(line: string, text: string): string | undefined {
  return scopesOf(line).find(([t]) => t.includes(text))?.[1];
}

describe('TextMate grammar', () => {
  it('marks comment lines and inline comments', () => {
    expect(scopeAt('* a comment', 'a comment')).toBe('comment.line.asterisk.spice');
    expect(scopeAt('R1 a b 1k $ note', '$ note')).toBe('comment.line.dollar.spice');
    expect(scopeAt('R1 a b 1k ; note', '; note')).toBe('comment.line.semicolon.spice');
  });
  it('marks directives, their verb and arguments', () => {
    const s = scopesOf('* tidemark: clock clk period=1n high=0.5n');
    expect(s.find(([t]) => t === 'tidemark')?.[1]).toBe('keyword.control.directive.tidemark');
    expect(s.find(([t]) => t === 'clock')?.[1]).toBe('keyword.other.directive.tidemark');
  });
  it('marks element names, cards, numbers with units and expressions', () => {
    expect(scopeAt('Mn1 d g s b nch w=1u', 'Mn1')).toBe('entity.name.tag.element.spice');
    expect(scopeAt('.subckt inv a y', '.subckt')).toBe('keyword.control.card.spice');
    expect(scopeAt('C1 a 0 10fF', '10fF')).toBe('constant.numeric.spice');
    expect(scopeAt('R2 a b 4.7kOhm', '4.7kOhm')).toBe('constant.numeric.spice');
    expect(scopeAt('V1 a 0 {vdd*2}', 'vdd')).toBe('meta.expression.brace.spice');
    expect(scopeAt('+ w=1u', '+')).toBe('punctuation.separator.continuation.spice');
  });
});
