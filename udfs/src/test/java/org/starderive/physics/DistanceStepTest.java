package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.ChainStepsTest.sunAt;
import static org.starderive.physics.QualityFlag.*;

import org.junit.jupiter.api.Test;

/**
 * {@link DistanceStep} through {@link StarDeriver}: the parallax rules at their first rejected and last accepted
 * values, the choice between the inverse parallax and the posterior (DeriveSettings), and the distance modulus
 * μ = 5 log10(d / 10 pc) with M = m − μ (definitions) for every band.
 */
class DistanceStepTest {
    private static final long PARALLAX_FLAGS = PARALLAX_LOW_SNR.mask() | PARALLAX_NONPOSITIVE.mask()
            | PARALLAX_MISSING.mask() | PARALLAX_IMPLAUSIBLE.mask() | INPUT_INVALID.mask() | DISTANCE_WITHHELD.mask();

    private static StarResult derive(DeriveSettings settings, StarInput in) {
        return new StarDeriver(settings).derive(in, new StarResult());
    }

    private static void assertNoDistance(StarResult r, String what) {
        assertEquals(StarResult.DistanceMethod.NONE, r.distMethod, what);
        assertTrue(Double.isNaN(r.distPc) && Double.isNaN(r.distLoPc) && Double.isNaN(r.distHiPc), what);
        assertTrue(Double.isNaN(r.distModulusMag) && Double.isNaN(r.lumLsun), what);
    }

    @Test
    void aParallaxThatIsNotANumberOrHasNoUsableErrorIsInvalidAndNothingElse() {
        DeriveSettings all = DeriveSettings.builder().distanceSnrMin(0).build();
        // README flag table: INPUT_INVALID for a NaN/∞ value or a missing or non-positive error; the parallax is not
        // judged further (not low S/N, not implausible)
        StarInput[] bad = {sunAt(Double.NaN, 0.1), sunAt(Double.POSITIVE_INFINITY, 0.1), sunAt(100, Double.NaN)};
        for (StarInput in : bad) {
            StarResult r = derive(all, in);
            assertEquals(INPUT_INVALID.mask(), r.flags & PARALLAX_FLAGS, in.parallaxMas + " ± " + in.parallaxErrMas);
            assertNoDistance(r, in.parallaxMas + " ± " + in.parallaxErrMas);
        }
        // StarInput: an error whose has-flag is false is absent, whatever its field holds
        StarInput noErr = sunAt(100, 0.01);
        noErr.hasParallaxErr = false;
        StarResult r = derive(all, noErr);
        assertEquals(INPUT_INVALID.mask(), r.flags & PARALLAX_FLAGS, QualityFlag.names(r.flags).toString());
        assertNoDistance(r, "no error");
        // the largest accepted error is 10^5 mas (DistanceStep): a posterior distance, nothing invalid; above it, invalid
        r = derive(all, sunAt(100, 1e5));
        assertFalse(r.has(INPUT_INVALID), QualityFlag.names(r.flags).toString());
        assertEquals(StarResult.DistanceMethod.EDSD_MEDIAN, r.distMethod);
        r = derive(all, sunAt(100, 1.0001e5));
        assertEquals(INPUT_INVALID.mask(), r.flags & PARALLAX_FLAGS);
    }

    @Test
    void theInverseParallaxIsUsedFromTheThresholdOnWhateverTheParallaxSize() {
        // ϖ = 1 mas ± 0.2: S/N exactly 5 (parallax_snr_min): d = 1/ϖ = 1000 pc, interval 1/(ϖ ± σ) (definition of the
        // parsec); positive, so not PARALLAX_NONPOSITIVE
        StarResult r = derive(DeriveSettings.defaults(), sunAt(1.0, 0.2));
        assertEquals(0L, r.flags & PARALLAX_FLAGS, QualityFlag.names(r.flags).toString());
        assertEquals(StarResult.DistanceMethod.INVERSE_PARALLAX, r.distMethod);
        assertEquals(1000.0, r.distPc, 1e-9);
        assertEquals(1000 / 1.2, r.distLoPc, 1e-9);
        assertEquals(1000 / 0.8, r.distHiPc, 1e-9);
        assertEquals(2 * 5 * Math.log10(10), r.distModulusMag, 1e-12); // μ = 5 log10(1000 pc / 10 pc)
    }

