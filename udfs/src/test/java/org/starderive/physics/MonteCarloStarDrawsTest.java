package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.Test;

/**
 * What a whole star's draws sample, by the kind of distance the analytic chain gave it: a posterior distance (its
 * median or its mode reported) is drawn from the posterior even when the rest of the chain runs; a star whose
 * distance is withheld keeps the Teff from its colours and the angular diameter from its bolometric flux, each with
 * its full spread, and nothing that needs a distance.
 */
class MonteCarloStarDrawsTest {

    private static double[][] run(MonteCarloDeriver mc, StarInput in) {
        double[][] out = new double[MonteCarloDeriver.NQ][3];
        mc.percentiles(in, 77L, out);
        return out;
    }

    /** The solar twin moved from 10 pc to 1 kpc: every magnitude 10 mag fainter (distance modulus, common practice). */
    private static StarInput solarTwinAt1kpc(double parallaxErrMas) {
        StarInput in = StarDeriverTest.solarTwinAt10pc().parallax(1.0, parallaxErrMas);
        for (int k = 0; k < Band.COUNT; k++) {
            if (in.hasMag[k]) {
                in.mag[k] += 10;
            }
        }
        return in;
    }

    /** The solar twin at 1 kpc without a distance (ϖ/σ = 2) seen in two bands only, each ± 0.02 mag. */
    private static StarInput twoBands(Band blue, Band red) {
        StarInput twin = solarTwinAt1kpc(0.5);
        return new StarInput().parallax(1.0, 0.5).magnitude(blue, twin.mag[blue.ordinal()], 0.02)
                .magnitude(red, twin.mag[red.ordinal()], 0.02);
    }

    @Test
    void aPosteriorDistanceIsDrawnFromThePosteriorWhetherItsMedianOrItsModeIsReported() {
        // ϖ = 1 ± 0.3 mas: the posterior under the exponentially decreasing space density prior (Bailer-Jones 2015),
        // its percentiles integrated independently (ChainStepsTest); 1/ϖ' would give 769, 1000 and 1429 pc instead
        double plx = 1.0;
        double sig = 0.3;
        StarInput in = solarTwinAt1kpc(sig);
        double[] expected = ChainStepsTest.posteriorPercentilesPc(plx, sig, DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT);
        double width = expected[2] - expected[0];
        for (boolean median : new boolean[] {true, false}) {
            DeriveSettings s = DeriveSettings.builder().distanceSnrMin(0).posteriorPercentiles(median).build();
            StarResult b = new StarDeriver(s).derive(in, new StarResult());
            assertEquals(median ? StarResult.DistanceMethod.EDSD_MEDIAN : StarResult.DistanceMethod.EDSD_MODE, b.distMethod);
            assertFalse(Double.isNaN(b.teffK), "the chain runs: the star has a Teff");
            double[][] q = run(new MonteCarloDeriver(s, 8000, 5), in);
            // draw noise of a percentile of 8000 draws: about 1.5 % of the 16-84 % width here; 4 % allowed
            for (int k = 0; k < 3; k++) {
                assertEquals(expected[k], q[0][k], 0.04 * width, (median ? "median" : "mode") + " star, percentile " + k);
            }
            assertFalse(Double.isNaN(q[1][1]), "Teff percentiles");
        }
    }

