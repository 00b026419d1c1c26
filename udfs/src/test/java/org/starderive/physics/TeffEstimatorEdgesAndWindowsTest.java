package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.TeffEstimatorTest.C10_BV;
import static org.starderive.physics.TeffEstimatorTest.C10_VI;
import static org.starderive.physics.TeffEstimatorTest.GHB09_VJ;
import static org.starderive.physics.TeffEstimatorTest.M15_VJ;
import static org.starderive.physics.TeffEstimatorTest.band;
import static org.starderive.physics.TeffEstimatorTest.bits;
import static org.starderive.physics.TeffEstimatorTest.emptyState;
import static org.starderive.physics.TeffEstimatorTest.estimator;
import static org.starderive.physics.TeffEstimatorTest.twoSigma;

import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.junit.jupiter.api.Test;
import org.starderive.physics.TeffEstimatorTest.Rel;

/**
 * {@link TeffEstimator#estimate}: which colour edges bound Teff in a Monte Carlo draw and in the nominal estimate
 * (the method's Javadoc: a draw keeps the FGK and giant relations' edge bounds, which decide the regime), and the Teff window of the
 * Mann et al. 2015 relations (2700–4100 K, ApJ 804, 64; widened to the blend zone's upper edge on request), against
 * the published relations typed again in {@link TeffEstimatorTest}.
 */
class TeffEstimatorEdgesAndWindowsTest {

    /** Teff of a typed relation at colour x of its two bands (the red band at 0), [Fe/H] and log g. */
    private static double typedAt(Rel r, double x, double feh, double logg) {
        StarState at = emptyState();
        at.m0[r.blue().ordinal()] = x;
        at.m0[r.red().ordinal()] = 0;
        return r.t().teffK(at.m0, feh, logg);
    }

    /**
     * A dwarf whose B−V is redder than the Casagrande et al. 2010 red edge 1.29 and whose V−I_C is bluer than the
     * blue edge 0.46, each by 1 mmag more than twice its error (the class rule); V = 0 so the colours are exact.
     */
    @Test
    void aDrawKeepsTheFgkRedAndBlueEdgeBounds() {
        StarState s = TeffEstimatorTest.solarTypeDwarf(0.0);
        s.m0[Band.B.ordinal()] = 1.29 + twoSigma(s, Band.B, Band.V) + 0.001;
        s.m0[Band.IC.ordinal()] = -(0.46 - twoSigma(s, Band.V, Band.IC) - 0.001);
        double redEdgeK = typedAt(C10_BV, 1.29, s.feh, 4.44);
        double blueEdgeK = typedAt(C10_VI, 0.46, s.feh, 4.44);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertEquals(redEdgeK, e.tUpper, 1e-6, "nominal: cooler than B−V at its red edge");
        assertEquals(blueEdgeK, e.tLower, 1e-6, "nominal: hotter than V−I_C at its blue edge");
        s.valuesOnly = true;
        e.estimate(Regime.FGK_DWARF, 4.44, 0.0, null, 0);
        assertEquals(redEdgeK, e.tUpper, 1e-6, "a draw: the red-edge bound decides the regime (M dwarf)");
        assertEquals(blueEdgeK, e.tLower, 1e-6, "a draw: the blue-edge bound decides the regime (hot)");
        assertTrue(e.anyOut);
    }

