// The one catalogue of findings: every rule code, its default severity, a title and the
// paragraph the editor links to. Codes are a public contract (CLI JSON, SARIF, settings).

export type Severity = 'error' | 'warning' | 'info';

export interface RuleInfo {
  severity: Severity;
  title: string;
  explanation: string;
}

export const RULES = {
  // ---- front end -------------------------------------------------------------------------
  syntax: {
    severity: 'error',
    title: 'Syntax error',
    explanation:
      'The line cannot be read as a SPICE element or card: an unbalanced parenthesis, a quote or brace left open, a parameter with no value, or a line that starts with a character no element starts with. The rest of the file is still read; the broken line is left out of the circuit.',
  },
  'unknown-element': {
    severity: 'warning',
    title: 'Element not modelled',
    explanation:
      'The element letter is valid SPICE but Tidemark does not model its behaviour (for example switches, transmission lines, XSPICE code models). Its terminals are kept as nets, but it conducts nothing in the analysis, so nodes it would drive may be reported as floating.',
  },
  'unknown-card': {
    severity: 'info',
    title: 'Card not used',
    explanation:
      'A dot card that Tidemark reads but does not act on, or does not know. Simulators may still honour it; the analysis ignores it.',
  },
  'unknown-subckt': {
    severity: 'error',
    title: 'Unknown subcircuit',
    explanation:
      'An X instance names a subcircuit that is not defined in the netlist or its includes, and no `device` rule maps that name to a transistor or other primitive. Add the definition, an `.include`, or a `* tidemark: device <name> nmos|pmos` directive.',
  },
  'pin-count': {
    severity: 'error',
    title: 'Pin count mismatch',
    explanation:
      'An X instance connects a different number of nets than its subcircuit has ports. The instance is left out of the circuit because binding by position would join the wrong nets.',
  },
  'unknown-model': {
    severity: 'warning',
    title: 'Model card not found',
    explanation:
      'A device names a model that no `.model` card defines. The device polarity is taken from the model name where the device rule recognises it, so the switch-level analysis still runs, but electrical estimates fall back to a generic technology profile.',
  },
  'param-error': {
    severity: 'error',
    title: 'Parameter error',
    explanation:
      'A value or expression cannot be evaluated: an unknown parameter name, a parameter that depends on itself, a division by zero, or a function Tidemark does not know. The value that depends on it is left undefined.',
  },
  'include-missing': {
    severity: 'error',
    title: 'Included file not found',
    explanation:
      'An `.include` or `.lib` names a file that cannot be found relative to the including file or on the configured include paths, or a `.lib` section that the file does not define. Anything that file would have defined (models, subcircuits) is missing from the analysis.',
  },
  'include-cycle': {
    severity: 'error',
    title: 'Include cycle',
    explanation: 'A file includes itself, directly or through other files. The repeated include is not followed.',
  },
  'recursive-subckt': {
    severity: 'error',
    title: 'Recursive subcircuit',
    explanation:
      'A subcircuit instantiates itself, directly or through other subcircuits, so it cannot be flattened. The recursive instance is left out.',
  },
  'duplicate-definition': {
    severity: 'warning',
    title: 'Duplicate definition',
    explanation:
      'A subcircuit or model is defined twice in the same scope. The first definition is used, as the reported line says.',
  },
  'geometry-scale': {
    severity: 'warning',
    title: 'Geometry scale assumed',
    explanation:
      'Transistor widths and lengths look like microns rather than metres (for example `w=0.42` with no `.option scale`). Tidemark assumed the scale named in the message. Add `.option scale=1e-6`, the `* tidemark: scale 1u` directive, or the `tidemark.geometryScale` setting to state it.',
  },
  directive: {
    severity: 'warning',
    title: 'Directive not understood',
    explanation:
      'A `* tidemark:` comment has an unknown verb or a malformed argument. Simulators ignore it as a comment; Tidemark ignores it too and says why.',
  },
  // ---- analysis (rules filled in by later stages) -----------------------------------------
  'floating-node': {
    severity: 'warning',
    title: 'Node can float',
    explanation:
      'In some clock phase every channel path from this storage node to a supply or a driven net is cut off, so it holds its level only as charge on its capacitance. The message names the phase, the input values that cut it off and the devices that are off.',
  },
  'retention-short': {
    severity: 'error',
    title: 'Retention shorter than the float window',
    explanation:
      'At some temperature corner, leakage moves the floating node by the droop budget before the node is driven again (or before the stated standby time ends).',
  },
  'charge-sharing': {
    severity: 'warning',
    title: 'Charge sharing',
    explanation:
      'An input change that does not complete a path to a rail joins the floating node to uncharged internal nodes, and the shared charge moves the node by more than the budget allows.',
  },
  'coupling-noise': {
    severity: 'warning',
    title: 'Coupling noise',
    explanation:
      'Capacitive coupling from nets that switch while the node floats (explicit coupling capacitors, gate-drain overlap of switching devices) moves the node by more than the budget allows.',
  },
  'combined-droop': {
    severity: 'warning',
    title: 'Combined droop over budget',
    explanation: 'No single mechanism exceeds the droop budget, but leakage, charge sharing and coupling together do.',
  },
  'undriven-net': {
    severity: 'error',
    title: 'Undriven net',
    explanation:
      'A net that drives transistor gates has no channel path to any supply or driven net in any phase. This is usually a wiring mistake, such as a misspelt net name: when a driven net of the same cell is a letter or two away, the quick fix puts its name in.',
  },
  contention: {
    severity: 'error',
    title: 'Contention',
    explanation:
      'For some input values, conducting paths join this node to opposite rails or to two different drivers at once. Ratioed structures such as keepers are excepted.',
  },
  'keeper-weak': {
    severity: 'warning',
    title: 'Keeper too weak',
    explanation: 'The keeper on this node cannot supply the hot-corner leakage, or cannot resist charge sharing, with margin. The quick fix resizes a keeper too weak for the leakage; no keeper size stops charge sharing (precharge the internal node).',
  },
  'keeper-strong': {
    severity: 'warning',
    title: 'Keeper too strong',
    explanation:
      'The keeper-to-pull-down strength ratio is above the common-practice range (about 0.1 to 0.3), so evaluation is slowed or may fail. The quick fix resizes the keeper into the range, still holding ten times the hot-corner leakage.',
  },
  'hyperperiod-capped': {
    severity: 'info',
    title: 'Clock cycle capped',
    explanation:
      'The clocks have periods whose common multiple is very long (or would need thousands of phases), so the phases are built over a capped stretch of time. Float windows longer than that stretch are not seen; declare clocks with commensurate periods if that matters.',
  },
  'clock-unknown': {
    severity: 'warning',
    title: 'Clock without a waveform',
    explanation:
      'A net whose name says clock has no periodic source and no `clock` directive, so Tidemark cannot build its phases. Declare it with `* tidemark: clock <net> period=<t> high=<t>`.',
  },
} as const satisfies Record<string, RuleInfo>;

export type RuleCode = keyof typeof RULES;

export function ruleInfo(code: RuleCode): RuleInfo {
  return RULES[code];
}
