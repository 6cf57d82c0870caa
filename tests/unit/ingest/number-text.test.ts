import { describe, expect, it } from 'vitest';
import { EMPTY_TEXT, NON_FINITE_TEXT, NOT_A_NUMBER_TEXT, scanNumber } from '@/src/ingest/number-text';

const out = new Float64Array(1);
const scan = (text: string, decimalComma = false) => {
  const code = scanNumber(text, decimalComma, out);
  return { code, value: out[0] };
};

describe('scanNumber', () => {
  it.each([
    ['0.12500', 5, 0.125],
    ['1.5e-3', 2, 0.0015],
    ['100', 3, 100],
    ['0', 1, 0],
    ['0.000', 1, 0],
    ['-0.00120', 3, -0.0012],
    ['+7', 1, 7],
    ['.5', 1, 0.5],
    ['5.', 1, 5],
    ['1.0000000000000002', 17, 1.0000000000000002],
    ['6.02214076E+23', 9, 6.02214076e23],
    ['  2.5  ', 2, 2.5],
    ['2.5\r', 2, 2.5],
    ['"3.25"', 3, 3.25],
  ])('counts the significant digits written in %j', (text, digits, value) => {
    expect(scan(text)).toEqual({ code: digits, value });
  });

  it('reads the Fortran D exponent', () => {
    expect(scan('1.25D-02')).toEqual({ code: 3, value: 0.0125 });
    expect(scan('-4d3')).toEqual({ code: 1, value: -4000 });
  });

  it.each([
    ['NaN', Number.NaN],
    ['nan', Number.NaN],
    ['-nan', Number.NaN],
    ['Inf', Number.POSITIVE_INFINITY],
    ['-inf', Number.NEGATIVE_INFINITY],
    ['Infinity', Number.POSITIVE_INFINITY],
    ['+INFINITY', Number.POSITIVE_INFINITY],
    ['-Infinity', Number.NEGATIVE_INFINITY],
  ])('accepts %j as a non-finite value without digits', (text, value) => {
    expect(scan(text)).toEqual({ code: NON_FINITE_TEXT, value });
  });

  it.each(['abc', '1.2.3', '0x1A', '1e', '1e+', '--1', '-', '.', '1,5', '1 000', '0.98x3', 'infinite', '1_000'])(
    'refuses %j',
    (text) => {
      expect(scan(text).code).toBe(NOT_A_NUMBER_TEXT);
      expect(scan(text).value).toBeNaN();
    },
  );

  it('tells an empty field apart from a bad one', () => {
    expect(scan('').code).toBe(EMPTY_TEXT);
    expect(scan('   ').code).toBe(EMPTY_TEXT);
    expect(scan('""').code).toBe(EMPTY_TEXT);
  });

  it('accepts a decimal comma only when asked to', () => {
    expect(scan('1,5', true)).toEqual({ code: 2, value: 1.5 });
    expect(scan('-0,00250e3', true)).toEqual({ code: 3, value: -2.5 });
    expect(scan('1,5', false).code).toBe(NOT_A_NUMBER_TEXT);
    expect(scan('1.234,5', true).code).toBe(NOT_A_NUMBER_TEXT);
  });
});
