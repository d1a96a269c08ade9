import { linear, reconcile, ReconcileError, type ReconcileInput } from '@/shared/reconcile';

// Every refusal path gives a typed ReconcileError with a code and a message naming the input
// (project rule: bad input gives a clear error, never NaN).

const two = (extra: Partial<ReconcileInput> = {}): ReconcileInput => ({
  measured: [
    { id: 'a', value: 10, sigma: 0.1 },
    { id: 'b', value: 10.2, sigma: 0.1 },
  ],
  constraints: [linear('ab', { a: 1, b: -1 })],
  ...extra,
});

function codeOf(fn: () => unknown): { code: string; message: string } {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(ReconcileError);
    const err = e as ReconcileError;
    return { code: err.code, message: err.message };
  }
  throw new Error('expected a ReconcileError');
}

describe('input validation', () => {
  test('duplicate ids: measured twice, measured and unmeasured, constraint twice', () => {
    const m = [
      { id: 'a', value: 1, sigma: 1 },
      { id: 'a', value: 2, sigma: 1 },
    ];
    expect(codeOf(() => reconcile({ measured: m, constraints: [linear('c', { a: 1 })] }))).toEqual({
      code: 'DUPLICATE_ID',
      message: expect.stringContaining('"a"'),
    });
    expect(codeOf(() => reconcile(two({ unmeasured: [{ id: 'b' }] }))).code).toBe('DUPLICATE_ID');
    expect(
      codeOf(() => reconcile(two({ constraints: [linear('c', { a: 1, b: -1 }), linear('c', { a: 1, b: -1 })] }))).code,
    ).toBe('DUPLICATE_ID');
  });
  test.each([0, -0.1, Number.NaN, Number.POSITIVE_INFINITY])(
    'sigma %p is refused, naming the measurement and value',
    (sigma) => {
      const e = codeOf(() =>
        reconcile({
          ...two(),
          measured: [
            { id: 'a', value: 1, sigma },
            { id: 'b', value: 1, sigma: 1 },
          ],
        }),
      );
      expect(e.code).toBe('INVALID_SIGMA');
      expect(e.message).toContain('"a"');
      expect(e.message).toContain(String(sigma));
    },
  );
  test('non-finite value and guess, empty id', () => {
    expect(
      codeOf(() =>
        reconcile({
          ...two(),
          measured: [
            { id: 'a', value: Number.NaN, sigma: 1 },
            { id: 'b', value: 1, sigma: 1 },
          ],
        }),
      ).code,
    ).toBe('INVALID_VALUE');
    expect(codeOf(() => reconcile(two({ unmeasured: [{ id: 'u', guess: Number.POSITIVE_INFINITY }] }))).code).toBe(
      'INVALID_VALUE',
    );
    expect(codeOf(() => reconcile({ ...two(), measured: [{ id: '', value: 1, sigma: 1 }] })).code).toBe('INVALID_ID');
  });
  test('constraint reading an unknown id (Proxy on the values), and a linear() typo', () => {
    const e = codeOf(() => reconcile(two({ constraints: [{ id: 'typo', f: (v) => v.a - v.bb }] })));
    expect(e.code).toBe('UNKNOWN_VARIABLE');
    expect(e.message).toContain('"typo"');
    expect(e.message).toContain('"bb"');
    expect(codeOf(() => reconcile(two({ constraints: [linear('lin', { a: 1, B: -1 })] }))).code).toBe(
      'UNKNOWN_VARIABLE',
    );
  });
  test.each([1, -1, 1.5, Number.NaN])('correlation rho %p outside (-1, 1) is refused', (rho) => {
    expect(codeOf(() => reconcile(two({ correlations: [{ a: 'a', b: 'b', rho }] }))).code).toBe('INVALID_CORRELATION');
  });
  test('correlation with an unknown or unmeasured id, with itself, or given twice', () => {
    expect(codeOf(() => reconcile(two({ correlations: [{ a: 'a', b: 'zz', rho: 0.2 }] }))).code).toBe(
      'INVALID_CORRELATION',
    );
    expect(codeOf(() => reconcile(two({ correlations: [{ a: 'a', b: 'a', rho: 0.2 }] }))).code).toBe(
      'INVALID_CORRELATION',
    );
    expect(
      codeOf(() =>
        reconcile(
          two({
            correlations: [
              { a: 'a', b: 'b', rho: 0.2 },
              { a: 'b', b: 'a', rho: 0.3 },
            ],
          }),
        ),
      ).code,
    ).toBe('INVALID_CORRELATION');
  });
  test('correlations that are pairwise valid but not jointly positive definite', () => {
    const e = codeOf(() =>
      reconcile({
        measured: ['a', 'b', 'c'].map((id) => ({ id, value: 1, sigma: 1 })),
        constraints: [linear('ab', { a: 1, b: -1 }), linear('bc', { b: 1, c: -1 })],
        correlations: [
          { a: 'a', b: 'b', rho: 0.9 },
          { a: 'b', b: 'c', rho: 0.9 },
          { a: 'a', b: 'c', rho: -0.9 },
        ],
      }),
    );
    expect(e.code).toBe('COVARIANCE_NOT_PD');
  });
  test.each([0, 1, 1.2, Number.NaN])('confidence %p is refused', (confidence) => {
    expect(codeOf(() => reconcile(two({ confidence }))).code).toBe('INVALID_CONFIDENCE');
  });
  test('no constraints; bad options; bad linear() input', () => {
    expect(codeOf(() => reconcile(two({ constraints: [] }))).code).toBe('NO_CONSTRAINTS');
    expect(codeOf(() => reconcile(two({ maxIterations: 0 }))).code).toBe('INVALID_OPTION');
    expect(codeOf(() => reconcile(two({ tolerance: -1 }))).code).toBe('INVALID_OPTION');
    expect(codeOf(() => linear('x', {})).code).toBe('INVALID_CONSTRAINT');
    expect(codeOf(() => linear('x', { a: Number.NaN })).code).toBe('INVALID_CONSTRAINT');
    expect(codeOf(() => linear('x', { a: 1 }, Number.POSITIVE_INFINITY)).code).toBe('INVALID_CONSTRAINT');
  });
});

