package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.lang.management.ManagementFactory;
import java.util.List;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;

/**
 * Per-star work allocates nothing once warm, in every regime (the UDFs reuse one input and one result per thread; a
 * per-star allocation would cost the garbage collector at 10^9 stars); the Monte Carlo path allocates only its
 * per-star generator, nothing per draw. Measured with the JVM's per-thread allocation counter, not with a timer.
 */
class AllocationTest {
    private static final int ROUNDS = 20_000;

    private static List<StarInput> stars() {
        List<StarInput> l = new java.util.ArrayList<>(ErrorSourceTest.stars()); // G dwarf, giant, M dwarf, A star, K7 blend
        l.add(new StarInput().parallax(768.07, 0.05).magnitude(Band.V, 11.13, 0.02).magnitude(Band.J, 5.357, 0.023)
                .magnitude(Band.H, 4.835, 0.057).magnitude(Band.KS, 4.384, 0.033)); // below the Eker mass range
        l.add(new StarInput().parallax(0.3, 0.2).magnitude(Band.V, 15, 0.01).magnitude(Band.B, 15.6, 0.01)); // low S/N
        return l;
    }

    private static long allocatedBytes() {
        return ((com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean()).getCurrentThreadAllocatedBytes();
    }

    @Test
    void analyticPathAllocatesNothingAndMonteCarloNothingPerDraw() {
        Assumptions.assumeTrue(ManagementFactory.getThreadMXBean() instanceof com.sun.management.ThreadMXBean,
                "this JVM has no per-thread allocation counter");
        List<StarInput> in = stars();
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        StarResult out = new StarResult();
        MonteCarloDeriver mc32 = new MonteCarloDeriver(DeriveSettings.defaults(), 32, 7);
        MonteCarloDeriver mc128 = new MonteCarloDeriver(DeriveSettings.defaults(), 128, 7);
        double[][] p = new double[MonteCarloDeriver.NQ][3];
        long withTeff = 0;
        int mcStars = ROUNDS / 20;
        for (int pass = 0; pass < 2; pass++) { // the first pass warms up (class loading, JIT); the second is measured
            long before = allocatedBytes();
            for (int k = 0; k < ROUNDS; k++) {
                withTeff += d.derive(in.get(k % in.size()), out).teffK > 0 ? 1 : 0;
            }
            long analytic = allocatedBytes() - before;
            long[] mc = new long[2];
            MonteCarloDeriver[] derivers = {mc32, mc128};
            for (int m = 0; m < 2; m++) {
                before = allocatedBytes();
                for (int k = 0; k < mcStars; k++) {
                    derivers[m].percentiles(in.get(k % in.size()), k, p);
                    withTeff += p[1][1] > 0 ? 1 : 0;
                }
                mc[m] = allocatedBytes() - before;
            }
            if (pass == 1) {
                // a few hundred bytes in all allow for the JIT's own bookkeeping on this thread; one object per
                // star would be 16 bytes x 20,000 = 320 kB
                assertTrue(analytic < 20_000, "analytic path allocated " + analytic + " bytes over " + ROUNDS + " stars");
                // the Monte Carlo path seeds one generator per star (so a retried task draws the same numbers):
                // that costs a constant per star, but 4x the draws must not cost more (nothing per draw)
                double perStar32 = (double) mc[0] / mcStars;
                double perStar128 = (double) mc[1] / mcStars;
                assertTrue(perStar32 < 400 && perStar128 - perStar32 < 16, "Monte Carlo bytes per star: "
                        + perStar32 + " at 32 draws, " + perStar128 + " at 128 draws");
            }
        }
        // the results are used (so the loops are not dead code): every one of these stars gets a Teff
        assertTrue(withTeff == 2L * (ROUNDS + 2 * mcStars), "stars with a Teff: " + withTeff);
    }
}
