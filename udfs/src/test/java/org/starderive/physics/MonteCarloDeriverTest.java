package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigDecimal;
import java.math.BigInteger;
import java.math.MathContext;
import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.rng.core.source64.SplitMix64;
import org.apache.commons.rng.sampling.distribution.ZigguratSampler;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;

class MonteCarloDeriverTest {

    private static double[][] run(MonteCarloDeriver mc, StarInput in, long key) {
        double[][] out = new double[MonteCarloDeriver.NQ][3];
        mc.percentiles(in, key, out);
        return out;
    }

    @Test
    void sameSeedAndKeyGiveTheSameNumbersWhateverCameBefore() {
        MonteCarloDeriver a = new MonteCarloDeriver(DeriveSettings.defaults(), 64, 7);
        MonteCarloDeriver b = new MonteCarloDeriver(DeriveSettings.defaults(), 64, 7);
        StarInput sun = StarDeriverTest.solarTwinAt10pc();
        double[][] first = run(a, sun, 12345L);
        run(b, StarDeriverTest.solarTwinAt10pc().feh(-1, 0.1), 999L); // b has done other work first
        double[][] second = run(b, sun, 12345L);
        for (int k = 0; k < MonteCarloDeriver.NQ; k++) {
            assertArrayEquals(first[k], second[k], 0.0, MonteCarloDeriver.QUANTITIES[k]);
        }
        double[][] otherKey = run(a, sun, 12346L);
        assertFalse(Arrays.equals(first[1], otherKey[1]), "another star key draws other numbers");
        double[][] otherSeed = run(new MonteCarloDeriver(DeriveSettings.defaults(), 64, 8), sun, 12345L);
        assertFalse(Arrays.equals(first[1], otherSeed[1]), "another run seed draws other numbers");
    }

    @Test
    void highSignificanceDistancePercentilesAreThoseOfTheInverseParallax() {
        // w = 100 +- 1 mas: percentiles of 1/w' with w' ~ N(100, 1) are 1000/101, 1000/100, 1000/99 pc
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.parallaxErrMas = 1.0;
        double[][] q = run(new MonteCarloDeriver(DeriveSettings.defaults(), 4000, 1), in, 1L);
        assertEquals(1000 / 101.0, q[0][0], 0.02);
        assertEquals(10.0, q[0][1], 0.02);
        assertEquals(1000 / 99.0, q[0][2], 0.02);
    }

    @Test
    void monteCarloAndFirstOrderAgreeForAWellMeasuredStar() {
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.parallaxErrMas = 0.5;
        StarResult a = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double[][] q = run(new MonteCarloDeriver(DeriveSettings.defaults(), 4000, 3), in, 42L);
        assertEquals(a.teffErrK, (q[1][2] - q[1][0]) / 2, 0.1 * a.teffErrK, "Teff");
        assertEquals(a.lumErrLsun, (q[2][2] - q[2][0]) / 2, 0.1 * a.lumErrLsun, "L");
        assertEquals(a.radiusErrRsun, (q[3][2] - q[3][0]) / 2, 0.1 * a.radiusErrRsun, "R");
        // and what is computed from them: mass (Eker et al. 2018), log g and the angular diameter 2R/d
        assertEquals(a.massErrMsun, (q[4][2] - q[4][0]) / 2, 0.1 * a.massErrMsun, "M");
        assertEquals(a.loggErrCgs, (q[5][2] - q[5][0]) / 2, 0.1 * a.loggErrCgs, "log g");
        assertEquals(a.angDiamErrMas, (q[6][2] - q[6][0]) / 2, 0.1 * a.angDiamErrMas, "angular diameter");
        assertEquals(a.loggCgs, q[5][1], 0.2 * a.loggErrCgs, "median log g");
        assertEquals(a.angDiamMas, q[6][1], 0.2 * a.angDiamErrMas, "median angular diameter");
        assertEquals(a.teffK, q[1][1], 0.2 * a.teffErrK, "median Teff");
    }

