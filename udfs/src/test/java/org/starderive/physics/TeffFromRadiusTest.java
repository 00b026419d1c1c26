package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.QualityFlag.*;

import org.apache.commons.math3.analysis.polynomials.PolynomialFunction;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.junit.jupiter.api.Test;

/**
 * M dwarfs without a colour of any Mann et al. 2015 relation: Teff from the M_Ks radius through the Teff–radius
 * relation run backwards ({@link TeffRadiusMann2015}). The relation against a second copy of its published
 * coefficients evaluated and inverted by a general-purpose library (Commons Math's PolynomialFunction and
 * BrentSolver), its branch limits, and well-measured M dwarfs through the whole chain without V and BP.
 */
class TeffFromRadiusTest {
    /**
     * Mann et al. 2015, ApJ 804, 64, Table 1, typed again: R = a + bX + cX² + dX³, X = Teff/3500 K, σ 13.4 %; with
     * [Fe/H] the cubic times (1 + 0.4565 [Fe/H]), σ 9.3 % (as in the first author's code release, awmann/
     * Teff_rad_mass_lum, and three independent transcriptions, which agree).
     */
    private static final PolynomialFunction PLAIN = new PolynomialFunction(new double[] {10.5440, -33.7546, 35.1909, -11.5928});
    private static final PolynomialFunction WITH_FEH = new PolynomialFunction(new double[] {16.7700, -54.3210, 57.6627, -19.6994});

    private static double reference(double teffK, double feh) {
        double x = teffK / 3500.0;
        return Double.isNaN(feh) ? PLAIN.value(x) : WITH_FEH.value(x) * (1 + 0.4565 * feh);
    }

    /** The Teff at which the published relation gives {@code r}, by Brent's method on the given branch. */
    private static double referenceInverse(double r, double feh, double lo, double hi) {
        return new BrentSolver(1e-10, 1e-12).solve(200, t -> reference(t, feh) - r, lo, hi);
    }

    private final StarDeriver deriver = new StarDeriver(DeriveSettings.defaults());

    @Test
    void theRelationMatchesItsPublishedCoefficients() {
        for (double t = 2700; t <= 4100; t += 25) {
            assertEquals(reference(t, Double.NaN), TeffRadiusMann2015.radiusRsun(t, Double.NaN), 1e-12, "plain, " + t + " K");
            for (double feh : new double[] {-0.5, 0.0, 0.3}) {
                assertEquals(reference(t, feh), TeffRadiusMann2015.radiusRsun(t, feh), 1e-12, "[Fe/H] " + feh + ", " + t + " K");
            }
        }
        // at X = 1 the cubic is the sum of its coefficients: 0.3875 and 0.4123 R_sun at 3500 K (arithmetic)
        assertEquals(0.3875, TeffRadiusMann2015.radiusRsun(3500, Double.NaN), 1e-12);
        assertEquals(0.4123, TeffRadiusMann2015.radiusRsun(3500, 0.0), 1e-12);
        assertEquals(0.134, TeffRadiusMann2015.scatterFrac(Double.NaN), 0);
        assertEquals(0.093, TeffRadiusMann2015.scatterFrac(0.1), 0);
        // the logarithmic slope against the library's derivative of the typed polynomial
        for (double t = 2800; t <= 4100; t += 100) {
            double x = t / 3500;
            assertEquals(x * PLAIN.derivative().value(x) / PLAIN.value(x), TeffRadiusMann2015.dLnRdLnTeff(t, Double.NaN), 1e-12);
            assertEquals(x * WITH_FEH.derivative().value(x) / WITH_FEH.value(x), TeffRadiusMann2015.dLnRdLnTeff(t, 0.2), 1e-12);
        }
        assertEquals(0.4565 / (1 + 0.4565 * -0.3), TeffRadiusMann2015.dLnRdFeh(-0.3), 1e-15);
    }

