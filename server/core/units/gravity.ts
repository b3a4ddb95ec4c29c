/** Standard acceleration of free fall, m/s² (3rd CGPM, 1901; exact by definition). */
export const STANDARD_GRAVITY_MS2 = 9.80665;