    @Test
    void starsWithoutAResultGiveNoPercentilesAndBadDrawsAreRejected() {
        double[][] q = run(new MonteCarloDeriver(DeriveSettings.defaults(), 16, 1), new StarInput(), 5L);
        for (double[] row : q) {
            assertTrue(Double.isNaN(row[0]) && Double.isNaN(row[1]) && Double.isNaN(row[2]));
        }
        assertThrows(IllegalArgumentException.class, () -> new MonteCarloDeriver(DeriveSettings.defaults(), 0, 1));
    }

    @Test
    void posteriorSamplingReproducesThePosteriorPercentiles() {
        // inverse-transform samples of the prior-based posterior have the posterior's own percentiles
        EdsdPosterior post = EdsdPosterior.standard();
        double[] exact = new double[3];
        assertTrue(post.percentilesKpc(0.3, 0.25, 1.35, new double[] {StarDeriver.P16, 0.5, StarDeriver.P84}, exact));
        int n = 20000;
        double[] s = new double[n];
        java.util.SplittableRandom r = new java.util.SplittableRandom(9);
        for (int i = 0; i < n; i++) {
            s[i] = post.quantileOfLast(r.nextDouble());
        }
        Arrays.sort(s);
        assertEquals(exact[0], MonteCarloDeriver.quantile(s, n, StarDeriver.P16), 0.02 * exact[1]);
        assertEquals(exact[1], MonteCarloDeriver.quantile(s, n, 0.5), 0.02 * exact[1]);
        assertEquals(exact[2], MonteCarloDeriver.quantile(s, n, StarDeriver.P84), 0.02 * exact[1]);
    }

    @Test
    void percentileIntervalOfFewDrawsHoldsSixtyEightPercentOnAverage() {
        // Order statistics of a uniform sample: E[U_(k)] = k / (n + 1) (the Beta(k, n + 1 - k) law; any text on order
        // statistics, e.g. David & Nagaraja 2003, Order Statistics, 3rd ed., section 2.5 — from memory). So the mean
        // probability between the 16th and 84th percentiles of n uniform draws should be 0.68, for n = 64 as used in
        // the job tests.
        int n = 64;
        int reps = 20_000;
        double[] u = new double[n];
        java.util.SplittableRandom r = new java.util.SplittableRandom(3);
        double sum = 0;
        double sum7 = 0;
        for (int i = 0; i < reps; i++) {
            for (int k = 0; k < n; k++) {
                u[k] = r.nextDouble();
            }
            Arrays.sort(u);
            sum += MonteCarloDeriver.quantile(u, n, StarDeriver.P84) - MonteCarloDeriver.quantile(u, n, StarDeriver.P16);
            // the type-7 rule, (n - 1) p, for contrast: the check below can tell them apart
            sum7 += (u[(int) ((n - 1) * StarDeriver.P84)] + ((n - 1) * StarDeriver.P84 % 1) * (u[(int) ((n - 1) * StarDeriver.P84) + 1]
                    - u[(int) ((n - 1) * StarDeriver.P84)])) - (u[(int) ((n - 1) * StarDeriver.P16)]
                    + ((n - 1) * StarDeriver.P16 % 1) * (u[(int) ((n - 1) * StarDeriver.P16) + 1] - u[(int) ((n - 1) * StarDeriver.P16)]));
        }
        double target = StarDeriver.P84 - StarDeriver.P16;
        assertEquals(target, sum / reps, 0.003, "type 6");
        assertTrue(target - sum7 / reps > 0.015, "type 7 shrinks the interval: " + sum7 / reps);
    }

