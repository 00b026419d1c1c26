package org.starderive.physics;

import java.io.Serializable;
import java.util.List;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;

/**
 * Everything a {@link StarDeriver} needs besides the star: thresholds, relation choices, defaults. Immutable and
 * validated when built: a bad value throws {@link IllegalArgumentException} naming the setting, the value and the
 * rule (configuration errors stop a job at start-up; they never reach a row).
 */
public final class DeriveSettings implements Serializable {
    private static final long serialVersionUID = 1L;

    /** How the distance is obtained from the parallax. */
    public enum DistanceMethod {
        /** Inverse parallax when ϖ/σ ≥ the threshold and ϖ &gt; 0, otherwise the prior-based posterior. */
        AUTO,
        /** Always the inverse parallax (no distance for ϖ ≤ 0). */
        INVERSE,
        /** Always the posterior under the exponentially decreasing space density prior. */
        EDSD
    }

    public static final double PARALLAX_ZERO_POINT_MAS_DEFAULT = 0.0;
    public static final double PARALLAX_SNR_MIN_DEFAULT = 5.0;
    /**
     * ϖ/σ_ϖ below which no distance is given at all: by default, distances only where the parallax decides them (our
     * choice, from the recovery of the synthetic survey — below 5 the 68 % posterior intervals under one geometric
     * prior covered the truth in 29–51 % of stars at ϖ/σ 1–4, and at 4–5 in 67 % overall but 75 % of FGK stars and
     * giants; docs/uncertainties.md). Lower it to use the posterior (0: every star with a parallax).
     */
    public static final double DISTANCE_SNR_MIN_DEFAULT = 5.0;
    /** Largest stellar parallax known is Proxima Cen's, 768 mas (common practice: anything above 800 mas is a unit error). */
    public static final double PARALLAX_MAX_MAS_DEFAULT = 800.0;
    public static final DistanceMethod DISTANCE_METHOD_DEFAULT = DistanceMethod.AUTO;
    /** Length scale of the exponentially decreasing space density prior, kpc (the value used by Bailer-Jones and co-workers, from memory). */
    public static final double PRIOR_LENGTH_KPC_DEFAULT = 1.35;
    /** Largest prior length scale accepted, kpc (our choice: several times the Galactic disc's radius). */
    public static final double PRIOR_LENGTH_KPC_MAX = 100.0;
    public static final boolean POSTERIOR_PERCENTILES_DEFAULT = true;
    public static final double RV_DEFAULT = 3.1;
    public static final double EBV_DEFAULT = 0.0;
    public static final double EBV_ERR_DEFAULT = 0.0;
    public static final double FEH_DEFAULT = 0.0;
    /** Spread of [Fe/H] in the solar neighbourhood, used as the error of an assumed metallicity (common practice). */
    public static final double FEH_ERR_DEFAULT = 0.2;
    public static final boolean ALLOW_EXTRAPOLATION_DEFAULT = false;
    public static final double TEFF_DISAGREE_P_DEFAULT = 0.01;
    public static final double DIAMETER_DISAGREE_SIGMA_DEFAULT = 3.0;
    /** Red-clump / giant-branch surface gravity used for the log g term of the Gaia relations for evolved stars (common practice). */
    public static final double GIANT_LOGG_PRIOR_DEFAULT = 2.5;
    public static final double GIANT_LOGG_PRIOR_ERR_DEFAULT = 0.5;
    /**
     * A hot-regime Teff whose 1σ error exceeds this fraction of Teff is flagged {@code HOT_TEFF_UNCERTAIN} (our choice:
     * 10 %, where a B star's L from BC_V is already uncertain by a factor of about two).
     */
    public static final double HOT_TEFF_ERR_FRAC_MAX_DEFAULT = 0.10;
    /** Plausible magnitudes; anything outside is a sentinel (common practice). */
    public static final double MAG_MIN_DEFAULT = -5.0;
    public static final double MAG_MAX_DEFAULT = 35.0;

    private static final int MAX_DOF = 24;

