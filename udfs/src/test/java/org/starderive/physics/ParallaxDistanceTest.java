package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.apache.commons.math3.analysis.solvers.LaguerreSolver;
import org.apache.commons.math3.complex.Complex;
import org.junit.jupiter.api.Test;

class ParallaxDistanceTest {
    private static final double L = 1.35;

    @Test
    void inverseParallaxAndItsOutOfDomainPolicy() {
        assertEquals(100.0, ParallaxDistance.inverseParallaxPc(10.0), 1e-12);
        assertTrue(Double.isNaN(ParallaxDistance.inverseParallaxPc(0.0)), "zero parallax has no inverse distance");
        assertTrue(Double.isNaN(ParallaxDistance.inverseParallaxPc(-1.0)), "negative parallax has no inverse distance");
        assertTrue(Double.isNaN(ParallaxDistance.inverseParallaxPc(Double.NaN)));
    }

    @Test
    void modesOfHandDerivedCases() {
        // Bailer-Jones 2015 cubic r^3/L - 2r^2 + (w/s^2) r - 1/s^2 = 0, solved by hand for L = 1.35 kpc:
        // w = 1 mas, s = 0.1 mas -> 1.013 kpc; s = 0.5 mas -> 1.500 kpc
        assertEquals(1.013, ParallaxDistance.edsdModeKpc(1.0, 0.1, L), 0.0005);
        assertEquals(1.500, ParallaxDistance.edsdModeKpc(1.0, 0.5, L), 0.0005);
    }

    /*
     * Independent reference, typed here from Bailer-Jones 2015, PASP 127, 994 (exponentially decreasing space
     * density prior): prior r^2 exp(-r/L) / (2 L^3), Gaussian likelihood of the parallax w with error s about 1/r, so
     * the unnormalised posterior is r^2 exp(-r/L) exp(-(w - 1/r)^2 / (2 s^2)); its mode is a positive real root of
     * r^3/L - 2 r^2 + (w/s^2) r - 1/s^2 = 0. Units: r and L in kpc, w and s in mas (1/kpc), consistent throughout.
     * Nothing of ParallaxDistance or EdsdPosterior is used to build it.
     */

