package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

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
}