    @Test
    void theInverseIsUniqueOnTheRisingBranchAndRefusedOutsideIt() {
        // inside the branches (plain 2800-4100 K, [Fe/H] form 2850-3900 K) the inverse equals Brent's root of the typed
        // relation; the branches are where the typed cubic rises with d ln R / d ln T >= 1.5 (our rule)
        for (double r = 0.128; r < 0.658; r += 0.01) {
            assertEquals(referenceInverse(r, Double.NaN, 2800, 4100), TeffRadiusMann2015.teffK(r, Double.NaN), 1e-6, "plain R " + r);
        }
        for (double feh : new double[] {-0.4, 0.0, 0.3}) {
            double rLo = reference(2850, feh);
            double rHi = reference(3900, feh);
            for (double r = rLo + 1e-6; r < rHi; r += 0.01) {
                assertEquals(referenceInverse(r, feh, 2850, 3900), TeffRadiusMann2015.teffK(r, feh), 1e-6, "[Fe/H] " + feh + " R " + r);
            }
            assertTrue(Double.isNaN(TeffRadiusMann2015.teffK(rLo - 1e-4, feh)), "below the [Fe/H] branch");
            assertTrue(Double.isNaN(TeffRadiusMann2015.teffK(rHi + 1e-4, feh)), "above the [Fe/H] branch");
        }
        for (double t = 2800; t <= 4100; t += 10) {
            double x = t / 3500;
            assertTrue(x * PLAIN.derivative().value(x) / PLAIN.value(x) >= 1.5, "plain slope at " + t);
            if (t >= 2850 && t <= 3900) {
                assertTrue(x * WITH_FEH.derivative().value(x) / WITH_FEH.value(x) >= 1.5, "[Fe/H] slope at " + t);
            }
        }
        // the plain cubic's minimum (2733 K) and the [Fe/H] form's maximum (4049 K) lie outside the branches: just
        // beyond each limit the slope has fallen below the rule, so the limits are not wider than they need be ... 
        assertTrue(2750 / 3500.0 * PLAIN.derivative().value(2750 / 3500.0) / PLAIN.value(2750 / 3500.0) < 1.5);
        assertTrue(3950 / 3500.0 * WITH_FEH.derivative().value(3950 / 3500.0) / WITH_FEH.value(3950 / 3500.0) < 1.5);
        // ... and radii outside the branch (a brown dwarf's 0.10 R_sun, an early K dwarf's 0.7) get no Teff
        assertTrue(Double.isNaN(TeffRadiusMann2015.teffK(0.10, Double.NaN)));
        assertTrue(Double.isNaN(TeffRadiusMann2015.teffK(reference(2800, Double.NaN) - 1e-6, Double.NaN)));
        assertTrue(Double.isNaN(TeffRadiusMann2015.teffK(0.70, Double.NaN)));
        assertTrue(Double.isNaN(TeffRadiusMann2015.teffK(0.3, -2.5)), "no positive [Fe/H] factor");
        assertTrue(Double.isNaN(TeffRadiusMann2015.teffK(Double.NaN, Double.NaN)));
    }

    /** Proxima Centauri without V: Gaia G and RP and 2MASS J, H, Ks, parallax (all from memory). */
    static StarInput proximaWithoutV() {
        return new StarInput().parallax(768.07, 0.05)
                .magnitude(Band.G, 8.98, 0.01).magnitude(Band.RP, 7.55, 0.01)
                .magnitude(Band.J, 5.357, 0.023).magnitude(Band.H, 4.835, 0.057).magnitude(Band.KS, 4.384, 0.033)
                .ebv(0, 0);
    }

