package org.starderive.physics;

import java.util.Arrays;

/**
 * Teff of one star from the colour relations of one {@link Regime}: the inverse-variance mean of every usable
 * relation, with its first-order error source by source ({@link ErrorSource}). Package private; one instance per
 * regime and thread, reused per star.
 *
 * <p>Weights: w_i = 1 / (σ_rel,i² + (∂T_i/∂X_i)² σ_X,i²). The error of the mean is propagated to first order
 * through every shared input, not averaged down as if the colours were independent: the gradient of the mean with
 * respect to each band magnitude (a band appears in several colours), E(B−V), [Fe/H] and log g is accumulated, and
 * σ²(T̄) = Σ_b (∂T̄/∂m_b)² σ_b² + (∂T̄/∂E)² σ_E² + (∂T̄/∂[Fe/H])² σ_[Fe/H]² + (∂T̄/∂log g)² σ_g² + Σ_i (w_i/W)² σ_rel,i²
 * + (Σ_i w_i zp_i / W)². Of several forms of one colour (a {@link TeffRelation#group()}) only the first usable is
 * used. Colours outside a relation's range are not used, but a colour beyond an edge by more than twice its error
 * bounds Teff (redder than the red edge: cooler than that edge's Teff).
 */
final class TeffEstimator {
    private static final double TEFF_SANE_MIN_K = 2000.0;
    private static final double TEFF_SANE_MAX_K = 50000.0;

    private final StarState s;
    private final TeffRelation[] relations;
    private final int[] relationIndex;
    private final int[] groupIds;
    private final boolean allowExtrapolation;
    private final double[] tEst;
    private final double[] gradBand = new double[Band.COUNT];
    /**
     * The error sources of the shared measurements, 0 … SHARED − 1: the bands, E(B−V) and [Fe/H] ({@link ErrorSource}
     * numbers them first).
     */
    private static final int SHARED = ErrorSource.FEH + 1;
    /**
     * Per used estimate i, its first-order contributions from the shared measurements: row i (SHARED entries, by
     * source), each entry the sum of its terms in the order they arise (E(B−V) enters a J−H form twice).
     */
    private final double[] shared;
    /** The shared sources the used estimates have terms from (bit j: source j). */
    private long sharedSources;
    /** Whether every entry of the used estimates' rows is finite. */
    private boolean sharedFinite;
    /** Per used estimate, the bands it has terms from (bit b: band b); every estimate has E(B−V) and [Fe/H] terms. */
    private final long[] bandsOf;
    /** Per used estimate: its relation's own scatter, squared (independent between relations). */
    private final double[] ownVar;
    /** Covariance matrix of the used estimates (row-major, n × n), factorised in place. */
    private final double[] cov;
    private final double[] resid;
    private final double[] ones;
    /** Indices of the relations of each regime (by ordinal), in list order. */
    private final int[][] byRegime = new int[Regime.values().length][];

    // result
    double mean;
    /** First-order contributions to Teff per error source. */
    final double[] c = new double[ErrorSource.COUNT];
    long mask;
    int n;
    /** χ² of this estimate, computed when first asked for ({@link #chi2()}); NaN in a Monte Carlo draw. */
    private double chi2;
    private boolean chi2Done;
    boolean anyColour;
    boolean anyOut;
    boolean extrapolated;
    boolean usesLogg;
    /**
     * Bounds from colours beyond an edge by more than twice their error: cooler than the red edge's Teff (not kept for
     * the hot regime), hotter than the blue edge's (not kept for the M-dwarf regime).
     */
    double tUpper;
    double tLower;

    TeffEstimator(StarState s, TeffRelation[] relations, int[] relationIndex, boolean allowExtrapolation) {
        this.s = s;
        this.relations = relations;
        this.relationIndex = relationIndex;
        this.allowExtrapolation = allowExtrapolation;
        this.tEst = new double[relations.length];
        this.groupIds = new int[relations.length];
        this.shared = new double[SHARED * relations.length];
        this.bandsOf = new long[relations.length];
        this.ownVar = new double[relations.length];
        this.cov = new double[relations.length * relations.length];
        this.resid = new double[relations.length];
        this.ones = new double[relations.length];
        for (int k = 0; k < relations.length; k++) {
            groupIds[k] = k;
            for (int i = 0; i < k; i++) {
                if (relations[i].group().equals(relations[k].group())) {
                    groupIds[k] = groupIds[i];
                    break;
                }
            }
        }
        for (Regime g : Regime.values()) {
            int count = 0;
            for (TeffRelation r : relations) {
                count += r.regime() == g ? 1 : 0;
            }
            int[] idx = new int[count];
            int i = 0;
            for (int k = 0; k < relations.length; k++) {
                if (relations[k].regime() == g) {
                    idx[i++] = k;
                }
            }
            byRegime[g.ordinal()] = idx;
        }
    }

