/** Number formatting for the dossier: significant digits, a true minus sign, powers of ten. */

const MINUS = "\u2212";

/** Plain-text number with `digits` significant digits; exponent form outside [1e-3, 1e6). */
export function formatNumber(value: number | null | undefined, digits = 6): string {
  if (value === null || value === undefined) return "—";
  if (Number.isNaN(value)) return "not a number";
  if (!Number.isFinite(value)) return value > 0 ? "∞" : `${MINUS}∞`;
  if (value === 0) return "0";
  const abs = Math.abs(value);
  const sign = value < 0 ? MINUS : "";
  if (abs >= 1e-3 && abs < 1e6) {
    const fixed = Number(abs.toPrecision(digits));
    return sign + trimZeros(fixed.toPrecision(digits));
  }
  const [mantissa, exponent] = abs.toExponential(digits - 1).split("e");
  return `${sign}${trimZeros(mantissa)} × 10^${Number(exponent)}`;
}

function trimZeros(s: string): string {
  if (!s.includes(".") || s.includes("e")) return s;
  return s.replace(/0+$/, "").replace(/\.$/, "");
}

/** The same number as HTML: powers of ten with a superscript. */
export function formatNumberHtml(value: number | null | undefined, digits = 6): string {
  return formatNumber(value, digits).replace(/ × 10\^(−?\d+)/, (_m, e: string) => ` × 10<sup>${e.replace("-", MINUS)}</sup>`);
}

/** Number followed by its unit, when there is one. */
export function formatQuantity(value: number | null | undefined, unit: string, digits = 6): string {
  const n = formatNumber(value, digits);
  return unit ? `${n} ${unit}` : n;
}

/** Complex eigenvalue a ± bi as text. */
export function formatComplex(re: number, im: number, digits = 6): string {
  if (im === 0) return formatNumber(re, digits);
  const sign = im < 0 ? MINUS : "+";
  return `${formatNumber(re, digits)} ${sign} ${formatNumber(Math.abs(im), digits)}i`;
}

/** A percentage with sensible precision. */
export function formatPercent(fraction: number, digits = 3): string {
  return `${formatNumber(100 * fraction, digits)}%`;
}

/** ISO date (YYYY-MM-DD) in UTC. */
export function formatDate(epochSeconds: number): string {
  return new Date(epochSeconds * 1000).toISOString().slice(0, 10);
}