    private final double parallaxZeroPointMas;
    private final double parallaxSnrMin;
    private final double distanceSnrMin;
    private final double parallaxMaxMas;
    private final DistanceMethod distanceMethod;
    private final double priorLengthKpc;
    private final boolean posteriorPercentiles;
    private final double rv;
    private final double ebvDefault;
    private final double ebvErrDefault;
    private final double fehDefault;
    private final double fehErrDefault;
    private final boolean allowExtrapolation;
    private final double teffDisagreeP;
    private final double diameterDisagreeSigma;
    private final double giantLoggPrior;
    private final double giantLoggPriorErr;
    private final double magMin;
    private final double magMax;
    private final long relationMask;
    private final double hotTeffErrFracMax;
    private final double[] chi2Critical;

    private DeriveSettings(Builder b) {
        this.parallaxZeroPointMas = requireFinite("parallax zero point", b.parallaxZeroPointMas, "mas");
        this.parallaxSnrMin = requirePositive("parallax SNR threshold", b.parallaxSnrMin, "");
        if (!(b.distanceSnrMin >= 0 && b.distanceSnrMin <= 1000)) {
            throw new IllegalArgumentException("Invalid distance SNR minimum: " + b.distanceSnrMin + " (must be between 0 and 1000)");
        }
        this.distanceSnrMin = b.distanceSnrMin;
        this.parallaxMaxMas = requirePositive("largest plausible parallax", b.parallaxMaxMas, "mas");
        if (b.distanceMethod == null) {
            throw new IllegalArgumentException("Invalid distance method: null (must be one of auto, inverse, edsd)");
        }
        this.distanceMethod = b.distanceMethod;
        // the prior describes stars of the Galaxy; beyond 100 kpc (several times the disc's radius) it is no longer a
        // space density of stars, and from ~3e4 kpc the posterior mode's two Newton polishing steps (ParallaxDistance)
        // no longer reach full precision (EdsdModeReferenceTest measures 1e-13 up to 1e4 kpc)
        if (!(b.priorLengthKpc > 0 && b.priorLengthKpc <= PRIOR_LENGTH_KPC_MAX)) {
            throw new IllegalArgumentException("Invalid prior length scale: " + b.priorLengthKpc + " kpc (must be > 0 and <= "
                    + PRIOR_LENGTH_KPC_MAX + ")");
        }
        this.priorLengthKpc = b.priorLengthKpc;
        this.posteriorPercentiles = b.posteriorPercentiles;
        this.rv = requirePositive("R_V", b.rv, "");
        this.ebvDefault = requireNonNegative("default E(B-V)", b.ebvDefault, "mag");
        this.ebvErrDefault = requireNonNegative("default E(B-V) error", b.ebvErrDefault, "mag");
        if (!(b.fehDefault >= -5 && b.fehDefault <= 1)) {
            throw new IllegalArgumentException("Invalid default [Fe/H]: " + b.fehDefault + " dex (must be between -5 and 1)");
        }
        this.fehDefault = b.fehDefault;
        this.fehErrDefault = requireNonNegative("default [Fe/H] error", b.fehErrDefault, "dex");
        this.allowExtrapolation = b.allowExtrapolation;
        if (!(b.teffDisagreeP > 0 && b.teffDisagreeP < 1)) {
            throw new IllegalArgumentException("Invalid Teff disagreement p-value: " + b.teffDisagreeP + " (must be in (0, 1))");
        }
        this.teffDisagreeP = b.teffDisagreeP;
        this.diameterDisagreeSigma = requirePositive("diameter disagreement threshold", b.diameterDisagreeSigma, "sigma");
        if (!(b.giantLoggPrior >= 0 && b.giantLoggPrior <= 5)) {
            throw new IllegalArgumentException("Invalid giant log g prior: " + b.giantLoggPrior + " (must be between 0 and 5)");
        }
        this.giantLoggPrior = b.giantLoggPrior;
        this.giantLoggPriorErr = requireNonNegative("giant log g prior error", b.giantLoggPriorErr, "dex");
        requireFinite("faintest plausible magnitude", b.magMax, "mag");
        requireFinite("brightest plausible magnitude", b.magMin, "mag");
        if (!(b.magMin < b.magMax)) {
            throw new IllegalArgumentException("Invalid plausible magnitude range: " + b.magMin + " to " + b.magMax + " (minimum must be below maximum)");
        }
        this.magMin = b.magMin;
        this.magMax = b.magMax;
        if (b.relationMask == 0) {
            throw new IllegalArgumentException("Invalid relation selection: none enabled (at least one colour-Teff relation is needed)");
        }
        this.relationMask = b.relationMask;
        if (!(b.hotTeffErrFracMax > 0 && b.hotTeffErrFracMax <= 1)) {
            throw new IllegalArgumentException("Invalid hot-star Teff error fraction: " + b.hotTeffErrFracMax + " (must be in (0, 1])");
        }
        this.hotTeffErrFracMax = b.hotTeffErrFracMax;
        this.chi2Critical = new double[MAX_DOF + 1];
        for (int k = 1; k <= MAX_DOF; k++) {
            chi2Critical[k] = new ChiSquaredDistribution(null, k).inverseCumulativeProbability(1 - teffDisagreeP);
        }
    }

