import { all, create } from 'mathjs'
import { afterEach, describe, expect, it } from 'vitest'
import {
  ExpressionError,
  evaluateExpression,
  expressionMath,
  validateExpression,
} from '../../../shared/modules/expressions'
import type { ExpressionContext } from '../../../shared/modules/expressions'
import { DISABLED_FUNCTIONS } from '../../../shared/modules/expression-names'
import { expectClose } from '../../helpers/expect-close'

/** A small scope of SI data: a 2 s burn logged at four instants. */
const scope = {
  t: [0, 0.5, 1.5, 2],
  thrust: [0, 100, 100, 0],
  pc: [2e5, 6e5, 5e5, 2e5],
  pa: 1e5,
  d_throat: 0.004,
}

const dataContext: ExpressionContext = {
  produces: 'number',
  names: [
    { name: 't', shape: 'array', sample: scope.t },
    { name: 'thrust', shape: 'array', sample: scope.thrust },
    { name: 'pc', shape: 'array', sample: scope.pc },
    { name: 'pa', shape: 'scalar', sample: scope.pa },
    { name: 'd_throat', shape: 'scalar', sample: scope.d_throat },
  ],
}
const ruleContext: ExpressionContext = { ...dataContext, produces: 'boolean' }

function evaluationError(
  expr: string,
  values: Record<string, number | boolean | readonly number[]> = scope,
): ExpressionError {
  try {
    evaluateExpression(expr, values)
  } catch (error) {
    expect(error).toBeInstanceOf(ExpressionError)
    return error as ExpressionError
  }
  throw new Error(`expected "${expr}" to be refused`)
}

function messages(expr: string, context: ExpressionContext = dataContext): string {
  return validateExpression(expr, context)
    .map((i) => i.message)
    .join(' | ')
}

describe('evaluateExpression: the formula library in expressions', () => {
  it('passes table columns to totalImpulse as plain arrays (trapezoid: 25 + 100 + 25 N·s)', () => {
    expect(evaluateExpression('totalImpulse(t, thrust)', scope)).toBe(150)
  })

  it('reads one field of a result object built from an object literal', () => {
    // A/A* = 1.6875 is the area ratio of Mach 2 in air (1/2 · (1.8/1.2)^3 = 1.6875 exactly).
    const expr =
      'nozzleFlow({chamberPressure: 1e6, chamberTemperature: 300, ambientPressure: 101325, throatArea: 1e-4,' +
      ' exitArea: 1.6875e-4, gamma: 1.4, gasConstant: 287}).exitMach'
    expectClose(evaluateExpression(expr, {}) as number, 2, 1e-9)
  })

  it('reads a field of a nested result object', () => {
    // Design p/p0 at Mach 2: (1 + 0.2·4)^(−3.5) = 1.8^(−3.5).
    const expr = 'nozzlePressureRatios(1.6875, 1.4).design'
    expectClose(evaluateExpression(expr, {}) as number, 1.8 ** -3.5, 1e-9)
  })

  it('computes element-wise with the dotted operators and reduces with max and mean', () => {
    // thrust ./ (pc / 1e5) = [0/2, 100/6, 100/5, 0/2]; the largest is 100/5.
    expect(evaluateExpression('max(thrust ./ (pc / 1e5))', scope)).toBe(20)
    expect(evaluateExpression('mean(pc) / pa', scope)).toBe(3.75)
  })

  it('gives G0 as the standard gravity and compares to booleans', () => {
    expect(evaluateExpression('G0', {})).toBe(9.80665)
    expect(evaluateExpression('max(thrust) > 99', scope)).toBe(true)
    expect(evaluateExpression('max(thrust) > 99 and pa < 1e5', scope)).toBe(false)
  })

  it('turns a library RangeError into an ExpressionError that keeps its words', () => {
    const error = evaluationError('machFromPressureRatio(max(pc) / pa, 1.4)')
    expect(error.message).toContain('pressureRatio must be')
  })
})