    @Test
    void proximaCentauriWithoutVGetsItsTeffFromItsRadius() {
        StarResult r = deriver.derive(proximaWithoutV(), new StarResult());
        assertTrue(TEFF_FROM_RADIUS.isSet(r.flags), "flags " + QualityFlag.names(r.flags));
        assertEquals(Regime.M_DWARF, r.regime);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        assertEquals(0L, r.teffRelations, "no colour relation gave the Teff");
        assertFalse(COLOUR_OUT_OF_RANGE.isSet(r.flags) || PHOTOMETRY_MISSING.isSet(r.flags), "flags " + QualityFlag.names(r.flags));
        // the radius is Mann et al. 2015's R(M_Ks) at M_Ks = Ks + 5 log10(parallax/100 mas) (common practice)
        double mKs = 4.384 + 5 * Math.log10(768.07 / 100);
        double rK = 1.9515 - 0.3520 * mKs + 0.01680 * mKs * mKs;
        assertEquals(rK, r.radiusRsun, 1e-9 * rK);
        // Teff: Brent's root of the typed Teff-radius relation at that radius
        assertEquals(referenceInverse(rK, Double.NaN, 2800, 4100), r.teffK, 1e-5);
        // L = R^2 (Teff / 5772 K)^4 (Stefan-Boltzmann with IAU 2015 B3's nominal solar Teff)
        assertEquals(rK * rK * Math.pow(r.teffK / 5772, 4), r.lumLsun, 1e-9 * r.lumLsun);
        // interferometric Teff 3054 +- 79 K, R 0.1542 +- 0.0045 R_sun (Boyajian et al. 2012, ApJ 757, 112; from memory)
        assertEquals(3054, r.teffK, 2 * Math.hypot(r.teffErrK, 79), "Teff " + r.teffK + " +- " + r.teffErrK);
        assertEquals(0.1542, r.radiusRsun, 2 * Math.hypot(r.radiusErrRsun, 0.0045));
        // the error carries the relation's 13.4 % scatter in R divided by the slope d ln R / d ln T, and the radius's:
        // its own 2.89 % and Ks's 0.033 mag through d ln R / d M_Ks (the parallax's 0.05 mas adds 1e-4 mag: left out)
        double slope = r.teffK / 3500 * PLAIN.derivative().value(r.teffK / 3500) / PLAIN.value(r.teffK / 3500);
        double dLnRdMks = (-0.3520 + 2 * 0.01680 * mKs) / rK;
        double lnRObsErr = Math.hypot(0.0289, dLnRdMks * 0.033);
        double expected = r.teffK * Math.hypot(0.134, lnRObsErr) / slope;
        assertEquals(expected, r.teffErrK, 0.005 * expected, "Teff error");
        // L's error: ln L = (2 + 4 / slope) ln R_obs - 4 ε / slope: R and Teff are correlated, not added as independent
        double lnLErr = Math.hypot((2 + 4 / slope) * lnRObsErr, 4 * 0.134 / slope);
        assertEquals(lnLErr, r.lumErrLsun / r.lumLsun, 0.005 * lnLErr, "L error");
        // the mass still comes from M_Ks (Mann et al. 2019), about 0.12 M_sun (from memory)
        assertEquals(0.122, r.massMsun, 2 * r.massErrMsun + 0.005);
    }

    @Test
    void barnardsStarWithoutVAgreesWithItsColourTeffAndInterferometry() {
        // Barnard's star as RegimeTest has it ([Fe/H] -0.40 measured: the [Fe/H] forms), but without V and I_C; G from
        // memory (about 8.19)
        StarInput noV = RegimeTest.barnardsStar();
        noV.hasMag[Band.V.ordinal()] = false;
        noV.hasMag[Band.IC.ordinal()] = false;
        noV.magnitude(Band.G, 8.19, 0.01);
        StarResult r = deriver.derive(noV, new StarResult());
        StarResult withColours = deriver.derive(RegimeTest.barnardsStar(), new StarResult());
        assertTrue(TEFF_FROM_RADIUS.isSet(r.flags), "flags " + QualityFlag.names(r.flags));
        assertFalse(TEFF_FROM_RADIUS.isSet(withColours.flags), "a star with V-J keeps its colour Teff");
        double mKs = 4.524 + 5 * Math.log10(546.9759 / 100);
        double rK = (1.9305 - 0.3466 * mKs + 0.01647 * mKs * mKs) * (1 + 0.04458 * -0.40);
        assertEquals(referenceInverse(rK, -0.40, 2850, 3900), r.teffK, 1e-5);
        // interferometric Teff 3222 +- 10 K (Boyajian et al. 2012; from memory)
        assertEquals(3222, r.teffK, 2 * Math.hypot(r.teffErrK, 10), "Teff " + r.teffK + " +- " + r.teffErrK);
        // the same star's colour Teff (V-J, V-I_C): the two routes agree within their combined errors
        assertEquals(withColours.teffK, r.teffK, 2 * Math.hypot(r.teffErrK, withColours.teffErrK));
        assertEquals(withColours.radiusRsun, r.radiusRsun, 1e-12, "the radius is M_Ks's either way");
        assertEquals(withColours.massMsun, r.massMsun, 1e-12, "and so is the mass");
    }

