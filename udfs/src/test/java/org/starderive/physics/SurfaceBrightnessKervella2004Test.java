package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class SurfaceBrightnessKervella2004Test {

    /** Kervella et al. 2004, A&amp;A 426, 297: log θ_LD[mas] = 0.0755 (V−K) + 0.5170 − 0.2 K, typed again. */
    private static double theta(double v, double k) {
        return Math.pow(10, 0.0755 * (v - k) + 0.5170 - 0.2 * k);
    }

    @Test
    void angularDiameterFollowsTheDwarfRelationInsideItsColourRange() {
        // derived from Kervella et al. 2004 (typed copy above)
        double[][] vk = {{5.0, 3.5}, {9.5, 6.0}, {1.0, 1.05}, {12.0, 8.2}};
        for (double[] c : vk) {
            assertEquals(theta(c[0], c[1]), SurfaceBrightnessKervella2004.angularDiameterMas(c[0], c[1]), 1e-12 * theta(c[0], c[1]));
        }
        // the colour range -0.1 <= V-K <= 4.1 (the class's stated A0-M2 span, from memory) includes its ends
        assertEquals(theta(0.0, 0.1), SurfaceBrightnessKervella2004.angularDiameterMas(0.0, 0.1), 1e-12);
        assertEquals(theta(4.1, 0.0), SurfaceBrightnessKervella2004.angularDiameterMas(4.1, 0.0), 1e-12);
        assertTrue(Double.isNaN(SurfaceBrightnessKervella2004.angularDiameterMas(0.0, 0.2)));
        assertTrue(Double.isNaN(SurfaceBrightnessKervella2004.angularDiameterMas(4.2, 0.0)));
        assertTrue(Double.isNaN(SurfaceBrightnessKervella2004.angularDiameterMas(Double.NaN, 0.0)));
    }

    @Test
    void relativeErrorPropagatesVAndKThroughTheRelationPlusItsScatter() {
        // log theta = 0.0755 V - 0.2755 K + 0.517 (Kervella et al. 2004 rearranged); d ln theta = ln 10 d log theta;
        // the relation's scatter, 1 % (Kervella et al. 2004: "1 % or better"), in quadrature
        double sv = 0.02;
        double sk = 0.03;
        double dlog = Math.sqrt(Math.pow(0.0755 * sv, 2) + Math.pow(0.2755 * sk, 2));
        double expected = Math.sqrt(Math.pow(Math.log(10) * dlog, 2) + 0.01 * 0.01);
        assertEquals(expected, SurfaceBrightnessKervella2004.relativeError(sv, sk), 1e-12);
        assertEquals(0.01, SurfaceBrightnessKervella2004.relativeError(0, 0), 1e-15);
        // V alone and K alone
        assertEquals(Math.hypot(Math.log(10) * 0.0755 * 0.1, 0.01), SurfaceBrightnessKervella2004.relativeError(0.1, 0), 1e-12);
        assertEquals(Math.hypot(Math.log(10) * 0.2755 * 0.1, 0.01), SurfaceBrightnessKervella2004.relativeError(0, 0.1), 1e-12);
    }
}