describe('evaluateExpression: the helpers', () => {
  it('at counts from 1 and refuses indices outside the list', () => {
    expect(evaluateExpression('at(thrust, 2)', scope)).toBe(100)
    expect(evaluationError('at(thrust, 0)').message).toContain('from 1 to 4')
    expect(evaluationError('at(thrust, 1.5)').message).toContain('whole number')
  })

  it('argmax and argmin give the first extreme, counting from 1', () => {
    expect(evaluateExpression('argmax(thrust)', scope)).toBe(2)
    expect(evaluateExpression('argmin(thrust)', scope)).toBe(1)
    expect(evaluateExpression('at(t, argmax(pc))', scope)).toBe(0.5)
  })

  it('interp interpolates linearly and refuses extrapolation', () => {
    expect(evaluateExpression('interp(1, t, pc)', scope)).toBe(5.5e5)
    expect(evaluationError('interp(3, t, pc)').message).toContain('outside the table')
  })

  it('select keeps the samples whose flag is true', () => {
    expect(evaluateExpression('sum(select(thrust, pc > 3e5))', scope)).toBe(200)
    expect(evaluateExpression('mean(select(t, pa ./ pc < 0.4))', scope)).toBe(1)
    expect(evaluationError('select(thrust, [true, false])').message).toContain('as long as the values')
  })

  it('regimeCode numbers the regimes from subsonic (1) to under-expanded (5)', () => {
    expect(evaluateExpression('regimeCode("subsonic")', {})).toBe(1)
    expect(evaluateExpression('regimeCode("ideal")', {})).toBe(4)
    expect(evaluateExpression('regimeCode("underexpanded")', {})).toBe(5)
    expect(evaluationError('regimeCode("supersonic")', {}).message).toContain('unknown regime')
  })
})

describe('evaluateExpression: results it will not return', () => {
  it('refuses infinite and NaN results', () => {
    expect(evaluationError('1 / (pa - pa)').message).toContain('Infinity')
    expect(evaluationError('sqrt(-1)').message).toContain('NaN')
  })

  it('refuses a whole column, a result object and text', () => {
    expect(evaluationError('thrust').message).toContain('list of 4 values')
    expect(evaluationError('isentropic(2, 1.4)').message).toContain('group of values')
    expect(
      evaluationError(
        'nozzleFlow({chamberPressure: 1e6, chamberTemperature: 300, ambientPressure: 1e5, throatArea: 1e-4, exitArea: 2e-4, gamma: 1.4, gasConstant: 287}).regime',
      ).message,
    ).toContain('text')
  })

  it('names the data an expression needs that the scope does not have', () => {
    expect(evaluationError('max(p_receiver)').message).toContain('"p_receiver"')
  })

  it('gives each scope its own result from the same cached expression', () => {
    expect(evaluateExpression('max(thrust) * 2', scope)).toBe(200)
    expect(evaluateExpression('max(thrust) * 2', { ...scope, thrust: [1, 2, 3, 4] })).toBe(8)
  })

  it('refuses the same bad expression the same way every time', () => {
    const first = evaluationError('max(thrust')
    const second = evaluationError('max(thrust')
    expect(second.message).toBe(first.message)
  })
})