    /**
     * χ² of the estimates with the full covariance: colours that share a band (V in B−V, V−J, V−Ks), the common
     * E(B−V) and [Fe/H] make their errors correlated, so χ² = min over μ of (t − μ1)ᵀ C⁻¹ (t − μ1) with
     * C_ij = Σ_s g_is g_js + δ_ij σ_i² (g: contributions of the shared measurements, σ_i: relation scatter) — the
     * generalised least-squares χ², which follows χ² with n − 1 degrees of freedom (common practice). With C = L Lᵀ
     * (Cholesky, in preallocated arrays), a = L⁻¹t and b = L⁻¹1: χ² = |a|² − (a·b)² / |b|². NaN if C is not positive
     * definite or an input is NaN. Temperatures are taken about the mean to keep the arithmetic well conditioned.
     */
    private double correlatedChi2() {
        int m = n;
        for (int i = 0; i < m; i++) {
            for (int j = 0; j <= i; j++) {
                cov[i * m + j] = i == j ? ownVar[i] : 0;
            }
        }
        // the terms of the sources the used estimates share, each element summing its products in ascending source
        // order (as a dense loop over all sources would add them). A source an estimate has no term from is an exact 0
        // in its row: with finite entries its products are ±0 and leave an element as it is (an element is never −0),
        // so only the sources both estimates have are visited — their common bands, then E(B−V) and [Fe/H]. With a
        // non-finite entry (0 × ∞ is NaN) every source is
        double[] g = shared;
        if (sharedFinite) {
            int ebv = ErrorSource.EBV;
            int feh = ErrorSource.FEH;
            for (int i = 0; i < m; i++) {
                int ri = i * SHARED;
                long bi = bandsOf[i];
                for (int j = 0; j <= i; j++) {
                    int rj = j * SHARED;
                    double sum = cov[i * m + j];
                    for (long common = bi & bandsOf[j]; common != 0; common &= common - 1) {
                        int q = Long.numberOfTrailingZeros(common);
                        sum += g[ri + q] * g[rj + q];
                    }
                    sum += g[ri + ebv] * g[rj + ebv];
                    sum += g[ri + feh] * g[rj + feh];
                    cov[i * m + j] = sum;
                }
            }
        } else {
            for (long bits = sharedSources; bits != 0; bits &= bits - 1) {
                int q = Long.numberOfTrailingZeros(bits);
                for (int i = 0; i < m; i++) {
                    double gi = g[i * SHARED + q];
                    int row = i * m;
                    for (int j = 0; j <= i; j++) {
                        cov[row + j] += gi * g[j * SHARED + q];
                    }
                }
            }
        }
        // Cholesky C = L Lᵀ (L in the lower triangle) row by row, each row's forward substitution for a (in resid) and
        // b (in ones) as soon as the row is known: the same operations in the same order as factorising first
        double aa = 0;
        double ab = 0;
        double bb = 0;
        for (int i = 0; i < m; i++) {
            int ri = i * m;
            for (int j = 0; j < i; j++) {
                int rj = j * m;
                double sum = cov[ri + j];
                for (int k = 0; k < j; k++) {
                    sum -= cov[ri + k] * cov[rj + k];
                }
                cov[ri + j] = sum / cov[rj + j];
            }
            double sum = cov[ri + i];
            double sa = tEst[i] - mean;
            double sb = 1;
            for (int k = 0; k < i; k++) {
                double lik = cov[ri + k];
                sum -= lik * lik;
                sa -= lik * resid[k];
                sb -= lik * ones[k];
            }
            if (!(sum > 0)) {
                return Double.NaN;
            }
            double lii = Math.sqrt(sum);
            cov[ri + i] = lii;
            double ai = sa / lii;
            double bi = sb / lii;
            resid[i] = ai;
            ones[i] = bi;
            aa += ai * ai;
            ab += ai * bi;
            bb += bi * bi;
        }
        return Math.max(0, aa - ab * ab / bb);
    }

