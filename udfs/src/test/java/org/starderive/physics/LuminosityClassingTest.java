package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.QualityFlag.*;

import org.junit.jupiter.api.Test;

/**
 * How {@link StarDeriver} classes a star, against the rules as published in the README ("Calibration regimes"): a red
 * star (Mann et al. 2015 colours, 2700–4300 K) is an M dwarf unless its absolute Ks is brighter than 4.0 mag (the
 * bright end of the Mann et al. 2019 mass relation) — then a giant; any other star by the log g it would have on the
 * main sequence against the dwarf boundary of Ciardi et al. 2011 ({@link LuminosityClass}); without what the rule needs
 * the class is unknown ({@code LUM_CLASS_ASSUMED}). And a Monte Carlo draw keeps the class it is given
 * ({@link StarDeriver#deriveDraw}).
 */
class LuminosityClassingTest {
    private final StarDeriver deriver = new StarDeriver(DeriveSettings.defaults());

    /**
     * A red star at exactly 10 pc (ϖ = 100 mas, μ = 0), no extinction, so its M_Ks is {@code mKs} to the last bit; V−J
     * {@code vMinusJ} and J−Ks 0.75 (inside the Casagrande et al. 2010 J−Ks range 0.07–0.80, relations sheet section
     * 2); no [Fe/H], so Mann's plain V−J form applies.
     */
    private static StarInput redStar(double vMinusJ, double mKs) {
        return new StarInput().parallax(100, 0.01).magnitude(Band.V, mKs + 0.75 + vMinusJ, 0.01)
                .magnitude(Band.J, mKs + 0.75, 0.01).magnitude(Band.KS, mKs, 0.01).ebv(0, 0);
    }

    /** Mann et al. 2015 V−J Teff, plain form (typed in {@link TeffEstimatorTest#M15_VJ}). */
    private static double mannVJTeffK(double vMinusJ) {
        double[] m0 = new double[Band.COUNT];
        m0[Band.V.ordinal()] = vMinusJ;
        return TeffEstimatorTest.M15_VJ.t().teffK(m0, 0, DerivedConstants.LOGG_SUN_CGS);
    }

