package org.starderive.physics;

/**
 * Photometric bands the physics core understands, with the column suffix used in the canonical schema
 * ({@code mag_<suffix>}) and, for the bands whose extinction comes from the Cardelli–Clayton–Mathis law,
 * the effective wavelength at which the law is evaluated.
 *
 * <p>Wavelengths: Johnson–Cousins U B V R_C I_C from Bessell, Castelli &amp; Plez 1998, A&amp;A 333, 231
 * (from memory); 2MASS J H Ks from Cohen, Wheaton &amp; Megeath 2003, AJ 126, 1090. The Gaia-like G, BP,
 * RP bands have colour-dependent coefficients instead ({@link GaiaBandExtinction}); their wavelength is NaN.
 */
public enum Band {
    B("b", 0.438),
    V("v", 0.545),
    RC("rc", 0.641),
    IC("ic", 0.798),
    J("j", 1.235),
    H("h", 1.662),
    KS("ks", 2.159),
    G("g", Double.NaN),
    BP("bp", Double.NaN),
    RP("rp", Double.NaN);

    /** Number of bands; the size of per-band arrays in {@link StarInput} and {@link StarResult}. */
    public static final int COUNT = values().length;
    private static final Band[] VALUES = values();

    private final String suffix;
    private final double wavelengthUm;

    Band(String suffix, double wavelengthUm) {
        this.suffix = suffix;
        this.wavelengthUm = wavelengthUm;
    }

    /** Column suffix: {@code mag_<suffix>}, {@code mag_<suffix>_err}, {@code abs_mag_<suffix>}. */
    public String suffix() { return suffix; }

    /** Effective wavelength in µm, NaN for the Gaia-like bands. */
    public double wavelengthUm() { return wavelengthUm; }

    /** Whether the extinction of this band is colour dependent (Gaia-like G, BP, RP). */
    public boolean isGaiaLike() { return Double.isNaN(wavelengthUm); }

    /** The label used in colour names, e.g. "V", "Ks", "BP". */
    public String label() {
        switch (this) {
            case RC: return "Rc";
            case IC: return "Ic";
            case KS: return "Ks";
            default: return name();
        }
    }

    public static Band bySuffix(String suffix) {
        for (Band b : VALUES) {
            if (b.suffix.equals(suffix)) {
                return b;
            }
        }
        throw new IllegalArgumentException("Unknown band: '" + suffix + "' (must be one of b v rc ic j h ks g bp rp)");
    }

}
