package org.starderive.physics;

/**
 * The Teff–radius relation of K7–M7 dwarfs, Mann et al. 2015, ApJ 804, 64, Table 1 (equations 8 and 9), with
 * X = Teff / 3500 K:
 * <pre>
 *   R/R⊙ = 10.5440 − 33.7546 X + 35.1909 X² − 11.5928 X³                               σ = 13.4 %
 *   R/R⊙ = (16.7700 − 54.3210 X + 57.6627 X² − 19.6994 X³) (1 + 0.4565 [Fe/H])          σ = 9.3 %   (with [Fe/H])
 * </pre>
 * calibrated on 2700–4100 K and −0.6 &lt; [Fe/H] &lt; +0.5 (the sample of the paper). The scatter is fractional, in R
 * at a given Teff. The [Fe/H] factor multiplies the whole cubic; the job uses the [Fe/H] form only for a measured
 * [Fe/H] inside −0.6 … +0.5 (the plain form otherwise: at M_Ks 8 the [Fe/H] form moves Teff by ~200 K per dex). Coefficients, form and scatter as in the first
 * author's code release and three independent transcriptions, which agree; the 2016 erratum (ApJ 819, 87) is reported
 * not to change these two rows (one transcription says so; the erratum itself was not read).
 *
 * <p>The job runs the relation backwards (our choice): an M dwarf with a distance but no colour of any Mann et al.
 * 2015 colour relation (a faint late M dwarf without V and without BP) gets its radius from M_Ks
 * ({@link RadiusMann2015}) and its Teff as the temperature at which this relation gives that radius. The inverse is
 * taken only on the rising branch of each polynomial, where the logarithmic slope
 * d ln R / d ln Teff is at least 1.5 (our choice: the Teff error is then at most 2/3 of the relation's fractional
 * scatter), so it is unique and never evaluated at a turnover: both cubics have a minimum near 2730–2780 K, where
 * the radius stops saying anything about Teff, and the [Fe/H] form a maximum near 4050 K. Plain form 2800–4100 K
 * (slope 1.84 and 1.72 at the ends), [Fe/H] form 2850–3900 K (2.42 and 1.54).
 *
 * <p>Errors: ln R(X) + ln(1 + f [Fe/H]) = ln R_obs − ε with ε of the relation's scatter, so
 * d ln Teff = (d ln R_obs − d ln(1 + f [Fe/H]) − ε) / (d ln R / d ln Teff). The slope peaks near 5.8 at 3150 K
 * (13.4 % in R is 2.3 % in Teff) and falls towards the ends (8 % at 4100 K): the Teff error says so.
 */
public final class TeffRadiusMann2015 {
    private TeffRadiusMann2015() {}

    public static final String CITATION = "Mann et al. 2015, ApJ 804, 64, Table 1, Teff-radius relations";
    /** What {@code teff_from} says for a Teff from the radius (the colour relations' ids are "M15/V-J" and so on). */
    public static final String ID = "M15/radius";
    public static final double X_SCALE_K = 3500.0;
    public static final double SCATTER_FRAC = 0.134;
    public static final double SCATTER_FRAC_FEH = 0.093;
    private static final double[] K = {10.5440, -33.7546, 35.1909, -11.5928};
    private static final double[] K_FEH = {16.7700, -54.3210, 57.6627, -19.6994};
    private static final double F_FEH = 0.4565;
    /** Lower Teff limit of the inverse, plain form (our choice, above its minimum at 2733 K; slope ≈ 1.8). */
    public static final double TEFF_MIN_K = 2800.0;
    /** Lower Teff limit of the inverse, [Fe/H] form (our choice, above its minimum at 2781 K; slope ≈ 2.4). */
    public static final double TEFF_MIN_FEH_K = 2850.0;
    /** Upper Teff limit of the inverse, plain form: the published range (slope ≈ 1.7). */
    public static final double TEFF_MAX_K = 4100.0;
    /** Upper Teff limit of the inverse, [Fe/H] form (our choice, below its maximum at 4050 K; slope ≈ 1.5). */
    public static final double TEFF_MAX_FEH_K = 3900.0;

    /** [Fe/H] range of the calibration sample (the [Fe/H] form is used only inside it). */
    public static final double FEH_MIN = -0.6;
    public static final double FEH_MAX = 0.5;

    /** Whether {@code feh} lies inside {@link #FEH_MIN} … {@link #FEH_MAX} (NaN: no). */
    public static boolean fehInRange(double feh) {
        return feh >= FEH_MIN && feh <= FEH_MAX;
    }

    /** R in R⊙ at {@code teffK} (the relation forwards, no range check); {@code feh} NaN selects the plain form. */
    public static double radiusRsun(double teffK, double feh) {
        double x = teffK / X_SCALE_K;
        if (Double.isNaN(feh)) {
            return K[0] + x * (K[1] + x * (K[2] + x * K[3]));
        }
        return (K_FEH[0] + x * (K_FEH[1] + x * (K_FEH[2] + x * K_FEH[3]))) * (1 + F_FEH * feh);
    }

    /** d ln R / d ln Teff at {@code teffK} (independent of [Fe/H] for the multiplicative form). */
    public static double dLnRdLnTeff(double teffK, double feh) {
        double[] k = Double.isNaN(feh) ? K : K_FEH;
        double x = teffK / X_SCALE_K;
        double p = k[0] + x * (k[1] + x * (k[2] + x * k[3]));
        double dp = k[1] + x * (2 * k[2] + x * 3 * k[3]);
        return x * dp / p;
    }

    /** d ln R / d [Fe/H] at fixed Teff (0 for the plain form). */
    public static double dLnRdFeh(double feh) {
        return Double.isNaN(feh) ? 0.0 : F_FEH / (1 + F_FEH * feh);
    }

    /** Relative 1σ scatter (in R) of the form used. */
    public static double scatterFrac(double feh) {
        return Double.isNaN(feh) ? SCATTER_FRAC : SCATTER_FRAC_FEH;
    }

    public static double teffMinK(double feh) {
        return Double.isNaN(feh) ? TEFF_MIN_K : TEFF_MIN_FEH_K;
    }

    public static double teffMaxK(double feh) {
        return Double.isNaN(feh) ? TEFF_MAX_K : TEFF_MAX_FEH_K;
    }

    /**
     * The Teff at which the relation gives {@code radiusRsun}, on its rising branch between {@link #teffMinK} and
     * {@link #teffMaxK}; NaN when the radius lies outside what that branch gives (or is not positive, or [Fe/H]
     * leaves no positive factor). Bisection, 60 halvings (to double precision): deterministic, no allocation.
     */
    public static double teffK(double radiusRsun, double feh) {
        double lo = teffMinK(feh);
        double hi = teffMaxK(feh);
        if (!(radiusRsun > 0) || !(Double.isNaN(feh) || 1 + F_FEH * feh > 0)) {
            return Double.NaN;
        }
        double rLo = radiusRsun(lo, feh);
        double rHi = radiusRsun(hi, feh);
        if (!(radiusRsun >= rLo && radiusRsun <= rHi)) {
            return Double.NaN;
        }
        // the branch rises: bisection on R(T) − R_obs, 60 halvings of a ≤ 1300 K interval (double precision)
        for (int i = 0; i < 60; i++) {
            double mid = 0.5 * (lo + hi);
            if (radiusRsun(mid, feh) < radiusRsun) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        return 0.5 * (lo + hi);
    }
}
