/**
 * Restricted expressions in time, e.g. `300 kPa + 50 kPa * sin(2*pi*t/(1 s))`.
 *
 * The text is parsed once by mathjs into a syntax tree, which is walked against a whitelist:
 * numbers, units (`5 kPa`, `2 s`), the symbol `t` (time in s), the constants `pi` and `e`,
 * `+ - * / ^`, unary minus, parentheses, and the functions below. Dimensions are checked at
 * compile time (t carries seconds; trigonometric, exp and log arguments must be
 * dimensionless) and the tree becomes a plain closure over SI numbers. Nothing is ever
 * evaluated by mathjs, so a netlist cannot reach `import`, `createUnit`, `evaluate` or the
 * host. Kinks from abs/min/max/floor/ceil are not located (no breakpoints are reported).
 */
import { isUnitName, mathParse, mathUnit } from './math.js';
import { DIMENSIONS, dimensionVector, nameDimension, type Dimension } from './dimensions.js';
import { fail, type ValueError } from './quantity.js';
import { unknownUnitHint } from './unit-hint.js';

export type CompiledExpression = {
  ok: true;
  /** Value in SI at time t (s). */
  f: (t: number) => number;
  /** True when the expression does not depend on t. */
  constant: boolean;
};

const MAX_EXPRESSION_LENGTH = 1000;
/** Deepest bracket nesting accepted (a formula needs a handful; this bounds the parser's recursion). */
const MAX_EXPRESSION_DEPTH = 32;
const ANGLE = 7; // index of the angle base dimension in mathjs

type Fn = (t: number) => number;
/** A compiled subtree: base-dimension exponents and either a folded constant or a closure. */
type Part = { dims: number[]; c: number; f?: undefined } | { dims: number[]; f: Fn; c?: undefined };
type Out = Part | ValueError;

/** The shape of mathjs nodes this module reads (its typings are generic-heavy). */
interface RawNode {
  type: string;
  value?: unknown;
  name?: string;
  fn?: unknown;
  op?: string;
  args?: RawNode[];
  content?: RawNode;
}

const FUNCTIONS = ['sin', 'cos', 'tan', 'exp', 'log', 'sqrt', 'abs', 'min', 'max', 'floor', 'ceil'] as const;
type FunctionName = (typeof FUNCTIONS)[number];

const ALLOWED_HINT = 'an expression may use numbers, units (`5 kPa`, `2 s`), `t` (time), `pi`, `e`, + - * / ^, parentheses and ' +
  FUNCTIONS.join(', ');

const NODE_REFUSALS: Record<string, string> = {
  AssignmentNode: 'assignments are not allowed in an expression',
  FunctionAssignmentNode: 'function definitions are not allowed in an expression',
  AccessorNode: 'member access and indexing are not allowed in an expression',
  IndexNode: 'indexing is not allowed in an expression',
  ArrayNode: 'matrices and lists are not allowed in an expression',
  ObjectNode: 'objects are not allowed in an expression',
  BlockNode: 'an expression is a single formula (no `;` or line breaks)',
  ConditionalNode: 'conditionals (`? :`) are not allowed in an expression; use min or max',
  RelationalNode: 'comparisons are not allowed in an expression',
  RangeNode: 'ranges (`a:b`) are not allowed in an expression',
};

const ZERO = (): number[] => new Array<number>(9).fill(0);

function sameDims(a: readonly number[], b: readonly number[]): boolean {
  return a.every((x, i) => Math.abs(x - b[i]) < 1e-12);
}

function isDimensionless(d: readonly number[], allowAngle = false): boolean {
  return d.every((x, i) => Math.abs(x) < 1e-12 || (allowAngle && i === ANGLE));
}

function nounOf(d: readonly number[]): string {
  const name = nameDimension(d);
  return name ? DIMENSIONS[name].noun : 'a quantity of unusual dimension';
}

function refuse(message: string, hint = ALLOWED_HINT): ValueError {
  return fail('expression-forbidden', message, hint);
}