describe('numerical refusals', () => {
  test('a constraint giving NaN (log of a negative) is named', () => {
    const e = codeOf(() => reconcile(two({ constraints: [{ id: 'logc', f: (v) => Math.log(v.a - 20) - v.b }] })));
    expect(e.code).toBe('NOT_FINITE');
    expect(e.message).toContain('"logc"');
  });
  test('a constraint that throws is wrapped', () => {
    const e = codeOf(() =>
      reconcile(
        two({
          constraints: [
            {
              id: 'boom',
              f: () => {
                throw new Error('table lookup failed');
              },
            },
          ],
        }),
      ),
    );
    expect(e.code).toBe('CONSTRAINT_FAILED');
    expect(e.message).toContain('table lookup failed');
  });
  test('zero gradient with a non-zero residual is singular', () => {
    const e = codeOf(() =>
      reconcile(two({ constraints: [linear('ab', { a: 1, b: -1 }), { id: 'flat', f: (v) => 0 * v.a + 1 }] })),
    );
    expect(e.code).toBe('SINGULAR');
    expect(e.message).toContain('"flat"');
  });
  test('contradicting dependent constraints are inconsistent', () => {
    const e = codeOf(() =>
      reconcile(
        two({
          unmeasured: [{ id: 'u' }],
          constraints: [linear('ab', { a: 1, b: -1 }), linear('u1', { u: 1 }, 1), linear('u2', { u: 1 }, 2)],
        }),
      ),
    );
    expect(e.code).toBe('INCONSISTENT');
  });
  test('no redundancy (dof 0) is refused, naming the observable unmeasured', () => {
    const e = codeOf(() =>
      reconcile({
        measured: [{ id: 'a', value: 1, sigma: 0.1 }],
        unmeasured: [{ id: 'u' }],
        constraints: [linear('c', { a: 1, u: -1 })],
      }),
    );
    expect(e.code).toBe('NOT_REDUNDANT');
  });
  test('a constraint with no real solution does not converge: x² + 1 = 0', () => {
    const e = codeOf(() =>
      reconcile(two({ constraints: [linear('ab', { a: 1, b: -1 }), { id: 'sq', f: (v) => v.a * v.a + 1 }] })),
    );
    expect(e.code).toBe('NOT_CONVERGED');
    expect(e.message).toContain('50');
  });
  test('maxIterations too small for a nonlinear problem', () => {
    const e = codeOf(() =>
      reconcile(
        two({
          maxIterations: 1,
          constraints: [{ id: 'prod', f: (v) => v.a * v.b - 100 }],
        }),
      ),
    );
    expect(e.code).toBe('NOT_CONVERGED');
  });
  test('results never carry NaN: a zero-residual problem gives zeros, not 0/0', () => {
    const r = reconcile({
      measured: [
        { id: 'a', value: 5, sigma: 1 },
        { id: 'b', value: 5, sigma: 1 },
      ],
      constraints: [linear('ab', { a: 1, b: -1 })],
    });
    expect(r.chiSquare).toBe(0);
    expect(r.z.a).toBe(0);
    expect(r.passed).toBe(true);
    for (const v of [...Object.values(r.values), ...Object.values(r.sigmas), ...Object.values(r.corrections)])
      expect(Number.isFinite(v)).toBe(true);
  });
});
