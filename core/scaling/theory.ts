/**
 * Theoretical area-preservation exponents to compare the estimate with.
 *
 * General form (Murray's cost argument generalised — derivation from memory): a segment pays a
 * hydraulic cost ∝ Q² r^-m and a maintenance cost ∝ r^n; minimising their sum over r gives
 * Q ∝ r^((m+n)/2), and flow conservation at a furcation gives Σ r_i^a = r_0^a with a = (m + n)/2.
 * Hagen–Poiseuille resistance m = 4 with volume cost n = 2 gives Murray's 3 (Murray 1926, PNAS
 * 12:207); a Kleiber-type cost ∝ volume^(3/4), n = 3/2, gives 11/4; da Vinci's area rule a = 2
 * (as compiled by Eloy 2011, PRL 107:258101) with the same Kleiber-type cost gives 7/4
 * (values as discussed by Savage et al. 2010, PNAS 107:22722 and West, Brown & Enquist 1997,
 * Science 276:122 / 1999, Nature 400:664 — from memory).
 */
export interface TheoryValue {
  name: string;
  value: number;
  source: string;
}

export function theoryValues(hydraulicExponentM: number, metabolicExponentN: number): TheoryValue[] {
  return [
    { name: 'da_vinci', value: 2, source: "da Vinci's rule (area preserving); compiled by Eloy 2011, PRL 107:258101" },
    { name: 'murray', value: 3, source: "Murray's law, Murray 1926, PNAS 12:207" },
    { name: 'murray_kleiber', value: 11 / 4, source: 'Murray cost with Kleiber-type metabolic scaling (from memory)' },
    { name: 'da_vinci_kleiber', value: 7 / 4, source: 'da Vinci with Kleiber-type metabolic scaling (from memory)' },
    {
      name: 'general_optimum',
      value: (hydraulicExponentM + metabolicExponentN) / 2,
      source: `(m + n)/2 with m = ${hydraulicExponentM}, n = ${metabolicExponentN} (generalised Murray cost, from memory)`,
    },
  ];
}

export interface TheoryRow extends TheoryValue {
  /** value − estimate */
  difference: number | null;
  inside_ci95: boolean | null;
  inside_pooled_ci95: boolean | null;
}

/** Place each theory value against an estimate and two intervals (null when an interval is missing). */
export function theoryTable(
  values: TheoryValue[],
  estimate: number,
  ci: [number | null, number | null],
  pooledCi: [number | null, number | null],
): TheoryRow[] {
  // A 1e-9 relative tolerance so that an exact tree's zero-width interval contains its own value.
  const inside = (v: number, c: [number | null, number | null]): boolean | null => {
    if (c[0] === null || c[1] === null) return null;
    const tol = 1e-9 * Math.max(1, Math.abs(v));
    return v >= c[0] - tol && v <= c[1] + tol;
  };
  return values.map((t) => ({
    ...t,
    difference: Number.isFinite(estimate) ? t.value - estimate : null,
    inside_ci95: inside(t.value, ci),
    inside_pooled_ci95: inside(t.value, pooledCi),
  }));
}
