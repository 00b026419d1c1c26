package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.TeffEstimatorTest.C10_JK;
import static org.starderive.physics.TeffEstimatorTest.C10_VJ;
import static org.starderive.physics.TeffEstimatorTest.C10_VK;
import static org.starderive.physics.TeffEstimatorTest.C21_BPRP;
import static org.starderive.physics.TeffEstimatorTest.C21_GK;
import static org.starderive.physics.TeffEstimatorTest.band;
import static org.starderive.physics.TeffEstimatorTest.bits;
import static org.starderive.physics.TeffEstimatorTest.emptyState;
import static org.starderive.physics.TeffEstimatorTest.estimator;

import java.util.List;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.DecompositionSolver;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;
import org.starderive.physics.TeffEstimatorTest.Rel;

/**
 * The chi-square of several colours that share bands ({@link TeffEstimator#chi2()}), against a covariance written
 * out here in the colours rather than in the bands: Cov(X−Y, X−Z) = σ_X², Cov(X−Y, Z−X) = −σ_X², each colour's own
 * variance σ_blue² + σ_red², plus ΔR_i ΔR_j σ_E(B−V)² for the common reddening (error propagation, common practice).
 * The Teff covariance is k_i k_j Cov(X_i, X_j) + f_i f_j σ_[Fe/H]² + δ_ij σ_rel,i², with the slopes k = ∂T/∂X and
 * f = ∂T/∂[Fe/H] of the published relations typed again ({@link TeffEstimatorTest}) by five-point differences, and
 * χ² = rᵀC⁻¹r − (1ᵀC⁻¹r)² / 1ᵀC⁻¹1 (the generalised least-squares χ² about a free mean, as the class Javadoc says)
 * solved by Commons Math's LU decomposition.
 */
class TeffChi2SharedBandsTest {
    private static final double LOGG = 4.4;

    /**
     * A solar-type dwarf in Gaia, Johnson V and 2MASS bands: V−J 1.20, V−Ks 1.55, J−Ks 0.35 (Casagrande et al. 2010
     * ranges 0.61–2.44, 0.78–3.15, 0.07–0.80), BP−RP 0.82 and G−Ks 1.40 (Casagrande et al. 2021 dwarf ranges
     * 0.20–2.00 and 0.20–2.80); V, J and Ks each enter two or three colours. [Fe/H] +0.1 ± 0.1 measured.
     */
    private static StarState gaiaJohnson2MassDwarf() {
        StarState s = emptyState();
        band(s, Band.G, 9.85, 0.003, 2.5);
        band(s, Band.BP, 10.18, 0.004, 3.2);
        band(s, Band.RP, 9.36, 0.005, 1.9);
        band(s, Band.V, 10.0, 0.02, 3.1);
        band(s, Band.J, 8.80, 0.025, 0.87);
        band(s, Band.KS, 8.45, 0.02, 0.35);
        s.sEbv = 0.02;
        s.feh = 0.1;
        s.sFeh = 0.1;
        s.fehMeasured = true;
        return s;
    }

    /** Five-point derivative of a typed relation along {@code dir} (a change of the magnitudes) or along [Fe/H]. */
    private static double slope(Rel r, StarState s, double[] dir, double dFeh) {
        double h = 1e-3;
        double[] f = new double[5];
        for (int k = -2; k <= 2; k++) {
            double[] m = s.m0.clone();
            for (int b = 0; b < m.length; b++) {
                m[b] += k * h * dir[b];
            }
            f[k + 2] = r.t().teffK(m, s.feh + k * h * dFeh, LOGG);
        }
        return (f[0] - 8 * f[1] + 8 * f[3] - f[4]) / (12 * h);
    }

    /** Variance of a band's magnitude shared by colours i and j, with the sign of its place in each. */
    private static double sharedBand(Rel i, Rel j, Band b, StarState s) {
        int si = i.blue() == b ? 1 : i.red() == b ? -1 : 0;
        int sj = j.blue() == b ? 1 : j.red() == b ? -1 : 0;
        return si * sj * s.sm[b.ordinal()] * s.sm[b.ordinal()];
    }

