package org.starderive.physics;

/**
 * M-dwarf radius from the absolute 2MASS Ks magnitude, Mann et al. 2015, ApJ 804, 64, Table 1, as corrected in the
 * erratum Mann et al. 2016, ApJ 819, 87:
 * <pre>
 *   R/R⊙ = 1.9515 − 0.3520 M_Ks + 0.01680 M_Ks²                              σ = 2.89 %
 *   R/R⊙ = (1.9305 − 0.3466 M_Ks + 0.01647 M_Ks²) (1 + 0.04458 [Fe/H])      σ = 2.70 %   (with [Fe/H])
 * </pre>
 * Valid for 4.6 &lt; M_Ks &lt; 9.8 (K7–M7 dwarfs); main-sequence stars only. The [Fe/H] form is used only for a
 * measured metallicity. No bolometric correction is needed: with Teff the luminosity follows from Stefan–Boltzmann.
 */
public final class RadiusMann2015 {
    private RadiusMann2015() {}

    public static final String CITATION = "Mann et al. 2015, ApJ 804, 64, Table 1 (erratum: Mann et al. 2016, ApJ 819, 87)";
    public static final double MKS_MIN = 4.6;
    public static final double MKS_MAX = 9.8;
    public static final double SCATTER_FRAC = 0.0289;
    public static final double SCATTER_FRAC_FEH = 0.0270;

    public static boolean inRange(double mKs) {
        return mKs > MKS_MIN && mKs < MKS_MAX;
    }

    /** R in R⊙ at absolute Ks {@code mKs}; {@code feh} NaN selects the form without [Fe/H]. NaN outside the range. */
    public static double radiusRsun(double mKs, double feh) {
        if (!inRange(mKs)) {
            return Double.NaN;
        }
        if (Double.isNaN(feh)) {
            return 1.9515 + mKs * (-0.3520 + 0.01680 * mKs);
        }
        return (1.9305 + mKs * (-0.3466 + 0.01647 * mKs)) * (1 + 0.04458 * feh);
    }

    /** d ln R / d M_Ks. */
    public static double dLnRdMks(double mKs, double feh) {
        if (Double.isNaN(feh)) {
            return (-0.3520 + 2 * 0.01680 * mKs) / (1.9515 + mKs * (-0.3520 + 0.01680 * mKs));
        }
        return (-0.3466 + 2 * 0.01647 * mKs) / (1.9305 + mKs * (-0.3466 + 0.01647 * mKs));
    }

    /** d ln R / d [Fe/H] (0 for the form without [Fe/H]). */
    public static double dLnRdFeh(double feh) {
        return Double.isNaN(feh) ? 0.0 : 0.04458 / (1 + 0.04458 * feh);
    }

    /** Relative 1σ scatter of the form used. */
    public static double scatterFrac(double feh) {
        return Double.isNaN(feh) ? SCATTER_FRAC : SCATTER_FRAC_FEH;
    }
}
