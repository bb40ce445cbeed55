/** Number formatting for the dossier: significant digits, a true minus sign, powers of ten. */

const MINUS = "\u2212";
const SUPERSCRIPT: Record<string, string> = {
  "-": "\u207b",
  "0": "\u2070",
  "1": "\u00b9",
  "2": "\u00b2",
  "3": "\u00b3",
  "4": "\u2074",
  "5": "\u2075",
  "6": "\u2076",
  "7": "\u2077",
  "8": "\u2078",
  "9": "\u2079",
};
const superscript = (text: string) => [...text].map((c) => SUPERSCRIPT[c] ?? c).join("");

/** A formatted number split into sign, mantissa and power of ten, so each medium writes its own exponent. */
interface NumberParts {
  /** Finished text for values without a mantissa (zero, missing, not finite). */
  special: string | null;
  sign: string;
  mantissa: string;
  exponent: number | null;
}

function numberParts(value: number | null | undefined, digits: number): NumberParts {
  const special = (text: string): NumberParts => ({ special: text, sign: "", mantissa: "", exponent: null });
  if (value === null || value === undefined) return special("—");
  if (Number.isNaN(value)) return special("not a number");
  if (!Number.isFinite(value)) return special(value > 0 ? "∞" : `${MINUS}∞`);
  if (value === 0) return special("0");
  const abs = Math.abs(value);
  const sign = value < 0 ? MINUS : "";
  if (abs >= 1e-3 && abs < 1e6) {
    const rounded = Number(abs.toPrecision(digits));
    // toPrecision writes 60000 to 4 digits as "6.000e+4"; a whole number reads better, all its digits kept
    if (rounded >= 10 ** digits)
      return { special: null, sign, mantissa: String(Math.round(abs)), exponent: null };
    return { special: null, sign, mantissa: trimZeros(rounded.toPrecision(digits)), exponent: null };
  }
  const [mantissa, exponent] = abs.toExponential(digits - 1).split("e");
  return { special: null, sign, mantissa: trimZeros(mantissa), exponent: Number(exponent) };
}

/** Plain-text number with `digits` significant digits; exponent form (× 10⁻⁵) outside [1e-3, 1e6). */
export function formatNumber(value: number | null | undefined, digits = 6): string {
  const p = numberParts(value, digits);
  if (p.special !== null) return p.special;
  if (p.exponent === null) return p.sign + p.mantissa;
  return `${p.sign}${timesTen(p.mantissa)}10${superscript(String(p.exponent))}`;
}

/** "2.5 × " before a power of ten; nothing for a mantissa of 1, so 1e-7 prints as 10⁻⁷. */
const timesTen = (mantissa: string) => (mantissa === "1" ? "" : `${mantissa} × `);

function trimZeros(s: string): string {
  if (!s.includes(".") || s.includes("e")) return s;
  return s.replace(/0+$/, "").replace(/\.$/, "");
}

/** The same number as HTML: powers of ten with a superscript. */
export function formatNumberHtml(value: number | null | undefined, digits = 6): string {
  const p = numberParts(value, digits);
  if (p.special !== null) return p.special;
  if (p.exponent === null) return p.sign + p.mantissa;
  return `${p.sign}${timesTen(p.mantissa)}10<sup>${String(p.exponent).replace("-", MINUS)}</sup>`;
}

/** The same number as TeX source, for matrices and formulas. */
export function formatNumberTex(value: number | null | undefined, digits = 6): string {
  const p = numberParts(value, digits);
  if (p.special !== null) return p.special === "0" ? "0" : `\\text{${p.special}}`;
  const sign = p.sign ? "-" : "";
  if (p.exponent === null) return sign + p.mantissa;
  return `${sign}${p.mantissa === "1" ? "" : `${p.mantissa} \\times `}10^{${p.exponent}}`;
}

/**
 * A unit as the spec writes it, with powers set as superscripts (g/m^2 → g/m², s^-1 → s⁻¹).
 * Plain text, so the templates still escape it.
 */
export function formatUnit(unit: string): string {
  return unit.replace(/\^\(?(-?\d+)\)?/g, (_m, e: string) => superscript(e));
}

/** Number followed by its unit, when there is one. */
export function formatQuantity(value: number | null | undefined, unit: string, digits = 6): string {
  const n = formatNumber(value, digits);
  return unit ? `${n} ${formatUnit(unit)}` : n;
}

/** Complex eigenvalue a ± bi as text. */
export function formatComplex(re: number, im: number, digits = 6): string {
  if (im === 0) return formatNumber(re, digits);
  const sign = im < 0 ? MINUS : "+";
  return `${formatNumber(re, digits)} ${sign} ${formatNumber(Math.abs(im), digits)}i`;
}

/**
 * A planar Jacobian's two eigenvalues as text: a complex-conjugate pair as one "a ± bi", so the
 * table cell does not repeat the real part.
 */
export function formatEigenvalues(values: { re: number; im: number }[], digits = 6): string {
  const [a, b] = values;
  if (values.length === 2 && a.im !== 0 && a.re === b.re && a.im === -b.im) {
    return `${formatNumber(a.re, digits)} ± ${formatNumber(Math.abs(a.im), digits)}i`;
  }
  return values.map((v) => formatComplex(v.re, v.im, digits)).join("; ");
}

/** A percentage with sensible precision. */
export function formatPercent(fraction: number, digits = 3): string {
  return `${formatNumber(100 * fraction, digits)}%`;
}

/** ISO date (YYYY-MM-DD) in UTC. */
export function formatDate(epochSeconds: number): string {
  return new Date(epochSeconds * 1000).toISOString().slice(0, 10);
}
