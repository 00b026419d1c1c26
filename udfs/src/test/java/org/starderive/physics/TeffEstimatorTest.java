package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.List;
import java.util.stream.IntStream;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.CholeskyDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;

/**
 * {@link TeffEstimator} on stars set up band by band, against the published relations typed a second time here (in
 * the flat form of each paper, not the nested evaluation of the core): the inverse-variance mean, its first-order
 * contributions as central differences of the typed copy (weights held fixed, as the class formula states), and the
 * chi-square as a dense generalised least-squares fit by Commons Math (Cholesky inverse) of the covariance written
 * out here from the same differences.
 */
class TeffEstimatorTest {

    /** Teff in K of one typed relation at dereddened magnitudes m0, [Fe/H] and log g. */
    interface Typed {
        double teffK(double[] m0, double feh, double logg);
    }

    /** A relation typed here: its catalogue id, colour bands, own scatter and zero point (K). */
    record Rel(String id, Band blue, Band red, double sigmaK, double zpK, Typed t) {}

    private static double m(double[] m0, Band b) {
        return m0[b.ordinal()];
    }

    /**
     * Casagrande et al. 2010, A&amp;A 512, A54, Table 4: θ = 5040/Teff = a0 + a1 X + a2 X² + a3 X [Fe/H] + a4 [Fe/H] +
     * a5 [Fe/H]²; zero point 15 K (same paper).
     */
    static Rel c10(Band blue, Band red, double[] a, double sigmaK) {
        return theta("C10/", blue, red, a, sigmaK, 15.0);
    }

    /** The θ form of Casagrande et al. 2010 and González Hernández &amp; Bonifacio 2009 (the same form). */
    static Rel theta(String prefix, Band blue, Band red, double[] a, double sigmaK, double zpK) {
        return new Rel(prefix + blue.label() + "-" + red.label(), blue, red, sigmaK, zpK, (m0, f, g) -> {
            double x = m(m0, blue) - m(m0, red);
            return 5040.0 / (a[0] + a[1] * x + a[2] * x * x + a[3] * x * f + a[4] * f + a[5] * f * f);
        });
    }

    // Casagrande et al. 2010, Table 4 rows (published values)
    static final Rel C10_BV = c10(Band.B, Band.V, new double[] {0.5665, 0.4809, -0.0060, -0.0613, -0.0042, -0.0055}, 73);
    static final Rel C10_VI = c10(Band.V, Band.IC, new double[] {0.4033, 0.8171, -0.1987, -0.0409, 0.0319, 0.0012}, 59);
    static final Rel C10_VJ = c10(Band.V, Band.J, new double[] {0.4669, 0.3849, -0.0350, -0.0140, 0.0225, 0.0011}, 42);
    static final Rel C10_VH = c10(Band.V, Band.H, new double[] {0.5251, 0.2553, -0.0119, -0.0187, 0.0410, 0.0025}, 33);
    static final Rel C10_VK = c10(Band.V, Band.KS, new double[] {0.5057, 0.2600, -0.0146, -0.0131, 0.0288, 0.0016}, 25);
    static final Rel C10_JK = c10(Band.J, Band.KS, new double[] {0.6393, 0.6104, 0.0920, -0.0330, 0.0291, 0.0020}, 132);

    /** González Hernández &amp; Bonifacio 2009, A&amp;A 497, 497, Table 5 (giants), V−J: the θ form, no zero point given. */
    static final Rel GHB09_VJ = theta("GHB09/", Band.V, Band.J, new double[] {0.4629, 0.4124, -0.0417, -0.0012, 0.0094, 0.0013}, 18, 0);

