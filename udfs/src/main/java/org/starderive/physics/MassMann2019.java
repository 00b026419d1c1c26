package org.starderive.physics;

/**
 * M-dwarf mass from the absolute 2MASS Ks magnitude, Mann et al. 2019, ApJ 871, 63, Table 6, the preferred n = 5
 * fits:
 * <pre>
 *   log10 M/M⊙ = Σ_{i=0..5} aᵢ (M_Ks − 7.5)^i                         σ = 2.0 %
 *   M/M⊙ = (1 + f [Fe/H]) · 10^(Σ bᵢ (M_Ks − 7.5)^i)                   σ = 2.1 %   (with [Fe/H], f = −0.0035)
 * </pre>
 * Valid for 4.0 &lt; M_Ks &lt; 11.0 (0.075–0.75 M⊙); main-sequence stars only. The [Fe/H] form is used only for a
 * measured metallicity. (A popular code puts a4 where a5 belongs; the order here is the paper's.)
 */
public final class MassMann2019 {
    private MassMann2019() {}

    public static final String CITATION = "Mann et al. 2019, ApJ 871, 63, Table 6 (n = 5)";
    public static final double MKS_MIN = 4.0;
    public static final double MKS_MAX = 11.0;
    public static final double SCATTER_FRAC = 0.020;
    public static final double SCATTER_FRAC_FEH = 0.021;
    static final double[] A = {-0.642, -0.208, -8.43e-4, 7.87e-3, 1.42e-4, -2.13e-4};
    static final double[] B = {-0.647, -0.207, -6.53e-4, 7.13e-3, 1.84e-4, -1.60e-4};
    static final double F = -0.0035;

    public static boolean inRange(double mKs) {
        return mKs > MKS_MIN && mKs < MKS_MAX;
    }

    /** log10 M/M⊙ at absolute Ks; {@code feh} NaN selects the form without [Fe/H]. NaN outside the range. */
    public static double logMass(double mKs, double feh) {
        if (!inRange(mKs)) {
            return Double.NaN;
        }
        boolean withFeh = !Double.isNaN(feh);
        double[] c = withFeh ? B : A;
        double x = mKs - 7.5;
        double s = 0;
        for (int i = c.length - 1; i >= 0; i--) {
            s = s * x + c[i];
        }
        return withFeh ? s + Math.log10(1 + F * feh) : s;
    }

    /** d ln M / d M_Ks. */
    public static double dLnMdMks(double mKs, double feh) {
        double[] c = Double.isNaN(feh) ? A : B;
        double x = mKs - 7.5;
        double s = 0;
        for (int i = c.length - 1; i >= 1; i--) {
            s = s * x + i * c[i];
        }
        return s * Math.log(10);
    }

    /** d ln M / d [Fe/H] (0 for the form without [Fe/H]). */
    public static double dLnMdFeh(double feh) {
        return Double.isNaN(feh) ? 0.0 : F / (1 + F * feh);
    }

    public static double scatterFrac(double feh) {
        return Double.isNaN(feh) ? SCATTER_FRAC : SCATTER_FRAC_FEH;
    }
}
