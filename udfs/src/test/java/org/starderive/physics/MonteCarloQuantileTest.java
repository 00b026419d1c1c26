package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.Arrays;
import java.util.SplittableRandom;

import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.junit.jupiter.api.Test;

/**
 * The Monte Carlo percentiles are Hyndman &amp; Fan (1996, Am. Stat. 50, 361) type-6 sample quantiles. Checked against
 * a general-purpose implementation of that definition, Commons Math's {@link Percentile} with
 * {@link Percentile.EstimationType#R_6}, on both of the core's paths (sorted, and selection without sorting),
 * including probabilities so close to 0 and 1 that the definition clamps to the extreme draws.
 */
class MonteCarloQuantileTest {

    @Test
    void quantilesAreHyndmanFanType6AsCommonsMathComputesThem() {
        SplittableRandom rnd = new SplittableRandom(20261202);
        double[] probs = {0.0001, 0.005, 0.02, StarDeriver.P16, 0.25, 0.5, 0.75, StarDeriver.P84, 0.98, 0.995, 0.9999};
        for (int n : new int[] {8, 9, 31, 128, 1000}) {
            for (int round = 0; round < 20; round++) {
                double[] a = new double[n + 3]; // the core reads only the first n values
                for (int i = 0; i < a.length; i++) {
                    a[i] = rnd.nextDouble() < 0.1 ? Math.floor(rnd.nextDouble() * 5) : rnd.nextGaussian() * 3 + 10;
                }
                double[] first = Arrays.copyOf(a, n);
                Percentile ref = new Percentile().withEstimationType(Percentile.EstimationType.R_6);
                ref.setData(first);
                double[] sorted = first.clone();
                Arrays.sort(sorted);
                double[] q = new double[probs.length];
                double[] work = a.clone();
                MonteCarloDeriver.selectQuantiles(work, n, probs, q);
                for (int k = 0; k < probs.length; k++) {
                    double expected = ref.evaluate(100 * probs[k]);
                    String what = "n=" + n + " p=" + probs[k];
                    assertEquals(expected, MonteCarloDeriver.quantile(sorted, n, probs[k]), 1e-12 * Math.abs(expected) + 1e-12, what);
                    assertEquals(expected, q[k], 1e-12 * Math.abs(expected) + 1e-12, what + " (selection)");
                }
            }
        }
    }

    @Test
    void drawsBetween8And100000AreAcceptedOthersRefusedWithTheRule() {
        DeriveSettings s = DeriveSettings.defaults();
        assertEquals(8, new MonteCarloDeriver(s, 8, 1).draws());
        assertEquals(100_000, new MonteCarloDeriver(s, 100_000, 1).draws());
        for (int bad : new int[] {7, 100_001, 0, -8}) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> new MonteCarloDeriver(s, bad, 1));
            assertEquals("Invalid Monte Carlo draws: " + bad + " (must be between 8 and 100000)", e.getMessage());
        }
    }

    @Test
    void probabilitiesLandingExactlyOnAnOrderStatisticReadOnlyTheDrawsThere() {
        // (n + 1) p - 1 an exact integer: p = 1/(n + 1) is the smallest draw, p = n/(n + 1) the largest, p = k/(n + 1)
        // the k-th (Hyndman & Fan 1996, type 6); reference Commons Math Percentile R_6. The arrays hold exactly n
        // values, so a rule that reads one past the order statistic it lands on fails here.
        SplittableRandom rnd = new SplittableRandom(20261203);
        for (int n : new int[] {3, 7, 15, 31, 63}) {
            double[] probs = {1.0 / (n + 1), 2.0 / (n + 1), (n - 1.0) / (n + 1), (double) n / (n + 1)};
            for (int round = 0; round < 5; round++) {
                double[] a = new double[n];
                for (int i = 0; i < n; i++) {
                    a[i] = rnd.nextGaussian() * 3 + 10;
                }
                Percentile ref = new Percentile().withEstimationType(Percentile.EstimationType.R_6);
                ref.setData(a);
                double[] sorted = a.clone();
                Arrays.sort(sorted);
                double[] q = new double[probs.length];
                MonteCarloDeriver.selectQuantiles(a.clone(), n, probs, q);
                for (int k = 0; k < probs.length; k++) {
                    double expected = ref.evaluate(100 * probs[k]);
                    String what = "n=" + n + " p=" + probs[k];
                    assertEquals(expected, MonteCarloDeriver.quantile(sorted, n, probs[k]), 1e-12 * Math.abs(expected), what);
                    assertEquals(expected, q[k], 1e-12 * Math.abs(expected), what + " (selection)");
                }
            }
        }
    }
}