    /**
     * Casagrande et al. 2021, MNRAS 507, 2684 (authors' release): Teff = c0 + c1X + c2X² + c3X³ + c4X⁵ + c5 g + c6 gX
     * + c7 gX² + c8 gX³ + c9 gX⁵ + c10 f + c11 fX + c12 fX² + c13 fX³ + c14 f g X; zero point 20 K (same paper);
     * scatter 80 K (BP−RP) and 60 K (G−Ks), values from memory as in the catalogue.
     */
    static Rel c21(Band blue, Band red, double[] c, double sigmaK) {
        return new Rel("C21/" + blue.label() + "-" + red.label() + "/dwarf", blue, red, sigmaK, 20.0, (m0, f, g) -> {
            double x = m(m0, blue) - m(m0, red);
            return c[0] + c[1] * x + c[2] * x * x + c[3] * Math.pow(x, 3) + c[4] * Math.pow(x, 5) + c[5] * g + c[6] * g * x
                    + c[7] * g * x * x + c[8] * g * Math.pow(x, 3) + c[9] * g * Math.pow(x, 5) + c[10] * f + c[11] * f * x
                    + c[12] * f * x * x + c[13] * f * Math.pow(x, 3) + c[14] * f * g * x;
        });
    }

    static final Rel C21_BPRP = c21(Band.BP, Band.RP, new double[] {7980.8845, -4138.3457, 1264.9366, -130.4388, 0,
            285.8393, -324.2196, 106.8511, -4.9825, 0, 4.5138, -203.7774, 126.6981, -14.7442, 40.7376}, 80);
    static final Rel C21_GK = c21(Band.G, Band.KS, new double[] {8031.7804, -1815.3523, 0, 70.7201, -1.7309,
            252.9647, -342.0817, 161.3031, -26.7714, 0, -120.1133, 42.6723, 0, 0, 10.0433}, 60);

    /**
     * Mann et al. 2015, ApJ 804, 64, Table 2 as reprinted in the erratum (Mann et al. 2016, ApJ 819, 87): Teff/3500 K
     * = a + bX + cX² + dX³ + eX⁴ + f (J−H) + g (J−H)²; the table note's 60 K in quadrature with σ, and for BP−RP a
     * further 100 K (the catalogue's stated choice for pre-launch passbands).
     */
    static Rel m15(Band blue, Band red, String suffix, double[] k, double sigmaK) {
        double extra = blue == Band.BP ? 100 : 0;
        return new Rel("M15/" + blue.label() + "-" + red.label() + suffix, blue, red,
                Math.sqrt(sigmaK * sigmaK + 60 * 60 + extra * extra), 0.0, (m0, f, g) -> {
                    double x = m(m0, blue) - m(m0, red);
                    double jh = k[5] == 0 ? 0 : m(m0, Band.J) - m(m0, Band.H);
                    return 3500 * (k[0] + k[1] * x + k[2] * x * x + k[3] * Math.pow(x, 3) + k[4] * Math.pow(x, 4)
                            + k[5] * jh + k[6] * jh * jh);
                });
    }

    static final Rel M15_VJ = m15(Band.V, Band.J, "", new double[] {2.840, -1.3453, 0.3906, -0.0546, 0.002913, 0, 0}, 55);
    static final Rel M15_VJ_JH = m15(Band.V, Band.J, "+JH", new double[] {2.769, -1.421, 0.4284, -0.06133, 0.003310, 0.1333, 0.05416}, 48);
    static final Rel M15_VI_JH = m15(Band.V, Band.IC, "+JH", new double[] {1.568, -0.4381, 0.07749, -0.005610, 0, 0.2441, -0.09257}, 52);
    static final Rel M15_BPRP = m15(Band.BP, Band.RP, "", new double[] {3.245, -2.4309, 1.043, -0.2127, 0.01649, 0, 0}, 52);

    /** A star of no bands: every magnitude NaN, no reddening, [Fe/H] 0 ± 0.1 assumed. */
    static StarState emptyState() {
        StarState s = new StarState();
        Arrays.fill(s.m0, Double.NaN);
        Arrays.fill(s.sm, Double.NaN);
        s.feh = 0;
        s.sFeh = 0.1;
        return s;
    }

    static void band(StarState s, Band b, double m0, double sigma, double aOverEbv) {
        s.m0[b.ordinal()] = m0;
        s.sm[b.ordinal()] = sigma;
        s.rBand[b.ordinal()] = aOverEbv;
    }

