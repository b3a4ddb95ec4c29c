/**
 * The usual cautions for a drain test (common practice, no single source), shown with every plan.
 * efflux defers to the site's procedures, permits, local codes and licensed engineering practice.
 */
export const PLAN_CAUTIONS: readonly string[] = [
  "Work at height: filling checks and gauges on a roof or ladder need the site's fall protection and a second person.",
  "Confined space: never enter the vessel or its valve pit without the site's confined-space permit, gas testing and standby.",
  'Hazardous or hot contents: know what is in the vessel (safety data sheet) and wear what the site requires; do not test a vessel under pressure unless its procedure allows.',
  'Discharge: the flow is largest the moment the valve opens; check the receiving drain, sewer or watercourse and any discharge permit before opening.',
  "Follow your site's procedures, permits and local codes; these figures are engineering estimates, not a certification.",
];