    @Test
    void theEdsdMethodUsesThePosteriorEvenForAPreciseParallax() {
        // distance_method EDSD: always the posterior (DeriveSettings), here at ϖ/σ = 20, its percentiles against the
        // published posterior integrated by Commons Math (ChainStepsTest), to the core's 0.3 % accuracy class
        StarResult r = derive(DeriveSettings.builder().distanceMethod(DeriveSettings.DistanceMethod.EDSD).build(), sunAt(10, 0.5));
        assertEquals(StarResult.DistanceMethod.EDSD_MEDIAN, r.distMethod);
        double[] expected = ChainStepsTest.posteriorPercentilesPc(10, 0.5, DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT);
        assertEquals(expected[0], r.distLoPc, 3e-3 * expected[1]);
        assertEquals(expected[1], r.distPc, 3e-3 * expected[1]);
        assertEquals(expected[2], r.distHiPc, 3e-3 * expected[1]);
    }

    @Test
    void theForcedInverseParallaxGivesNoDistanceForANonPositiveParallaxAndNoUpperBoundBelowOneSigma() {
        DeriveSettings inverse = DeriveSettings.builder().distanceSnrMin(0)
                .distanceMethod(DeriveSettings.DistanceMethod.INVERSE).build();
        for (double plx : new double[] {0.0, -0.5}) {
            StarResult r = derive(inverse, sunAt(plx, 0.5));
            assertTrue(r.has(PARALLAX_NONPOSITIVE) && r.has(PARALLAX_LOW_SNR), QualityFlag.names(r.flags).toString());
            assertNoDistance(r, "ϖ = " + plx);
            assertNull(r.lumClass, "ϖ = " + plx);
        }
        // a positive parallax below the S/N threshold: 1/ϖ all the same, the interval open above when ϖ − σ ≤ 0
        StarResult r = derive(inverse, sunAt(1.0, 0.5));
        assertEquals(StarResult.DistanceMethod.INVERSE_PARALLAX, r.distMethod);
        assertEquals(1000.0, r.distPc, 1e-9);
        assertEquals(1000 / 1.5, r.distLoPc, 1e-9);
        assertEquals(2000.0, r.distHiPc, 1e-9);
        r = derive(inverse, sunAt(1.0, 1.0));
        assertEquals(1000.0, r.distPc, 1e-9);
        assertTrue(Double.isNaN(r.distHiPc), "no upper bound for ϖ − σ = 0");
    }

    @Test
    void aDistanceSnrMinimumBelowOneStillWithholds() {
        // distance_snr_min: no distance below it, whatever its size; 0 alone switches the rule off
        DeriveSettings half = DeriveSettings.builder().distanceSnrMin(0.5).build();
        StarResult r = derive(half, sunAt(0.49, 1.0));
        assertTrue(r.has(DISTANCE_WITHHELD), QualityFlag.names(r.flags).toString());
        assertNoDistance(r, "S/N 0.49");
        r = derive(half, sunAt(0.5, 1.0));
        assertFalse(r.has(DISTANCE_WITHHELD), QualityFlag.names(r.flags).toString());
        assertTrue(r.distPc > 0);
    }

    @Test
    void aStarCloserThanOneParsecHasItsModulusAndAbsoluteMagnitudes() {
        // with parallax_max_mas raised, ϖ = 1250 mas: d = 0.8 pc, μ = 5 log10(0.08) < 0, M = m − μ in every band
        StarResult r = derive(DeriveSettings.builder().parallaxMaxMas(2000).build(), sunAt(1250, 0.1));
        assertEquals(0.8, r.distPc, 1e-12);
        double mu = 5 * Math.log10(0.8 / 10);
        assertEquals(mu, r.distModulusMag, 1e-12);
        assertEquals(4.81 - mu, r.absMag[Band.V.ordinal()], 1e-12);
        assertTrue(r.lumLsun > 0);
    }

