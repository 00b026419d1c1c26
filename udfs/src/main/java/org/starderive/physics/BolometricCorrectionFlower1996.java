package org.starderive.physics;

/**
 * Bolometric correction in V of Flower 1996, ApJ 469, 355, with the coefficients as corrected and republished by
 * Torres 2010, AJ 140, 1158 (Table 1):
 * <pre>
 *   BC_V = Σ kᵢ (log10 Teff)^i
 *   log Teff &lt; 3.70 :      k0..k3
 *   3.70 ≤ log Teff ≤ 3.90 : k0..k4
 *   log Teff &gt; 3.90 :      k0..k5
 * </pre>
 * <b>Scale rule (Torres 2010):</b> a BC scale must be used with its own solar bolometric magnitude. With these
 * BCs and V⊙ = −26.76 (Torres 2010) the Sun's M_bol is M_V⊙ + BC_V(Teff⊙) = 4.73; {@link #MBOL_SUN} computes it
 * from those inputs rather than retyping it. Mixing these BCs with the IAU's 4.74 makes L about 0.9 % too high.
 * Known to be poor for M dwarfs (at 3300 K these BCs give about −3.1 mag where infrared-flux work gives about
 * −1.9): the caller flags dwarfs cooler than {@link #COOL_DWARF_LIMIT_K}.
 * Calibrated domain taken as 2900–52000 K (log Teff 3.46–4.72, the span of Flower's sample, from memory).
 */
public final class BolometricCorrectionFlower1996 {
    private BolometricCorrectionFlower1996() {}

    public static final String CITATION = "Flower 1996, ApJ 469, 355; coefficients as corrected by Torres 2010, AJ 140, 1158";

    /** Apparent V magnitude of the Sun, Torres 2010 (± 0.03). */
    public static final double V_SUN = -26.76;
    public static final Constant V_SUN_CONSTANT = Constant.of("V_sun", V_SUN, 0.03, "mag", "Torres 2010, AJ 140, 1158");

    /** Dwarfs cooler than this get {@code BC_UNRELIABLE}. */
    public static final double COOL_DWARF_LIMIT_K = 4000.0;
    public static final double TEFF_MIN_K = 2900.0;
    public static final double TEFF_MAX_K = 52000.0;

    private static final double[] K_COOL = {-0.190537291496456e5, 0.155144866764412e5, -0.421278819301717e4, 0.381476328422343e3};
    private static final double[] K_MID = {-0.370510203809015e5, 0.385672629965804e5, -0.150651486316025e5,
            0.261724637119416e4, -0.170623810323864e3};
    private static final double[] K_HOT = {-0.118115450538963e6, 0.137145973583929e6, -0.636233812100225e5,
            0.147412923562646e5, -0.170587278406872e4, 0.788731721804990e2};

    /** Absolute V magnitude of the Sun: V⊙ − 5 log10(1 au / 10 pc). */
    public static final double MV_SUN = V_SUN - DerivedConstants.SUN_DISTANCE_MODULUS;
    /** Solar bolometric magnitude on this BC scale: M_V⊙ + BC_V(Teff⊙ nominal) ≈ 4.73. */
    public static final double MBOL_SUN = MV_SUN + bcV(Iau2015.TEFF_SUN_K);
    public static final Constant MBOL_SUN_CONSTANT = Constant.derived("M_bol,sun (Flower/Torres BC scale)", MBOL_SUN, 0.03,
            "mag", "V_sun (Torres 2010), au and pc (IAU 2012 B2, IAU 2015 B2), BC_V at Teff_sun (IAU 2015 B3)");

    private static double[] coefficients(double logT) {
        if (logT < 3.70) {
            return K_COOL;
        }
        return logT <= 3.90 ? K_MID : K_HOT;
    }

    /** BC_V in mag at Teff in K; NaN for non-positive or NaN Teff. */
    public static double bcV(double teffK) {
        return bcV(teffK, logTeff(teffK));
    }

    /** log10 Teff as {@link #bcV(double, double)} and {@link #dBcVdTeff(double, double)} take it (NaN for Teff ≤ 0). */
    static double logTeff(double teffK) {
        return teffK > 0 ? Math.log10(teffK) : Double.NaN;
    }

    /** {@link #bcV(double)} where {@code logT = logTeff(teffK)} is already known. */
    static double bcV(double teffK, double logT) {
        if (!(teffK > 0)) {
            return Double.NaN;
        }
        double x = logT;
        double[] k = coefficients(x);
        double s = 0;
        for (int i = k.length - 1; i >= 0; i--) {
            s = s * x + k[i];
        }
        return s;
    }

    /** dBC_V/dTeff in mag per K. */
    public static double dBcVdTeff(double teffK) {
        return dBcVdTeff(teffK, logTeff(teffK));
    }

    /** {@link #dBcVdTeff(double)} where {@code logT = logTeff(teffK)} is already known. */
    static double dBcVdTeff(double teffK, double logT) {
        if (!(teffK > 0)) {
            return Double.NaN;
        }
        double x = logT;
        double[] k = coefficients(x);
        double s = 0;
        for (int i = k.length - 1; i >= 1; i--) {
            s = s * x + i * k[i];
        }
        return s / (teffK * Math.log(10));
    }

    public static boolean inRange(double teffK) {
        return teffK >= TEFF_MIN_K && teffK <= TEFF_MAX_K;
    }
}
