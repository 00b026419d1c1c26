package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * {@link RadiusMann2015} and {@link MassMann2019} against the published fits typed a second time here, in plain
 * powers: Mann et al. 2015, ApJ 804, 64, Table 1 as corrected in the erratum (Mann et al. 2016, ApJ 819, 87), and
 * Mann et al. 2019, ApJ 871, 63, Table 6 (n = 5). Values are "derived from" those tables by this typed copy.
 */
class MannRelationsTest {

    // Mann et al. 2015 Table 1 (erratum): R = a + b M_Ks + c M_Ks^2; with [Fe/H]: (a' + b' M_Ks + c' M_Ks^2)(1 + f [Fe/H])
    static double radius(double mKs) {
        return 1.9515 - 0.3520 * mKs + 0.01680 * mKs * mKs;
    }

    static double radiusFeh(double mKs, double feh) {
        return (1.9305 - 0.3466 * mKs + 0.01647 * mKs * mKs) * (1 + 0.04458 * feh);
    }

    /**
     * Mann et al. 2015 Table 2 (erratum), the V−J row with [Fe/H] (relations.md section 11), in plain powers:
     * Teff / 3500 K = 2.515 − 1.054 X + 0.2965 X² − 0.04150 X³ + 0.002245 X⁴ + 0.05262 [Fe/H], X = V − J.
     */
    static double teffVjFehK(double x, double feh) {
        return 3500 * (2.515 - 1.054 * x + 0.2965 * x * x - 0.04150 * Math.pow(x, 3) + 0.002245 * Math.pow(x, 4)
                + 0.05262 * feh);
    }

    // Mann et al. 2019 Table 6, n = 5: log10 M = sum a_i (M_Ks - 7.5)^i; with [Fe/H]: M = (1 + f [Fe/H]) 10^(sum b_i ...)
    private static final double[] A19 = {-0.642, -0.208, -8.43e-4, 7.87e-3, 1.42e-4, -2.13e-4};
    private static final double[] B19 = {-0.647, -0.207, -6.53e-4, 7.13e-3, 1.84e-4, -1.60e-4};
    private static final double F19 = -0.0035;

    static double logMass(double mKs) {
        double s = 0;
        for (int i = 0; i < A19.length; i++) {
            s += A19[i] * Math.pow(mKs - 7.5, i);
        }
        return s;
    }

    static double logMassFeh(double mKs, double feh) {
        double s = 0;
        for (int i = 0; i < B19.length; i++) {
            s += B19[i] * Math.pow(mKs - 7.5, i);
        }
        return Math.log10((1 + F19 * feh) * Math.pow(10, s));
    }

    private static final double[] MKS = {4.7, 5.15, 6.0, 6.55, 7.36, 8.2, 9.0, 9.7};
    private static final double[] FEH = {-0.5, -0.2, 0.0, 0.3};

    @Test
    void radiusFollowsTable1WithAndWithoutMetallicity() {
        // derived from Mann et al. 2015 Table 1 (erratum), both forms, solar and non-solar [Fe/H]
        for (double m : MKS) {
            assertEquals(radius(m), RadiusMann2015.radiusRsun(m, Double.NaN), 1e-12, "M_Ks=" + m);
            for (double feh : FEH) {
                assertEquals(radiusFeh(m, feh), RadiusMann2015.radiusRsun(m, feh), 1e-12, "M_Ks=" + m + " [Fe/H]=" + feh);
            }
        }
        // hand-evaluated values of the plain form, derived from Mann et al. 2015 Table 1 (erratum): 5.15 -> 0.584, 8.20 -> 0.195
        assertEquals(0.584, RadiusMann2015.radiusRsun(5.15, Double.NaN), 0.0005);
        assertEquals(0.195, RadiusMann2015.radiusRsun(8.20, Double.NaN), 0.0005);
    }

    @Test
    void radiusDerivativesAreThoseOfTheFit() {
        // central differences of the typed copy above (derived from Mann et al. 2015 Table 1)
        double h = 1e-5;
        for (double m : MKS) {
            double dPlain = (Math.log(radius(m + h)) - Math.log(radius(m - h))) / (2 * h);
            assertEquals(dPlain, RadiusMann2015.dLnRdMks(m, Double.NaN), 1e-7, "M_Ks=" + m);
            for (double feh : FEH) {
                double dM = (Math.log(radiusFeh(m + h, feh)) - Math.log(radiusFeh(m - h, feh))) / (2 * h);
                assertEquals(dM, RadiusMann2015.dLnRdMks(m, feh), 1e-7, "M_Ks=" + m + " [Fe/H]=" + feh);
                double dF = (Math.log(radiusFeh(m, feh + h)) - Math.log(radiusFeh(m, feh - h))) / (2 * h);
                assertEquals(dF, RadiusMann2015.dLnRdFeh(feh), 1e-7, "[Fe/H]=" + feh);
            }
        }
        assertEquals(0.0, RadiusMann2015.dLnRdFeh(Double.NaN), 0.0, "the plain form has no [Fe/H] term");
    }