    /** A giant's V−J beyond the González Hernández &amp; Bonifacio 2009 red edge 2.4 (Table 5) bounds a draw too. */
    @Test
    void aDrawKeepsTheGiantRedEdgeBound() {
        StarState s = emptyState();
        band(s, Band.V, 0.0, 0.02, 3.1);
        band(s, Band.J, 0.0, 0.02, 0.87);
        s.m0[Band.V.ordinal()] = 2.4 + twoSigma(s, Band.V, Band.J) + 0.001;
        s.valuesOnly = true;
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.GIANT, 2.5, 0.0, null, 0);
        assertEquals(0, e.n);
        assertEquals(typedAt(GHB09_VJ, 2.4, s.feh, 2.5), e.tUpper, 1e-6);
    }

    /**
     * An M dwarf with V and J only, V−J 6.6: redder than where the plain Mann et al. 2015 polynomial turns back up
     * (its minimum, found here by Commons Math's Brent optimiser on the typed copy, near 6.40 and 2811 K; the sheet
     * says 2780–2820 K). The nominal estimate is bounded by the plain form's Teff there (the J−H form, which needs H,
     * and the [Fe/H] form, which needs a measured [Fe/H], bound nothing); a draw is not bounded by the M-dwarf edge.
     */
    @Test
    void anMDwarfRedderThanTheTurnoverIsBoundedNominallyOnly() {
        double turnoverK = new BrentOptimizer(1e-12, 1e-14).optimize(new MaxEval(200), GoalType.MINIMIZE,
                new SearchInterval(5.0, 8.0), new UnivariateObjectiveFunction(x -> typedAt(M15_VJ, x, 0, 4.8)))
                .getValue();
        StarState s = emptyState();
        band(s, Band.V, 14.6, 0.01, 3.1);
        band(s, Band.J, 8.0, 0.02, 0.87);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(0, e.n);
        assertTrue(e.anyOut && e.anyColour);
        // the catalogue places the edge on a 0.001 mag grid: Teff is flat there to well under 0.01 K
        assertEquals(turnoverK, e.tUpper, 0.01);
        // with extrapolation allowed as well: beyond the turnover the polynomial is never evaluated (relations sheet)
        TeffEstimator ex = estimator(s, true);
        ex.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(0, ex.n, "V−J 6.6 would give about 2820 K, inside the window, if it were evaluated");
        assertTrue(!ex.extrapolated && Double.isNaN(ex.mean));
        s.valuesOnly = true;
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(Double.POSITIVE_INFINITY, e.tUpper, "a draw: the M-dwarf edge does not decide the regime");
    }

    /**
     * A J−H form of Mann et al. 2015 (Table 2: Teff from the colour and J−H) needs both J and H: with an estimator
     * holding only that form, a star missing one of them has no usable colour at all; with both, it is used.
     */
    @Test
    void aJhFormNeedsBothJAndH() {
        for (String id : new String[] {"M15/V-Ic+JH", "M15/V-J+JH"}) {
            TeffRelation[] one = {TeffRelations.byId(id)};
            int[] idx = {TeffRelations.index(one[0])};
            for (Band missing : new Band[] {Band.J, Band.H}) {
                StarState s = emptyState();
                band(s, Band.V, 11.9, 0.02, 3.1);
                band(s, Band.IC, 9.45, 0.02, 1.8);
                band(s, Band.J, 8.0, 0.02, 0.87);
                band(s, Band.H, 7.4, 0.025, 0.55);
                TeffEstimator e = new TeffEstimator(s, one, idx, false);
                e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
                assertEquals(1, e.n, id + " with J and H");
                s.m0[missing.ordinal()] = Double.NaN;
                s.sm[missing.ordinal()] = Double.NaN;
                e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
                assertEquals(0, e.n, id + " without " + missing.label());
                assertTrue(!e.anyColour && !e.anyOut, id + " without " + missing.label() + ": no colour at all");
            }
        }
    }

    /**
     * V−J 2.5 gives 4125 K by the plain Mann et al. 2015 form (the sheet: 4100 K at V−J 2.53): above the published
     * 2700–4100 K window, so unused with no wider cap and used when the cap is the blend zone's upper edge 4300 K.
     * With nothing used, no contribution is left.
     */
    @Test
    void mannTeffAboveItsWindowIsUsedOnlyUpToTheGivenCap() {
        StarState s = emptyState();
        band(s, Band.V, 10.5, 0.01, 3.1);
        band(s, Band.J, 8.0, 0.02, 0.87);
        s.sEbv = 0.02;
        double teffK = typedAt(M15_VJ, 2.5, 0, 4.8);
        assertTrue(teffK > 4100 && teffK < Regime.M_BLEND_HI_K, "set-up: " + teffK);
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(bits("M15/V-J"), e.mask);
        assertEquals(teffK, e.mean, 1e-6);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, 0);
        assertEquals(0, e.n, "beyond 4100 K with no wider cap");
        assertTrue(e.anyColour && !e.anyOut, "the colour itself is inside its range");
        for (int q = 0; q < ErrorSource.COUNT; q++) {
            assertEquals(0.0, e.c[q], 0.0, "no estimate, no contribution: " + ErrorSource.name(q));
        }
    }

    /**
     * The [Fe/H] form of V−J (Mann et al. 2015 Table 2: f = 0.05262 per dex) at V−J 6.3 gives 2698 K at [Fe/H] −0.6
     * (inside the −0.6 … +0.5 range) — below the 2700 K window, so the next usable form of the colour, the plain
     * one (2813 K), is taken; at [Fe/H] −0.5 the [Fe/H] form gives 2717 K and is used.
     */
    @Test
    void mannFormBelowItsWindowGivesWayToTheNextForm() {
        Rel vjFeh = new Rel("M15/V-J+FeH", Band.V, Band.J, Math.sqrt(42 * 42 + 60 * 60), 0.0, (m0, f, g) -> {
            double x = m0[Band.V.ordinal()] - m0[Band.J.ordinal()];
            return 3500 * (2.515 - 1.054 * x + 0.2965 * x * x - 0.04150 * x * x * x + 0.002245 * x * x * x * x
                    + 0.05262 * f);
        });
        StarState s = emptyState();
        band(s, Band.V, 14.3, 0.01, 3.1);
        band(s, Band.J, 8.0, 0.02, 0.87);
        s.fehMeasured = true;
        s.feh = -0.6;
        assertTrue(typedAt(vjFeh, 6.3, -0.6, 4.8) < 2700, "set-up");
        TeffEstimator e = estimator(s, false);
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(bits("M15/V-J"), e.mask);
        assertEquals(M15_VJ.t().teffK(s.m0, s.feh, 4.8), e.mean, 1e-6);
        s.feh = -0.5;
        e.estimate(Regime.M_DWARF, 4.8, 0.0, null, Regime.M_BLEND_HI_K);
        assertEquals(bits("M15/V-J+FeH"), e.mask);
        assertEquals(vjFeh.t().teffK(s.m0, s.feh, 4.8), e.mean, 1e-6);
    }
}
