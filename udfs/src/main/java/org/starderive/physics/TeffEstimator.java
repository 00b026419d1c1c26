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
    /** Most shared-measurement terms one estimate has: its two bands, E(B−V) twice, J and H, [Fe/H]. */
    private static final int MAX_TERMS = 7;
    /**
     * Per used estimate i, its first-order contributions from the shared measurements (bands, E(B−V), [Fe/H]) as
     * terms in the order they arise: source termSource[i · MAX_TERMS + k], value termValue[…]; nTerms[i] of them.
     * Kept sparse while estimating (a star is estimated several times); χ² makes them dense once.
     */
    private final int[] termSource;
    private final double[] termValue;
    private final int[] nTerms;
    /** χ² scratch: the shared sources used, ascending; each one's column; the dense columns (source-major). */
    private final int[] activeSources = new int[ErrorSource.COUNT];
    private final int[] columnOf = new int[ErrorSource.COUNT];
    private final double[] bySource;
    /** Per used estimate: its relation's own scatter, squared (independent between relations). */
    private final double[] ownVar;
    /** Covariance matrix of the used estimates (row-major, n × n), factorised in place. */
    private final double[] cov;
    private final double[] resid;
    private final double[] ones;
    private final boolean[] groupUsed;
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
    double tUpper;
    double tLower;

    TeffEstimator(StarState s, TeffRelation[] relations, int[] relationIndex, boolean allowExtrapolation) {
        this.s = s;
        this.relations = relations;
        this.relationIndex = relationIndex;
        this.allowExtrapolation = allowExtrapolation;
        this.tEst = new double[relations.length];
        this.groupIds = new int[relations.length];
        this.groupUsed = new boolean[relations.length];
        this.bySource = new double[ErrorSource.COUNT * relations.length];
        this.termSource = new int[MAX_TERMS * relations.length];
        this.termValue = new double[MAX_TERMS * relations.length];
        this.nTerms = new int[relations.length];
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
        // the sources the used estimates share, ascending (as a dense loop over all sources would add them: the
        // same sums to the last bit), each with its own column
        int[] act = activeSources;
        int na = 0;
        Arrays.fill(columnOf, -1);
        for (int i = 0; i < m; i++) {
            for (int k = 0; k < nTerms[i]; k++) {
                int q = termSource[i * MAX_TERMS + k];
                if (columnOf[q] < 0) {
                    columnOf[q] = 0;
                    act[na++] = q;
                }
            }
        }
        Arrays.sort(act, 0, na);
        int nr = relations.length;
        for (int a = 0; a < na; a++) {
            columnOf[act[a]] = a * nr;
        }
        Arrays.fill(bySource, 0, na * nr, 0);
        for (int i = 0; i < m; i++) { // the terms of each estimate, added in the order they arose
            for (int k = 0; k < nTerms[i]; k++) {
                int t = i * MAX_TERMS + k;
                bySource[columnOf[termSource[t]] + i] += termValue[t];
            }
        }
        for (int i = 0; i < m; i++) {
            for (int j = 0; j <= i; j++) {
                cov[i * m + j] = i == j ? ownVar[i] : 0;
            }
        }
        // source by source: each element still sums its terms in source order, but consecutive additions go to
        // different elements, so they need not wait for each other
        for (int a = 0; a < na; a++) {
            int col = a * nr;
            for (int i = 0; i < m; i++) {
                double gi = bySource[col + i];
                int row = i * m;
                for (int j = 0; j <= i; j++) {
                    cov[row + j] += gi * bySource[col + j];
                }
            }
        }
        for (int i = 0; i < m; i++) { // Cholesky C = L Lᵀ, L in the lower triangle
            for (int j = 0; j <= i; j++) {
                double sum = cov[i * m + j];
                for (int k = 0; k < j; k++) {
                    sum -= cov[i * m + k] * cov[j * m + k];
                }
                if (i == j) {
                    if (!(sum > 0)) {
                        return Double.NaN;
                    }
                    cov[i * m + i] = Math.sqrt(sum);
                } else {
                    cov[i * m + j] = sum / cov[j * m + j];
                }
            }
        }
        double aa = 0;
        double ab = 0;
        double bb = 0;
        for (int i = 0; i < m; i++) { // forward substitution for a (in resid) and b (in ones)
            double sa = tEst[i] - mean;
            double sb = 1;
            for (int k = 0; k < i; k++) {
                sa -= cov[i * m + k] * resid[k];
                sb -= cov[i * m + k] * ones[k];
            }
            resid[i] = sa / cov[i * m + i];
            ones[i] = sb / cov[i * m + i];
            aa += resid[i] * resid[i];
            ab += resid[i] * ones[i];
            bb += ones[i] * ones[i];
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
        Arrays.fill(groupUsed, false);
        int ji = Band.J.ordinal();
        int hi = Band.H.ordinal();
        int[] ofRegime = byRegime[regime.ordinal()];
        // a draw needs only the edge bounds of the FGK and giant relations (they decide the regime, TeffBlend);
        // the other regimes' bounds only flag the nominal estimate
        boolean boundsDecideRegime = regime == Regime.FGK_DWARF || regime == Regime.GIANT;
        for (int kk = 0; kk < ofRegime.length; kk++) {
            int k = ofRegime[kk];
            TeffRelation r = relations[k];
            if (groupUsed[groupIds[k]]) {
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
                    tUpper = Math.min(tUpper, r.teff(r.colourMax(), feh, logg, aux));
                } else if (x < r.colourMin() - margin) {
                    tLower = Math.max(tLower, r.teff(r.colourMin(), feh, logg, aux));
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
            groupUsed[groupIds[k]] = true;
            double dx = r.dTeffDColourAt(x, feh, logg, aux, tRaw);
            double sr = r.scatterK(t);
            double w = 1 / (dx * dx * sx2 + sr * sr);
            tEst[n] = t;
            if (!s.valuesOnly) {
                int t0 = n * MAX_TERMS;
                int e = t0;
                termSource[e] = bi;
                termValue[e++] = dx * sm[bi];
                termSource[e] = ri;
                termValue[e++] = -(dx * sm[ri]);
                termSource[e] = ErrorSource.EBV;
                termValue[e++] = -(dx * (rBand[bi] - rBand[ri]) * s.sEbv);
                if (r.aux() == TeffRelation.Aux.JH) {
                    double da = r.dTeffDAux(aux);
                    termSource[e] = ji;
                    termValue[e++] = da * sm[ji];
                    termSource[e] = hi;
                    termValue[e++] = -(da * sm[hi]);
                    termSource[e] = ErrorSource.EBV;
                    termValue[e++] = -(da * (rBand[ji] - rBand[hi]) * s.sEbv);
                }
                termSource[e] = ErrorSource.FEH;
                termValue[e++] = r.dTeffDFeh(x, feh, logg) * s.sFeh;
                nTerms[n] = e - t0;
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
                double da = r.dTeffDAux(aux);
                gradBand[ji] += w * da;
                gradBand[hi] -= w * da;
                gEbv -= w * da * (rBand[ji] - rBand[hi]);
            }
            gFeh += w * r.dTeffDFeh(x, feh, logg);
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
