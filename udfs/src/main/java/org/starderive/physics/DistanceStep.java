package org.starderive.physics;

import static org.starderive.physics.QualityFlag.*;

/**
 * The distance step of {@link StarDeriver}: the zero-point-corrected parallax checked and turned into a distance
 * with a 68 % interval by the configured method ({@link ParallaxDistance}: the inverse parallax where ϖ/σ is high
 * enough; the mode of the posterior under the exponentially decreasing space density prior of Bailer-Jones 2015,
 * PASP 127, 994, with a Laplace approximation of its width, or that posterior's 16th/50th/84th percentiles by
 * {@link EdsdPosterior}), then the distance modulus μ = 5 log10(d / 10 pc) and the absolute magnitudes
 * M = m₀ − μ. Flags a missing, invalid, implausible, non-positive or insignificant parallax, and a distance withheld
 * below the configured ϖ/σ.
 */
final class DistanceStep {
    private static final double LN10 = Math.log(10);
    private static final double PARALLAX_ERR_MAX_MAS = 1e5;
    /** Below a nano-arcsecond an error is not a measurement (its square underflows the posterior). */
    private static final double PARALLAX_ERR_MIN_MAS = 1e-6;

    private final DeriveSettings settings;
    private final StarState s;
    private final EdsdPosterior posterior = EdsdPosterior.standard();
    private final double[] probs = {StarDeriver.P16, 0.5, StarDeriver.P84};
    private final double[] quantiles = new double[3];

    DistanceStep(DeriveSettings settings, StarState s) {
        this.settings = settings;
        this.s = s;
    }

    EdsdPosterior posterior() { return posterior; }

    /** The distance from the parallax into {@code out}; returns the flags raised. */
    long distance(StarInput in, StarResult out) {
        if (!in.hasParallax) {
            return PARALLAX_MISSING.mask();
        }
        double plx = in.parallaxMas;
        double err = in.hasParallaxErr ? in.parallaxErrMas : Double.NaN;
        if (!Double.isFinite(plx) || !(err >= PARALLAX_ERR_MIN_MAS && err <= PARALLAX_ERR_MAX_MAS)) {
            return INPUT_INVALID.mask();
        }
        double p = plx - settings.parallaxZeroPointMas();
        if (Math.abs(p) > settings.parallaxMaxMas()) {
            return PARALLAX_IMPLAUSIBLE.mask();
        }
        long flags = 0;
        out.parallaxCorrMas = p;
        double snr = p / err;
        if (p <= 0) {
            flags |= PARALLAX_NONPOSITIVE.mask();
        }
        if (!(snr >= settings.parallaxSnrMin())) {
            flags |= PARALLAX_LOW_SNR.mask();
        }
        if (settings.distanceSnrMin() > 0 && !(snr >= settings.distanceSnrMin())) {
            return flags | DISTANCE_WITHHELD.mask();
        }
        DeriveSettings.DistanceMethod m = settings.distanceMethod();
        boolean inverse = m == DeriveSettings.DistanceMethod.INVERSE
                || (m == DeriveSettings.DistanceMethod.AUTO && p > 0 && snr >= settings.parallaxSnrMin());
        double lengthKpc = settings.priorLengthKpc();
        if (inverse) {
            double d = ParallaxDistance.inverseParallaxPc(p);
            // a positive ϖ' whose inverse overflows (~1e-320 mas) has no distance, and so no interval either
            if (p > 0 && Double.isFinite(d)) {
                out.distMethod = StarResult.DistanceMethod.INVERSE_PARALLAX;
                out.distPc = d;
                out.distLoPc = ParallaxDistance.inverseParallaxPc(p + err);
                out.distHiPc = ParallaxDistance.inverseParallaxPc(p - err); // NaN when p <= err: no upper bound
            }
        } else if (settings.posteriorPercentiles()) {
            if (posterior.percentilesKpc(p, err, lengthKpc, probs, quantiles)) {
                out.distMethod = StarResult.DistanceMethod.EDSD_MEDIAN;
                out.distLoPc = 1000 * quantiles[0];
                out.distPc = 1000 * quantiles[1];
                out.distHiPc = 1000 * quantiles[2];
            }
        } else {
            double mode = ParallaxDistance.edsdModeKpc(p, err, lengthKpc);
            if (mode > 0) {
                // Laplace approximation at the mode: σ_r = (−d² ln p / dr²)^(−1/2)
                double curv = -2 / (mode * mode)
                        - (1 / Math.pow(mode, 4) - 2 * (p - 1 / mode) / (mode * mode * mode)) / (err * err);
                double sr = curv < 0 ? 1 / Math.sqrt(-curv) : Double.NaN;
                out.distMethod = StarResult.DistanceMethod.EDSD_MODE;
                out.distPc = 1000 * mode;
                out.distLoPc = 1000 * Math.max(mode - sr, 0);
                out.distHiPc = 1000 * (mode + sr);
            }
        }
        return flags;
    }

    /** A Monte Carlo draw: the sampled distance, known exactly within the draw. */
    static void drawn(StarResult out, double distPc) {
        out.distMethod = StarResult.DistanceMethod.INVERSE_PARALLAX;
        out.distPc = distPc;
        out.distLoPc = out.distHiPc = distPc;
    }

    /**
     * μ, its error and the absolute magnitudes with their errors (measurement, distance and extinction added in
     * quadrature) into {@code out} and the state; μ NaN without a distance. Returns whether there is a distance.
     */
    boolean modulus(StarResult out) {
        boolean haveDist = out.distPc > 0 && Double.isFinite(out.distPc);
        if (!haveDist) {
            s.mu = s.sMu = Double.NaN;
            return false;
        }
        double mu = 5 * Math.log10(out.distPc / 10.0);
        double sMu = 5 / LN10 * 0.5 * (out.distHiPc - out.distLoPc) / out.distPc;
        s.mu = mu;
        s.sMu = sMu;
        out.distModulusMag = mu;
        out.distModulusErrMag = sMu;
        for (int b = 0; b < Band.COUNT; b++) {
            if (!Double.isNaN(s.m0[b])) {
                out.absMag[b] = s.m0[b] - mu;
                double r = s.rBand[b] * s.sEbv;
                out.absMagErr[b] = Math.sqrt(s.sm[b] * s.sm[b] + sMu * sMu + r * r);
            }
        }
        return true;
    }
}