    /** An estimator over the whole catalogue, relation k at bit k. */
    static TeffEstimator estimator(StarState s, boolean extrapolate) {
        TeffRelation[] all = TeffRelations.all().toArray(new TeffRelation[0]);
        return new TeffEstimator(s, all, IntStream.range(0, all.length).toArray(), extrapolate);
    }

    /** The catalogue bits of the relations named. */
    static long bits(String... ids) {
        long m = 0;
        for (String id : ids) {
            m |= 1L << TeffRelations.index(TeffRelations.byId(id));
        }
        return m;
    }

    static long bits(List<Rel> used) {
        return bits(used.stream().map(Rel::id).toArray(String[]::new));
    }

    /**
     * The sources shared between estimates (bands, E(B−V), [Fe/H]) and log g: ∂T_i/∂source × σ by central differences
     * of the typed copy. Row i, column j as in {@link ErrorSource}.
     */
    static double[][] partials(List<Rel> used, StarState s, double logg, double sLogg) {
        double[][] g = new double[used.size()][ErrorSource.COUNT];
        double h = 1e-4;
        for (int i = 0; i < used.size(); i++) {
            Typed t = used.get(i).t();
            for (int b = 0; b < Band.COUNT; b++) {
                if (!Double.isNaN(s.m0[b])) {
                    double[] up = s.m0.clone();
                    double[] dn = s.m0.clone();
                    up[b] += h;
                    dn[b] -= h;
                    g[i][b] = (t.teffK(up, s.feh, logg) - t.teffK(dn, s.feh, logg)) / (2 * h) * s.sm[b];
                }
            }
            double[] up = s.m0.clone();
            double[] dn = s.m0.clone();
            for (int b = 0; b < Band.COUNT; b++) { // dereddened m0 = m − R·E(B−V)
                up[b] -= s.rBand[b] * h;
                dn[b] += s.rBand[b] * h;
            }
            g[i][ErrorSource.EBV] = (t.teffK(up, s.feh, logg) - t.teffK(dn, s.feh, logg)) / (2 * h) * s.sEbv;
            g[i][ErrorSource.FEH] = (t.teffK(s.m0, s.feh + h, logg) - t.teffK(s.m0, s.feh - h, logg)) / (2 * h) * s.sFeh;
            g[i][ErrorSource.LOGG] = (t.teffK(s.m0, s.feh, logg + h) - t.teffK(s.m0, s.feh, logg - h)) / (2 * h) * sLogg;
        }
        return g;
    }

    /** Weight 1/(σ_rel² + (∂T/∂X)² σ_X²) of each estimate, σ_X² from both bands and the colour excess. */
    static double[] weights(List<Rel> used, StarState s, double logg) {
        double[] w = new double[used.size()];
        double h = 1e-4;
        for (int i = 0; i < used.size(); i++) {
            Rel r = used.get(i);
            double[] up = s.m0.clone();
            double[] dn = s.m0.clone();
            up[r.blue().ordinal()] += h; // the blue band of every relation here enters its colour only
            dn[r.blue().ordinal()] -= h;
            double slope = (r.t().teffK(up, s.feh, logg) - r.t().teffK(dn, s.feh, logg)) / (2 * h);
            double sb = s.sm[r.blue().ordinal()];
            double sr = s.sm[r.red().ordinal()];
            double se = (s.rBand[r.blue().ordinal()] - s.rBand[r.red().ordinal()]) * s.sEbv;
            w[i] = 1 / (slope * slope * (sb * sb + sr * sr + se * se) + r.sigmaK() * r.sigmaK());
        }
        return w;
    }

    static double weightedMean(List<Rel> used, StarState s, double logg) {
        double[] w = weights(used, s, logg);
        double sw = 0;
        double swt = 0;
        for (int i = 0; i < used.size(); i++) {
            sw += w[i];
            swt += w[i] * used.get(i).t().teffK(s.m0, s.feh, logg);
        }
        return swt / sw;
    }

