package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.junit.jupiter.api.Test;

/**
 * Percentiles of {@link EdsdPosterior} against an independent reference CDF of the same posterior, typed a second time
 * here from Bailer-Jones 2015 (PASP 127, 994, exponentially decreasing space density prior):
 * p(r | w) ∝ r² e^(−r/L) exp(−(w − 1/r)² / (2 s²)), r and L in kpc, w and s in mas.
 *
 * <p>The reference works in r (not in ln r as the class does): the peak is found by Commons Math's
 * {@link BrentOptimizer}, the density is cut into pieces from the peak outwards (half a Laplace width wide near the
 * peak, widening into the tails) until it has fallen e^-60, each piece is integrated by Commons Math's {@link IterativeLegendreGaussIntegrator} and each percentile
 * is the root of that CDF by Commons Math's {@link BrentSolver}. Nothing of EdsdPosterior or ParallaxDistance is used.
 */
class EdsdPercentileReferenceTest {
    private static final double L = DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT;

    /** From far into the lower tail to far into the upper tail, with the median and the central 68 % interval. */
    private static final double[] PROBS = {1e-6, 0.001, StarDeriver.P16, 0.5, StarDeriver.P84, 0.999, 0.999999};
    /**
     * Tolerance for each of {@link #PROBS} on the standard grid, as a share of the posterior's width in ln r
     * (ln(r84 / r16) of the reference): about three times the largest error measured against the reference over
     * the cases below (4.5e-3, 2.5e-3, 7.6e-4, 1.6e-4, 7.7e-4, 3.7e-3, 8.2e-3). The grid's error grows into the
     * tails, where the density is spread over few intervals.
     */
    private static final double[] WIDTH_TOLERANCE = {1.5e-2, 8e-3, 2.5e-3, 5e-4, 2.5e-3, 1.2e-2, 2.5e-2};

    @Test
    void percentilesFromTailToTailAgreeWithTheReferenceCdf() {
        // reference: the Bailer-Jones 2015 posterior typed above, integrated by Commons Math (class comment)
        double[][] cases = {
            {1, 0.1, L}, {1, 0.5, L}, {0.2, 0.1, L}, {0, 0.3, L}, {-0.5, 0.5, L}, {10, 0.05, L}, {0.05, 1, L},
            {0, 1e4, L}, // no information: the prior alone
            {0.1, 0.001, L}, // a distant star with a 1 % parallax: the likelihood sets a narrow posterior far out
            // a negative parallax measured very precisely (no real star): a narrow peak where prior and likelihood
            // balance, r ≈ sqrt(|w| L) / s ≈ 2 Mpc, its width set by the prior's curvature there
            {-3, 0.001, L},
            {3.333, 1.361, L}, // near the cusp where the cubic's three roots merge: flat-topped posterior
            {4.9, 1.784, L}, {4.0, 1.5745, L}, // three positive roots of the cubic: two maxima
            {1, 0.3, 100}, {0, 1, 100}, {0, 1, 1e4}, {1, 0.3, 0.01}, // length scales far from the default
        };
        EdsdPosterior post = EdsdPosterior.standard();
        double[] mine = new double[PROBS.length];
        for (double[] c : cases) {
            ReferenceCdf ref = new ReferenceCdf(c[0], c[1], c[2]);
            assertTrue(post.percentilesKpc(c[0], c[1], c[2], PROBS, mine));
            double widthLn = Math.log(ref.quantile(StarDeriver.P84) / ref.quantile(StarDeriver.P16));
            for (int k = 0; k < PROBS.length; k++) {
                double expected = ref.quantile(PROBS[k]);
                double tol = WIDTH_TOLERANCE[k] * widthLn;
                String what = "w=" + c[0] + " s=" + c[1] + " L=" + c[2] + " p=" + PROBS[k];
                assertEquals(0, Math.log(mine[k] / expected), tol, what);
                assertEquals(0, Math.log(post.quantileOfLast(PROBS[k]) / expected), tol, what + " (sample)");
            }
        }
    }

    @Test
    void theQuantileKeepsRisingDeepIntoTheLowerTail() {
        // a posterior with a positive density on r > 0 has a strictly increasing quantile function (common
        // practice), down to probabilities inside the grid's first interval: there the class solves its quadratic
        // from the interval's start (the first interval holds 1e-8 to 6e-4 of these posteriors on 8 intervals,
        // about 3e-11 on 128 for the first two)
        double[] probs = new double[12];
        for (int k = 0; k < probs.length; k++) {
            probs[k] = Math.pow(10, k - 14.0);
        }
        for (int intervals : new int[] {8, 128}) {
            EdsdPosterior post = new EdsdPosterior(intervals);
            for (double[] c : new double[][] {{1, 0.1}, {0, 1e4}, {-0.5, 0.5}}) {
                double[] q = new double[probs.length];
                assertTrue(post.percentilesKpc(c[0], c[1], L, probs, q));
                for (int k = 1; k < probs.length; k++) {
                    String what = intervals + " intervals, w=" + c[0] + " s=" + c[1] + " p=" + probs[k];
                    assertTrue(q[k] > q[k - 1], what + ": " + q[k - 1] + " then " + q[k]);
                    assertTrue(post.quantileOfLast(probs[k]) > post.quantileOfLast(probs[k - 1]), what + " (sample)");
                }
            }
        }
    }

