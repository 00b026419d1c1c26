package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * {@link ParallaxDistance#edsdModeKpc} against outside references in the corners of its domain: far modes of zero and
 * negative parallaxes (where the closed form loses digits and the Newton polish must restore them), the triple root
 * of the cubic, and the uninformative limit where the posterior is the prior. The cubic and the posterior are those of
 * Bailer-Jones 2015, PASP 127, 994, typed in {@link ParallaxDistanceTest}.
 */
class EdsdModeReferenceTest {
    private static final double L = DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT;

    /**
     * Mode for ϖ ≤ 0, as the Brent root of the Bailer-Jones 2015 cubic f(r) = r³/L − 2r² + (ϖ/σ²) r − 1/σ².
     * Its coefficients have the signs +, −, −/0, −: one sign change, so one positive root (Descartes' rule of
     * signs), which is the mode (the posterior vanishes at 0 and ∞). Bracket: f(2L) = (2Lϖ − 1)/σ² &lt; 0; for
     * r ≥ 4L, f(r) ≥ r³/(2L) + (ϖ/σ²) r − 1/σ², which is ≥ 0 once r³/(4L) ≥ 1/σ² and r² ≥ 4L|ϖ|/σ².
     */
    private static double modeOfNonPositiveParallaxKpc(double w, double s, double lengthKpc) {
        double hi = Math.max(4 * lengthKpc, Math.max(Math.cbrt(4 * lengthKpc / (s * s)), Math.sqrt(4 * lengthKpc * -w) / s));
        return ParallaxDistanceTest.brentRoot(w, s, lengthKpc, 2 * lengthKpc, hi);
    }

    @Test
    void aNullParallaxMeasuredToATenthOfAMicroarcsecondHasItsModeToTwelveDigits() {
        // reference: Brent root of the Bailer-Jones 2015 cubic (above). With ϖ = 0 and σ of 0.05-0.2 µas the mode is
        // far out, r ≈ (L/σ²)^(1/3) ≈ 300-800 kpc, where r³/L nearly cancels 1/σ²: the closed form (two cube roots of
        // numbers that nearly cancel) is off by 1e-7 to 3e-6 there, so two full Newton steps on the exact derivative
        // are needed to reach 1e-12
        for (double s : new double[] {5e-5, 8e-5, 9e-5, 1e-4, 2e-4}) {
            double ref = modeOfNonPositiveParallaxKpc(0, s, L);
            assertEquals(ref, ParallaxDistance.edsdModeKpc(0, s, L), 1e-12 * ref, "sigma=" + s);
        }
        // other length scales (thin disc to halo, common practice) and negative parallaxes: same reference
        double[][] cases = {{0, 1e-3, 0.1}, {0, 5e-4, 0.3}, {0, 1.2e-4, 8}, {-0.4, 1e-6, L}, {-0.1, 2e-5, L}, {-2, 0.01, L}};
        for (double[] c : cases) {
            double ref = modeOfNonPositiveParallaxKpc(c[0], c[1], c[2]);
            assertEquals(ref, ParallaxDistance.edsdModeKpc(c[0], c[1], c[2]), 1e-12 * ref,
                    "w=" + c[0] + " s=" + c[1] + " L=" + c[2]);
        }
    }

    @Test
    void atTheTripleRootTheModeIsTwoThirdsOfTheLengthScale() {
        // the Bailer-Jones 2015 cubic times L, r³ − 2L r² + (ϖL/σ²) r − L/σ², is (r − r0)³ when 3 r0 = 2L,
        // 3 r0² = ϖL/σ² and r0³ = L/σ²: r0 = 2L/3, σ² = 27/(8L²), ϖ = 9/(2L) (algebra by hand). There the posterior has
        // a single stationary point, its mode, at 2L/3 (the cusp where the bimodal region of the posterior closes).
        // A triple root moves with the cube root of a rounding of the coefficients (1e-16^(1/3) ≈ 5e-6): tolerance 1e-5
        for (double lengthKpc : new double[] {1.0, L, 2.0, 4.5}) {
            double w = 9 / (2 * lengthKpc);
            double s = Math.sqrt(27 / (8 * lengthKpc * lengthKpc));
            double r0 = 2 * lengthKpc / 3;
            assertEquals(r0, ParallaxDistance.edsdModeKpc(w, s, lengthKpc), 1e-5 * r0, "L=" + lengthKpc);
            // and it is the maximum of the posterior typed in ParallaxDistanceTest
            double top = ParallaxDistanceTest.referenceLogPosterior(r0, w, s, lengthKpc);
            assertTrue(top > ParallaxDistanceTest.referenceLogPosterior(0.99 * r0, w, s, lengthKpc), "below, L=" + lengthKpc);
            assertTrue(top > ParallaxDistanceTest.referenceLogPosterior(1.01 * r0, w, s, lengthKpc), "above, L=" + lengthKpc);
        }
    }

    @Test
    void anErrorOfDegreesLeavesThePriorWhoseModeIsTwiceTheLengthScale() {
        // with σ of 1e8 mas (about 28 degrees) the likelihood is flat and the posterior is the prior r² e^(−r/L),
        // whose mode is 2L (Bailer-Jones 2015, PASP 127, 994; d/dr of 2 ln r − r/L vanishes there); the likelihood moves
        // it by less than 1e-14 kpc. The other two roots of the cubic are a complex pair of modulus 1/(σ√2) ≈ 1e-8 kpc,
        // so near a double root at 0 that the sign of the discriminant is lost to rounding: the cases below are ones
        // where it comes out ≤ 0
        double[][] cases = {{-81, 1e8}, {-61, 1e8}, {27, 1e8}, {31, 1e8}, {-74, 1.5e8}, {57, 1.5e8}, {65, 1.5e8},
            {100, 2e8}};
        for (double[] c : cases) {
            assertEquals(2 * L, ParallaxDistance.edsdModeKpc(c[0], c[1], L), 1e-12 * L, "w=" + c[0] + " s=" + c[1]);
        }
    }

    @Test
    void beyondTheRangeOfDoublesTheModeIsRightOrNaNNeverAnotherNumber() {
        // ϖ = 2 mas with σ = 1e-80 mas: the likelihood pins r to 1/ϖ = 0.5 kpc to ~1e-150 (Bailer-Jones 2015 cubic,
        // dominated by (ϖ r − 1)/σ²); its coefficients ~1e160 overflow the closed form. Either the right mode or NaN
        // (the "no mode" value of ParallaxDistance), never some other number
        for (double s : new double[] {1e-80, 1e-120, 1e-160}) {
            double mode = ParallaxDistance.edsdModeKpc(2, s, L);
            assertTrue(Double.isNaN(mode) || Math.abs(mode - 0.5) <= 1e-12, "sigma=" + s + ": " + mode);
        }
    }
}
