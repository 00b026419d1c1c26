package org.starderive.physics;

/**
 * Main-sequence mass–luminosity relation of Eker et al. 2018, MNRAS 479, 5491, Table 4, a broken power law
 * log L/L⊙ = α log M/M⊙ + β over six mass segments from 0.179 to 31 M⊙ (main-sequence stars only):
 * <pre>
 *   0.179–0.45  α 2.028  β −0.976      2.40–7.0  α 3.967  β 0.093
 *   0.45–0.72   α 4.572  β −0.102      7.0–31    α 2.865  β 1.105
 *   0.72–1.05   α 5.743  β −0.007
 *   1.05–2.40   α 4.329  β 0.010
 * </pre>
 * Where the published segments do not join in luminosity (an overlap of the two segments' log L ranges, or a gap
 * between them), the inverse {@link #massMsun} is made continuous and monotone: in a gap it returns the break mass;
 * in an overlap it blends the two segments' masses linearly in log L across the overlap. Outside 0.179–31 M⊙ (in
 * luminosity) there is no mass.
 * <b>Scatter.</b> We could not confirm a published scatter for these six segments (Table 4 as we have it gives only α
 * and β). The mass error therefore carries a scatter of our own choice, {@link #LOGL_SCATTER_DEX} = 0.05 dex in
 * log L at fixed mass (about 3 % in mass on the 0.72–1.05 M⊙ segment), so that a mass interval is not narrower than
 * the spread of real main-sequence stars (age, rotation, metallicity) about any single relation. Replace it when the
 * paper's own figure is at hand.
 */
public final class MassLuminosityEker2018 {
    private MassLuminosityEker2018() {}

    public static final String CITATION = "Eker et al. 2018, MNRAS 479, 5491, Table 4";

    static final double[] M_LO = {0.179, 0.45, 0.72, 1.05, 2.40, 7.0};
    static final double[] M_HI = {0.45, 0.72, 1.05, 2.40, 7.0, 31.0};
    static final double[] ALPHA = {2.028, 4.572, 5.743, 4.329, 3.967, 2.865};
    static final double[] BETA = {-0.976, -0.102, -0.007, 0.010, 0.093, 1.105};
    private static final int N = ALPHA.length;
    private static final double[] LOGL_LO = new double[N];
    private static final double[] LOGL_HI = new double[N];

    static {
        for (int i = 0; i < N; i++) {
            LOGL_LO[i] = ALPHA[i] * Math.log10(M_LO[i]) + BETA[i];
            LOGL_HI[i] = ALPHA[i] * Math.log10(M_HI[i]) + BETA[i];
        }
    }

    public static final double MASS_MIN_MSUN = M_LO[0];
    public static final double MASS_MAX_MSUN = M_HI[N - 1];
    public static final double LOGL_MIN = LOGL_LO[0];
    public static final double LOGL_MAX = LOGL_HI[N - 1];

    /** Spread of log L at fixed mass used as the relation's scatter, dex (our choice; see the class Javadoc). */
    public static final double LOGL_SCATTER_DEX = 0.05;

    /** 1σ scatter of ln M from {@link #LOGL_SCATTER_DEX} at log L: ln10 · σ(log L) · d log M / d log L. */
    public static double lnMassScatter(double logL) {
        return lnMassScatterAtSlope(dLogMassDLogL(logL));
    }

    /** {@link #lnMassScatter} where {@code slope = dLogMassDLogL(logL)} is already known. */
    static double lnMassScatterAtSlope(double slope) {
        return Math.log(10) * LOGL_SCATTER_DEX * slope;
    }

    /** Forward relation: log10 L/L⊙ for a main-sequence mass in M⊙; NaN outside 0.179–31. */
    public static double logLuminosity(double massMsun) {
        if (!(massMsun >= MASS_MIN_MSUN && massMsun <= MASS_MAX_MSUN)) {
            return Double.NaN;
        }
        int i = 0;
        while (i < N - 1 && massMsun > M_HI[i]) {
            i++;
        }
        return ALPHA[i] * Math.log10(massMsun) + BETA[i];
    }

    private static double segmentLogMass(int i, double logL) {
        return (logL - BETA[i]) / ALPHA[i];
    }

    /** Mass in M⊙ of a main-sequence star of luminosity 10^logL L⊙; NaN outside the relation's range. */
    public static double massMsun(double logL) {
        return Math.pow(10, logMass(logL));
    }

    /** log10 M/M⊙ for log10 L/L⊙; NaN outside the relation's range. */
    public static double logMass(double logL) {
        if (!(logL >= LOGL_MIN && logL <= LOGL_MAX)) {
            return Double.NaN;
        }
        for (int i = 0; i < N; i++) {
            boolean inThis = logL >= LOGL_LO[i] && logL <= LOGL_HI[i];
            if (i + 1 < N) {
                // overlap with the next segment: blend linearly in log L across the overlap
                double ovLo = LOGL_LO[i + 1];
                double ovHi = LOGL_HI[i];
                if (ovLo < ovHi && logL >= ovLo && logL <= ovHi) {
                    double w = (logL - ovLo) / (ovHi - ovLo);
                    return (1 - w) * segmentLogMass(i, logL) + w * segmentLogMass(i + 1, logL);
                }
                // gap between this segment's top and the next one's bottom: the break mass
                if (logL > LOGL_HI[i] && logL < LOGL_LO[i + 1]) {
                    return Math.log10(M_HI[i]);
                }
            }
            if (inThis) {
                return segmentLogMass(i, logL);
            }
        }
        return Double.NaN;
    }

    /** d log M / d log L at log L (1/α of the segment, or 0 in a gap); NaN outside the range. */
    public static double dLogMassDLogL(double logL) {
        double h = 1e-6;
        double a = logMass(logL - h);
        double b = logMass(logL + h);
        if (Double.isNaN(a) || Double.isNaN(b)) {
            for (int i = 0; i < N; i++) {
                if (logL >= LOGL_LO[i] && logL <= LOGL_HI[i]) {
                    return 1.0 / ALPHA[i];
                }
            }
            return Double.NaN;
        }
        return (b - a) / (2 * h);
    }
}
