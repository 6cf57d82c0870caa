/**
 * Reading one CSV field as a number, and counting the significant digits it was written with.
 * The count feeds the noise floor: a value written as `0.12500` cannot resolve differences
 * below 5e-6 of its size, whatever its binary value is.
 *
 * `Number(text)` alone is not strict enough: it turns an empty field into 0 and accepts hex
 * (`0x1A`), so each field is first scanned against a plain decimal grammar
 * `[+-]? digits [. digits] [(e|E|d|D) [+-] digits]` with spaces allowed around it. The scan
 * also counts digits, so the text is walked once.
 */

/** Result codes of {@link scanNumber} besides a digit count (which is >= 1). */
export const NOT_A_NUMBER_TEXT = -1;
export const EMPTY_TEXT = -2;
/** `NaN`, `Inf`, `-Infinity` and friends: valid values that carry no digits. */
export const NON_FINITE_TEXT = 0;

const CH_SPACE = 32;
const CH_TAB = 9;
const CH_CR = 13;
const CH_QUOTE = 34;
const CH_PLUS = 43;
const CH_MINUS = 45;
const CH_DOT = 46;
const CH_COMMA = 44;
const CH_0 = 48;
const CH_9 = 57;
const CH_E_UPPER = 69;
const CH_E_LOWER = 101;
const CH_D_UPPER = 68;
const CH_D_LOWER = 100;

function isBlank(c: number): boolean {
  return c === CH_SPACE || c === CH_TAB || c === CH_CR;
}

/**
 * Scans `text` and stores its value in `out[0]`. Returns the number of significant digits
 * (>= 1) for a finite number, NON_FINITE_TEXT for NaN/Inf spellings, EMPTY_TEXT for an empty or
 * blank field, NOT_A_NUMBER_TEXT otherwise (out[0] is then NaN).
 *
 * Significant digits are the mantissa digits from the first non-zero one on, trailing zeros
 * included because the writer chose to print them (`0.12500` → 5, `1.5e-3` → 2, `100` → 3);
 * a zero value counts as 1. With `decimalComma`, a `,` is accepted in place of `.`.
 */
export function scanNumber(text: string, decimalComma: boolean, out: Float64Array): number {
  const n = text.length;
  let i = 0;
  while (i < n && isBlank(text.charCodeAt(i))) i++;
  let end = n;
  while (end > i && isBlank(text.charCodeAt(end - 1))) end--;
  let rewrite = false;
  // A writer that quotes every field (`"1.5"`) still wrote a number.
  if (end - i >= 2 && text.charCodeAt(i) === CH_QUOTE && text.charCodeAt(end - 1) === CH_QUOTE) {
    i++;
    end--;
    rewrite = true;
    while (i < end && isBlank(text.charCodeAt(i))) i++;
    while (end > i && isBlank(text.charCodeAt(end - 1))) end--;
  }
  if (i === end) {
    out[0] = Number.NaN;
    return EMPTY_TEXT;
  }
  const start = i;
  let c = text.charCodeAt(i);
  if (c === CH_PLUS || c === CH_MINUS) {
    i++;
    if (i === end) return fail(out);
    c = text.charCodeAt(i);
  }
  if (!(c >= CH_0 && c <= CH_9) && c !== CH_DOT && !(decimalComma && c === CH_COMMA)) {
    return scanNonFinite(text, start, end, out);
  }

  let mantissaDigits = 0;
  let significant = 0;
  let seenNonZero = false;
  // integer part
  while (i < end) {
    c = text.charCodeAt(i);
    if (c < CH_0 || c > CH_9) break;
    mantissaDigits++;
    if (seenNonZero) significant++;
    else if (c !== CH_0) {
      seenNonZero = true;
      significant = 1;
    }
    i++;
  }
  // fraction
  if (i < end && (c === CH_DOT || (decimalComma && c === CH_COMMA))) {
    if (c === CH_COMMA) rewrite = true;
    i++;
    while (i < end) {
      c = text.charCodeAt(i);
      if (c < CH_0 || c > CH_9) break;
      mantissaDigits++;
      if (seenNonZero) significant++;
      else if (c !== CH_0) {
        seenNonZero = true;
        significant = 1;
      }
      i++;
    }
  }
  if (mantissaDigits === 0) return fail(out);
  // exponent
  if (i < end) {
    c = text.charCodeAt(i);
    if (c === CH_E_LOWER || c === CH_E_UPPER || c === CH_D_LOWER || c === CH_D_UPPER) {
      if (c === CH_D_LOWER || c === CH_D_UPPER) rewrite = true;
      i++;
      if (i < end) {
        c = text.charCodeAt(i);
        if (c === CH_PLUS || c === CH_MINUS) i++;
      }
      const expStart = i;
      while (i < end) {
        c = text.charCodeAt(i);
        if (c < CH_0 || c > CH_9) break;
        i++;
      }
      if (i === expStart) return fail(out);
    }
  }
  if (i !== end) return fail(out);

  // Number() is correctly rounded and fast; only quotes, the Fortran `D` exponent and the
  // decimal comma need a rewritten copy first.
  out[0] = rewrite ? Number(normalise(text.slice(start, end))) : Number(text);
  return seenNonZero ? significant : 1;
}

function fail(out: Float64Array): number {
  out[0] = Number.NaN;
  return NOT_A_NUMBER_TEXT;
}

function normalise(text: string): string {
  let s = '';
  for (let k = 0; k < text.length; k++) {
    const c = text.charCodeAt(k);
    if (c === CH_COMMA) s += '.';
    else if (c === CH_D_LOWER || c === CH_D_UPPER) s += 'e';
    else s += text[k];
  }
  return s;
}

/** Accepts nan, inf, infinity in any case with an optional sign (what C, Fortran, NumPy print). */
function scanNonFinite(text: string, start: number, end: number, out: Float64Array): number {
  let i = start;
  let negative = false;
  const c = text.charCodeAt(i);
  if (c === CH_PLUS || c === CH_MINUS) {
    negative = c === CH_MINUS;
    i++;
  }
  const word = text.slice(i, end).toLowerCase();
  if (word === 'nan') {
    out[0] = Number.NaN;
    return NON_FINITE_TEXT;
  }
  if (word === 'inf' || word === 'infinity') {
    out[0] = negative ? Number.NEGATIVE_INFINITY : Number.POSITIVE_INFINITY;
    return NON_FINITE_TEXT;
  }
  return fail(out);
}

/** Quotes a field for a message, cut to a readable length. */
export function quoteField(text: string): string {
  const cut = text.length > 40 ? `${text.slice(0, 37)}...` : text;
  return JSON.stringify(cut);
}
