package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.QualityFlag.*;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Random and hostile inputs never throw, and every result is either finite or NaN with a flag that explains it.
 */
class StarDeriverPropertyTest {
    private static final double[] HOSTILE = {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY, 0.0, -0.0,
            -1.0, 1e300, -1e300, Double.MIN_VALUE, 99.99, 99.0, -99.0, 1e-300};

    private static double pick(SplittableRandom rnd, double typicalLo, double typicalHi) {
        int k = rnd.nextInt(10);
        if (k < 3) {
            return HOSTILE[rnd.nextInt(HOSTILE.length)];
        }
        return typicalLo + (typicalHi - typicalLo) * rnd.nextDouble();
    }

    private static void fill(SplittableRandom rnd, StarInput in) {
        in.clear();
        in.hasParallax = rnd.nextInt(10) > 0;
        in.parallaxMas = pick(rnd, -2, 50);
        in.hasParallaxErr = rnd.nextInt(10) > 0;
        in.parallaxErrMas = pick(rnd, 0.005, 2);
        double base = 5 + 15 * rnd.nextDouble();
        for (int b = 0; b < Band.COUNT; b++) {
            in.hasMag[b] = rnd.nextInt(4) > 0;
            in.mag[b] = rnd.nextInt(10) < 3 ? HOSTILE[rnd.nextInt(HOSTILE.length)] : base + 3 * rnd.nextGaussian();
            in.hasMagErr[b] = rnd.nextInt(10) > 0;
            in.magErr[b] = pick(rnd, 0.001, 0.3);
        }
        in.hasEbv = rnd.nextBoolean();
        in.ebv = pick(rnd, 0, 2);
        in.hasEbvErr = rnd.nextBoolean();
        in.ebvErr = pick(rnd, 0, 0.2);
        in.hasFeh = rnd.nextBoolean();
        in.feh = pick(rnd, -4, 0.5);
        in.hasFehErr = rnd.nextBoolean();
        in.fehErr = pick(rnd, 0, 0.5);
    }

    private static boolean ok(double v) {
        return Double.isNaN(v) || Double.isFinite(v);
    }

    @Test
    void hostileInputsNeverThrowAndEveryNullIsExplained() {
        SplittableRandom rnd = new SplittableRandom(20261201L);
        for (DeriveSettings s : new DeriveSettings[] {DeriveSettings.defaults(),
                DeriveSettings.builder().allowExtrapolation(true).distanceMethod(DeriveSettings.DistanceMethod.INVERSE).build(),
                DeriveSettings.builder().posteriorPercentiles(false).distanceMethod(DeriveSettings.DistanceMethod.EDSD).build()}) {
            StarDeriver d = new StarDeriver(s);
            StarInput in = new StarInput();
            StarResult r = new StarResult();
            int withTeff = 0;
            int withMass = 0;
            for (int i = 0; i < 100_000; i++) {
                fill(rnd, in);
                d.derive(in, r);
                long f = r.flags;
                String ctx = "star " + i + " flags " + QualityFlag.names(f);
                for (double v : new double[] {r.distPc, r.distLoPc, r.distHiPc, r.teffK, r.teffErrK, r.lumLsun, r.lumErrLsun,
                        r.radiusRsun, r.radiusErrRsun, r.massMsun, r.massErrMsun, r.loggCgs, r.densityKgM3, r.angDiamMas,
                        r.angDiamErrMas, r.bcV, r.mbolMag, r.distModulusMag}) {
                    assertTrue(ok(v), ctx);
                }
                long distExplained = PARALLAX_MISSING.mask() | INPUT_INVALID.mask() | PARALLAX_IMPLAUSIBLE.mask()
                        | PARALLAX_NONPOSITIVE.mask() | PARALLAX_LOW_SNR.mask();
                long teffExplained = PHOTOMETRY_MISSING.mask() | COLOUR_OUT_OF_RANGE.mask();
                if (Double.isNaN(r.distPc)) {
                    assertTrue((f & distExplained) != 0, "no distance without a reason: " + ctx);
                }
                if (Double.isNaN(r.teffK)) {
                    assertTrue((f & teffExplained) != 0, "no Teff without a reason: " + ctx);
                } else {
                    withTeff++;
                    assertTrue(r.teffK >= 2000 && r.teffK <= 50000 && r.teffErrK > 0, ctx);
                    assertTrue(r.teffFrom() != null, ctx);
                }
                if (Double.isNaN(r.lumLsun)) {
                    assertTrue((f & (distExplained | teffExplained)) != 0 || Double.isNaN(r.distPc), ctx);
                } else {
                    assertTrue(r.lumLsun > 0 && r.radiusRsun > 0, ctx);
                }
                if (Double.isNaN(r.massMsun)) {
                    assertTrue(MASS_NOT_APPLICABLE.isSet(f), ctx);
                } else {
                    withMass++;
                    assertTrue(r.massMsun >= 0.07 && r.massMsun <= 31.1 && r.lumClass == LuminosityClass.MAIN_SEQUENCE, ctx);
                }
            }
            // the generator must exercise the good paths too, or the test proves little
            assertTrue(withTeff > 5_000, "stars with Teff: " + withTeff);
            assertTrue(withMass > 500, "stars with mass: " + withMass);
        }
    }

    /**
     * Every reported field comes from the final Teff estimate, whatever path the class/Teff loop took (it once could
     * stop at its cap right after a re-estimate, leaving L and R from the previous one): on random Gaia-band stars,
     * R must equal √L (Teff⊙/Teff)² from the reported L and Teff (Stefan–Boltzmann, IAU 2015 B3 nominal Teff⊙).
     */
    @Test
    void radiusLuminosityAndTeffAreFromOneEstimate() {
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        StarResult r = new StarResult();
        StarInput in = new StarInput();
        SplittableRandom rnd = new SplittableRandom(2026);
        int checked = 0;
        for (int k = 0; k < 200_000; k++) {
            in.clear();
            double g = 8 + 10 * rnd.nextDouble();
            double bpRp = -0.2 + 4 * rnd.nextDouble();
            in.parallax(0.2 + 20 * rnd.nextDouble(), 0.01 + 0.1 * rnd.nextDouble())
                    .magnitude(Band.G, g, 0.002).magnitude(Band.BP, g + 0.4 * bpRp, 0.003)
                    .magnitude(Band.RP, g - 0.6 * bpRp, 0.003)
                    .magnitude(Band.KS, g - 1.2 * bpRp - rnd.nextDouble(), 0.02).ebv(0.3 * rnd.nextDouble(), 0.02);
            if (rnd.nextBoolean()) {
                in.magnitude(Band.J, g - 0.9 * bpRp - 0.5 * rnd.nextDouble(), 0.02);
            }
            d.derive(in, r);
            if (r.teffK > 0 && r.lumLsun > 0 && r.radiusRsun > 0) {
                double expected = Math.sqrt(r.lumLsun) * Math.pow(Iau2015.TEFF_SUN_K / r.teffK, 2);
                assertEquals(expected, r.radiusRsun, 1e-9 * expected, "star " + k + ": " + r.teffFrom());
                checked++;
            }
        }
        assertTrue(checked > 50_000, "stars checked: " + checked);
    }
}
