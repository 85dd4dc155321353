import { expect, test } from 'vitest';
import { symmetricEigen } from '../../src/linalg/symmetric-eigen.js';
test('x', () => {
  const a = [4, 1, 2, 1, 3, 0, 2, 0, 5];
  const { values, vectors } = symmetricEigen(a, 3);
  for (let k = 0; k < 3; k++) for (let i = 0; i < 3; i++) {
    let s = 0; for (let j = 0; j < 3; j++) s += a[i * 3 + j] * vectors[j * 3 + k];
    expect(s).toBeCloseTo(values[k] * vectors[i * 3 + k], 10);
  }
  expect(values[0]).toBeLessThan(values[1]);
});
