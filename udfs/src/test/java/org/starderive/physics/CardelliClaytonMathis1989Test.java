package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * The extinction law against a second typed copy of Cardelli, Clayton &amp; Mathis 1989, ApJ 345, 245, eqs. 2a/2b
 * (infrared) and 3a/3b (optical), typed here in plain powers (not the nested form of the class) from the paper's
 * coefficients. Every value below is "derived from CCM89 eq. 2 or 3" by this typed copy, never read from the class.
 */
class CardelliClaytonMathis1989Test {

    /** CCM89 eq. 3a: a(y), y = x − 1.82. */
    private static final double[] A_OPT = {1, 0.17699, -0.50447, -0.02427, 0.72085, 0.01979, -0.77530, 0.32999};
    /** CCM89 eq. 3b: b(y). */
    private static final double[] B_OPT = {0, 1.41338, 2.28305, 1.07233, -5.38434, -0.62251, 5.30260, -2.09002};

    private static double powerSeries(double[] c, double y) {
        double s = 0;
        for (int i = 0; i < c.length; i++) {
            s += c[i] * Math.pow(y, i);
        }
        return s;
    }

    /** A(λ)/A(V) by CCM89: eq. 2 for 0.3 ≤ x < 1.1 µm⁻¹, eq. 3 for 1.1 ≤ x ≤ 3.3 µm⁻¹. */
    private static double reference(double lambdaUm, double rv) {
        double x = 1 / lambdaUm;
        if (x >= 0.3 && x < 1.1) {
            return 0.574 * Math.pow(x, 1.61) + (-0.527 * Math.pow(x, 1.61)) / rv;
        }
        double y = x - 1.82;
        return powerSeries(A_OPT, y) + powerSeries(B_OPT, y) / rv;
    }

    @Test
    void opticalAndInfraredBandsAtSeveralRvFollowThePublishedEquations() {
        // derived from CCM89 eqs. 2-3 (typed copy above) at the Johnson-Cousins and 2MASS wavelengths of Band and at
        // points spread over both segments; R_V = 3.1 (diffuse ISM) and the paper's dense-cloud and low values 5.0, 2.5
        double[] lambdas = {0.31, 0.366, 0.438, 0.50, 0.545, 0.60, 0.641, 0.70, 0.798, 0.88, 0.95, 1.235, 1.662, 2.159, 3.0};
        for (double rv : new double[] {3.1, 5.0, 2.5}) {
            for (double l : lambdas) {
                double ref = reference(l, rv);
                assertEquals(ref, CardelliClaytonMathis1989.aLambdaOverAv(l, rv), 1e-12 * Math.abs(ref) + 1e-14,
                        "lambda=" + l + " R_V=" + rv);
            }
        }
    }

    @Test
    void theSegmentEdgesBelongWhereTheEquationsPutThem() {
        // CCM89: eq. 2 holds for 0.3 <= x < 1.1, eq. 3 for 1.1 <= x <= 3.3 (x in inverse microns). At x = 1.1 exactly
        // the optical polynomial applies; the two forms differ there, so a shifted edge changes the value.
        double edge = 1 / 1.1;
        assertEquals(1.1, 1 / edge, 0.0, "the wavelength is exactly x = 1.1");
        double optical = powerSeries(A_OPT, 1.1 - 1.82) + powerSeries(B_OPT, 1.1 - 1.82) / 3.1;
        double infrared = 0.574 * Math.pow(1.1, 1.61) * (1 - 0.527 / 0.574 / 3.1);
        assertNotEquals(optical, infrared, 1e-4, "the two segments disagree at the edge");
        assertEquals(optical, CardelliClaytonMathis1989.aLambdaOverAv(edge, 3.1), 1e-12);
        // just inside the infrared segment (x = 1.05): eq. 2
        assertEquals(reference(1 / 1.05, 3.1), CardelliClaytonMathis1989.aLambdaOverAv(1 / 1.05, 3.1), 1e-12);
        // the domain ends are inclusive: x = 0.3 (eq. 2) and x = 3.3 (eq. 3), finite; beyond them NaN
        double lo = 1 / 0.3;
        double hi = 1 / 3.3;
        assertEquals(0.3, 1 / lo, 0.0);
        assertEquals(3.3, 1 / hi, 0.0);
        assertEquals(reference(lo, 3.1), CardelliClaytonMathis1989.aLambdaOverAv(lo, 3.1), 1e-12);
        assertEquals(reference(hi, 3.1), CardelliClaytonMathis1989.aLambdaOverAv(hi, 3.1), 1e-12);
        assertTrue(Double.isNaN(CardelliClaytonMathis1989.aLambdaOverAv(1 / 0.29, 3.1)));
        assertTrue(Double.isNaN(CardelliClaytonMathis1989.aLambdaOverAv(1 / 3.31, 3.1)));
    }

    @Test
    void bandRatiosAreTheLawAtTheBandDividedByTheLawAtV() {
        // derived from CCM89 eqs. 2-3; the band wavelengths are those stated in Band (Bessell, Castelli & Plez 1998,
        // from memory; Cohen, Wheaton & Megeath 2003), typed here again
        double[][] bands = {{0.438}, {0.545}, {0.641}, {0.798}, {1.235}, {1.662}, {2.159}};
        Band[] order = {Band.B, Band.V, Band.RC, Band.IC, Band.J, Band.H, Band.KS};
        for (double rv : new double[] {3.1, 4.0, 2.75}) {
            for (int i = 0; i < order.length; i++) {
                double ref = reference(bands[i][0], rv) / reference(0.545, rv);
                assertEquals(ref, CardelliClaytonMathis1989.bandOverAv(order[i], rv), 1e-12, order[i] + " R_V=" + rv);
            }
        }
    }
}