    @Test
    void radiusScatterAndRangeAreThePublishedOnes() {
        // Mann et al. 2015 Table 1 (erratum): 2.89 % plain, 2.70 % with [Fe/H]; valid 4.6 < M_Ks < 9.8 (open interval)
        assertEquals(0.0289, RadiusMann2015.scatterFrac(Double.NaN), 0.0);
        assertEquals(0.0270, RadiusMann2015.scatterFrac(0.1), 0.0);
        assertTrue(Double.isNaN(RadiusMann2015.radiusRsun(4.6, Double.NaN)));
        assertTrue(Double.isNaN(RadiusMann2015.radiusRsun(9.8, 0.0)));
        assertEquals(radius(4.6 + 1e-9), RadiusMann2015.radiusRsun(4.6 + 1e-9, Double.NaN), 1e-12);
        assertEquals(radiusFeh(9.8 - 1e-9, 0.0), RadiusMann2015.radiusRsun(9.8 - 1e-9, 0.0), 1e-12);
        assertTrue(Double.isNaN(RadiusMann2015.radiusRsun(4.5, Double.NaN)));
        assertTrue(Double.isNaN(RadiusMann2015.radiusRsun(10.0, Double.NaN)));
    }

    @Test
    void massFollowsTable6WithAndWithoutMetallicity() {
        // derived from Mann et al. 2019 Table 6 (n = 5), both forms, solar and non-solar [Fe/H]
        for (double m : new double[] {4.1, 5.15, 6.55, 7.36, 7.5, 8.2, 9.5, 10.9}) {
            assertEquals(logMass(m), MassMann2019.logMass(m, Double.NaN), 1e-12, "M_Ks=" + m);
            for (double feh : FEH) {
                assertEquals(logMassFeh(m, feh), MassMann2019.logMass(m, feh), 1e-12, "M_Ks=" + m + " [Fe/H]=" + feh);
            }
        }
        // hand-evaluated values, derived from Mann et al. 2019 Table 6 (n = 5): 5.15 -> 0.575, 8.20 -> 0.164 Msun
        assertEquals(0.575, Math.pow(10, MassMann2019.logMass(5.15, Double.NaN)), 0.0005);
        assertEquals(0.164, Math.pow(10, MassMann2019.logMass(8.20, Double.NaN)), 0.0005);
    }

    @Test
    void massDerivativesAreThoseOfTheFit() {
        // central differences of the typed copy above (derived from Mann et al. 2019 Table 6)
        double h = 1e-5;
        double ln10 = Math.log(10);
        for (double m : new double[] {4.1, 5.15, 6.55, 8.2, 9.5, 10.9}) {
            double dPlain = ln10 * (logMass(m + h) - logMass(m - h)) / (2 * h);
            assertEquals(dPlain, MassMann2019.dLnMdMks(m, Double.NaN), 1e-7, "M_Ks=" + m);
            for (double feh : FEH) {
                double dM = ln10 * (logMassFeh(m + h, feh) - logMassFeh(m - h, feh)) / (2 * h);
                assertEquals(dM, MassMann2019.dLnMdMks(m, feh), 1e-7, "M_Ks=" + m + " [Fe/H]=" + feh);
                double dF = ln10 * (logMassFeh(m, feh + h) - logMassFeh(m, feh - h)) / (2 * h);
                assertEquals(dF, MassMann2019.dLnMdFeh(feh), 1e-9, "[Fe/H]=" + feh);
            }
        }
        assertEquals(0.0, MassMann2019.dLnMdFeh(Double.NaN), 0.0, "the plain form has no [Fe/H] term");
    }

    @Test
    void massScatterAndRangeAreThePublishedOnes() {
        // Mann et al. 2019 Table 6: 2.0 % plain, 2.1 % with [Fe/H]; valid 4.0 < M_Ks < 11.0 (open interval)
        assertEquals(0.020, MassMann2019.scatterFrac(Double.NaN), 0.0);
        assertEquals(0.021, MassMann2019.scatterFrac(-0.3), 0.0);
        assertTrue(Double.isNaN(MassMann2019.logMass(4.0, Double.NaN)));
        assertTrue(Double.isNaN(MassMann2019.logMass(11.0, 0.0)));
        assertEquals(logMass(4.0 + 1e-9), MassMann2019.logMass(4.0 + 1e-9, Double.NaN), 1e-12);
        assertEquals(logMassFeh(11.0 - 1e-9, 0.0), MassMann2019.logMass(11.0 - 1e-9, 0.0), 1e-12);
        assertTrue(Double.isNaN(MassMann2019.logMass(3.9, Double.NaN)));
        assertTrue(Double.isNaN(MassMann2019.logMass(11.1, Double.NaN)));
    }
}