    @Test
    void selectedQuantilesAreThoseOfTheSortedDraws() {
        // reference: a full sort (java.util.Arrays.sort) and the type-6 rule of Hyndman & Fan 1996 on it; the
        // selection must give the same numbers to the last bit, also with ties and for every n the job can meet
        java.util.SplittableRandom r = new java.util.SplittableRandom(11);
        double[] p = {StarDeriver.P16, 0.5, StarDeriver.P84};
        double[] q = new double[3];
        for (int n = 1; n <= 300; n++) {
            for (int rep = 0; rep < 20; rep++) {
                double[] a = new double[n + 5];
                for (int k = 0; k < n; k++) {
                    a[k] = rep % 3 == 0 ? r.nextInt(5) : rep % 3 == 1 ? r.nextGaussian() : Math.exp(3 * r.nextGaussian());
                }
                double[] sorted = Arrays.copyOf(a, n);
                Arrays.sort(sorted);
                MonteCarloDeriver.selectQuantiles(a, n, p, q);
                for (int i = 0; i < 3; i++) {
                    assertEquals(MonteCarloDeriver.quantile(sorted, n, p[i]), q[i], 0.0, "n=" + n + " p=" + p[i]);
                }
            }
        }
    }

    @Test
    void theStarGeneratorIsCommonsRngsXoRoShiRo128PlusPlusForTheSeed() {
        // reference: Commons RNG's own factory, RandomSource.XO_RO_SHI_RO_128_PP.create(seed), which the draws used
        // before the generator was built directly; the same stream keeps every recorded Monte Carlo result
        java.util.SplittableRandom r = new java.util.SplittableRandom(5);
        for (int i = 0; i < 2000; i++) {
            long seed = i < 3 ? i - 1 : r.nextLong();
            org.apache.commons.rng.UniformRandomProvider want =
                    org.apache.commons.rng.simple.RandomSource.XO_RO_SHI_RO_128_PP.create(seed);
            org.apache.commons.rng.UniformRandomProvider got = MonteCarloDeriver.generator(seed);
            for (int k = 0; k < 16; k++) {
                assertEquals(want.nextLong(), got.nextLong(), "seed " + seed + ", output " + k);
            }
        }
    }

    @Test
    void starSeedIsOutputNumberRunSeedOfSplitMix64SeededWithTheStarKey() {
        // SplitMix64 (Steele, Lea & Flood 2014, OOPSLA, "Fast splittable pseudorandom number generators"): the state
        // advances by the odd "golden gamma", floor(2^64 / phi), and each output is the new state through the
        // variant-13 finaliser. The documented seed, a SplitMix64 mix of run seed and star key, is the state
        // key + runSeed * gamma finalised: output number runSeed (from 1) of a SplitMix64 seeded with the key.
        // References: Commons RNG's SplitMix64 and the JDK's SplittableRandom (the same generator, its state advanced
        // by the same gamma before each output), with gamma computed here from the golden ratio.
        MathContext mc = new MathContext(60);
        BigDecimal invPhi = BigDecimal.valueOf(5).sqrt(mc).subtract(BigDecimal.ONE).divide(BigDecimal.valueOf(2), mc);
        long gamma = new BigDecimal(BigInteger.ONE.shiftLeft(64)).multiply(invPhi).toBigInteger().longValue();
        assertEquals(1L, gamma & 1L, "the golden gamma is odd");
        for (long key : new long[] {0L, 1L, 12345L, -1L, Long.MIN_VALUE, 0x5DEECE66DL}) {
            SplitMix64 stream = new SplitMix64(key);
            for (long run = 1; run <= 5; run++) {
                assertEquals(stream.nextLong(), MonteCarloDeriver.starSeed(run, key), "run " + run + ", key " + key);
            }
        }
        SplittableRandom r = new SplittableRandom(17);
        for (int i = 0; i < 200; i++) {
            long run = r.nextLong();
            long key = r.nextLong();
            long state = run * gamma + key; // arithmetic modulo 2^64, as the generator's
            long want = new SplittableRandom(state - gamma).nextLong();
            assertEquals(want, new SplitMix64(state - gamma).nextLong(), "the two references agree");
            assertEquals(want, MonteCarloDeriver.starSeed(run, key), "run " + run + ", key " + key);
        }
    }

