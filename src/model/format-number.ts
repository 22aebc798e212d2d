// Numbers as a person reads them in messages, text reports and written data files: a fixed number of
// significant digits, no float noise (-53.056000000000004 → -53.06). JSON keeps full precision.

/** `value` to `digits` significant digits (default 4), trailing zeros dropped; exponent form outside 1e-4..1e7 (common practice). */
export function formatSignificant(value: number, digits = 4): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e7 || magnitude < 1e-4) {
    const [mantissa = '', exponent = ''] = value.toExponential(digits - 1).split('e');
    return `${stripZeros(mantissa)}e${exponent.replace(/^\+/, '')}`;
  }
  // toPrecision may answer in exponent form for large integers; Number() turns it back into plain digits.
  return stripZeros(String(Number(value.toPrecision(digits))));
}

function stripZeros(text: string): string {
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}
