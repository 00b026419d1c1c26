package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * A star with a parallax but no usable photometry has no Teff, L or R — but its distance still has a distribution,
 * and the Monte Carlo path must draw it: the percentiles of the drawn distances equal the distribution's own,
 * computed here independently (within draw noise).
 */
class MonteCarloDistanceOnlyTest {
    private static final int DRAWS = 20_000;

    private static double[][] run(DeriveSettings s, StarInput in) {
        double[][] out = new double[MonteCarloDeriver.NQ][3];
        new MonteCarloDeriver(s, DRAWS, 7).percentiles(in, 42, out);
        return out;
    }

    @Test
    void posteriorDistanceOfAStarWithoutPhotometryIsStillDrawn() {
        double plx = 1.0;
        double sig = 0.3;
        double[][] out = run(DeriveSettings.builder().distanceSnrMin(0).build(), new StarInput().parallax(plx, sig));
        double[] expected = ChainStepsTest.posteriorPercentilesPc(plx, sig, DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT);
        // draw noise of a percentile of 20,000 draws: about 1 % of the width here; 3 % allowed
        double width = expected[2] - expected[0];
        for (int k = 0; k < 3; k++) {
            assertEquals(expected[k], out[0][k], 0.03 * width, "distance percentile " + k);
        }
        for (int q = 1; q < MonteCarloDeriver.NQ; q++) {
            assertTrue(Double.isNaN(out[q][1]), MonteCarloDeriver.QUANTITIES[q] + " has no distribution without Teff");
        }
    }

    @Test
    void inverseParallaxDistanceOfAStarWithoutPhotometryIsStillDrawn() {
        // ϖ = 10 ± 1 mas, Gaussian: d = 1/ϖ is monotonic, so its percentiles are 1/(ϖ ± σ) and 1/ϖ exactly
        // (percentiles commute with monotonic maps; common practice)
        double[][] out = run(DeriveSettings.defaults(), new StarInput().parallax(10, 1));
        double[] expected = {1000 / 11.0, 100.0, 1000 / 9.0};
        double width = expected[2] - expected[0];
        for (int k = 0; k < 3; k++) {
            assertEquals(expected[k], out[0][k], 0.03 * width, "distance percentile " + k);
        }
    }

    @Test
    void theDistanceSourceSwitchedOffLeavesAStarWithoutTeffItsNominalDistance() {
        // StarDeriver#errorSources: the switch acts "in both paths"; with every source off a draw is the nominal star
        // (as MonteCarloDeriverTest checks for stars with a Teff), so the percentiles are 1/ϖ = 100 pc exactly
        MonteCarloDeriver mc = new MonteCarloDeriver(DeriveSettings.defaults(), 64, 7);
        mc.errorSources(0L);
        double[][] out = new double[MonteCarloDeriver.NQ][3];
        mc.percentiles(new StarInput().parallax(10, 1), 42, out);
        for (int k = 0; k < 3; k++) {
            assertEquals(100.0, out[0][k], 1e-9, "distance percentile " + k + " with the distance source off");
        }
    }

    @Test
    void aStarWithoutTeffSpendsItsRandomNumbersOnItsDistanceAlone() {
        // Class Javadoc: a star without a Teff only has its distance sampled, without the rest of the chain, from its
        // own stream, Commons RNG's XoRoShiRo128++ at the star seed (for run seed 1: output 1 of a SplitMix64 seeded
        // with the star key; MonteCarloDeriverTest checks both). So its 64 draws are exactly 1/ϖ' with ϖ' = ϖ + σ z and
        // z the stream's first 64 standard normal deviates (Commons RNG's ZigguratSampler, the sampler the draws use;
        // at ϖ/σ = 10 no redraw happens), and its percentiles those of Commons Math's type-6 Percentile (R_6) of them
        // (MonteCarloDeriverTest.streamInverseParallaxPercentiles with no deviate skipped).
        int n = 64;
        double plx = 10;
        double sig = 1;
        long key = 42;
        double[] expected = MonteCarloDeriverTest.streamInverseParallaxPercentiles(plx, sig, key, n, 0);
        double[][] out = new double[MonteCarloDeriver.NQ][3];
        new MonteCarloDeriver(DeriveSettings.defaults(), n, 1).percentiles(new StarInput().parallax(plx, sig), key, out);
        for (int k = 0; k < 3; k++) {
            assertEquals(expected[k], out[0][k], 1e-12 * expected[k], "distance percentile " + k);
        }
    }
}
