package org.starderive.physics;

/**
 * Distance from parallax.
 * <ul>
 *   <li>Zero-point correction ϖ' = ϖ − Z (Z configurable; the bias of space astrometry depends on magnitude, colour
 *       and position: Lindegren et al. 2021, A&amp;A 649, A4).</li>
 *   <li>Inverse parallax d = 1/ϖ, trustworthy only at small fractional error (Bailer-Jones 2015, PASP 127, 994;
 *       Luri et al. 2018, A&amp;A 616, A9). Its 16th/84th percentiles are 1/(ϖ ± σ) for a Gaussian parallax.
 *       Zero and negative parallaxes have no inverse distance: NaN.</li>
 *   <li>The mode of the posterior under the exponentially decreasing space density prior of Bailer-Jones 2015,
 *       P(r) = r² e^(−r/L) / (2L³), r &gt; 0, with a Gaussian likelihood: the positive real root of
 *       r³/L − 2r² + (ϖ/σ²) r − 1/σ² = 0 (r in kpc, ϖ and σ in mas, L in kpc) that maximises the posterior.
 *       Defined for every finite ϖ, including zero and negative values.</li>
 * </ul>
 * Percentiles of that posterior: {@link EdsdPosterior}.
 */
public final class ParallaxDistance {
    private ParallaxDistance() {}

    public static final String CITATION = "Bailer-Jones 2015, PASP 127, 994 (exponentially decreasing space density prior)";

    /** 1/ϖ in pc for ϖ in mas; NaN for ϖ ≤ 0 or NaN. */
    public static double inverseParallaxPc(double parallaxMas) {
        return parallaxMas > 0 ? 1000.0 / parallaxMas : Double.NaN;
    }

    /** Unnormalised log posterior in r (kpc). */
    static double logPosterior(double rKpc, double parallaxMas, double sigmaMas, double lengthKpc) {
        if (!(rKpc > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        double d = parallaxMas - 1.0 / rKpc;
        return 2 * Math.log(rKpc) - rKpc / lengthKpc - d * d / (2 * sigmaMas * sigmaMas);
    }

    /**
     * Mode of the posterior in kpc. NaN when σ is not positive or an input is not finite.
     */
    public static double edsdModeKpc(double parallaxMas, double sigmaMas, double lengthKpc) {
        if (!(sigmaMas > 0 && lengthKpc > 0) || !Double.isFinite(parallaxMas) || !Double.isFinite(sigmaMas)) {
            return Double.NaN;
        }
        double s2 = sigmaMas * sigmaMas;
        // r^3 + a r^2 + b r + c = 0 after multiplying by L
        double a = -2 * lengthKpc;
        double b = parallaxMas * lengthKpc / s2;
        double c = -lengthKpc / s2;
        double p = b - a * a / 3;
        double q = 2 * a * a * a / 27 - a * b / 3 + c;
        double shift = -a / 3;
        double disc = q * q / 4 + p * p * p / 27;
        double best = Double.NaN;
        double bestLp = Double.NEGATIVE_INFINITY;
        if (disc > 0) {
            double sq = Math.sqrt(disc);
            double t = Math.cbrt(-q / 2 + sq) + Math.cbrt(-q / 2 - sq);
            double r = polish(t + shift, a, b, c);
            if (r > 0) {
                best = r;
            }
        } else {
            double m = 2 * Math.sqrt(-p / 3);
            double arg = p == 0 ? 0 : 3 * q / (p * m);
            arg = Math.max(-1, Math.min(1, arg));
            double phi = Math.acos(arg) / 3;
            for (int k = 0; k < 3; k++) {
                double r = polish(m * Math.cos(phi - 2 * Math.PI * k / 3) + shift, a, b, c);
                if (r > 0) {
                    double lp = logPosterior(r, parallaxMas, sigmaMas, lengthKpc);
                    if (lp > bestLp) {
                        bestLp = lp;
                        best = r;
                    }
                }
            }
        }
        return best;
    }

    /** Two Newton steps on the cubic to remove cancellation error of the closed form. */
    private static double polish(double r, double a, double b, double c) {
        for (int i = 0; i < 2; i++) {
            double f = ((r + a) * r + b) * r + c;
            double df = (3 * r + 2 * a) * r + b;
            if (df == 0 || !Double.isFinite(df)) {
                break;
            }
            double next = r - f / df;
            if (!Double.isFinite(next)) {
                break;
            }
            r = next;
        }
        return r;
    }
}
