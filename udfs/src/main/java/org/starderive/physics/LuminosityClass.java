package org.starderive.physics;

/**
 * The coarse evolutionary class that selects which colour–Teff relations and which mass relation apply.
 *
 * <p>Classing rule (applied in {@link StarDeriver}): a star is {@link #MAIN_SEQUENCE} when the surface gravity
 * it would have on the main sequence — radius from the Stefan–Boltzmann law, mass from the main-sequence
 * mass–luminosity relation ({@link MassLuminosityEker2018}) — lies on the dwarf side of the boundary of
 * Ciardi et al. 2011, AJ 141, 108 (as used for the K2 input catalogue):
 * <pre>
 *   log g ≥ 3.5                      for Teff ≥ 6000 K
 *   log g ≥ 4.0                      for Teff ≤ 4250 K
 *   log g ≥ 5.2 − 2.8·10⁻⁴ Teff      in between
 * </pre>
 * (boundary coefficients from memory; the two end points join the middle line, which supports them).
 * Otherwise the star is {@link #EVOLVED} (subgiant or giant). A star without a distance cannot be classed.
 */
public enum LuminosityClass {
    MAIN_SEQUENCE("main_sequence"),
    EVOLVED("evolved");

    public static final String CLASSING_CITATION = "Ciardi et al. 2011, AJ 141, 108 (dwarf/evolved log g boundary)";

    private final String label;

    LuminosityClass(String label) { this.label = label; }

    /** The value written to the {@code lum_class} column. */
    public String label() { return label; }

    /** Lowest log g (cgs) of a dwarf at this Teff, after Ciardi et al. 2011. */
    public static double dwarfLoggBoundary(double teffK) {
        if (teffK >= 6000.0) {
            return 3.5;
        }
        if (teffK <= 4250.0) {
            return 4.0;
        }
        return 5.2 - 2.8e-4 * teffK;
    }
}