    @Test
    void aRedStarIsAGiantOnlyWhenBrighterThanMKs4() {
        // an M dwarf of Mann Teff about 3370 K (V−J 4.0) at M_Ks = 4.0 exactly: not brighter than 4.0, an M dwarf
        StarResult at = deriver.derive(LuminosityRadiusStepTest.mDwarfAt10pc(4.0), new StarResult());
        assertEquals(4.0, at.absMag[Band.KS.ordinal()], 0.0);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, at.lumClass);
        assertEquals(Regime.M_DWARF, at.regime);
        // ... by the M_Ks rule alone: its main-sequence log g lies below Ciardi's 4.0 for Teff ≤ 4250 K, which would
        // make any other star evolved
        assertTrue(at.loggCgs < 4.0, "log g " + at.loggCgs);
        // 0.01 mag brighter: a giant; no giant relation reaches M colours (README: M giants get no Teff), no mass
        StarResult brighter = deriver.derive(LuminosityRadiusStepTest.mDwarfAt10pc(3.99), new StarResult());
        assertEquals(LuminosityClass.EVOLVED, brighter.lumClass);
        assertTrue(Double.isNaN(brighter.teffK) && Double.isNaN(brighter.massMsun), "Teff " + brighter.teffK);
        assertTrue(brighter.has(COLOUR_OUT_OF_RANGE) && brighter.has(MASS_NOT_APPLICABLE), QualityFlag.names(brighter.flags).toString());
    }

    @Test
    void theMKsRuleHoldsForARedStarInsideTheK7M0Blend() {
        // V−J 2.50: Mann Teff 4125 K, so the M-dwarf weight is (4300 − 4125)/200 = 0.875 (Regime: linear over
        // 4100–4300 K) and the C10 J−Ks estimate takes the rest; the M-dwarf regime dominates, the star is red
        double tMann = mannVJTeffK(2.50);
        assertTrue(tMann > 4100 && tMann < 4200, "Mann Teff " + tMann);
        StarResult at = deriver.derive(redStar(2.50, 4.0), new StarResult());
        assertEquals(LuminosityClass.MAIN_SEQUENCE, at.lumClass);
        assertEquals(Regime.M_DWARF, at.regime);
        assertEquals("C10/J-Ks,M15/V-J", at.teffFrom(), "a blend of both regimes");
        // brighter than 4.0 in Ks: a giant, although its main-sequence log g (about 4.4) would make it a dwarf
        StarResult brighter = deriver.derive(redStar(2.50, 3.99), new StarResult());
        assertEquals(LuminosityClass.EVOLVED, brighter.lumClass);
        assertEquals(Regime.GIANT, brighter.regime, brighter.teffFrom());
        assertTrue(brighter.teffFrom().startsWith("GHB09/"), brighter.teffFrom());
    }

    @Test
    void aRedStarWithoutKsIsClassedByItsLogg() {
        // V−J 4.0 at M_V = 0 (10 pc), no Ks: no M_Ks, so the log g boundary decides. Typed chain: Mann Teff, BC_V
        // (Flower 1996 / Torres 2010), L, Stefan–Boltzmann R; even with the largest main-sequence mass of Eker et al.
        // 2018 (31 M⊙) log g = log g⊙ + log M − 2 log R is far below Ciardi's 4.0: a giant
        StarInput in = new StarInput().parallax(100, 0.01).magnitude(Band.V, 0.0, 0.01).magnitude(Band.J, -4.0, 0.01)
                .ebv(0, 0);
        double teffK = mannVJTeffK(4.0);
        double radius = LuminosityRadiusStepTest.radiusRsun(
                LuminosityRadiusStepTest.lumLsun(0.0 + BolometricCorrectionTest.typedBcV(teffK)), teffK);
        double loggMax = DerivedConstants.LOGG_SUN_CGS + Math.log10(31) - 2 * Math.log10(radius);
        assertTrue(loggMax < 4.0 - 1, "R " + radius + ", log g at most " + loggMax);
        StarResult r = deriver.derive(in, new StarResult());
        assertEquals(LuminosityClass.EVOLVED, r.lumClass, QualityFlag.names(r.flags).toString());
        assertTrue(r.has(MASS_NOT_APPLICABLE));
    }

    @Test
    void withoutALuminosityTheClassIsUnknown() {
        // a K dwarf seen in J and Ks only, with a good parallax: Teff from C10 J−Ks (about 4850 K: not a red star), but
        // no V (nor G, BP, RP), so no L (README: PHOTOMETRY_MISSING), and the classing rule needs L for the
        // main-sequence radius and mass: class unknown, main sequence assumed. Exactly the flags of the README table:
        // no [Fe/H] (METALLICITY_ASSUMED), no mass (MASS_NOT_APPLICABLE)
        StarInput in = new StarInput().parallax(50, 0.05).magnitude(Band.J, 8.0, 0.02).magnitude(Band.KS, 7.4, 0.02)
                .ebv(0, 0);
        StarResult r = deriver.derive(in, new StarResult());
        assertEquals("C10/J-Ks", r.teffFrom());
        assertTrue(r.distPc > 0 && r.teffK > 4300, "distance " + r.distPc + ", Teff " + r.teffK);
        assertNull(r.lumClass);
        assertEquals(PHOTOMETRY_MISSING.mask() | METALLICITY_ASSUMED.mask() | MASS_NOT_APPLICABLE.mask()
                | LUM_CLASS_ASSUMED.mask(), r.flags, QualityFlag.names(r.flags).toString());
    }

    @Test
    void aDrawKeepsTheMainSequenceClassItIsGiven() {
        // StarDeriver.deriveDraw: a draw keeps the star's class; neither rule that would make these stars evolved
        // (the M_Ks rule, the log g boundary) may change it
        double[] z = new double[ErrorSource.COUNT];
        StarResult red = StarDeriverTest.draw(deriver, LuminosityRadiusStepTest.mDwarfAt10pc(3.99), z,
                LuminosityClass.MAIN_SEQUENCE, Double.NaN);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, red.lumClass);
        assertEquals(Regime.M_DWARF, red.regime, red.teffFrom());
        StarInput giant = StarDeriverTest.giantAt500pc();
        assertEquals(LuminosityClass.EVOLVED, deriver.derive(giant, new StarResult()).lumClass, "classed by its log g");
        StarResult kept = StarDeriverTest.draw(deriver, giant, z, LuminosityClass.MAIN_SEQUENCE, Double.NaN);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, kept.lumClass);
        assertEquals(Regime.FGK_DWARF, kept.regime, kept.teffFrom());
    }
}
