package org.starderive.physics;

/**
 * Colour-dependent extinction coefficients R = A/E(B−V) for the Gaia-like G, BP and RP bands, from the
 * Fitzpatrick 1999 law renormalised by Schlafly &amp; Finkbeiner 2011, as published with the colour–Teff
 * relations of Casagrande et al. 2021, MNRAS 507, 2684 (coefficients as released by the authors):
 * <pre>
 *   R_G  = 2.609 − 0.475 C + 0.053 C²
 *   R_BP = 2.998 − 0.140 C − 0.175 C² + 0.062 C³
 *   R_RP = 1.689 − 0.059 C
 * </pre>
 * with C = (BP−RP)₀ the dereddened colour. {@link #dereddenedBpRp} finds C by fixed-point iteration
 * starting from C ≈ (BP−RP) − 0.8·E(B−V), a fixed number of steps so the result is deterministic.
 */
public final class GaiaBandExtinction {
    private GaiaBandExtinction() {}

    public static final String CITATION = "Casagrande et al. 2021, MNRAS 507, 2684 (Fitzpatrick 1999 law, Schlafly & Finkbeiner 2011 renormalisation)";

    /**
     * The R_V of the law these coefficients come from (the diffuse-ISM value of the Fitzpatrick 1999 law as used by
     * Schlafly &amp; Finkbeiner 2011): they do not follow another R_V, so the job refuses a different r_v with these bands.
     */
    public static final double RV = 3.1;

    private static final int ITERATIONS = 4;

    public static double rG(double c) { return 2.609 + c * (-0.475 + c * 0.053); }

    public static double rBp(double c) { return 2.998 + c * (-0.140 + c * (-0.175 + c * 0.062)); }

    public static double rRp(double c) { return 1.689 - 0.059 * c; }

    /** R = A/E(B−V) for a Gaia-like band at dereddened colour C. */
    public static double r(Band band, double c) {
        switch (band) {
            case G: return rG(c);
            case BP: return rBp(c);
            case RP: return rRp(c);
            default: throw new IllegalArgumentException("Invalid band for Gaia extinction: " + band + " (must be G, BP or RP)");
        }
    }

    /** (BP−RP)₀ from the observed colour and E(B−V). */
    public static double dereddenedBpRp(double bpRpObserved, double ebv) {
        double c = bpRpObserved - 0.8 * ebv;
        for (int i = 0; i < ITERATIONS; i++) {
            c = bpRpObserved - (rBp(c) - rRp(c)) * ebv;
        }
        return c;
    }
}