/** The deepest nesting of ( [ { in `text`. */
function bracketDepth(text: string): number {
  let depth = 0;
  let deepest = 0;
  for (const c of text) {
    if (c === '(' || c === '[' || c === '{') deepest = Math.max(deepest, ++depth);
    else if (c === ')' || c === ']' || c === '}') depth = Math.max(0, depth - 1);
  }
  return deepest;
}

function isFail(x: Out): x is ValueError {
  return (x as ValueError).ok === false;
}

/** Builds a Part from an operation on parts, folding constants. */
function combine(dims: number[], parts: Part[], op: (...xs: number[]) => number): Part {
  if (parts.every((p) => p.f === undefined)) return { dims, c: op(...parts.map((p) => p.c as number)) };
  const fs: Fn[] = parts.map((p) => (p.f ? p.f : ((c) => () => c)(p.c as number)));
  if (fs.length === 1) {
    const [a] = fs;
    return { dims, f: (t) => op(a(t)) };
  }
  if (fs.length === 2) {
    const [a, b] = fs;
    return { dims, f: (t) => op(a(t), b(t)) };
  }
  return { dims, f: (t) => op(...fs.map((g) => g(t))) };
}

function compileSymbol(name: string): Out {
  if (name === 't') return { dims: dimensionVector('time'), f: (t) => t };
  if (name === 'pi') return { dims: ZERO(), c: Math.PI };
  if (name === 'e') return { dims: ZERO(), c: Math.E };
  if (!isUnitName(name)) return refuse(`unknown name \`${name}\` in the expression`, unknownUnitHint(name) ?? ALLOWED_HINT);
  const u = mathUnit(`1 ${name}`);
  if (u.units.some((c) => c.unit.offset !== 0)) {
    return refuse(`\`${name}\` has an offset and cannot be used inside an expression`, 'use K for temperatures in an expression');
  }
  return { dims: u.dimensions.slice(), c: u.value };
}

function compileOperator(node: RawNode): Out {
  const args = (node.args ?? []).map(compileNode);
  const bad = args.find(isFail);
  if (bad) return bad;
  const parts = args as Part[];
  switch (node.fn) {
    case 'unaryMinus':
      return combine(parts[0].dims, parts, (a) => -a);
    case 'unaryPlus':
      return parts[0];
    case 'add':
    case 'subtract': {
      if (!sameDims(parts[0].dims, parts[1].dims)) {
        return fail('expression-dimension', `cannot ${node.fn} ${nounOf(parts[1].dims)} ${node.fn === 'add' ? 'to' : 'from'} ${nounOf(parts[0].dims)}`, 'both sides of + and - must have the same dimension');
      }
      return combine(parts[0].dims, parts, node.fn === 'add' ? (a, b) => a + b : (a, b) => a - b);
    }
    case 'multiply':
      return combine(parts[0].dims.map((x, i) => x + parts[1].dims[i]), parts, (a, b) => a * b);
    case 'divide':
      return combine(parts[0].dims.map((x, i) => x - parts[1].dims[i]), parts, (a, b) => a / b);
    case 'pow': {
      const [base, exponent] = parts;
      if (!isDimensionless(exponent.dims)) return fail('expression-dimension', 'an exponent must be a plain number', 'write e.g. `(t/(1 s))^2`');
      if (isDimensionless(base.dims)) return combine(ZERO(), parts, Math.pow);
      if (exponent.f) return fail('expression-dimension', 'a quantity with units can only be raised to a constant power', 'make the base dimensionless, e.g. `(t/(1 s))^x`');
      return combine(base.dims.map((x) => x * (exponent.c as number)), parts, Math.pow);
    }
    default:
      return refuse(`the operator \`${node.op}\` is not allowed in an expression`);
  }
}