    /** The generalised least-squares χ² of the typed relations' Teff with the colour covariance written out. */
    static double chi2FromColourCovariance(List<Rel> used, StarState s) {
        int n = used.size();
        double[] k = new double[n];
        double[] f = new double[n];
        double[] dR = new double[n];
        RealVector t = new ArrayRealVector(n);
        for (int i = 0; i < n; i++) {
            Rel r = used.get(i);
            double[] blueOnly = new double[Band.COUNT]; // the blue band of each of these relations is in its colour only
            blueOnly[r.blue().ordinal()] = 1;
            k[i] = slope(r, s, blueOnly, 0);
            f[i] = slope(r, s, new double[Band.COUNT], 1);
            dR[i] = s.rBand[r.blue().ordinal()] - s.rBand[r.red().ordinal()];
            t.setEntry(i, r.t().teffK(s.m0, s.feh, LOGG));
        }
        RealMatrix c = new Array2DRowRealMatrix(n, n);
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                Rel a = used.get(i);
                Rel b = used.get(j);
                double colourCov = dR[i] * dR[j] * s.sEbv * s.sEbv;
                for (Band band : List.of(a.blue(), a.red())) {
                    colourCov += sharedBand(a, b, band, s);
                }
                double own = i == j ? a.sigmaK() * a.sigmaK() : 0;
                c.setEntry(i, j, k[i] * k[j] * colourCov + f[i] * f[j] * s.sFeh * s.sFeh + own);
            }
        }
        DecompositionSolver solver = new LUDecomposition(c).getSolver();
        RealVector r = t.mapSubtract(t.getEntry(0)); // about one of the values: χ² does not depend on the shift
        RealVector one = new ArrayRealVector(n, 1.0);
        RealVector cInvR = solver.solve(r);
        RealVector cInvOne = solver.solve(one);
        return r.dotProduct(cInvR) - Math.pow(one.dotProduct(cInvR), 2) / one.dotProduct(cInvOne);
    }

    private static void assertChi2(TeffEstimator e, List<Rel> used, StarState s) {
        assertEquals(bits(used), e.mask, "colours used");
        double expected = chi2FromColourCovariance(used, s);
        assertEquals(expected, e.chi2(), 1e-9 * expected, "χ² of " + used.stream().map(Rel::id).toList());
    }

    @Test
    void fiveColoursSharingVJAndKsFollowTheColourCovariance() {
        StarState s = gaiaJohnson2MassDwarf();
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, LOGG, 0.2, null, 0);
        // no B, R_C, I_C or H: of the Casagrande et al. 2010 colours only V−J, V−Ks and J−Ks
        assertChi2(e, List.of(C10_VJ, C10_VK, C10_JK, C21_BPRP, C21_GK), s);
    }

    /**
     * BP 0.2 mag too faint (BP−RP 1.02: about 550 K cooler by Casagrande et al. 2021 than at 0.82, with BP known
     * to 4 mmag): the χ² is beyond the 1-in-a-million point of χ² with 4 degrees of freedom (Commons Math), and
     * still the correlated one.
     */
    @Test
    void coloursThatDisagreeGiveALargeChi2() {
        StarState s = gaiaJohnson2MassDwarf();
        s.m0[Band.BP.ordinal()] += 0.2;
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, LOGG, 0.2, null, 0);
        List<Rel> used = List.of(C10_VJ, C10_VK, C10_JK, C21_BPRP, C21_GK);
        assertChi2(e, used, s);
        double far = new ChiSquaredDistribution(used.size() - 1).inverseCumulativeProbability(1 - 1e-6);
        assertTrue(e.chi2() > far, "χ² " + e.chi2() + " against " + far);
    }

    /**
     * Without J its two colours are dropped and the covariance is that of the three left; estimated by the same
     * estimator right after the five-colour star (it reuses its arrays: nothing of the earlier star may remain).
     */
    @Test
    void aMissingBandDropsItsColoursAndNothingOfTheStarBeforeRemains() {
        StarState s = gaiaJohnson2MassDwarf();
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, LOGG, 0.2, null, 0);
        assertChi2(e, List.of(C10_VJ, C10_VK, C10_JK, C21_BPRP, C21_GK), s);
        s.m0[Band.J.ordinal()] = Double.NaN;
        s.sm[Band.J.ordinal()] = Double.NaN;
        e.estimate(Regime.FGK_DWARF, LOGG, 0.2, null, 0);
        assertChi2(e, List.of(C10_VK, C21_BPRP, C21_GK), s);
        // without G and BP as well: the two Casagrande et al. 2010 colours of V and Ks that remain, V−Ks alone
        s.m0[Band.G.ordinal()] = Double.NaN;
        s.m0[Band.BP.ordinal()] = Double.NaN;
        e.estimate(Regime.FGK_DWARF, LOGG, 0.2, null, 0);
        assertEquals(bits(List.of(C10_VK)), e.mask);
        assertEquals(0.0, e.chi2(), 0.0, "one colour: no degree of freedom");
    }

    /**
     * Two M-dwarf colours in their J−H forms (Mann et al. 2015): each estimate has seven shared terms (its two bands,
     * J and H, E(B−V) twice, [Fe/H]); an estimator holding just these two relations uses every slot it has. Checked
     * against the dense fit of {@link TeffEstimatorTest}.
     */
    @Test
    void twoJhFormsFillEverySharedTermSlot() {
        StarState s = emptyState();
        double j = 8.0;
        band(s, Band.V, j + 3.9, 0.02, 3.1);
        band(s, Band.IC, j + 3.9 - 2.45, 0.02, 1.8);
        band(s, Band.J, j, 0.02, 0.87);
        band(s, Band.H, j - 0.60, 0.025, 0.55);
        s.sEbv = 0.02;
        TeffRelation[] two = {TeffRelations.byId("M15/V-J+JH"), TeffRelations.byId("M15/V-Ic+JH")};
        int[] idx = {TeffRelations.index(two[0]), TeffRelations.index(two[1])};
        TeffEstimator e = new TeffEstimator(s, two, idx, false);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        TeffEstimatorTest.assertMatchesTypedCopy(e, List.of(TeffEstimatorTest.M15_VJ_JH, TeffEstimatorTest.M15_VI_JH),
                s, 4.8, 0.0);
    }

    /** "NaN if … an input is NaN" (class Javadoc): a colour excess without an error gives no χ². */
    @Test
    void aNanInputGivesNoChi2() {
        StarState s = gaiaJohnson2MassDwarf();
        s.sEbv = Double.NaN;
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, LOGG, 0.2, null, 0);
        assertEquals(5, e.n);
        assertTrue(Double.isNaN(e.chi2()), "χ² " + e.chi2());
    }
}