    /**
     * The generalised least-squares χ² = min over μ of (t − μ1)ᵀ C⁻¹ (t − μ1) = rᵀC⁻¹r − (1ᵀC⁻¹r)² / 1ᵀC⁻¹1 (common
     * practice), C = G Gᵀ + diag(σ_rel²) with G the partials of the shared measurements (bands, E(B−V), [Fe/H]),
     * inverted by Commons Math.
     */
    static double glsChi2(List<Rel> used, StarState s, double logg) {
        int n = used.size();
        double[][] g = partials(used, s, logg, 0);
        RealMatrix c = new Array2DRowRealMatrix(n, n);
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                double sum = i == j ? used.get(i).sigmaK() * used.get(i).sigmaK() : 0;
                for (int q = 0; q <= ErrorSource.FEH; q++) {
                    sum += g[i][q] * g[j][q];
                }
                c.setEntry(i, j, sum);
            }
        }
        RealMatrix inv = new CholeskyDecomposition(c).getSolver().getInverse();
        RealVector t = new ArrayRealVector(n);
        for (int i = 0; i < n; i++) {
            t.setEntry(i, used.get(i).t().teffK(s.m0, s.feh, logg));
        }
        RealVector one = new ArrayRealVector(n, 1.0);
        return t.dotProduct(inv.operate(t)) - Math.pow(one.dotProduct(inv.operate(t)), 2) / one.dotProduct(inv.operate(one));
    }

    /** The estimate of {@code e} against the typed copy: mean, every contribution, mask, count and χ². */
    static void assertMatchesTypedCopy(TeffEstimator e, List<Rel> used, StarState s, double logg, double sLogg) {
        String what = String.valueOf(used.stream().map(Rel::id).toList());
        assertEquals(used.size(), e.n, what);
        assertEquals(bits(used), e.mask, what);
        double[] w = weights(used, s, logg);
        double sw = Arrays.stream(w).sum();
        assertEquals(weightedMean(used, s, logg), e.mean, 1e-6, what);
        double[][] g = partials(used, s, logg, sLogg);
        for (int q = 0; q <= ErrorSource.LOGG; q++) {
            double expected = 0;
            for (int i = 0; i < used.size(); i++) {
                expected += w[i] * g[i][q] / sw;
            }
            assertEquals(expected, e.c[q], 1e-5, what + ": contribution of " + ErrorSource.name(q));
        }
        double scatter2 = 0;
        double zp = 0;
        for (int i = 0; i < used.size(); i++) {
            scatter2 += Math.pow(w[i] * used.get(i).sigmaK(), 2);
            zp += w[i] * used.get(i).zpK();
        }
        // the weights here use slopes by central differences: 1e-7 relative
        // each regime's relations have a scatter source of their own (ErrorSource: SCATTER, SCATTER_M, SCATTER_HOT)
        int slot = used.get(0).id().startsWith("M15/") ? ErrorSource.SCATTER_M : ErrorSource.SCATTER;
        assertEquals(Math.sqrt(scatter2) / sw, e.c[slot], 1e-7 * e.c[slot], what);
        assertEquals(zp / sw, e.c[ErrorSource.ZP], 1e-7 * e.c[ErrorSource.ZP], what);
        double chi2 = glsChi2(used, s, logg);
        assertEquals(chi2, e.chi2(), 1e-7 * Math.max(1, chi2), what);
    }

    /**
     * A solar-type dwarf with Johnson–Cousins and 2MASS bands, [Fe/H] −0.2 ± 0.1 measured, E(B−V) error 0.03 with
     * A/E(B−V) ratios of the sizes the CCM law gives (any values serve: the estimator only reads them). Colours
     * B−V 0.65, V−I_C 0.71, V−J 1.20, V−H 1.47, V−Ks 1.55, J−Ks 0.35: inside every Casagrande et al. 2010 range.
     */
    static StarState solarTypeDwarf(double v) {
        StarState s = emptyState();
        band(s, Band.B, v + 0.65, 0.012, 4.1);
        band(s, Band.V, v, 0.02, 3.1);
        band(s, Band.IC, v - 0.71, 0.015, 1.8);
        band(s, Band.J, v - 1.20, 0.025, 0.87);
        band(s, Band.H, v - 1.47, 0.03, 0.55);
        band(s, Band.KS, v - 1.55, 0.02, 0.35);
        s.sEbv = 0.03;
        s.feh = -0.2;
        s.sFeh = 0.1;
        s.fehMeasured = true;
        return s;
    }

    @Test
    void solarTypeDwarfIsTheInverseVarianceMeanOfItsSixColours() {
        StarState s = solarTypeDwarf(4.8);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, 4.44, 0.3, null, 0);
        List<Rel> used = List.of(C10_BV, C10_VI, C10_VJ, C10_VH, C10_VK, C10_JK);
        assertMatchesTypedCopy(e, used, s, 4.44, 0.3);
        assertTrue(e.chi2() > 0.1, "six real colours never agree exactly: " + e.chi2());
        // Casagrande et al. 2010 relations take no log g; all six zero points are the paper's 15 K
        assertEquals(0.0, e.c[ErrorSource.LOGG], 0.0);
        assertEquals(15.0, e.c[ErrorSource.ZP], 1e-9);
        assertTrue(e.anyColour && !e.anyOut && !e.extrapolated && !e.usesLogg);
        assertEquals(Double.POSITIVE_INFINITY, e.tUpper);
        assertEquals(0.0, e.tLower, 0.0);
    }

    @Test
    void gaiaBandDwarfCarriesLogGAndTheMixedZeroPoint() {
        // BP−RP 0.85, G−Ks 1.65 (inside the C21 dwarf ranges 0.20–2.00 and 0.20–2.80), J−Ks 0.36 (C10)
        StarState s = emptyState();
        band(s, Band.G, 10.0, 0.003, 2.5);
        band(s, Band.BP, 10.30, 0.004, 3.2);
        band(s, Band.RP, 9.45, 0.005, 1.9);
        band(s, Band.J, 8.71, 0.02, 0.72);
        band(s, Band.KS, 8.35, 0.02, 0.31);
        s.sEbv = 0.02;
        s.feh = 0.1;
        s.fehMeasured = true;
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, 4.3, 0.25, null, 0);
        assertMatchesTypedCopy(e, List.of(C10_JK, C21_BPRP, C21_GK), s, 4.3, 0.25);
        assertTrue(e.usesLogg);
        assertTrue(Math.abs(e.c[ErrorSource.LOGG]) > 1, "log g moves the C21 temperatures: " + e.c[ErrorSource.LOGG]);
        assertTrue(e.c[ErrorSource.ZP] > 15 && e.c[ErrorSource.ZP] < 20, "between the C10 and C21 zero points");
    }

    /**
     * An M dwarf without a measured [Fe/H]: of the three Mann et al. 2015 forms of V−J and of V−I_C the J−H form is
     * the first usable one (the [Fe/H] form needs a measured [Fe/H]); BP−RP has no J−H form, so its plain one. J and H
     * then enter two colours each, and E(B−V) twice per J−H estimate.
     */
    @Test
    void mDwarfUsesTheJhFormsAndCorrelatesThroughJAndH() {
        StarState s = emptyState();
        double j = 8.0;
        band(s, Band.V, j + 3.9, 0.02, 3.1);
        band(s, Band.IC, j + 3.9 - 2.45, 0.02, 1.8);
        band(s, Band.J, j, 0.02, 0.87);
        band(s, Band.H, j - 0.60, 0.025, 0.55);
        band(s, Band.KS, j - 0.85, 0.02, 0.35);
        band(s, Band.BP, j + 3.6, 0.005, 3.2);
        band(s, Band.RP, j + 3.6 - 2.45, 0.005, 1.9);
        s.sEbv = 0.02;
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertMatchesTypedCopy(e, List.of(M15_VJ_JH, M15_VI_JH, M15_BPRP), s, 4.8, 0.0);
        assertTrue(e.mean > 2700 && e.mean < 4100, "an M dwarf: " + e.mean);
        // the same star with a measured [Fe/H]: the [Fe/H] forms come first (typed below: Table 2, f·[Fe/H] term)
        s.fehMeasured = true;
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(bits("M15/V-J+FeH", "M15/V-Ic+FeH", "M15/BP-RP+FeH"), e.mask);
    }

    @Test
    void aSingleColourHasNoChiSquareFreedomAndNoneWithoutAColour() {
        // Mann et al. 2015 check value (relations sheet section 11, derived): V−J 4.413 → 3228 K, plain form
        StarState s = emptyState();
        band(s, Band.V, 12.413, 0.01, 3.1);
        band(s, Band.J, 8.0, 0.02, 0.87);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(3228, e.mean, 1.0);
        assertMatchesTypedCopy(e, List.of(M15_VJ), s, 4.8, 0.0);
        assertEquals(0.0, e.chi2(), 1e-9, "one estimate: χ² with 0 degrees of freedom is 0");
        // no band of the hot regime: nothing, and no χ²
        e.estimate(Regime.HOT, 4.8, 0.0, null, 0);
        assertEquals(0, e.n);
        assertFalse(e.anyColour);
        assertTrue(Double.isNaN(e.mean) && Double.isNaN(e.chi2()));
        assertEquals(0.0, e.c[Band.V.ordinal()], 0.0, "contributions of the earlier estimate cleared");
    }

    @Test
    void chiSquareIsThatOfTheLatestEstimate() {
        // asked, then a new estimate of another star: the χ² must be the new one's, not the one kept from before
        StarState s = solarTypeDwarf(4.8);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        double first = e.chi2();
        s.m0[Band.B.ordinal()] += 0.05; // B−V 0.70: disagrees more with the other colours
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertMatchesTypedCopy(e, List.of(C10_BV, C10_VI, C10_VJ, C10_VH, C10_VK, C10_JK), s, 4.44, 0.0);
        assertTrue(e.chi2() > first, "a redder B−V disagrees more: " + first + " → " + e.chi2());
        // a subset estimator (as with a relation mask): relations keep their catalogue bits
        TeffRelation[] two = {TeffRelations.byId("C10/V-J"), TeffRelations.byId("C10/V-Ks")};
        int[] idx = {TeffRelations.index(two[0]), TeffRelations.index(two[1])};
        TeffEstimator sub = new TeffEstimator(s, two, idx, false);
        sub.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertMatchesTypedCopy(sub, List.of(C10_VJ, C10_VK), s, 4.44, 0.0);
    }

    /** Twice the error of colour blue−red: both bands and the colour excess (the class rule), in its order. */
    static double twoSigma(StarState s, Band blue, Band red) {
        double sb = s.sm[blue.ordinal()];
        double sr = s.sm[red.ordinal()];
        double se = (s.rBand[blue.ordinal()] - s.rBand[red.ordinal()]) * s.sEbv;
        return 2 * Math.sqrt(sb * sb + sr * sr + se * se);
    }

    /**
     * A colour beyond a range edge by more than twice its error bounds Teff by the relation's Teff at that edge; at
     * exactly twice its error it does not (the class rule). B−V red edge 1.29 and V−I_C blue edge 0.46 (Casagrande et
     * al. 2010, Table 4); V = 0 so that B and I_C give these colours to the last bit.
     */
    @Test
    void coloursBeyondAnEdgeBoundTeffFromTwiceTheirError() {
        StarState s = solarTypeDwarf(0.0);
        s.m0[Band.B.ordinal()] = 1.29 + twoSigma(s, Band.B, Band.V);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertTrue(e.anyOut, "B−V " + s.m0[Band.B.ordinal()] + " is outside 0.18–1.29");
        assertEquals(Double.POSITIVE_INFINITY, e.tUpper, "at 2σ exactly: no bound");
        assertFalse(e.extrapolated);
        List<Rel> others = List.of(C10_VI, C10_VJ, C10_VH, C10_VK, C10_JK);
        assertMatchesTypedCopy(e, others, s, 4.44, 0.0);
        // 1 mmag further: cooler than the relation at its red edge
        s.m0[Band.B.ordinal()] += 0.001;
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        double[] atEdge = s.m0.clone();
        atEdge[Band.B.ordinal()] = 1.29;
        assertEquals(C10_BV.t().teffK(atEdge, s.feh, 4.44), e.tUpper, 1e-6);
        assertEquals(0.0, e.tLower, 0.0);
        assertMatchesTypedCopy(e, others, s, 4.44, 0.0);
        // V−I_C bluer than 0.46 by 2σ exactly: no bound; by 1 mmag more: hotter than the relation at its blue edge
        s.m0[Band.B.ordinal()] = 0.65;
        s.m0[Band.IC.ordinal()] = -(0.46 - twoSigma(s, Band.V, Band.IC));
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertEquals(0.0, e.tLower, 0.0, "at 2σ exactly: no bound");
        s.m0[Band.IC.ordinal()] += 0.001;
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        atEdge = s.m0.clone();
        atEdge[Band.IC.ordinal()] = -0.46;
        assertEquals(C10_VI.t().teffK(atEdge, s.feh, 4.44), e.tLower, 1e-6);
        assertEquals(Double.POSITIVE_INFINITY, e.tUpper);
        assertMatchesTypedCopy(e, List.of(C10_BV, C10_VJ, C10_VH, C10_VK, C10_JK), s, 4.44, 0.0);
    }

    @Test
    void extrapolationUsesAnOutOfRangeColourButNeverBeyondAMannEdge() {
        // J−Ks 0.85, just beyond the Casagrande et al. 2010 edge 0.80 (within 2σ: no bound either)
        StarState s = solarTypeDwarf(4.8);
        s.m0[Band.J.ordinal()] = s.m0[Band.KS.ordinal()] + 0.85;
        s.sm[Band.J.ordinal()] = 0.05;
        TeffEstimator e = estimator(s, true);
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertTrue(e.extrapolated && e.anyOut);
        assertMatchesTypedCopy(e, List.of(C10_BV, C10_VI, C10_VJ, C10_VH, C10_VK, C10_JK), s, 4.44, 0.0);
        TeffEstimator strict = estimator(s, false);
        strict.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertFalse(strict.extrapolated);
        assertMatchesTypedCopy(strict, List.of(C10_BV, C10_VI, C10_VJ, C10_VH, C10_VK), s, 4.44, 0.0);
        // V−J 0.45 is bluer than every Mann et al. 2015 form's range (from 0.5 mag): never evaluated, even extrapolating
        StarState m = emptyState();
        band(m, Band.V, 8.45, 0.01, 3.1);
        band(m, Band.J, 8.0, 0.01, 0.87);
        e = new TeffEstimator(m, TeffRelations.all().toArray(new TeffRelation[0]),
                IntStream.range(0, TeffRelations.all().size()).toArray(), true);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(0, e.n);
        assertTrue(e.anyOut && e.anyColour && !e.extrapolated);
    }

    /**
     * A Monte Carlo draw (values only): the relations' Teff shifted by the draw's offsets, weighted as nominal; no χ²
     * and no contributions. Offsets that push a Teff below 2000 K drop that relation (the class's sane range).
     */
    @Test
    void drawShiftsEachRelationByItsOffset() {
        StarState s = solarTypeDwarf(4.8);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        s.valuesOnly = true;
        double[] off = new double[TeffRelations.all().size()];
        off[TeffRelations.index(TeffRelations.byId("C10/V-Ks"))] = 100;
        off[TeffRelations.index(TeffRelations.byId("C10/J-Ks"))] = -10_000;
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, off, 0);
        List<Rel> used = List.of(C10_BV, C10_VI, C10_VJ, C10_VH, C10_VK);
        double[] w = weights(used, s, 4.44);
        double expected = 0;
        for (int i = 0; i < used.size(); i++) {
            expected += w[i] * (used.get(i).t().teffK(s.m0, s.feh, 4.44) + (used.get(i) == C10_VK ? 100 : 0));
        }
        expected /= Arrays.stream(w).sum();
        assertEquals(expected, e.mean, 1e-6);
        assertEquals(5, e.n);
        assertEquals(bits(used), e.mask);
        assertTrue(Double.isNaN(e.chi2()), "no χ² in a draw");
    }
}