    @Test
    void aStarWithoutDistanceKeepsTeffAndAngularDiameterSpreadsAndGetsNothingThatNeedsADistance() {
        // ϖ/σ = 2, below distance_snr_min (5, README): no distance, hence no luminosity class, but a Teff from the
        // colours. Its draws must scatter every relation it uses (a star without a class blends the dwarf regimes):
        // with only the relations' scatter switched on, half the 16-84 % range equals the first-order error (a
        // Gaussian's 16-84 % half-range is its σ: common practice), within 8 % as in ErrorSourceTest. Two stars: all
        // the solar twin's bands, and two stars with one dwarf relation each (Casagrande et al. 2010 J-Ks, B-V; the
        // B-V star with all sources on also spreads by its B error).
        StarInput jks = twoBands(Band.J, Band.KS);
        StarInput bv = twoBands(Band.B, Band.V);
        DeriveSettings s = DeriveSettings.defaults();
        for (StarInput in : new StarInput[] {solarTwinAt1kpc(0.5), jks, bv}) {
            for (long mask : new long[] {-1L, 1L << ErrorSource.SCATTER}) {
                StarDeriver first = new StarDeriver(s);
                first.errorSources(mask);
                StarResult b = first.derive(in, new StarResult());
                String ctx = Long.bitCount(b.teffRelations) + " relations, sources " + Long.toHexString(mask);
                assertEquals(StarResult.DistanceMethod.NONE, b.distMethod);
                assertNull(b.lumClass);
                if (in != jks && in != bv) {
                    assertTrue(Long.bitCount(b.teffRelations) > 1, ctx);
                } else {
                    assertEquals(1, Long.bitCount(b.teffRelations), ctx);
                }
                assertTrue(b.teffErrK > 10, "the first-order Teff error: " + b.teffErrK);
                MonteCarloDeriver mc = new MonteCarloDeriver(s, 4000, 9);
                mc.errorSources(mask);
                double[][] q = run(mc, in);
                assertEquals(b.teffK, q[1][1], 0.1 * b.teffErrK, "median Teff, " + ctx);
                assertEquals(b.teffErrK, (q[1][2] - q[1][0]) / 2, 0.08 * b.teffErrK, "Teff spread, " + ctx);
                for (int k : new int[] {0, 2, 3, 4, 5}) {
                    assertTrue(Double.isNaN(q[k][0]) && Double.isNaN(q[k][1]) && Double.isNaN(q[k][2]),
                            MonteCarloDeriver.QUANTITIES[k] + " needs a distance");
                }
                // the angular diameter does not: θ = 2 √(F_bol / σ_SB) / Teff², from the apparent bolometric flux
                // (common practice); where the star has one, its draws spread as its first-order error says
                if (!Double.isNaN(b.angDiamMas)) {
                    assertEquals(b.angDiamErrMas, (q[6][2] - q[6][0]) / 2, 0.08 * b.angDiamErrMas, "θ spread, " + ctx);
                }
            }
        }
    }

    /**
     * The solar twin at parallax ϖ ± σ, every magnitude shifted alike so that the analytic chain gives it
     * {@code lumOverLmin} times the lowest luminosity of the Eker et al. 2018 mass–luminosity relation (its 0.179 M⊙
     * end, Table 4): L scales as 10^(−0.4 Δm) when all magnitudes move by Δm and the colours stay (definition of the
     * magnitude scale), repeated three times as the Teff moves a little with the star's class. Returns the star;
     * {@code nominal} receives its analytic result.
     */
    private static StarInput twinNearTheMassRelationsFaintEnd(DeriveSettings s, double plx, double sig, double lumOverLmin,
                                                              StarResult nominal) {
        StarInput in = StarDeriverTest.solarTwinAt10pc().parallax(plx, sig);
        double target = lumOverLmin * Math.pow(10, MassLuminosityEker2018.LOGL_MIN);
        for (int round = 0; round < 3; round++) {
            double shift = 2.5 * Math.log10(new StarDeriver(s).derive(in, nominal).lumLsun / target);
            for (int k = 0; k < Band.COUNT; k++) {
                if (in.hasMag[k]) {
                    in.mag[k] += shift;
                }
            }
        }
        new StarDeriver(s).derive(in, nominal);
        assertEquals(target, nominal.lumLsun, 1e-3 * target);
        return in;
    }

    /** Settings that give the inverse parallax 1/ϖ at any ϖ/σ (no distance withheld). */
    private static DeriveSettings inverseAtAnySignificance() {
        return DeriveSettings.builder().distanceSnrMin(0).distanceMethod(DeriveSettings.DistanceMethod.INVERSE).build();
    }

