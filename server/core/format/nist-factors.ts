/**
 * Conversion factors from SI to the US customary units people read, each from NIST Special
 * Publication 811 (2008 edition), Appendix B.8 "Factors for units listed alphabetically".
 * The parsers of logger files (core/units) convert the other way with the same exact values.
 * The B.8 rows are quoted from memory; the exact values rest on the 1959 yard-and-pound agreement
 * (1 in = 25.4 mm) and the US gallon's definition as 231 in³, which the tests recompute.
 */

/** 1 in = 0.0254 m exactly (NIST SP 811, B.8 "inch (in) → meter (m) 2.54 E-02", exact). */
export const METRES_PER_INCH = 0.0254;

/** 1 ft = 0.3048 m exactly (NIST SP 811, B.8 "foot (ft) → meter (m) 3.048 E-01", exact). */
export const METRES_PER_FOOT = 0.3048;

/** 1 in² = 6.4516 × 10⁻⁴ m² exactly (NIST SP 811, B.8 "square inch (in²) → square meter 6.4516 E-04"). */
export const SQUARE_METRES_PER_SQUARE_INCH = METRES_PER_INCH * METRES_PER_INCH;

/**
 * 1 US liquid gallon = 3.785 411 784 L exactly (NIST SP 811, B.8 "gallon [U.S.] (gal) → liter (L)
 * 3.785 412 E+00"; the exact value 231 in³ is given in its footnote and in B.8's cubic-meter row
 * 3.785 412 E-03). Written as the exact decimal, which 231 × 0.0254³ equals.
 */
export const LITRES_PER_US_GALLON = 3.785411784;

/** 1 gal/min = 3.785 411 784 L / 60 s (NIST SP 811, B.8 "gallon [U.S.] per minute (gpm) → liter per second 6.309 020 E-02"). */
export const LITRES_PER_SECOND_PER_US_GALLON_PER_MINUTE = LITRES_PER_US_GALLON / 60;