    @Test
    void withEveryErrorSourceOffEveryDrawIsTheNominalStar() {
        // a distribution of zero width has its one value as every percentile (definition of a percentile); the
        // nominal values are those of the analytic chain with the same sources off
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        StarDeriver first = new StarDeriver(DeriveSettings.defaults());
        first.errorSources(0L);
        StarResult a = first.derive(in, new StarResult());
        double[] nominal = {a.distPc, a.teffK, a.lumLsun, a.radiusRsun, a.massMsun, a.loggCgs, a.angDiamMas};
        MonteCarloDeriver mc = new MonteCarloDeriver(DeriveSettings.defaults(), 64, 3);
        mc.errorSources(0L);
        double[][] q = run(mc, in, 42L);
        for (int k = 0; k < MonteCarloDeriver.NQ; k++) {
            for (int i = 0; i < 3; i++) {
                assertEquals(nominal[k], q[k][i], 1e-9 * Math.abs(nominal[k]), MonteCarloDeriver.QUANTITIES[k] + " " + i);
            }
        }
    }

    /**
     * Standard normal deviates one draw of {@code in} takes before its distance, by the class Javadoc: one per error
     * source the star has (each measured band; E(B−V), [Fe/H], the zero points, the radius, mass and blend relations;
     * the log g prior only where the star has no log g of its own, as evolved stars never do; G→V only where V comes
     * from G), then one per relation whose two bands the star has, for the regimes its class blends (a main-sequence
     * star: FGK dwarf, M dwarf, hot; an evolved one: giant, FGK dwarf, hot).
     */
    private static int deviatesBeforeTheDistance(StarInput in, StarResult b) {
        int n = 6;
        for (int k = 0; k < Band.COUNT; k++) {
            n += in.hasMag[k] ? 1 : 0;
        }
        n += Double.isNaN(b.loggCgs) ? 1 : 0;
        n += QualityFlag.V_FROM_G.isSet(b.flags) ? 1 : 0;
        Regime skipped = b.lumClass == LuminosityClass.EVOLVED ? Regime.M_DWARF : Regime.GIANT;
        for (TeffRelation r : TeffRelations.all()) {
            n += in.hasMag[r.blue().ordinal()] && in.hasMag[r.red().ordinal()] && r.regime() != skipped ? 1 : 0;
        }
        return n;
    }

    /**
     * 16th, 50th, 84th percentiles (Commons Math Percentile, type 6: R_6) of n distances 1000 / (ϖ + σ z) pc, z every
     * (m + 1)-th standard normal deviate of the stream of star {@code key} under run seed 1: Commons RNG's
     * XoRoShiRo128++ at output 1 of a SplitMix64 seeded with the key (both checked above), through Commons RNG's
     * ZigguratSampler, the sampler the draws use. At ϖ/σ ≥ 10 no ϖ' ≤ 0 needs a redraw.
     */
    static double[] streamInverseParallaxPercentiles(double plx, double sig, long key, int n, int m) {
        assertTrue(plx >= 10 * sig, "no redraws");
        ZigguratSampler.NormalizedGaussian z = ZigguratSampler.NormalizedGaussian.of(
                RandomSource.XO_RO_SHI_RO_128_PP.create(new SplitMix64(key).nextLong()));
        double[] d = new double[n];
        for (int i = 0; i < n; i++) {
            for (int k = 0; k < m; k++) {
                z.sample();
            }
            d[i] = 1000 / (plx + sig * z.sample());
        }
        Percentile ref = new Percentile().withEstimationType(Percentile.EstimationType.R_6);
        ref.setData(d);
        return new double[] {ref.evaluate(100 * StarDeriver.P16), ref.evaluate(50), ref.evaluate(100 * StarDeriver.P84)};
    }