    @Test
    void aLowSignificanceInverseParallaxIsRedrawnWhileNotPositive() {
        // ϖ = 1 ± 2 mas taken as 1/ϖ: a draw is 1/ϖ' with ϖ' ~ N(ϖ, σ) redrawn while ϖ' ≤ 0 (class Javadoc), i.e. ϖ'
        // from the normal law truncated to ϖ' > 0, where 31 % of the first tries fall. d = 1/ϖ' is decreasing, so
        // P(d ≤ x) = P(ϖ' ≥ 1/x | ϖ' > 0) = (1 − Φ((1/x − ϖ)/σ)) / (1 − Φ(−ϖ/σ)), Φ from Commons Math. Each drawn
        // percentile must sit at its probability in that law within 4 standard errors of a sample quantile of n
        // draws, √(p(1 − p)/n) in probability (asymptotic law of sample quantiles; common practice). Without the
        // redraws a draw with ϖ' ≤ 0 would fall back on the nominal 1000 pc: the median would sit at P = 0.72.
        double plx = 1.0;
        double sig = 2.0;
        int n = 256;
        DeriveSettings s = inverseAtAnySignificance();
        StarResult b = new StarResult();
        StarInput in = twinNearTheMassRelationsFaintEnd(s, plx, sig, 30, b);
        assertEquals(StarResult.DistanceMethod.INVERSE_PARALLAX, b.distMethod);
        assertEquals(1000.0, b.distPc, 1e-9);
        NormalDistribution w = new NormalDistribution(plx, sig);
        double positive = 1 - w.cumulativeProbability(0);
        double[][] q = run(new MonteCarloDeriver(s, n, 3), in);
        double[] p = {StarDeriver.P16, 0.5, StarDeriver.P84};
        for (int k = 0; k < 3; k++) {
            double at = (1 - w.cumulativeProbability(1000 / q[0][k])) / positive;
            assertEquals(p[k], at, 4 * Math.sqrt(p[k] * (1 - p[k]) / n), "distance percentile " + k + ": " + q[0][k] + " pc");
        }
        assertFalse(Double.isNaN(q[1][1]) || Double.isNaN(q[2][1]), "Teff and L are drawn too");
    }

