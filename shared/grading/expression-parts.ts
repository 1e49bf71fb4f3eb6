/**
 * Evaluating module expressions part by part, so that repeated evaluations with one input moved
 * (the uncertainty propagation: each input up and down by its uncertainty) recompute only the parts
 * that input reaches.
 *
 * Each expression is split into parts: every call, field read, operator, comparison and condition
 * is one part, its inner parts replaced by placeholders. A part's value is kept under its text, in
 * one of two memos:
 * - the base memo, for parts that read none of the moved names (their value is the same as with
 *   the unmoved data, whatever else moves), kept for the whole submission: `reduce(t, thrust)` is
 *   worked out once for all results and all perturbations that leave the thrust alone;
 * - the side memo, for parts that read a moved name, kept while one perturbation lasts: when the
 *   thrust is moved up, `reduce(t, thrust)` is worked out once for every result that uses it.
 * The parts run in the same locked-down mathjs instance and on trees that passed the same checks
 * as {@link evaluateExpression}, so each part gives exactly the value it has inside the whole
 * expression (the functions are deterministic). Inner parts are worked out only when the outer one
 * asks for them, so the branch a condition does not take is never run.
 */
import type { MathNode } from 'mathjs'
import { checkedExpressionTree, expressionMath as math } from '../modules/expressions'
import type { ExpressionValue } from '../modules/scope'

/** One part of an expression: its own code, with its inner parts as placeholders. */
interface Part {
  /** The part's text, the key of its memo entry (the same text means the same computation). */
  key: string
  /** Every scope name read anywhere inside the part. */
  names: ReadonlySet<string>
  /** The inner parts, in placeholder order. */
  inner: readonly Part[]
  run: (scope: Map<string, unknown>) => unknown
}

/** Prefix of the placeholders; module keys start with a lower-case letter, so they never clash. */
const PLACEHOLDER = '__part'

function isPartNode(n: MathNode): boolean {
  return (
    math.isFunctionNode(n) ||
    math.isAccessorNode(n) ||
    math.isOperatorNode(n) ||
    math.isConditionalNode(n) ||
    math.isRelationalNode(n)
  )
}

function partOf(node: MathNode): Part {
  const inner: Part[] = []
  const names = new Set<string>()
  // The called function's own name (path 'fn') is not a value read from the scope.
  const rewrite = (n: MathNode): MathNode => {
    if (isPartNode(n)) {
      const part = partOf(n)
      inner.push(part)
      for (const name of part.names) names.add(name)
      return new math.SymbolNode(`${PLACEHOLDER}${inner.length - 1}`)
    }
    if (math.isSymbolNode(n)) {
      names.add(n.name)
      return n
    }
    return n.map((child, path) => (path === 'fn' ? child : rewrite(child)))
  }
  let body: MathNode
  if (math.isSymbolNode(node)) {
    names.add(node.name)
    body = node
  } else {
    body = node.map((child, path) => (path === 'fn' ? child : rewrite(child)))
  }
  const code = body.compile()
  return { key: node.toString(), names, inner, run: (scope) => code.evaluate(scope) }
}

const PLAN_LIMIT = 500
const plans = new Map<string, Part>()

/** The parts of a checked expression, built once per text (modules are graded many times). */
function planOf(expr: string): Part {
  const hit = plans.get(expr)
  if (hit) {
    plans.delete(expr)
    plans.set(expr, hit)
    return hit
  }
  const plan = partOf(checkedExpressionTree(expr))
  plans.set(expr, plan)
  if (plans.size > PLAN_LIMIT) plans.delete(plans.keys().next().value as string)
  return plan
}

/** Every scope name an expression reads. */
export function expressionReads(expr: string): ReadonlySet<string> {
  return planOf(expr).names
}

type Entry = { ok: true; value: unknown } | { ok: false; error: unknown }

/**
 * The evaluations of one submission's expressions: the unmoved data, and any number of
 * perturbations of it, one at a time.
 */
export class PartEvaluator {
  private readonly baseMemo = new Map<string, Entry>()
  private sideMemo = new Map<string, Entry>()
  private scope: Readonly<Record<string, ExpressionValue>>
  private moved: ReadonlySet<string> = new Set()

  constructor(private readonly base: Readonly<Record<string, ExpressionValue>>) {
    this.scope = base
  }

  /**
   * Evaluates from now on with `scope`, which differs from the base scope only in the values of
   * `moved`; `null` returns to the base scope.
   */
  perturb(change: { scope: Readonly<Record<string, ExpressionValue>>; moved: ReadonlySet<string> } | null): void {
    this.sideMemo = new Map()
    this.scope = change ? change.scope : this.base
    this.moved = change ? change.moved : new Set()
  }

  /**
   * The expression's value on the current scope (a number or anything else it gives; the caller
   * checks). Throws what the expression throws.
   */
  evaluate(expr: string): unknown {
    return this.value(planOf(expr))
  }

  private value(part: Part): unknown {
    let movedHere = false
    for (const n of this.moved) {
      if (part.names.has(n)) {
        movedHere = true
        break
      }
    }
    const memo = movedHere ? this.sideMemo : this.baseMemo
    let entry = memo.get(part.key)
    if (entry === undefined) {
      try {
        entry = { ok: true, value: part.run(this.scopeFor(part, movedHere)) }
      } catch (error) {
        entry = { ok: false, error }
      }
      memo.set(part.key, entry)
    }
    if (!entry.ok) throw entry.error
    return entry.value
  }

  private scopeFor(part: Part, moved: boolean): Map<string, unknown> {
    // A part no moved name reaches is worked out on the base scope, so its memo entry is the base value.
    return new PartScope(moved ? this.scope : this.base, (i) => this.value(part.inner[i] as Part))
  }
}

/**
 * The scope of one part's code: the data, and its placeholders, each worked out when the code reads
 * it (and only then, so the untaken branch of a condition never runs). mathjs reads a scope only
 * through has and get.
 */
class PartScope extends Map<string, unknown> {
  constructor(
    private readonly data: Readonly<Record<string, ExpressionValue>>,
    private readonly inner: (index: number) => unknown,
  ) {
    super()
  }

  override has(name: string): boolean {
    return name.startsWith(PLACEHOLDER) || Object.prototype.hasOwnProperty.call(this.data, name)
  }

  override get(name: string): unknown {
    return name.startsWith(PLACEHOLDER) ? this.inner(Number(name.slice(PLACEHOLDER.length))) : this.data[name]
  }
}