    /** Log of the unnormalised posterior above (Bailer-Jones 2015); -inf for r <= 0. */
    static double referenceLogPosterior(double r, double w, double s, double lengthKpc) {
        if (!(r > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        double d = w - 1 / r;
        return 2 * Math.log(r) - r / lengthKpc - d * d / (2 * s * s);
    }

    /** Positive real roots of the Bailer-Jones 2015 cubic, by Commons Math's Laguerre solver (all complex roots). */
    private static List<Double> cubicPositiveRoots(double w, double s, double lengthKpc) {
        double s2 = s * s;
        // coefficients in increasing powers of r: -1/s^2 + (w/s^2) r - 2 r^2 + r^3 / L
        double[] cubic = {-1 / s2, w / s2, -2, 1 / lengthKpc};
        List<Double> roots = new ArrayList<>();
        for (Complex z : new LaguerreSolver(1e-15, 1e-15, 1e-300).solveAllComplex(cubic, 1.0)) {
            if (Math.abs(z.getImaginary()) <= 1e-9 * Math.abs(z.getReal()) && z.getReal() > 0) {
                roots.add(z.getReal());
            }
        }
        return roots;
    }

    /**
     * Mode: of the positive real roots of the cubic (there may be three: two maxima and the minimum between them)
     * the one where the posterior typed above is highest.
     */
    private static double referenceModeKpc(double w, double s, double lengthKpc) {
        double best = Double.NaN;
        double bestLp = Double.NEGATIVE_INFINITY;
        for (double r : cubicPositiveRoots(w, s, lengthKpc)) {
            double lp = referenceLogPosterior(r, w, s, lengthKpc);
            if (lp > bestLp) {
                bestLp = lp;
                best = r;
            }
        }
        assertTrue(best > 0, "the cubic has a positive real root for w=" + w + " s=" + s);
        return best;
    }

    @Test
    void modeIsTheRootOfTheBailerJonesCubic() {
        // reference: Bailer-Jones 2015, PASP 127, 994: the mode is a root of r^3/L - 2r^2 + (w/s^2) r - 1/s^2 = 0;
        // solved here with Commons Math's LaguerreSolver, the root picked by the posterior typed in this test
        double[][] cases = {{1, 0.1}, {1, 0.5}, {0.2, 0.1}, {0, 0.3}, {-0.5, 0.5}, {10, 0.05}, {0.05, 1.0}, {300, 0.02},
            {-5, 0.5}, {0.5, 0.3}, {2, 1.5}};
        for (double[] c : cases) {
            double w = c[0];
            double s = c[1];
            double ref = referenceModeKpc(w, s, L);
            assertEquals(ref, ParallaxDistance.edsdModeKpc(w, s, L), 1e-9 * ref, "w=" + w + " s=" + s);
        }
        // length scales below 1 kpc (a thin-disc population, common practice): same cubic, same reference
        for (double lengthKpc : new double[] {0.5, 0.25}) {
            for (double[] c : new double[][] {{1, 0.5}, {0.2, 0.3}, {-1, 1}}) {
                double ref = referenceModeKpc(c[0], c[1], lengthKpc);
                assertEquals(ref, ParallaxDistance.edsdModeKpc(c[0], c[1], lengthKpc), 1e-9 * ref, "L=" + lengthKpc);
            }
        }
    }

    @Test
    void withThreePositiveRootsTheHigherMaximumIsTheMode() {
        // reference as above (Bailer-Jones 2015, PASP 127, 994). At w/s near 2.5-3 the cubic has three positive real
        // roots: two maxima of the posterior and the minimum between them; the mode is the higher maximum, which is
        // the smallest root in the first case and the largest in the second (posteriors typed in this test)
        double[][] cases = {{4.9, 1.784}, {4.0, 1.5745}};
        for (double[] c : cases) {
            double w = c[0];
            double s = c[1];
            List<Double> roots = cubicPositiveRoots(w, s, L);
            assertEquals(3, roots.size(), "three positive real roots for w=" + w + " s=" + s + ": " + roots);
            double ref = referenceModeKpc(w, s, L);
            assertEquals(ref, ParallaxDistance.edsdModeKpc(w, s, L), 1e-9 * ref, "w=" + w + " s=" + s);
        }
        assertEquals(Collections.min(cubicPositiveRoots(4.9, 1.784, L)), referenceModeKpc(4.9, 1.784, L));
        assertEquals(Collections.max(cubicPositiveRoots(4.0, 1.5745, L)), referenceModeKpc(4.0, 1.5745, L));
    }

    /**
     * Reference percentiles of the Bailer-Jones 2015 posterior typed in this test: Commons Math Gauss-Legendre
     * integration of r^2 exp(-r/L) exp(-(w - 1/r)^2 / (2 s^2)) (scaled by its value at the reference mode, against
     * underflow), Brent root for the CDF.
     */
    private static double[] referencePercentiles(double w, double s, double[] probs) {
        double mode = referenceModeKpc(w, s, L);
        double lpMax = referenceLogPosterior(mode, w, s, L);
        UnivariateFunction density = r -> Math.exp(referenceLogPosterior(r, w, s, L) - lpMax);
        // log-spaced pieces from 1e-5 kpc to 60 L: fine enough for the narrowest case here
        int pieces = 4000;
        double lo = Math.log(1e-5);
        double hi = Math.log(60 * L);
        double[] edges = new double[pieces + 1];
        double[] cum = new double[pieces + 1];
        IterativeLegendreGaussIntegrator integ = new IterativeLegendreGaussIntegrator(16, 1e-12, 1e-14);
        for (int i = 0; i <= pieces; i++) {
            edges[i] = Math.exp(lo + (hi - lo) * i / pieces);
            if (i > 0) {
                cum[i] = cum[i - 1] + integ.integrate(1_000_000, density, edges[i - 1], edges[i]);
            }
        }
        double total = cum[pieces];
        double[] out = new double[probs.length];
        for (int k = 0; k < probs.length; k++) {
            double target = probs[k] * total;
            int i = 1;
            while (cum[i] < target) {
                i++;
            }
            final int piece = i;
            UnivariateFunction f = r -> cum[piece - 1] + (r == edges[piece - 1] ? 0
                    : integ.integrate(1_000_000, density, edges[piece - 1], r)) - target;
            out[k] = new BrentSolver(1e-13).solve(10000, f, edges[piece - 1], edges[piece]);
        }
        return out;
    }

    @Test
    void percentilesAgreeWithBruteForceIntegration() {
        // reference: numerical integration of the Bailer-Jones 2015 (PASP 127, 994) posterior typed in this test
        double[] probs = {StarDeriver.P16, 0.5, StarDeriver.P84};
        double[][] cases = {{1, 0.1}, {1, 0.5}, {0.2, 0.1}, {0, 0.3}, {-0.5, 0.5}, {10, 0.05}, {0.05, 1.0}, {2, 0.3}};
        EdsdPosterior post = EdsdPosterior.standard();
        double[] mine = new double[3];
        for (double[] c : cases) {
            double[] ref = referencePercentiles(c[0], c[1], probs);
            assertTrue(post.percentilesKpc(c[0], c[1], L, probs, mine));
            double width = ref[2] - ref[0];
            for (int k = 0; k < 3; k++) {
                assertEquals(ref[k], mine[k], 2e-3 * width, "w=" + c[0] + " s=" + c[1] + " p=" + probs[k]);
            }
        }
    }

    @Test
    void negativeAndZeroParallaxesHaveAProperPosterior() {
        EdsdPosterior post = EdsdPosterior.standard();
        double[] q = new double[3];
        for (double w : new double[] {-5, -1, -0.1, 0}) {
            assertTrue(post.percentilesKpc(w, 0.5, L, new double[] {StarDeriver.P16, 0.5, StarDeriver.P84}, q), "w=" + w);
            assertTrue(q[0] > 0 && q[0] < q[1] && q[1] < q[2], "ordered percentiles for w=" + w);
        }
        // with no information the posterior tends to the prior: median of r^2 exp(-r/L) is 2.674 L
        // (Gamma(3, L) median, from the gamma quantile function of Commons Math)
        assertTrue(post.percentilesKpc(0, 1e4, L, new double[] {0.5}, q));
        double priorMedian = new org.apache.commons.math3.distribution.GammaDistribution(3, L).inverseCumulativeProbability(0.5);
        assertEquals(priorMedian, q[0], 1e-3 * priorMedian);
    }

    @Test
    void highSignificanceConvergesToTheInverseParallaxPercentiles() {
        // w/s = 5000: the prior is negligible; the percentiles are 1/(w +- s) (monotone transform of a Gaussian)
        EdsdPosterior post = EdsdPosterior.standard();
        double[] q = new double[3];
        assertTrue(post.percentilesKpc(100, 0.02, L, new double[] {StarDeriver.P16, 0.5, StarDeriver.P84}, q));
        assertEquals(1 / 100.02, q[0], 1e-7);
        assertEquals(1 / 100.0, q[1], 1e-7);
        assertEquals(1 / 99.98, q[2], 1e-7);
    }

    @Test
    void noPosteriorForInvalidInputs() {
        EdsdPosterior post = EdsdPosterior.standard();
        double[] q = new double[1];
        assertFalse(post.percentilesKpc(1, 0, L, new double[] {0.5}, q));
        assertTrue(Double.isNaN(q[0]));
        assertFalse(post.percentilesKpc(Double.NaN, 0.1, L, new double[] {0.5}, q));
        assertFalse(post.percentilesKpc(1, Double.POSITIVE_INFINITY, L, new double[] {0.5}, q));
    }

    @Test
    void inverseParallaxOfASubMilliarcsecondParallax() {
        // d[pc] = 1000 / parallax[mas] (definition of the parsec, IAU 2015 B2): 0.5 mas is 2 kpc, 0.25 mas 4 kpc
        assertEquals(2000.0, ParallaxDistance.inverseParallaxPc(0.5), 1e-9);
        assertEquals(4000.0, ParallaxDistance.inverseParallaxPc(0.25), 1e-9);
    }

    @Test
    void logPosteriorIsTheBailerJonesPosteriorAndMinusInfinityOffItsSupport() {
        // reference: the posterior typed above (Bailer-Jones 2015, PASP 127, 994); the prior is zero for r <= 0
        for (double r : new double[] {0.05, 0.7, 1.0, 3.2}) {
            assertEquals(referenceLogPosterior(r, 0.8, 0.3, L), ParallaxDistance.logPosterior(r, 0.8, 0.3, L), 1e-12, "r=" + r);
        }
        assertEquals(Double.NEGATIVE_INFINITY, ParallaxDistance.logPosterior(-0.5, 0.8, 0.3, L));
        assertEquals(Double.NEGATIVE_INFINITY, ParallaxDistance.logPosterior(0.0, 0.8, 0.3, L));
    }

    @Test
    void noModeWithoutAPositiveErrorAndLengthScaleOrWithNonFiniteInputs() {
        // out-of-domain policy of ParallaxDistance (stated in its Javadoc): NaN, never 0 or a number
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(1, 0, L)), "sigma 0");
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(1, -0.1, L)), "sigma < 0");
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(1, 0.1, 0)), "L 0");
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(1, 0.1, -1)), "L < 0");
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(Double.NaN, 0.1, L)), "parallax NaN");
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(Double.POSITIVE_INFINITY, 0.1, L)), "parallax infinite");
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(1, Double.POSITIVE_INFINITY, L)), "sigma infinite");
        assertTrue(Double.isNaN(ParallaxDistance.edsdModeKpc(1, Double.NaN, L)), "sigma NaN");
    }

    /**
     * Root of the Bailer-Jones 2015 cubic near 1/w for a very significant parallax, by Commons Math's Brent solver on
     * the cubic typed here, bracketed at [0.5/w, 2/w] (one sign change: the cubic is dominated by (w r - 1)/s^2 there).
     */
    private static double brentRoot(double w, double s, double lengthKpc) {
        return brentRoot(w, s, lengthKpc, 0.5 / w, 2 / w);
    }

    /**
     * Root of the Bailer-Jones 2015 cubic typed here, by Commons Math's Brent solver on a bracket where the cubic
     * changes sign once, to a relative accuracy of about one unit in the last place.
     */
    static double brentRoot(double w, double s, double lengthKpc, double loKpc, double hiKpc) {
        UnivariateFunction cubic = r -> ((r / lengthKpc - 2) * r + w / (s * s)) * r - 1 / (s * s);
        return new BrentSolver(1e-16, 1e-300, 1e-300).solve(10000, cubic, loKpc, hiKpc);
    }

    @Test
    void highSignificanceModesAreAccurateToMachinePrecision() {
        // reference: Brent root of the Bailer-Jones 2015 cubic typed above. At w/s of 10^6-10^8 the closed form loses
        // digits to cancellation (its two cube roots nearly cancel); the mode must still be the root to 1e-12
        double[][] cases = {{800, 1e-5}, {300, 1e-5}, {100, 1e-4}, {50, 1e-3}};
        for (double[] c : cases) {
            double ref = brentRoot(c[0], c[1], L);
            assertEquals(ref, ParallaxDistance.edsdModeKpc(c[0], c[1], L), 1e-12 * ref, "w=" + c[0] + " s=" + c[1]);
        }
    }

    @Test
    void samplingTheLastPosteriorGivesItsPercentiles() {
        // reference: numerical integration of the Bailer-Jones 2015 posterior typed in this test
        EdsdPosterior post = EdsdPosterior.standard();
        double[] probs = {0.05, StarDeriver.P16, 0.5, StarDeriver.P84, 0.95};
        double[][] cases = {{1, 0.5}, {0.2, 0.1}, {-0.5, 0.5}, {10, 0.05}};
        for (double[] c : cases) {
            double[] ref = referencePercentiles(c[0], c[1], probs);
            double[] mine = new double[probs.length];
            assertTrue(post.percentilesKpc(c[0], c[1], L, probs, mine));
            double width = ref[3] - ref[1];
            for (int k = 0; k < probs.length; k++) {
                assertEquals(ref[k], mine[k], 2e-3 * width, "percentile w=" + c[0] + " s=" + c[1] + " p=" + probs[k]);
                assertEquals(ref[k], post.quantileOfLast(probs[k]), 2e-3 * width, "sample w=" + c[0] + " s=" + c[1] + " p=" + probs[k]);
            }
        }
    }

    @Test
    void aSinglePercentileIsWrittenIntoAFreshArray() {
        // reference: numerical integration of the Bailer-Jones 2015 posterior typed in this test
        double ref = referencePercentiles(1, 0.3, new double[] {0.5})[0];
        double[] out = new double[1];
        assertTrue(EdsdPosterior.standard().percentilesKpc(1, 0.3, L, new double[] {0.5}, out));
        assertEquals(ref, out[0], 1e-3 * ref);
    }

    @Test
    void afterAStarWithoutPosteriorNothingIsSampled() {
        // the "never sample another star's grid" rule of EdsdPosterior: a failed call leaves nothing to sample
        EdsdPosterior post = EdsdPosterior.standard();
        assertTrue(Double.isNaN(post.quantileOfLast(0.5)), "no call yet");
        assertTrue(post.percentilesKpc(1, 0.1, L, new double[] {0.5}, new double[1]));
        assertTrue(post.quantileOfLast(0.5) > 0);
        assertFalse(post.percentilesKpc(1, 0, L, new double[] {0.5}, new double[1]));
        assertTrue(Double.isNaN(post.quantileOfLast(0.5)), "after sigma = 0");
    }

    @Test
    void theGridNeedsAtLeastEightIntervals() {
        // EdsdPosterior's stated minimum grid (8 intervals); 7 is refused with a message naming the rule
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> new EdsdPosterior(7));
        assertTrue(e.getMessage().contains("7 intervals (must be >= 8)"), e.getMessage());
        double[] out = new double[1];
        // 8 intervals still give a posterior median, to the accuracy of such a coarse grid (reference: numerical
        // integration of the Bailer-Jones 2015 posterior typed in this test)
        double ref = referencePercentiles(1, 0.1, new double[] {0.5})[0];
        assertTrue(new EdsdPosterior(8).percentilesKpc(1, 0.1, L, new double[] {0.5}, out));
        assertEquals(ref, out[0], 0.01 * ref);
    }
}