    @Test
    void aParallaxBeyondDoublePrecisionGivesEitherThePosteriorOrFalseWithNaN() {
        // w/s = 1e17: the posterior is a spike at r = 1/w = 1 kpc, narrower than a double resolves around 1. The
        // Javadoc's contract: true with the percentiles (1/w, here to 1e-8: the point is where they lie, not the
        // spike's width), or false with NaN written and nothing left to sample
        EdsdPosterior post = EdsdPosterior.standard();
        double[] probs = {StarDeriver.P16, 0.5, StarDeriver.P84};
        double[] q = {-1, -1, -1};
        assertTrue(post.percentilesKpc(1, 0.1, L, probs, new double[3]));
        boolean ok = post.percentilesKpc(1, 1e-17, L, probs, q);
        for (int k = 0; k < probs.length; k++) {
            if (ok) {
                assertEquals(1.0, q[k], 1e-8, "p=" + probs[k]);
                assertEquals(1.0, post.quantileOfLast(probs[k]), 1e-8, "sample p=" + probs[k]);
            } else {
                assertTrue(Double.isNaN(q[k]), "false comes with NaN, p=" + probs[k] + ": " + q[k]);
                assertTrue(Double.isNaN(post.quantileOfLast(probs[k])), "nothing sampled after false");
            }
        }
    }

    /** The posterior's logarithm as published (Bailer-Jones 2015), unnormalised; -inf off its support r > 0. */
    static double logPosterior(double r, double w, double s, double lengthKpc) {
        if (!(r > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        double misfit = (w - 1 / r) / s;
        return 2 * Math.log(r) - r / lengthKpc - misfit * misfit / 2;
    }

    /** Reference CDF of the posterior: piece edges in kpc and the normalised cumulative probability at each. */
    static final class ReferenceCdf {
        private final double w;
        private final double s;
        private final double lengthKpc;
        private final double peakLog;
        private final double[] edges;
        private final double[] cum;
        private final double norm;
        private final IterativeLegendreGaussIntegrator integrator;

        ReferenceCdf(double w, double s, double lengthKpc) {
            this.w = w;
            this.s = s;
            this.lengthKpc = lengthKpc;
            // the peak: coarse scan of ln r over 1e-8 .. 1e4 L, then Brent's optimiser between the neighbours
            double best = Double.NaN;
            double bestLog = Double.NEGATIVE_INFINITY;
            int n = 4000;
            double lo = Math.log(1e-8 * lengthKpc);
            double hi = Math.log(1e4 * lengthKpc);
            for (int i = 0; i <= n; i++) {
                double lp = logPosterior(Math.exp(lo + (hi - lo) * i / n), w, s, lengthKpc);
                if (lp > bestLog) {
                    bestLog = lp;
                    best = lo + (hi - lo) * i / n;
                }
            }
            double step = (hi - lo) / n;
            double uPeak = new BrentOptimizer(1e-15, 1e-300).optimize(new MaxEval(10_000), GoalType.MAXIMIZE,
                    new UnivariateObjectiveFunction(u -> logPosterior(Math.exp(u), w, s, lengthKpc)),
                    new SearchInterval(best - step, best + step, best)).getPoint();
            double peak = Math.exp(uPeak);
            peakLog = logPosterior(peak, w, s, lengthKpc);
            // Laplace width from a central second difference of the log density
            double dr = 1e-4 * peak;
            double second = (logPosterior(peak + dr, w, s, lengthKpc) - 2 * peakLog
                    + logPosterior(peak - dr, w, s, lengthKpc)) / (dr * dr);
            double halfWidth = 0.5 / Math.sqrt(Math.max(-second, 1e-300));
            // the density is scaled to 1 at the peak: 1e-15 of a Laplace width is far below what the grid reaches
            integrator = new IterativeLegendreGaussIntegrator(8, 1e-11, 1e-15 * halfWidth);
            java.util.ArrayList<Double> below = new java.util.ArrayList<>();
            double r = peak;
            while (r > 0 && logPosterior(r, w, s, lengthKpc) > peakLog - 60) {
                r -= Math.max(halfWidth, 0.25 * (peak - r)); // pieces widen into the tails
                below.add(Math.max(r, 0));
            }
            java.util.ArrayList<Double> above = new java.util.ArrayList<>();
            r = peak;
            do {
                r += Math.max(halfWidth, 0.25 * (r - peak));
                above.add(r);
            } while (logPosterior(r, w, s, lengthKpc) > peakLog - 60);
            edges = new double[below.size() + 1 + above.size()];
            int k = 0;
            for (int i = below.size() - 1; i >= 0; i--) {
                edges[k++] = below.get(i);
            }
            edges[k++] = peak;
            for (double a : above) {
                edges[k++] = a;
            }
            cum = new double[edges.length];
            for (int i = 1; i < edges.length; i++) {
                cum[i] = cum[i - 1] + integrate(edges[i - 1], edges[i]);
            }
            norm = cum[cum.length - 1];
            for (int i = 0; i < cum.length; i++) {
                cum[i] /= norm;
            }
        }

        private double integrate(double a, double b) {
            UnivariateFunction density = r -> Math.exp(logPosterior(r, w, s, lengthKpc) - peakLog);
            return a == b ? 0 : integrator.integrate(10_000_000, density, a, b);
        }

        /** The distance in kpc where the reference CDF reaches p. */
        double quantile(double p) {
            int i = 1;
            while (i < cum.length - 1 && cum[i] < p) {
                i++;
            }
            double a = edges[i - 1];
            double start = cum[i - 1];
            UnivariateFunction f = r -> start + integrate(a, r) / norm - p;
            return new BrentSolver(1e-14 * edges[i]).solve(10_000, f, a, edges[i]);
        }
    }
}
