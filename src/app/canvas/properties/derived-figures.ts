/**
 * Read-only figures derived from an event's rates and test plan, shown beside the form.
 * DC = λDD / (λDD + λDU)  (IEC 61508-4 3.8.6, the diagnostic coverage of dangerous failures);
 * SFF = (λS + λDD) / (λS + λDD + λDU)  (IEC 61508-2 Annex C, C.1);
 * tCE = λDU/λD (T1/2 + MRT) + λDD/λD · MTTR  (IEC 61508-6 B.3.2.2.1), with MRT taken equal to MTTR since
 * the model holds one restoration time per event (common practice).
 */
export interface DerivedFigures {
  readonly dc: number | null;
  readonly sff: number | null;
  readonly tceHours: number | null;
}

export function derivedFigures(input: {
  lambdaDU: number;
  lambdaDD: number;
  lambdaS: number;
  mttrHours: number;
  proofIntervalHours: number | null;
}): DerivedFigures {
  const dangerous = input.lambdaDU + input.lambdaDD;
  const total = dangerous + input.lambdaS;
  return {
    dc: dangerous > 0 ? input.lambdaDD / dangerous : null,
    sff: total > 0 ? (input.lambdaS + input.lambdaDD) / total : null,
    tceHours:
      dangerous > 0 && input.proofIntervalHours !== null
        ? (input.lambdaDU / dangerous) * (input.proofIntervalHours / 2 + input.mttrHours) + (input.lambdaDD / dangerous) * input.mttrHours
        : null,
  };
}

export function formatPercent(value: number | null): string {
  return value === null ? '—' : `${(value * 100).toFixed(1)} %`;
}
