/**
 * Carlson's trophic state index (Carlson, R.E. 1977, A trophic state index for lakes,
 * Limnol. Oceanogr. 22: 361–369), from Secchi depth (m), chlorophyll-a and total P
 * (both mg/m^3 = ug/L). Two variants are in use and they differ by up to ~0.05 units:
 * - `exact`: the base-2 forms, TSI(SD) = 10 (6 − log2 SD), TSI(Chl) = 10 (6 − (2.04 −
 *   0.68 ln Chl)/ln 2), TSI(TP) = 10 (6 − log2(48/TP));
 * - `rounded`: the rounded natural-log forms 60 − 14.41 ln SD, 9.81 ln Chl + 30.6,
 *   14.42 ln TP + 4.15 (as given by Carlson & Simpson 1996, NALMS).
 * Non-positive or non-finite inputs give NaN (the index is a logarithm).
 */
export type TsiVariant = 'exact' | 'rounded';

/** The variant the app reports unless told otherwise, named wherever a TSI is shown. */
export const DEFAULT_TSI_VARIANT: TsiVariant = 'exact';

const valid = (x: number) => Number.isFinite(x) && x > 0;

export function tsiSecchi(sd: number, variant: TsiVariant = DEFAULT_TSI_VARIANT): number {
  if (!valid(sd)) return NaN;
  return variant === 'exact' ? 10 * (6 - Math.log2(sd)) : 60 - 14.41 * Math.log(sd);
}

export function tsiChlorophyll(chl: number, variant: TsiVariant = DEFAULT_TSI_VARIANT): number {
  if (!valid(chl)) return NaN;
  return variant === 'exact' ? 10 * (6 - (2.04 - 0.68 * Math.log(chl)) / Math.LN2) : 9.81 * Math.log(chl) + 30.6;
}

export function tsiTotalP(tp: number, variant: TsiVariant = DEFAULT_TSI_VARIANT): number {
  if (!valid(tp)) return NaN;
  return variant === 'exact' ? 10 * (6 - Math.log2(48 / tp)) : 14.42 * Math.log(tp) + 4.15;
}

/** Words for a TSI value (Carlson & Simpson 1996 classes). */
export function trophicClass(tsi: number): 'oligotrophic' | 'mesotrophic' | 'eutrophic' | 'hypereutrophic' | 'unknown' {
  if (!Number.isFinite(tsi)) return 'unknown';
  if (tsi < 40) return 'oligotrophic';
  if (tsi < 50) return 'mesotrophic';
  if (tsi < 70) return 'eutrophic';
  return 'hypereutrophic';
}