describe('validateExpression', () => {
  it('accepts a good expected-value expression and a good review rule', () => {
    expect(validateExpression('totalImpulse(t, thrust) / max(thrust)', dataContext)).toEqual([])
    expect(validateExpression('max(pc) > 3 * pa', ruleContext)).toEqual([])
  })

  it('reports a parse error with its character position', () => {
    const [issue] = validateExpression('max(thrust) +* 2', dataContext)
    // The '*' is the 14th character (index 13).
    expect(issue?.position).toBe(13)
    expect(issue?.message).toContain('character 14')
  })

  it('names an unknown name and suggests the closest known one', () => {
    expect(messages('max(thrsut)')).toContain('unknown name "thrsut" — did you mean thrust?')
    expect(messages('Pa * 2')).toContain('did you mean pa?')
  })

  it('names an unknown function and suggests a close one', () => {
    expect(messages('totalImpuls(t, thrust)')).toContain('unknown function "totalImpuls" — did you mean totalImpulse?')
  })

  it('checks the argument count of library functions', () => {
    expect(messages('totalImpulse(thrust)')).toContain('totalImpulse takes 2 arguments, but 1 is given')
    expect(messages('idealThrust(max(pc), pa, 1e-5, 2e-5)')).toContain('idealThrust takes 5 arguments, but 4 are given')
    expect(messages('meanValue(thrust, t, t)')).toContain('meanValue takes 1 to 2 arguments')
  })

  it('checks the named inputs of nozzleFlow', () => {
    const message = messages('nozzleFlow({chamberPressure: max(pc), ambientPressure: pa, speed: 3}).thrust')
    expect(message).toContain('needs chamberTemperature, throatArea, exitArea, gamma, gasConstant')
    expect(message).toContain('no input named speed')
    expect(messages('nozzleFlow(max(pc)).thrust')).toContain('one object of named inputs')
  })

  it('refuses assignments, function definitions and several statements', () => {
    expect(messages('x = max(thrust)')).toContain('assignments')
    expect(messages('f(x) = x^2')).toContain('defining a function')
    expect(messages('max(thrust); min(thrust)')).toContain('single formula')
  })

  it('refuses fields of anything but the library result objects, and unknown fields', () => {
    expect(messages('pa.value')).toContain('can only be read from the result of')
    expect(messages('isentropic(2, 1.4).machNumber')).toContain('no field "machNumber"')
    expect(
      messages(
        'nozzleFlow({chamberPressure: max(pc), chamberTemperature: 293, ambientPressure: pa, throatArea: 1e-5, exitArea: 2e-5, gamma: 1.4, gasConstant: 287}).pressureRatios',
      ),
    ).toContain('read one of chokeLimit, shockAtExit, design')
  })

  it('refuses bracket indexing, ranges, object literals elsewhere and unit arithmetic', () => {
    expect(messages('thrust[2]')).toContain('at(values, i)')
    expect(messages('sum(1:3)')).toContain('ranges')
    expect(messages('{a: 1}')).toContain('only as the input of nozzleFlow')
    expect(messages('5 cm')).toContain('unknown name "cm"')
    expect(messages('pa to kPa')).toContain('not available')
    expect(messages('3!')).toContain('not available')
  })

  it('refuses a function used as a value and data used as a function', () => {
    expect(messages('max')).toContain('max is a function')
    expect(messages('thrust(1)')).toContain('"thrust" is data, not a function')
  })

  it('runs the expression on the sample data and reports a failure', () => {
    expect(messages('machFromPressureRatio(max(pc) / pa, 1.4)')).toContain('a trial run with made-up data failed')
  })

  it('requires a number from expected values and true/false from review rules', () => {
    expect(messages('max(thrust) > 1')).toContain('must be a number')
    expect(messages('max(thrust)', ruleContext)).toContain('must give true or false')
  })

  it('refuses an empty expression and one over 2000 characters', () => {
    expect(messages('   ')).toContain('empty')
    expect(messages(`${'1 + '.repeat(600)}1`)).toContain('longer than 2000')
  })
})