    @Test
    void eachDrawSpendsOneDeviatePerSourceAndPerRelationItsClassEvaluates() {
        // The random numbers a draw spends are not visible in the spread, only in the stream: with the distance the
        // only source switched on, each draw's distance is 1/ϖ' with ϖ' = ϖ + σ z and z the deviate after those the
        // draw spends on its other sources and relations, so the percentiles are those (Commons Math R_6) of every
        // (m + 1)-th deviate of the star's stream (Commons RNG XoRoShiRo128++ at the star seed, ZigguratSampler), m
        // as counted above. A dwarf that also drew its giant relations, or a giant its M-dwarf ones, would take more.
        // Stars: the solar twin (a dwarf with log g) and the red-clump giant of ErrorSourceTest (9 bands, no log g).
        int n = 64;
        long key = 7;
        StarInput dwarf = StarDeriverTest.solarTwinAt10pc();
        dwarf.parallaxErrMas = 1.0;
        for (StarInput in : new StarInput[] {dwarf, ErrorSourceTest.stars().get(1)}) {
            StarResult b = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
            assertEquals(StarResult.DistanceMethod.INVERSE_PARALLAX, b.distMethod);
            assertEquals(in == dwarf ? LuminosityClass.MAIN_SEQUENCE : LuminosityClass.EVOLVED, b.lumClass);
            int m = deviatesBeforeTheDistance(in, b);
            double[] expected = streamInverseParallaxPercentiles(in.parallaxMas, in.parallaxErrMas, key, n, m);
            MonteCarloDeriver mc = new MonteCarloDeriver(DeriveSettings.defaults(), n, 1);
            mc.errorSources(1L << ErrorSource.MU);
            double[][] q = run(mc, in, key);
            for (int k = 0; k < 3; k++) {
                assertEquals(expected[k], q[0][k], 1e-12 * expected[k], b.lumClass + ", " + m + " deviates before the distance, percentile " + k);
            }
        }
    }

    /**
     * Class Javadoc: "A quantity the analytic chain does not give for the measured inputs ... gets no percentiles
     * either". An M6 dwarf without V or G (BP−RP 3.8: Mann et al. 2015 about 2930 K) at exactly 10 pc without
     * reddening, so that M_Ks is its Ks, 9.8, to the last bit: the faint end of Mann et al. 2015's radius range
     * (4.6 < M_Ks < 9.8, exclusive), so no radius, and without V no bolometric correction: no L, no R. Its draws move
     * M_Ks by the Ks and distance errors, symmetric about 9.8, and extinction E(B−V) = 0 ± 0.2, clipped at 0, only ever
     * brightens it: more than half of them fall inside the range and give L and R. Control: the same star 0.001 mag
     * brighter in Ks (inside the range; its draws move alike) gets L and R percentiles, so at least half its draws have
     * them.
     */
    @Test
    void aStarWithoutLOrRGetsNoLOrRPercentilesAlthoughMostDrawsHaveThem() {
        StarInput in = new StarInput().parallax(100, 0.1).magnitude(Band.BP, 13.8, 0.01).magnitude(Band.RP, 10.0, 0.01)
                .magnitude(Band.KS, 9.8, 0.02).ebv(0, 0.2).feh(0, 0.1);
        StarResult b = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertEquals(9.8, b.absMag[Band.KS.ordinal()], 0.0);
        assertTrue(b.teffK > 2700 && Double.isNaN(b.lumLsun) && Double.isNaN(b.radiusRsun), "Teff " + b.teffK + ", L " + b.lumLsun);
        double[][] q = run(new MonteCarloDeriver(DeriveSettings.defaults(), 128, 1), in, 1L);
        for (int k : new int[] {2, 3}) {
            for (int i = 0; i < 3; i++) {
                assertTrue(Double.isNaN(q[k][i]), MonteCarloDeriver.QUANTITIES[k] + " " + i + ": " + q[k][i]);
            }
        }
        assertTrue(q[1][1] > 2700, "Teff has its percentiles: " + q[1][1]);
        in.mag[Band.KS.ordinal()] -= 0.001;
        q = run(new MonteCarloDeriver(DeriveSettings.defaults(), 128, 1), in, 1L);
        assertTrue(q[2][0] > 0 && q[3][0] > 0, "control, M_Ks 9.799: L " + q[2][0] + ", R " + q[3][0]);
    }