    private static double requireFinite(String what, double v, String unit) {
        if (Double.isFinite(v)) {
            return v;
        }
        throw new IllegalArgumentException("Invalid " + what + ": " + v + (unit.isEmpty() ? "" : " " + unit) + " (must be finite)");
    }

    private static double requirePositive(String what, double v, String unit) {
        if (v > 0 && Double.isFinite(v)) {
            return v;
        }
        throw new IllegalArgumentException("Invalid " + what + ": " + v + (unit.isEmpty() ? "" : " " + unit) + " (must be finite and > 0)");
    }

    private static double requireNonNegative(String what, double v, String unit) {
        if (v >= 0 && Double.isFinite(v)) {
            return v;
        }
        throw new IllegalArgumentException("Invalid " + what + ": " + v + (unit.isEmpty() ? "" : " " + unit) + " (must be finite and >= 0)");
    }

    public static DeriveSettings defaults() { return builder().build(); }

    public static Builder builder() { return new Builder(); }

    public Builder toBuilder() {
        Builder b = new Builder();
        b.parallaxZeroPointMas = parallaxZeroPointMas;
        b.parallaxSnrMin = parallaxSnrMin;
        b.distanceSnrMin = distanceSnrMin;
        b.parallaxMaxMas = parallaxMaxMas;
        b.distanceMethod = distanceMethod;
        b.priorLengthKpc = priorLengthKpc;
        b.posteriorPercentiles = posteriorPercentiles;
        b.rv = rv;
        b.ebvDefault = ebvDefault;
        b.ebvErrDefault = ebvErrDefault;
        b.fehDefault = fehDefault;
        b.fehErrDefault = fehErrDefault;
        b.allowExtrapolation = allowExtrapolation;
        b.teffDisagreeP = teffDisagreeP;
        b.diameterDisagreeSigma = diameterDisagreeSigma;
        b.giantLoggPrior = giantLoggPrior;
        b.giantLoggPriorErr = giantLoggPriorErr;
        b.magMin = magMin;
        b.magMax = magMax;
        b.relationMask = relationMask;
        b.hotTeffErrFracMax = hotTeffErrFracMax;
        return b;
    }

    public double parallaxZeroPointMas() { return parallaxZeroPointMas; }
    public double parallaxSnrMin() { return parallaxSnrMin; }
    /** ϖ/σ_ϖ below which no distance is given (0: always one). */
    public double distanceSnrMin() { return distanceSnrMin; }
    public double parallaxMaxMas() { return parallaxMaxMas; }
    public DistanceMethod distanceMethod() { return distanceMethod; }
    public double priorLengthKpc() { return priorLengthKpc; }
    public boolean posteriorPercentiles() { return posteriorPercentiles; }
    public double rv() { return rv; }
    public double ebvDefault() { return ebvDefault; }
    public double ebvErrDefault() { return ebvErrDefault; }
    public double fehDefault() { return fehDefault; }
    public double fehErrDefault() { return fehErrDefault; }
    public boolean allowExtrapolation() { return allowExtrapolation; }
    public double teffDisagreeP() { return teffDisagreeP; }
    public double diameterDisagreeSigma() { return diameterDisagreeSigma; }
    public double giantLoggPrior() { return giantLoggPrior; }
    public double giantLoggPriorErr() { return giantLoggPriorErr; }
    public double magMin() { return magMin; }
    public double magMax() { return magMax; }
    /** Bit i set: relation i of {@link TeffRelations#all()} is enabled. */
    public long relationMask() { return relationMask; }
    /** Largest Teff error, as a fraction of Teff, of a hot-regime star without {@code HOT_TEFF_UNCERTAIN}. */
    public double hotTeffErrFracMax() { return hotTeffErrFracMax; }

