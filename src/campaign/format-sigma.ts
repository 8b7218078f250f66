// A standardized residual for a crew's hint: explicit sign, one decimal, σ — e.g. "+4.8σ", "−5.1σ"
// (U+2212 minus, as printed tables use; the value 0 prints as "+0.0σ").
export function formatSigma(standardized: number): string {
  const rounded = Math.round(standardized * 10) / 10;
  const sign = rounded < 0 ? '\u2212' : '+';
  return `${sign}${Math.abs(rounded).toFixed(1)}σ`;
}