    @Test
    void outsideItsMetallicityRangeThePlainFormGivesTheTeff() {
        // Mann et al. 2015 calibrated the [Fe/H] forms on -0.6 < [Fe/H] < +0.5: at [Fe/H] -1.0 the Teff-radius
        // relation's plain form is used (the radius keeps the M_Ks relation's [Fe/H] form, as the luminosity step has it)
        StarInput poor = proximaWithoutV().feh(-1.0, 0.1);
        StarResult r = deriver.derive(poor, new StarResult());
        double mKs = 4.384 + 5 * Math.log10(768.07 / 100);
        double rK = (1.9305 - 0.3466 * mKs + 0.01647 * mKs * mKs) * (1 + 0.04458 * -1.0);
        assertTrue(TEFF_FROM_RADIUS.isSet(r.flags), "flags " + QualityFlag.names(r.flags));
        assertEquals(referenceInverse(rK, Double.NaN, 2800, 4100), r.teffK, 1e-5);
        assertEquals(rK, r.radiusRsun, 1e-9 * rK);
        // inside the range the [Fe/H] form: at -0.5 its Teff differs from the plain form's at the same radius
        StarResult in = deriver.derive(proximaWithoutV().feh(-0.5, 0.1), new StarResult());
        double rIn = (1.9305 - 0.3466 * mKs + 0.01647 * mKs * mKs) * (1 + 0.04458 * -0.5);
        assertEquals(referenceInverse(rIn, -0.5, 2850, 3900), in.teffK, 1e-5);
    }

    @Test
    void noTeffWithoutADistanceOrOutsideTheRadiusRange() {
        // without a parallax there is no M_Ks: the red colour leaves no Teff (as before)
        StarInput noPlx = proximaWithoutV();
        noPlx.hasParallax = noPlx.hasParallaxErr = false;
        StarResult r = deriver.derive(noPlx, new StarResult());
        assertTrue(Double.isNaN(r.teffK));
        assertTrue(COLOUR_OUT_OF_RANGE.isSet(r.flags) && !TEFF_FROM_RADIUS.isSet(r.flags), "flags " + QualityFlag.names(r.flags));
        // M_Ks 9.6 (R 0.121): below the relation's branch (about M_Ks 9.4, 2800 K): no Teff, flagged
        StarInput late = proximaWithoutV();
        late.parallax(1000 * Math.pow(10, (9.6 - 4.384 - 5) / 5) , 0.05);
        StarResult lr = deriver.derive(late, new StarResult());
        assertTrue(Double.isNaN(lr.teffK) && COLOUR_OUT_OF_RANGE.isSet(lr.flags), "flags " + QualityFlag.names(lr.flags));
        // M_Ks 4.3: brighter than the radius relation's range (4.6): no M-dwarf radius, hence no Teff from it
        StarInput bright = proximaWithoutV();
        bright.parallax(100 * Math.pow(10, -(4.3 - 4.384 - 5) / 5), 0.05);
        StarResult br = deriver.derive(bright, new StarResult());
        assertFalse(TEFF_FROM_RADIUS.isSet(br.flags), "flags " + QualityFlag.names(br.flags));
        // a star without any colour redder than the FGK relations (J, H, Ks only: J-Ks's edge is at 4248 K) is not
        // known to be an M dwarf: no Teff from a radius
        StarInput nir = new StarInput().parallax(768.07, 0.05)
                .magnitude(Band.J, 5.357, 0.023).magnitude(Band.H, 4.835, 0.057).magnitude(Band.KS, 4.384, 0.033).ebv(0, 0);
        assertFalse(TEFF_FROM_RADIUS.isSet(deriver.derive(nir, new StarResult()).flags));
    }

    @Test
    void monteCarloDrawsCarryTheRelationsScatter() {
        // 4000 draws: half the 16-84 % range of Teff matches the first-order error (a Gaussian's: common practice)
        StarInput in = proximaWithoutV();
        StarResult r = deriver.derive(in, new StarResult());
        MonteCarloDeriver mc = new MonteCarloDeriver(DeriveSettings.defaults(), 4000, 7);
        double[][] p = new double[MonteCarloDeriver.NQ][3];
        mc.percentiles(in, 42L, p);
        double half = 0.5 * (p[1][2] - p[1][0]);
        assertEquals(r.teffErrK, half, 0.08 * r.teffErrK, "draws " + p[1][0] + " .. " + p[1][2]);
        assertEquals(r.teffK, p[1][1], 0.1 * r.teffErrK, "median");
    }
}