    void clear() {
        mean = chi2 = Double.NaN;
        chi2Done = s.valuesOnly; // a draw (values only) fills no covariance inputs: its χ² stays NaN
        if (!s.valuesOnly) {
            Arrays.fill(c, 0); // a Monte Carlo draw (values only) never reads the contributions
        }
        mask = 0;
        sharedSources = 0;
        sharedFinite = true;
        n = 0;
        anyColour = anyOut = extrapolated = usesLogg = false;
        tUpper = Double.POSITIVE_INFINITY;
        tLower = 0;
    }

    private static double sq(double x) { return x * x; }

    /**
     * Estimates Teff from the relations of {@code regime} at log g {@code logg} (error {@code sLogg}); {@code offsets}
     * (null: none) shifts each enabled relation's Teff (a Monte Carlo draw); {@code teffMaxK} caps the temperature a
     * windowed relation may give (its own window, or the blend zone's upper edge).
     *
     * <p>In a Monte Carlo draw ({@link StarState#valuesOnly}) only what the draw's value needs is computed: the mean,
     * the mask, n, the flags of the colours and the FGK and giant relations' edge bounds (tUpper below the M-dwarf
     * regime's edge, tLower above the hot regime's, decide which regime a star is in, see {@link TeffBlend}); not the
     * other regimes' bounds (they only flag the nominal estimate), the gradients or the first-order contributions.
     * The mean is the same to the last bit either way.
     */
    void estimate(Regime regime, double logg, double sLogg, double[] offsets, double teffMaxK) {
        clear();
        double[] m0 = s.m0;
        double[] sm = s.sm;
        double[] rBand = s.rBand;
        double feh = s.feh;
        double sumW = 0;
        double sumWT = 0;
        double sumWZp = 0;
        double gEbv = 0;
        double gFeh = 0;
        double gLogg = 0;
        double scatterVar = 0;
        boolean vo = s.valuesOnly;
        if (!vo) {
            Arrays.fill(gradBand, 0);
        }
        long groupsUsed = 0; // bit g: a form of colour group g is already used (at most 63 relations)
        int ji = Band.J.ordinal();
        int hi = Band.H.ordinal();
        int[] ofRegime = byRegime[regime.ordinal()];
        // a draw needs only the edge bounds of the FGK and giant relations (they decide the regime, TeffBlend), and
        // not those where it keeps the nominal star's route; the other regimes' bounds only flag the nominal estimate
        boolean boundsDecideRegime = (regime == Regime.FGK_DWARF || regime == Regime.GIANT) && s.drawRoute < 0;
        // the M-dwarf relations bound only from the red side, the hot one only from the blue side: their other edge is
        // where another regime takes over, and TeffBlend reads no such bound (the hot edge would cost a power of 10)
        boolean upperBounds = regime != Regime.HOT;
        boolean lowerBounds = regime != Regime.M_DWARF;
        for (int kk = 0; kk < ofRegime.length; kk++) {
            int k = ofRegime[kk];
            TeffRelation r = relations[k];
            long group = 1L << groupIds[k];
            if ((groupsUsed & group) != 0) {
                continue; // another form of this colour is already used
            }
            int bi = r.blue().ordinal();
            int ri = r.red().ordinal();
            if (Double.isNaN(m0[bi]) || Double.isNaN(m0[ri])) {
                continue;
            }
            double aux = Double.NaN;
            if (r.aux() == TeffRelation.Aux.JH) {
                if (Double.isNaN(m0[ji]) || Double.isNaN(m0[hi])) {
                    continue;
                }
                aux = m0[ji] - m0[hi];
            } else if (r.aux() == TeffRelation.Aux.FEH && !s.fehMeasured) {
                continue;
            }
            anyColour = true;
            double x = m0[bi] - m0[ri];
            double sx2 = sm[bi] * sm[bi] + sm[ri] * sm[ri] + sq((rBand[bi] - rBand[ri]) * s.sEbv);
            boolean in = r.inRange(x, feh);
            if (!in) {
                anyOut = true;
            }
            if (!in && (!vo || boundsDecideRegime)) {
                double margin = 2 * Math.sqrt(sx2);
                if (x > r.colourMax() + margin) {
                    if (upperBounds) {
                        tUpper = Math.min(tUpper, r.teff(r.colourMax(), feh, logg, aux));
                    }
                } else if (x < r.colourMin() - margin) {
                    if (lowerBounds) {
                        tLower = Math.max(tLower, r.teff(r.colourMin(), feh, logg, aux));
                    }
                }
            }
            if (!in && (!allowExtrapolation || r.form() == TeffRelation.Form.MANN2015)) {
                continue; // beyond a Mann turnover the polynomial is never evaluated
            }
            double tRaw = r.teff(x, feh, logg, aux);
            double t = tRaw;
            if (!(t >= r.teffMinK() && t <= Math.max(r.teffMaxK(), teffMaxK))) {
                continue;
            }
            if (offsets != null) {
                t += offsets[k];
            }
            if (!(t >= TEFF_SANE_MIN_K && t <= TEFF_SANE_MAX_K)) {
                continue;
            }
            groupsUsed |= group;
            double dx = r.dTeffDColourAt(x, feh, logg, aux, tRaw);
            double sr = r.scatterK(t);
            double w = 1 / (dx * dx * sx2 + sr * sr);
            tEst[n] = t;
            // the derivatives in [Fe/H] and J−H serve both the covariance terms and the gradient of the mean
            double dFeh = vo ? 0 : r.dTeffDFeh(x, feh, logg);
            double da = vo || r.aux() != TeffRelation.Aux.JH ? 0 : r.dTeffDAux(aux);
            if (!vo) {
                int row = n * SHARED;
                double[] g = shared;
                Arrays.fill(g, row, row + SHARED, 0);
                g[row + bi] += dx * sm[bi];
                g[row + ri] += -(dx * sm[ri]);
                g[row + ErrorSource.EBV] += -(dx * (rBand[bi] - rBand[ri]) * s.sEbv);
                long bands = 1L << bi | 1L << ri;
                if (r.aux() == TeffRelation.Aux.JH) {
                    g[row + ji] += da * sm[ji];
                    g[row + hi] += -(da * sm[hi]);
                    g[row + ErrorSource.EBV] += -(da * (rBand[ji] - rBand[hi]) * s.sEbv);
                    bands |= 1L << ji | 1L << hi;
                }
                g[row + ErrorSource.FEH] += dFeh * s.sFeh;
                // the other entries of the row are 0
                sharedFinite &= Double.isFinite(g[row + bi]) & Double.isFinite(g[row + ri])
                        & Double.isFinite(g[row + ErrorSource.EBV]) & Double.isFinite(g[row + ErrorSource.FEH])
                        & Double.isFinite(g[row + ji]) & Double.isFinite(g[row + hi]);
                bandsOf[n] = bands;
                sharedSources |= bands | 1L << ErrorSource.EBV | 1L << ErrorSource.FEH;
                ownVar[n] = sr * sr;
            }
            n++;
            sumW += w;
            sumWT += w * t;
            mask |= 1L << relationIndex[k];
            extrapolated |= !in;
            usesLogg |= r.form() == TeffRelation.Form.GAIA2021;
            if (vo) {
                continue;
            }
            gradBand[bi] += w * dx;
            gradBand[ri] -= w * dx;
            gEbv -= w * dx * (rBand[bi] - rBand[ri]);
            if (r.aux() == TeffRelation.Aux.JH) {
                gradBand[ji] += w * da;
                gradBand[hi] -= w * da;
                gEbv -= w * da * (rBand[ji] - rBand[hi]);
            }
            gFeh += w * dFeh;
            gLogg += w * r.dTeffDLogg(x, feh);
            scatterVar += w * w * sr * sr;
            sumWZp += w * r.zeroPointK();
        }
        if (n == 0) {
            return;
        }
        mean = sumWT / sumW;
        if (vo) {
            return;
        }
        for (int b = 0; b < Band.COUNT; b++) {
            c[b] = gradBand[b] == 0 ? 0 : gradBand[b] * sm[b] / sumW;
        }
        c[ErrorSource.EBV] = gEbv * s.sEbv / sumW;
        c[ErrorSource.FEH] = gFeh * s.sFeh / sumW;
        c[ErrorSource.LOGG] = gLogg * sLogg / sumW;
        c[ErrorSource.scatterOf(regime)] = Math.sqrt(scatterVar) / sumW; // each regime's scatter independent
        c[ErrorSource.ZP] = sumWZp / sumW;
        s.mask(c);
    }

    /**
     * χ² of the current estimate ({@link #correlatedChi2()}), computed on first request and kept until the next
     * {@link #estimate}: a star is often estimated several times (class iteration, regimes) but only the estimate
     * that is reported is judged. NaN without an estimate and in a Monte Carlo draw.
     */
    double chi2() {
        if (!chi2Done) {
            chi2 = n == 0 ? Double.NaN : correlatedChi2();
            chi2Done = true;
        }
        return chi2;
    }
}
