/** The safety and scope statement every report carries (common practice for engineering reports). */
export const SCOPE_STATEMENT: readonly string[] = [
  'The numbers in this report are engineering estimates with the stated uncertainty, computed from the recorded drain test; they are not a certification of the outlet or the vessel.',
  'Uncertainties follow the vocabulary of JCGM 100:2008 (GUM): standard uncertainty u, coverage factor k, expanded uncertainty U = k·u at a coverage probability of about 95 %.',
  'They hold only for the recorded conditions (liquid, temperature, head range of the window, outlet as it was on the test date) and the vessel geometry on record.',
  'Drain tests involve work at height, confined spaces, hot or hazardous liquids, pressurised vessels and discharges to drains or the environment: follow site procedures, local codes and licensed engineering practice.',
];