function compileFunction(node: RawNode): Out {
  const fnNode = node.fn as RawNode | undefined;
  if (!fnNode || fnNode.type !== 'SymbolNode' || !fnNode.name) return refuse('only named functions may be called in an expression');
  const name = fnNode.name;
  if (!(FUNCTIONS as readonly string[]).includes(name)) {
    return refuse(`the function \`${name}\` is not allowed in an expression`, `allowed functions: ${FUNCTIONS.join(', ')}`);
  }
  const fname = name as FunctionName;
  const argNodes = node.args ?? [];
  const variadic = fname === 'min' || fname === 'max';
  if (variadic ? argNodes.length < 1 : argNodes.length !== 1) {
    return refuse(`\`${fname}\` takes ${variadic ? 'one or more arguments' : 'one argument'}, got ${argNodes.length}`, `write e.g. \`${fname}(${variadic ? 'a, b' : 'x'})\``);
  }
  const args = argNodes.map(compileNode);
  const bad = args.find(isFail);
  if (bad) return bad;
  const parts = args as Part[];
  const d = parts[0].dims;
  switch (fname) {
    case 'sin':
    case 'cos':
    case 'tan':
      if (!isDimensionless(d, true)) return fail('expression-dimension', `the argument of ${fname} must be dimensionless, got ${nounOf(d)}`, 'divide time by a period, e.g. `sin(2*pi*t/(1 s))`');
      return combine(ZERO(), parts, Math[fname]);
    case 'exp':
    case 'log':
    case 'floor':
    case 'ceil':
      if (!isDimensionless(d)) return fail('expression-dimension', `the argument of ${fname} must be dimensionless, got ${nounOf(d)}`, 'divide by a reference, e.g. `exp(-t/(2 s))`');
      return combine(ZERO(), parts, Math[fname]);
    case 'sqrt':
      return combine(d.map((x) => x / 2), parts, Math.sqrt);
    case 'abs':
      return combine(d, parts, Math.abs);
    case 'min':
    case 'max': {
      const odd = parts.find((p) => !sameDims(p.dims, d));
      if (odd) return fail('expression-dimension', `the arguments of ${fname} must have the same dimension (${nounOf(d)} and ${nounOf(odd.dims)})`, 'compare like with like');
      return combine(d, parts, Math[fname]);
    }
  }
}

function compileNode(node: RawNode): Out {
  switch (node.type) {
    case 'ConstantNode':
      if (typeof node.value !== 'number') return refuse(`only numbers are allowed as constants, got ${JSON.stringify(node.value)}`);
      return { dims: ZERO(), c: node.value };
    case 'SymbolNode':
      return compileSymbol(node.name ?? '');
    case 'ParenthesisNode':
      return compileNode(node.content as RawNode);
    case 'OperatorNode':
      return compileOperator(node);
    case 'FunctionNode':
      return compileFunction(node);
    default:
      return refuse((Object.hasOwn(NODE_REFUSALS, node.type) ? NODE_REFUSALS[node.type] : undefined) ?? `\`${node.type}\` is not allowed in an expression`);
  }
}

/**
 * Compiles `text` into a closure giving `dimension` in SI at time t (s), or explains why not.
 */
export function compileExpression(text: string, dimension: Dimension): CompiledExpression | ValueError {
  if (text.length > MAX_EXPRESSION_LENGTH) return fail('expression-syntax', `the expression is ${text.length} characters long (at most ${MAX_EXPRESSION_LENGTH})`, 'split the signal into a time table');
  const depth = bracketDepth(text);
  if (depth > MAX_EXPRESSION_DEPTH) return fail('too-deep', `the expression is nested ${depth} levels deep (at most ${MAX_EXPRESSION_DEPTH})`, 'write a simpler formula, or the signal as a time table');
  let tree: RawNode;
  try {
    tree = mathParse(text) as unknown as RawNode;
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return fail('expression-syntax', `cannot read the expression: ${message}`, 'check parentheses and operators');
  }
  const out = compileNode(tree);
  if (isFail(out)) return out;
  const want = dimensionVector(dimension);
  if (!sameDims(out.dims, want)) {
    return fail('expression-dimension', `the expression gives ${nounOf(out.dims)}, expected ${DIMENSIONS[dimension].noun}`, `give every term a unit, e.g. \`${DIMENSIONS[dimension].example}\``);
  }
  if (out.f === undefined) {
    const c = out.c;
    if (!Number.isFinite(c)) return fail('not-finite', 'the expression is not a finite number', 'check divisions and logarithms');
    return { ok: true, f: () => c, constant: true };
  }
  return { ok: true, f: out.f, constant: false };
}