    @Test
    void everyMeasuredBandGetsItsAbsoluteMagnitude() {
        // the solar twin at 10 pc without reddening: μ = 0, so M = m for each of its five bands, B (the first) included
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        StarResult r = derive(DeriveSettings.defaults(), in);
        for (Band b : Band.values()) {
            if (in.hasMag[b.ordinal()]) {
                assertEquals(in.mag[b.ordinal()], r.absMag[b.ordinal()], 1e-12, b.name());
                assertTrue(r.absMagErr[b.ordinal()] >= 0.01, b.name());
            } else {
                assertTrue(Double.isNaN(r.absMag[b.ordinal()]), b.name());
            }
        }
    }

    @Test
    void withoutAParallaxThereIsNoModulusAndOnlyTheFlagsOfTheTable() {
        // README flag table: no parallax → PARALLAX_MISSING; no class (LUM_CLASS_ASSUMED); no mass; the luminosity is
        // missing for want of a distance, not of photometry (so no PHOTOMETRY_MISSING)
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.hasParallax = in.hasParallaxErr = false;
        StarResult r = derive(DeriveSettings.defaults(), in);
        assertEquals(PARALLAX_MISSING.mask() | LUM_CLASS_ASSUMED.mask() | MASS_NOT_APPLICABLE.mask(), r.flags,
                QualityFlag.names(r.flags).toString());
        assertNoDistance(r, "no parallax");
        assertTrue(Double.isNaN(r.distModulusErrMag) && Double.isNaN(r.absMag[Band.V.ordinal()]));
    }

    /**
     * The forced inverse parallax of a positive parallax too small for a double: 1000 / 10⁻³²⁰ mas overflows to +∞ pc.
     * StarDeriver's rule "no infinity leaves the core: anything not finite becomes NaN (NULL)" and StarResult's "a
     * quantity that could not be derived is NaN and flags says why": no distance, hence (README flag table) nothing
     * absolute and no class — the star is then what a star without a usable distance is, with its parallax's own reason,
     * PARALLAX_LOW_SNR (ϖ/σ about 10⁻³¹⁹), in place of PARALLAX_MISSING.
     */
    @Test
    void aParallaxWhoseInverseOverflowsGivesNoDistanceAndNoInfinity() throws IllegalAccessException {
        DeriveSettings inverse = DeriveSettings.builder().distanceSnrMin(0)
                .distanceMethod(DeriveSettings.DistanceMethod.INVERSE).build();
        assertEquals(Double.POSITIVE_INFINITY, 1000 / 1e-320, "the premise: the inverse overflows");
        StarResult r = derive(inverse, sunAt(1e-320, 0.1));
        assertEquals(PARALLAX_LOW_SNR.mask() | LUM_CLASS_ASSUMED.mask() | MASS_NOT_APPLICABLE.mask(), r.flags,
                QualityFlag.names(r.flags).toString());
        assertTrue(Double.isNaN(r.distPc) && Double.isNaN(r.distModulusMag) && Double.isNaN(r.distModulusErrMag),
                "d " + r.distPc + ", μ " + r.distModulusMag);
        // no interval without a value (1000/(ϖ+σ) = 10,000 pc would otherwise be left as a lower bound)
        assertTrue(Double.isNaN(r.distLoPc) && Double.isNaN(r.distHiPc), "interval " + r.distLoPc + "–" + r.distHiPc);
        assertEquals(StarResult.DistanceMethod.NONE, r.distMethod);
        for (Band b : Band.values()) {
            assertTrue(Double.isNaN(r.absMag[b.ordinal()]) && Double.isNaN(r.absMagErr[b.ordinal()]), b.name());
        }
        assertNull(r.lumClass);
        assertTrue(Double.isNaN(r.lumLsun) && Double.isNaN(r.radiusRsun) && Double.isNaN(r.mbolMag), "L " + r.lumLsun);
        // Teff and the bolometric-flux diameter need no distance (the solar twin's, as without a parallax)
        assertEquals(5772, r.teffK, 40);
        assertTrue(r.angDiamMas > 0);
        // no field of the result is infinite (every public double and double array of StarResult)
        for (java.lang.reflect.Field f : StarResult.class.getFields()) {
            if (f.getType() == double.class) {
                assertFalse(Double.isInfinite(f.getDouble(r)), f.getName() + " " + f.getDouble(r));
            } else if (f.getType() == double[].class) {
                for (double v : (double[]) f.get(r)) {
                    assertFalse(Double.isInfinite(v), f.getName() + " " + v);
                }
            }
        }
    }
}
