/**
 * A vessel and its outlets as they are stored and served: the one definition of these shapes (the
 * store, the API's zod schemas in server/http/schemas.ts, the report records and the web use them).
 */
export interface Vessel {
  id: number;
  site: string;
  name: string;
  revision: number;
  /** The vessel file as stored. */
  spec: Record<string, unknown>;
  outlets: Outlet[];
  createdAt: string;
  updatedAt: string;
}

export interface Outlet {
  id: number;
  key: string;
  type: string | null;
  boreM: number | null;
  boreToleranceM: number | null;
  elevationM: number | null;
  /**
   * The baseline Cd·a times this factor is the action threshold: below 1 for fouling, above 1
   * for erosion (0 < x < 2, not 1; checked in server/http/vessel-file.ts), or null for the default.
   */
  actionThreshold: number | null;
  /** The outlet's part of the vessel file as stored. */
  spec: Record<string, unknown>;
  retiredAt: string | null;
}
