package org.starderive.physics;

/**
 * Percentiles of the distance posterior under the exponentially decreasing space density prior
 * (Bailer-Jones 2015, PASP 127, 994): p(r | ϖ) ∝ r² e^(−r/L) exp(−(ϖ − 1/r)² / (2σ²)).
 *
 * <p>Method: the density is integrated in u = ln r (where it is close to symmetric even at low ϖ/σ). The window
 * starts at the posterior mode ({@link ParallaxDistance#edsdModeKpc}), uses the curvature there as the step, and
 * is stepped outwards until the log density falls {@value #LOG_DROP} below its running maximum. The window is then
 * integrated with the trapezoid rule on {@code intervals} equal steps and each percentile is found by solving the
 * quadratic of the trapezoid's linear density exactly. Deterministic, no allocation per call. One instance holds
 * the work array: not thread-safe, use one per thread.
 */
public final class EdsdPosterior {
    /** Log-density drop that bounds the integration window (e^-20 ≈ 2e-9 of the peak). */
    static final double LOG_DROP = 20.0;
    private static final int MAX_STEPS = 200;

    private final int intervals;
    private final double[] cumulative;
    // the last successful call's grid, for sampling
    private double lastULo;
    private double lastH;
    private double lastMax;
    private double lastTotal;
    private double lastParallax;
    private double lastSigma;
    private double lastLength;
    private boolean lastValid;

    public EdsdPosterior(int intervals) {
        if (!(intervals >= 8)) {
            throw new IllegalArgumentException("Invalid posterior grid: " + intervals + " intervals (must be >= 8)");
        }
        this.intervals = intervals;
        this.cumulative = new double[intervals + 1];
    }

    /** The default grid (128 intervals): see the accuracy test against brute-force integration. */
    public static EdsdPosterior standard() { return new EdsdPosterior(128); }

    private static double logDensityU(double u, double parallaxMas, double sigmaMas, double lengthKpc) {
        double r = Math.exp(u);
        double d = parallaxMas - 1.0 / r;
        return 3 * u - r / lengthKpc - d * d / (2 * sigmaMas * sigmaMas);
    }

    /**
     * Writes the distances in kpc at cumulative probabilities {@code probs} (ascending, each in (0,1)) to
     * {@code outKpc}. Returns false (and writes NaN) when the inputs have no posterior: σ ≤ 0 or non-finite values;
     * also when the posterior is narrower than doubles resolve near its mode (ϖ/σ above ~1e16, or a prior length far
     * below a parsec), where the grid misses the spike. Between ϖ/σ ~1e10 and 1e16 the 1e-7 floor on the step in ln r
     * makes the percentiles coarser than the posterior, by under 1e-8 relative. Measured parallaxes stay far from both.
     */
    public boolean percentilesKpc(double parallaxMas, double sigmaMas, double lengthKpc, double[] probs, double[] outKpc) {
        lastValid = false; // never sample another star's grid
        double mode = ParallaxDistance.edsdModeKpc(parallaxMas, sigmaMas, lengthKpc);
        if (!(mode > 0) || !Double.isFinite(mode)) {
            java.util.Arrays.fill(outKpc, 0, probs.length, Double.NaN);
            return false;
        }
        double u0 = Math.log(mode);
        double curv = -mode / lengthKpc + (parallaxMas / mode - 2 / (mode * mode)) / (sigmaMas * sigmaMas);
        double step = curv < 0 ? 1.0 / Math.sqrt(-curv) : 0.5;
        step = Math.max(1e-7, Math.min(step, 1.0));

        double ref = logDensityU(u0, parallaxMas, sigmaMas, lengthKpc);
        double max = ref;
        double uLo = u0;
        for (int i = 0; i < MAX_STEPS; i++) {
            uLo -= step;
            double v = logDensityU(uLo, parallaxMas, sigmaMas, lengthKpc);
            if (v > max) {
                max = v;
            }
            if (v < max - LOG_DROP) {
                break;
            }
        }
        double uHi = u0;
        for (int i = 0; i < MAX_STEPS; i++) {
            uHi += step;
            double v = logDensityU(uHi, parallaxMas, sigmaMas, lengthKpc);
            if (v > max) {
                max = v;
            }
            if (v < max - LOG_DROP) {
                break;
            }
        }

        double h = (uHi - uLo) / intervals;
        double ratio = Math.exp(h);
        double r = Math.exp(uLo);
        double inv2s2 = 1.0 / (2 * sigmaMas * sigmaMas);
        double u = uLo;
        double prevW = 0;
        double total = 0;
        cumulative[0] = 0;
        for (int i = 0; i <= intervals; i++) {
            double d = parallaxMas - 1.0 / r;
            double lq = 3 * u - r / lengthKpc - d * d * inv2s2;
            double w = Math.exp(lq - max);
            if (i > 0) {
                total += 0.5 * (prevW + w) * h;
                cumulative[i] = total;
            }
            prevW = w;
            r *= ratio;
            u += h;
        }
        if (!(total > 0) || !Double.isFinite(total)) {
            java.util.Arrays.fill(outKpc, 0, probs.length, Double.NaN);
            lastValid = false;
            return false;
        }
        lastULo = uLo;
        lastH = h;
        lastMax = max;
        lastTotal = total;
        lastParallax = parallaxMas;
        lastSigma = sigmaMas;
        lastLength = lengthKpc;
        lastValid = true;
        int i = 0;
        for (int k = 0; k < probs.length; k++) {
            double target = probs[k] * total;
            while (i < intervals - 1 && cumulative[i + 1] < target) {
                i++;
            }
            outKpc[k] = invert(i, target);
        }
        return true;
    }

    /**
     * The distance in kpc inside interval {@code i} of the last grid where the cumulative integral reaches
     * {@code target}: the trapezoid's density is linear there, so its integral is a quadratic, solved exactly.
     */
    private double invert(int i, double target) {
        double ua = lastULo + i * lastH;
        double wa = Math.exp(logDensityU(ua, lastParallax, lastSigma, lastLength) - lastMax);
        double wb = Math.exp(logDensityU(ua + lastH, lastParallax, lastSigma, lastLength) - lastMax);
        double rem = Math.max(0, target - cumulative[i]);
        double slope = (wb - wa) / (2 * lastH);
        double disc = wa * wa + 4 * slope * rem;
        double t = disc > 0 ? 2 * rem / (wa + Math.sqrt(disc)) : lastH;
        return Math.exp(ua + Math.max(0, Math.min(lastH, t)));
    }

    /**
     * The distance in kpc at cumulative probability {@code p} of the posterior of the last successful
     * {@link #percentilesKpc} call (inverse-transform sampling with a uniform {@code p}); NaN if there is none.
     */
    public double quantileOfLast(double p) {
        if (!lastValid) {
            return Double.NaN;
        }
        double target = p * lastTotal;
        int lo = 0;
        int hi = intervals;
        while (hi - lo > 1) {
            int mid = (lo + hi) >>> 1;
            if (cumulative[mid] < target) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        return invert(lo, target);
    }
}