    /**
     * "Percentiles are taken over the draws that gave a value (none if fewer than half did)" (class Javadoc): 4 of 8
     * is not fewer than half, 3 of 8 is. A K7 dwarf without V or G (BP−RP 1.9: Mann et al. 2015 about 4010 K, wholly in
     * the M-dwarf regime) at exactly 10 pc, M_Ks 10⁻⁹ mag inside the bright end of Mann et al. 2015's radius range
     * (4.6), E(B−V) 0 ± 0.2 the only error source on: a draw with z_E ≤ 0 is the nominal star (E clipped at 0), one
     * with z_E > 0 is reddened, its M_Ks brighter than 4.6, and without V it has no L. The star keys are chosen by the
     * number of z_E ≤ 0 among the 8 draws in the stream (see {@link #eachDrawSpendsOneDeviatePerSourceAndPerRelationItsClassEvaluates}:
     * z_E is each draw's deviate after those of its bands); every draw with L has the nominal L.
     */
    @Test
    void percentilesNeedAtLeastHalfTheDrawsExactlyHalfIsEnough() {
        StarInput in = new StarInput().parallax(100, 0.01).magnitude(Band.BP, 7.9, 0.01).magnitude(Band.RP, 6.0, 0.01)
                .magnitude(Band.KS, 4.6 + 1e-9, 0.02).ebv(0, 0.2).feh(0, 0.1);
        StarResult b = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertEquals(1.0, b.radiusMksWeight, 0.0, "the radius route alone: " + b.teffFrom());
        assertTrue(b.lumLsun > 0, "L " + b.lumLsun);
        int draws = 8;
        int m = deviatesBeforeTheDistance(in, b); // the distance source is off: no deviate for it
        long[] keyWith = new long[draws + 1];
        for (long key = 1; key < 2000; key++) {
            ZigguratSampler.NormalizedGaussian z = ZigguratSampler.NormalizedGaussian.of(
                    RandomSource.XO_RO_SHI_RO_128_PP.create(new SplitMix64(key).nextLong()));
            int nominal = 0;
            boolean clear = true;
            for (int d = 0; d < draws; d++) {
                for (int k = 0; k < m; k++) {
                    double v = z.sample();
                    if (k == 3) { // after BP, RP, Ks
                        nominal += v <= 0 ? 1 : 0;
                        clear &= !(v > 0 && v < 1e-6); // no reddening too small to move M_Ks out of the range
                    }
                }
            }
            if (clear && keyWith[nominal] == 0) {
                keyWith[nominal] = key;
            }
        }
        assertTrue(keyWith[3] > 0 && keyWith[4] > 0);
        MonteCarloDeriver mc = new MonteCarloDeriver(DeriveSettings.defaults(), draws, 1);
        mc.errorSources(1L << ErrorSource.EBV);
        double[][] half = run(mc, in, keyWith[4]);
        double[][] fewer = run(mc, in, keyWith[3]);
        for (int i = 0; i < 3; i++) {
            assertEquals(b.lumLsun, half[2][i], 1e-12 * b.lumLsun, "4 of 8 draws with L, percentile " + i);
            assertEquals(b.radiusRsun, half[3][i], 1e-12 * b.radiusRsun, "4 of 8 draws with R, percentile " + i);
            assertTrue(Double.isNaN(fewer[2][i]) && Double.isNaN(fewer[3][i]), "3 of 8: " + fewer[2][i]);
        }
    }
}