    @Test
    void aQuantityMostDrawsLackGetsNoPercentilesThoughTheNominalStarHasIt() {
        // Class Javadoc: percentiles only over the draws that gave a value, none if fewer than half did. The same
        // low-significance star (ϖ = 1 ± 2 mas, inverse parallax, 1000 pc nominal) made 2.25 times as luminous as the
        // faint end of the Eker et al. 2018 relation: it has a mass, but a draw below the distance
        // d_c = 1000 pc / √2.25 = 667 pc falls below the relation and has none. P(d ≥ d_c) = P(0 < ϖ' ≤ 1.5 mas) /
        // P(ϖ' > 0) = 0.42 (Commons Math's Φ): most draws have no mass (and no log g), so neither has percentiles;
        // Teff and L, which every draw has, do.
        double plx = 1.0;
        double sig = 2.0;
        DeriveSettings s = inverseAtAnySignificance();
        StarResult b = new StarResult();
        StarInput in = twinNearTheMassRelationsFaintEnd(s, plx, sig, 2.25, b);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, b.lumClass);
        assertFalse(Double.isNaN(b.massMsun) || Double.isNaN(b.loggCgs), "the nominal star has a mass and a log g");
        NormalDistribution w = new NormalDistribution(plx, sig);
        double withMass = (w.cumulativeProbability(plx * Math.sqrt(2.25)) - w.cumulativeProbability(0))
                / (1 - w.cumulativeProbability(0));
        assertTrue(withMass > 0.38 && withMass < 0.46, "share of draws with a mass: " + withMass);
        double[][] q = run(new MonteCarloDeriver(s, 256, 3), in);
        for (int k : new int[] {4, 5}) {
            assertTrue(Double.isNaN(q[k][0]) && Double.isNaN(q[k][1]) && Double.isNaN(q[k][2]),
                    MonteCarloDeriver.QUANTITIES[k] + " from fewer than half the draws: " + q[k][1]);
        }
        for (int k : new int[] {0, 1, 2, 3}) {
            assertFalse(Double.isNaN(q[k][0]) || Double.isNaN(q[k][2]), MonteCarloDeriver.QUANTITIES[k]);
        }
    }

    @Test
    void aQuantityTheNominalStarLacksGetsNoPercentilesThoughMostDrawsHaveIt() {
        // Class Javadoc: a quantity the analytic chain does not give gets no percentiles. ϖ = 1 ± 0.5 mas with the
        // posterior's mode reported (Bailer-Jones 2015; 1500 pc, ChainStepsTest) and the twin made 1/1.8 as luminous
        // as the faint end of the Eker et al. 2018 relation there: no mass, no log g. A draw beyond
        // d_c = 1500 pc × √1.8 = 2012 pc is bright enough for a mass; the posterior's 16th and 50th percentiles,
        // integrated independently (ChainStepsTest), bracket d_c, so more than half the draws (about two thirds)
        // have a mass, and still none may be reported.
        double plx = 1.0;
        double sig = 0.5;
        DeriveSettings s = DeriveSettings.builder().distanceSnrMin(0).posteriorPercentiles(false).build();
        StarResult b = new StarResult();
        StarInput in = twinNearTheMassRelationsFaintEnd(s, plx, sig, 1 / 1.8, b);
        assertEquals(StarResult.DistanceMethod.EDSD_MODE, b.distMethod);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, b.lumClass);
        assertTrue(Double.isNaN(b.massMsun) && Double.isNaN(b.loggCgs), "below the relation: no mass");
        double dc = b.distPc * Math.sqrt(1.8);
        double[] post = ChainStepsTest.posteriorPercentilesPc(plx, sig, DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT);
        assertTrue(post[0] < dc && dc < 0.85 * post[1], "d_c " + dc + " pc against the posterior's 16/50 % " + post[0]
                + ", " + post[1]);
        double[][] q = run(new MonteCarloDeriver(s, 256, 3), in);
        for (int k : new int[] {4, 5}) {
            assertTrue(Double.isNaN(q[k][0]) && Double.isNaN(q[k][1]) && Double.isNaN(q[k][2]),
                    MonteCarloDeriver.QUANTITIES[k] + " the nominal star lacks: " + q[k][1]);
        }
        assertFalse(Double.isNaN(q[2][0]) || Double.isNaN(q[3][2]), "L and R are given");
    }

    @Test
    void withOneRelationEnabledTheTeffSpreadIsItsPublishedScatter() {
        // only C10 B−V enabled (Casagrande et al. 2010, Table 4: σ = 73 K) and only the relations' scatter on: every
        // draw shifts that one relation by N(0, 73 K), so half the 16–84 % range is 73 K (a Gaussian's; common
        // practice) within 25 %, 4 standard errors of that half-range for 256 draws (0.067 σ: asymptotic law of sample
        // quantiles, common practice). The relation is the only one the star draws: the one slot there is.
        DeriveSettings s = DeriveSettings.builder().relations(List.of("C10/B-V")).build();
        StarInput in = twoBands(Band.B, Band.V);
        MonteCarloDeriver mc = new MonteCarloDeriver(s, 256, 5);
        mc.errorSources(1L << ErrorSource.SCATTER);
        double[][] q = run(mc, in);
        assertEquals(73.0, (q[1][2] - q[1][0]) / 2, 0.25 * 73, "Teff spread");
        StarResult b = new StarDeriver(s).derive(in, new StarResult());
        assertEquals("C10/B-V", b.teffFrom());
        assertEquals(b.teffK, q[1][1], 0.25 * 73, "median Teff");
    }

    @Test
    void aStarWithoutDistanceDrawsTheAssumedLoggOfItsGaiaRelation() {
        // The G dwarf seen in Gaia-like bands and 2MASS of ErrorSourceTest moved from 100 pc to 1.43 pc (every magnitude
        // 5 log10(100/1.43) brighter: distance modulus, common practice), with a poor parallax, 700 ± 300 mas: ϖ/σ 2.3
        // is below distance_snr_min (5, README), so no distance and no class. Its Teff comes from the Casagrande et al.
        // 2021 relations at an assumed log g, itself an error source for such a star (ErrorSource LOGG): with only that
        // source on, half the 16–84 % range must be the first-order error (a Gaussian's half-range is its σ, common
        // practice; the C21 relations are linear in log g) within 25 %, 4 standard errors of that half-range for 256
        // draws (0.067 σ: asymptotic law of sample quantiles, common practice).
        StarInput in = ErrorSourceTest.stars().get(0).parallax(700, 300);
        for (int k = 0; k < Band.COUNT; k++) {
            if (in.hasMag[k]) {
                in.mag[k] -= 5 * Math.log10(100 / 1.43);
            }
        }
        long logg = 1L << ErrorSource.LOGG;
        StarDeriver first = new StarDeriver(DeriveSettings.defaults());
        first.errorSources(logg);
        StarResult b = first.derive(in, new StarResult());
        assertEquals(StarResult.DistanceMethod.NONE, b.distMethod);
        assertNull(b.lumClass);
        assertTrue(b.teffFrom().contains("C21/BP-RP/dwarf"), b.teffFrom());
        assertTrue(b.teffErrK > 10, "the assumed log g moves the Teff: " + b.teffErrK);
        MonteCarloDeriver mc = new MonteCarloDeriver(DeriveSettings.defaults(), 256, 5);
        mc.errorSources(logg);
        double[][] q = run(mc, in);
        assertEquals(b.teffErrK, (q[1][2] - q[1][0]) / 2, 0.25 * b.teffErrK, "Teff spread from the assumed log g");
        assertEquals(b.teffK, q[1][1], 0.25 * b.teffErrK, "median Teff");
    }
}