describe('the expression sandbox', () => {
  afterEach(() => {
    // None of the payloads may leave a trace on the global object.
    expect((globalThis as Record<string, unknown>).pwned).toBeUndefined()
  })

  // Payloads after https://mathjs.org/docs/expressions/security.html and published mathjs escapes.
  const payloads = [
    'import({x: 1}, {override: true})',
    'import',
    'evaluate("1 + 1")',
    'parse("1 + 1")',
    'parse("1").compile().evaluate()',
    'compile("1 + 1")',
    'createUnit("furlong", "201.168 m")',
    'reviver("x", 1)',
    'simplify("x + x")',
    'simplifyConstant("1 + 1")',
    'simplifyCore("x + 0")',
    'derivative("x^2", "x")',
    'resolve("x", {x: 1})',
    'chain(1).done()',
    'rationalize("1/x + 1")',
    'leafCount("x + 1")',
    'symbolicEqual("x", "x")',
    'parser()',
    'eval("1")',
    'Function("return globalThis")()',
    // The same without the final call, so that they parse and the allowlist has to refuse them.
    'Function("globalThis.pwned = 1")',
    '[1].constructor.constructor("globalThis.pwned = 1")',
    'cos.constructor("globalThis.pwned = 1")',
    'f = cos.constructor',
    'constructor',
    '__proto__',
    'process',
    'process.exit()',
    'globalThis',
    'globalThis.pwned = 1',
    'this',
    'window',
    'require("fs")',
    '[1].constructor.constructor("globalThis.pwned = 1")()',
    '[].constructor.constructor("globalThis.pwned = 1")()',
    'cos.constructor("globalThis.pwned = 1")()',
    'sqrt.constructor("globalThis.pwned = 1")()',
    'f = cos.constructor; f("globalThis.pwned = 1")()',
    'sqrt.toString()',
    'totalImpulse.call(1, t, thrust)',
    '"".constructor',
    '"abc".length',
    'isentropic(2, 1.4).constructor',
    'isentropic(2, 1.4).__proto__',
    'isentropic(2, 1.4)["constructor"]',
    'isentropic(2, 1.4).constructor.constructor("globalThis.pwned = 1")()',
    'nozzleFlow({constructor: 1, __proto__: 2}).exitMach',
    'unit("5 cm")',
    'config({matrix: "Matrix"})',
    'typed("f", {"number": 1})',
    'map([1, 2], sqrt)',
    'filter([1, 2], isNaN)',
    'forEach([1], sqrt)',
    'pi = 3',
    'x.y = 1',
    'f(x) = globalThis',
  ]

  it.each(payloads)('validation refuses %s', (payload) => {
    expect(validateExpression(payload, dataContext).length).toBeGreaterThan(0)
  })

  it.each(payloads)('evaluation refuses %s', (payload) => {
    expect(() => evaluateExpression(payload, scope)).toThrow(ExpressionError)
  })

  it.each(DISABLED_FUNCTIONS)('the mathjs instance itself has %s disabled', (name) => {
    const fn = (expressionMath as unknown as Record<string, (...args: unknown[]) => unknown>)[name]
    expect(typeof fn).toBe('function')
    expect(() => fn?.('1')).toThrow(`${name} is disabled in module expressions`)
  })
})

describe('max and min of a logged column', () => {
  // A plain mathjs instance, without the expression engine's direct loops, is the reference.
  const reference = create(all!)

  it('give exactly what mathjs gives, nearly-equal values and all', () => {
    const columns: number[][] = [
      Array.from({ length: 5000 }, (_, i) => Math.sin(i / 100) * 1e5 + i * 1e-3),
      [1, 1 + 1e-14, 0.5, 1 - 1e-14],
      [-3, -3 - 1e-13, -2.9999999999999, -3.1],
      [42],
      [0, -0, 1e-300, -1e-300],
    ]
    for (const xs of columns) {
      expect(evaluateExpression('max(xs)', { xs })).toBe(reference.max(xs))
      expect(evaluateExpression('min(xs)', { xs })).toBe(reference.min(xs))
    }
  })

  it('leave lists with an infinite value, several arguments and empty lists to mathjs', () => {
    // 2/0 is Infinity, the largest; −2/0 is −Infinity, the smallest.
    expect(evaluateExpression('max(xs ./ ys) > 1e300', { xs: [1, 2, 3], ys: [1, 0, 1] })).toBe(true)
    expect(evaluateExpression('min(xs ./ ys) < -1e300', { xs: [1, -2, 3], ys: [1, 0, 1] })).toBe(true)
    expect(evaluateExpression('max(1, 7, 3)', {})).toBe(7)
    expect(evaluationError('max(select(xs, xs > 5))', { xs: [1, 2] }).message).toContain('empty')
  })
})
