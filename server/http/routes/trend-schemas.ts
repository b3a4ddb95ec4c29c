/** The trend answers' schemas live with their types in server/jobs/trend-views.ts; the route's own query here. */
import { z } from 'zod';

export { fleetView, statusChange, threshold, trendView } from '../../jobs/trend-views.js';

/** `asOf`: evaluate the trend at this time instead of now (ISO date or date-time). */
export const asOfQuery = z.object({
  asOf: z.iso
    .date()
    .or(z.iso.datetime({ offset: true }))
    .optional(),
});
