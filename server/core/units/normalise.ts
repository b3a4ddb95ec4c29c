/**
 * Unit spellings as they arrive in logger headers and vessel files vary ("m³/h", "m3/hr",
 * "in H2O", "degC"). normaliseUnit removes what carries no meaning (spaces, brackets,
 * superscript forms) so each module's table can stay a plain list of spellings.
 */
export function normaliseUnit(unit: string): string {
  return unit
    .trim()
    .replace(/^[([{]\s*|\s*[)\]}]$/g, '')
    .replace(/\u00b3/g, '3')
    .replace(/\u00b2/g, '2')
    .replace(/\u2082/g, '2') // subscript two in "H₂O"
    .replace(/\u00b5|\u03bc/g, 'u')
    .replace(/\^/g, '')
    .replace(/\s+/g, '');
}

/** Look a spelling up first exactly, then (for the unambiguous ones) case-folded. */
export function lookUp(
  unit: string,
  exact: ReadonlyMap<string, number>,
  folded: ReadonlyMap<string, number>,
): number | null {
  const u = normaliseUnit(unit);
  return exact.get(u) ?? folded.get(u.toLowerCase()) ?? null;
}