    /** Chi-square value above which {@code dof} degrees of freedom reject agreement at the configured p. */
    public double teffDisagreeChi2(int dof) {
        return chi2Critical[Math.min(dof, MAX_DOF)];
    }

    /** Mutable builder; {@link #build()} validates. */
    public static final class Builder {
        private double parallaxZeroPointMas = PARALLAX_ZERO_POINT_MAS_DEFAULT;
        private double parallaxSnrMin = PARALLAX_SNR_MIN_DEFAULT;
        private double distanceSnrMin = DISTANCE_SNR_MIN_DEFAULT;
        private double parallaxMaxMas = PARALLAX_MAX_MAS_DEFAULT;
        private DistanceMethod distanceMethod = DISTANCE_METHOD_DEFAULT;
        private double priorLengthKpc = PRIOR_LENGTH_KPC_DEFAULT;
        private boolean posteriorPercentiles = POSTERIOR_PERCENTILES_DEFAULT;
        private double rv = RV_DEFAULT;
        private double ebvDefault = EBV_DEFAULT;
        private double ebvErrDefault = EBV_ERR_DEFAULT;
        private double fehDefault = FEH_DEFAULT;
        private double fehErrDefault = FEH_ERR_DEFAULT;
        private boolean allowExtrapolation = ALLOW_EXTRAPOLATION_DEFAULT;
        private double teffDisagreeP = TEFF_DISAGREE_P_DEFAULT;
        private double diameterDisagreeSigma = DIAMETER_DISAGREE_SIGMA_DEFAULT;
        private double giantLoggPrior = GIANT_LOGG_PRIOR_DEFAULT;
        private double giantLoggPriorErr = GIANT_LOGG_PRIOR_ERR_DEFAULT;
        private double magMin = MAG_MIN_DEFAULT;
        private double magMax = MAG_MAX_DEFAULT;
        private long relationMask = (1L << TeffRelations.all().size()) - 1;
        private double hotTeffErrFracMax = HOT_TEFF_ERR_FRAC_MAX_DEFAULT;

        private Builder() {}

        public Builder parallaxZeroPointMas(double v) { parallaxZeroPointMas = v; return this; }
        public Builder parallaxSnrMin(double v) { parallaxSnrMin = v; return this; }
        public Builder distanceSnrMin(double v) { distanceSnrMin = v; return this; }
        public Builder parallaxMaxMas(double v) { parallaxMaxMas = v; return this; }
        public Builder distanceMethod(DistanceMethod v) { distanceMethod = v; return this; }
        public Builder priorLengthKpc(double v) { priorLengthKpc = v; return this; }
        public Builder posteriorPercentiles(boolean v) { posteriorPercentiles = v; return this; }
        public Builder rv(double v) { rv = v; return this; }
        public Builder ebvDefault(double v) { ebvDefault = v; return this; }
        public Builder ebvErrDefault(double v) { ebvErrDefault = v; return this; }
        public Builder fehDefault(double v) { fehDefault = v; return this; }
        public Builder fehErrDefault(double v) { fehErrDefault = v; return this; }
        public Builder allowExtrapolation(boolean v) { allowExtrapolation = v; return this; }
        public Builder teffDisagreeP(double v) { teffDisagreeP = v; return this; }
        public Builder diameterDisagreeSigma(double v) { diameterDisagreeSigma = v; return this; }
        public Builder giantLoggPrior(double v) { giantLoggPrior = v; return this; }
        public Builder giantLoggPriorErr(double v) { giantLoggPriorErr = v; return this; }
        public Builder magMin(double v) { magMin = v; return this; }
        public Builder magMax(double v) { magMax = v; return this; }
        public Builder hotTeffErrFracMax(double v) { hotTeffErrFracMax = v; return this; }

        /** Enable only the named relations (ids of {@link TeffRelations}); unknown ids throw. */
        public Builder relations(List<String> ids) {
            long mask = 0;
            for (String id : ids) {
                mask |= 1L << TeffRelations.index(TeffRelations.byId(id));
            }
            relationMask = mask;
            return this;
        }

        public DeriveSettings build() { return new DeriveSettings(this); }
    }
}
