package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.QualityFlag.*;

import org.junit.jupiter.api.Test;

/**
 * The calibration regimes: the new relations against values computed from their published coefficients, their
 * range edges, well-measured stars through the whole chain, and continuity across the regime boundaries.
 */
class RegimeTest {
    private final StarDeriver deriver = new StarDeriver(DeriveSettings.defaults());

    @Test
    void mannRadiusAndMassMatchThePublishedCoefficients() {
        // check values computed from the published coefficients: Mann et al. 2015 Table 1 (erratum 2016) and
        // Mann et al. 2019 Table 6 (n = 5), independently evaluated
        double[][] rows = {{5.15, 0.584, 0.575}, {6.55, 0.367, 0.353}, {7.36, 0.271, 0.244}, {8.20, 0.195, 0.164}};
        for (double[] r : rows) {
            assertEquals(r[1], RadiusMann2015.radiusRsun(r[0], Double.NaN), 0.0015, "R at M_Ks " + r[0]);
            assertEquals(r[2], Math.pow(10, MassMann2019.logMass(r[0], Double.NaN)), 0.0015, "M at M_Ks " + r[0]);
        }
        // the [Fe/H] forms: R multiplied by (1 + 0.04458 [Fe/H]) (Mann et al. 2015 Table 1), M by (1 - 0.0035 [Fe/H])
        // with the b coefficients (Mann et al. 2019 Table 6); at [Fe/H] = +0.3 both stay within their scatter of the plain form
        double rFe = (1.9305 - 0.3466 * 6.55 + 0.01647 * 6.55 * 6.55) * (1 + 0.04458 * 0.3);
        assertEquals(rFe, RadiusMann2015.radiusRsun(6.55, 0.3), 1e-12);
        assertEquals(0.367, RadiusMann2015.radiusRsun(6.55, 0.0), 0.03 * 0.367);
        assertEquals(0.353, Math.pow(10, MassMann2019.logMass(6.55, 0.3)), 0.03 * 0.353);
        // range edges: 4.6 < M_Ks < 9.8 (radius), 4.0 < M_Ks < 11.0 (mass)
        assertTrue(Double.isNaN(RadiusMann2015.radiusRsun(4.55, Double.NaN)));
        assertTrue(Double.isNaN(RadiusMann2015.radiusRsun(9.85, Double.NaN)));
        assertTrue(Double.isNaN(MassMann2019.logMass(3.95, Double.NaN)));
        assertTrue(Double.isNaN(MassMann2019.logMass(11.05, Double.NaN)));
        assertFalse(Double.isNaN(MassMann2019.logMass(10.9, Double.NaN)));
    }

    @Test
    void mannColourRelationsMatchThePublishedCoefficients() {
        // computed from the published coefficients (Mann et al. 2015 Table 2, erratum 2016): V-J 2.833 -> 3885 K,
        // 3.769 -> 3440 K, 4.413 -> 3228 K; the 4100 K blue edge at V-J 2.53, V-Ic 1.61, BP-RP 1.83
        TeffRelation vj = TeffRelations.byId("M15/V-J");
        assertEquals(3885, vj.teff(2.833, 0, 4.8), 2);
        assertEquals(3440, vj.teff(3.769, 0, 4.8), 2);
        assertEquals(3228, vj.teff(4.413, 0, 4.8), 2);
        assertEquals(4100, vj.teff(2.53, 0, 4.8), 10);
        assertEquals(4100, TeffRelations.byId("M15/V-Ic").teff(1.61, 0, 4.8), 10);
        assertEquals(4100, TeffRelations.byId("M15/BP-RP").teff(1.83, 0, 4.8), 10);
        // the turnover near 2800 K: a redder colour is out of range (never evaluated), a bluer one inside
        double turn = vj.colourMax();
        assertEquals(2811, vj.teff(turn, 0, 4.8), 15);
        assertFalse(vj.inRange(turn + 0.01, 0));
        assertTrue(vj.inRange(turn - 0.3, 0));
        // the [Fe/H] range of the calibration sample, -0.6 ... +0.5
        assertFalse(vj.inRange(3.5, -0.7));
        // effective scatter: the table's sigma with the table note's 60 K in quadrature (Mann et al. 2015, Table 2)
        assertEquals(Math.hypot(55, 60), vj.scatterK(), 1e-9);
    }

    @Test
    void flowerTemperaturesMatchThePublishedCoefficients() {
        // computed from the coefficients of Flower 1996 as corrected by Torres 2010 (AJ 140, 1158, Table 2):
        // B-V 0.00 -> 9531 K, 0.65 -> 5718 K, -0.20 -> 16958 K
        TeffRelation f = TeffRelations.byId("F96/B-V");
        assertEquals(9531, f.teff(0.00, 0, 4), 3);
        assertEquals(5718, f.teff(0.65, 0, 4), 3);
        assertEquals(16958, f.teff(-0.20, 0, 4), 10);
        assertFalse(f.inRange(-0.45, 0));
    }

    /** Barnard's star, GJ 699 (values from memory / secondary copies; see the comments), at its measured parallax. */
    static StarInput barnardsStar() {
        // V 9.511, I_C 6.741 (Koen et al. 2010, MNRAS 403, 1949, copy); 2MASS J 5.244, H 4.834, Ks 4.524 (from
        // memory); parallax 546.976 +- 0.040 mas (Gaia DR3, copy); [Fe/H] -0.40 (as used by Mann et al. 2015, copy)
        return new StarInput().parallax(546.9759, 0.0401)
                .magnitude(Band.V, 9.511, 0.02).magnitude(Band.IC, 6.741, 0.02)
                .magnitude(Band.J, 5.244, 0.020).magnitude(Band.H, 4.834, 0.034).magnitude(Band.KS, 4.524, 0.020)
                .ebv(0, 0).feh(-0.40, 0.08);
    }

    @Test
    void proximaCentauriBelowTheEkerMassRangeGetsAMannMassWithItsError() {
        // V 11.13, 2MASS J 5.357, H 4.835, Ks 4.384, parallax 768.07 +- 0.05 mas (Gaia DR3): all from memory.
        // M_Ks = 8.81: below the Eker et al. 2018 mass range (0.179 M_sun), so the mass is Mann et al. 2019's alone
        StarInput in = new StarInput().parallax(768.07, 0.05)
                .magnitude(Band.V, 11.13, 0.02).magnitude(Band.J, 5.357, 0.023).magnitude(Band.H, 4.835, 0.057)
                .magnitude(Band.KS, 4.384, 0.033).ebv(0, 0);
        StarResult r = deriver.derive(in, new StarResult());
        assertEquals(Regime.M_DWARF, r.regime);
        // interferometric R = 0.1542 +- 0.0045 R_sun (Boyajian et al. 2012, ApJ 757, 112; from memory). Their Teff,
        // about 3050 K (from memory), is not checked: at V-J 5.8 the Mann et al. 2015 relations give about 2850 K,
        // near their cool end; the radius and mass do not depend on it
        assertEquals(0.1542, r.radiusRsun, 2 * Math.hypot(r.radiusErrRsun, 0.0045), "R " + r.radiusRsun);
        assertTrue(r.teffK > 2700 && r.teffK < 3200, "Teff " + r.teffK);
        // mass about 0.12 M_sun (from memory); its error is finite and carries the 2.0 % scatter of Mann et al. 2019
        assertEquals(0.122, r.massMsun, 2 * r.massErrMsun + 0.005, "M " + r.massMsun + " +- " + r.massErrMsun);
        assertTrue(r.massErrMsun / r.massMsun >= 0.020 && r.massErrMsun / r.massMsun < 0.05, "M error " + r.massErrMsun);
        assertTrue(Double.isFinite(r.densityErrKgM3) && Double.isFinite(r.loggErrCgs), "density and log g errors");
    }

    @Test
    void theRouteOfRadiusAndMassIsReported() {
        // which relation gave R and M (radiusMksWeight, massMksWeight; read by the job's check): the rules are the
        // class comment's. Proxima (inputs from memory, as above) is an M dwarf far from the K7-M0 blend with M_Ks 8.8,
        // inside Mann et al. 2015's radius range and below Eker et al. 2018's mass range: both from M_Ks alone
        StarResult p = deriver.derive(new StarInput().parallax(768.07, 0.05)
                .magnitude(Band.V, 11.13, 0.02).magnitude(Band.J, 5.357, 0.023).magnitude(Band.H, 4.835, 0.057)
                .magnitude(Band.KS, 4.384, 0.033).ebv(0, 0), new StarResult());
        assertEquals(1.0, p.radiusMksWeight, "Proxima's radius route");
        assertEquals(1.0, p.massMksWeight, "Proxima's mass route");
        // the Sun at 10 pc (StarDeriverTest's solar twin): no M-dwarf relation, R from L and Stefan-Boltzmann, M from L
        StarResult sun = deriver.derive(StarDeriverTest.solarTwinAt10pc(), new StarResult());
        assertEquals(0.0, sun.radiusMksWeight, "the Sun's radius route");
        assertEquals(0.0, sun.massMksWeight, "the Sun's mass route");
        // without a parallax there is no radius and no mass, hence no route
        StarInput noPlx = StarDeriverTest.solarTwinAt10pc();
        noPlx.hasParallax = noPlx.hasParallaxErr = false;
        StarResult none = deriver.derive(noPlx, new StarResult());
        assertTrue(Double.isNaN(none.radiusMksWeight) && Double.isNaN(none.massMksWeight), "no route without a distance");
    }

    @Test
    void barnardsStarMatchesItsInterferometricRadiusAndTemperature() {
        StarResult r = deriver.derive(barnardsStar(), new StarResult());
        // interferometric R = 0.1867 +- 0.0012 R_sun, Teff = 3222 +- 10 K (Boyajian et al. 2012, ApJ 757, 112; from memory)
        assertEquals(Regime.M_DWARF, r.regime);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        assertEquals(3222, r.teffK, 2 * Math.hypot(r.teffErrK, 10), "Teff " + r.teffK + " +- " + r.teffErrK);
        assertEquals(0.1867, r.radiusRsun, 2 * Math.hypot(r.radiusErrRsun, 0.0012), "R " + r.radiusRsun);
        // mass about 0.16 M_sun (a common figure, from memory): within 2 sigma of the Mann et al. 2019 mass
        assertEquals(0.16, r.massMsun, 2 * r.massErrMsun + 0.01, "M " + r.massMsun);
        assertTrue(r.teffFrom().contains("M15/V-J+FeH") && r.teffFrom().contains("M15/V-Ic+FeH"), r.teffFrom());
        assertFalse(r.has(BC_UNRELIABLE) || r.has(COLOUR_OUT_OF_RANGE) || r.has(MASS_NOT_APPLICABLE),
                QualityFlag.names(r.flags).toString());
        // the radius error carries the relation's 2.7 % scatter (Mann et al. 2015, Table 1, [Fe/H] form)
        assertTrue(r.radiusErrRsun / r.radiusRsun >= 0.027, "R error " + r.radiusErrRsun);
        // the mass error carries the relation's 2.1 % scatter (Mann et al. 2019, Table 6)
        assertTrue(r.massErrMsun / r.massMsun >= 0.021, "M error " + r.massErrMsun);
    }

    @Test
    void siriusAMatchesItsInterferometricRadiusAndDynamicalMass() {
        // V -1.46, B-V 0.00 (Bright Star Catalogue, copy); parallax 379.21 +- 1.58 mas (van Leeuwen 2007, copy)
        StarInput in = new StarInput().parallax(379.21, 1.58).magnitude(Band.V, -1.46, 0.01)
                .magnitude(Band.B, -1.46, 0.01).ebv(0, 0.005).feh(0.5, 0.1);
        StarResult r = deriver.derive(in, new StarResult());
        assertEquals(Regime.HOT, r.regime);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        assertEquals("F96/B-V", r.teffFrom());
        // Teff 9845 +- 64 K and R 1.713 +- 0.009 (Davis et al. 2011, interferometry, abstract)
        assertEquals(9845, r.teffK, 2 * Math.hypot(r.teffErrK, 64), "Teff " + r.teffK + " +- " + r.teffErrK);
        assertEquals(1.713, r.radiusRsun, 2 * Math.hypot(r.radiusErrRsun, 0.009), "R " + r.radiusRsun);
        // dynamical mass 2.063 +- 0.023 M_sun (Bond et al. 2017, ApJ 840, 70, abstract)
        assertEquals(2.063, r.massMsun, 2 * Math.hypot(r.massErrMsun, 0.023), "M " + r.massMsun + " +- " + r.massErrMsun);
        assertFalse(r.has(HOT_TEFF_UNCERTAIN));
    }

    @Test
    void aHotStarWithAPoorlyKnownReddeningIsFlagged() {
        // a B star (Flower B-V -0.20 -> 16958 K) whose E(B-V) is known only to 0.05 mag: the Teff error exceeds 10 %
        StarInput in = new StarInput().parallax(5, 0.05).magnitude(Band.V, 6.0, 0.01).magnitude(Band.B, 5.9, 0.01)
                .ebv(0.1, 0.05).feh(0, 0.1);
        StarResult r = deriver.derive(in, new StarResult());
        assertEquals(Regime.HOT, r.regime);
        assertTrue(r.teffErrK > 0.1 * r.teffK, "Teff " + r.teffK + " +- " + r.teffErrK);
        assertTrue(r.has(HOT_TEFF_UNCERTAIN), QualityFlag.names(r.flags).toString());
        StarResult sure = deriver.derive(in.ebv(0.1, 0.005), new StarResult());
        assertFalse(sure.has(HOT_TEFF_UNCERTAIN), "Teff " + sure.teffK + " +- " + sure.teffErrK);
    }

    @Test
    void aRedStarTooBrightForAnMDwarfIsClassedEvolved() {
        // Barnard's star's colours placed at 1/20 of its parallax: M_Ks = 8.2 - 6.5 = 1.7, brighter than any M dwarf
        StarInput in = barnardsStar();
        in.parallaxMas /= 20;
        StarResult r = deriver.derive(in, new StarResult());
        assertEquals(LuminosityClass.EVOLVED, r.lumClass);
        assertFalse(r.regime == Regime.M_DWARF);
        assertTrue(r.has(MASS_NOT_APPLICABLE));
    }

    @Test
    void withoutADistanceARedStarIsAssumedADwarf() {
        StarInput in = barnardsStar();
        in.hasParallax = false;
        StarResult r = deriver.derive(in, new StarResult());
        assertEquals(Regime.M_DWARF, r.regime);
        assertTrue(r.has(LUM_CLASS_ASSUMED) && r.has(PARALLAX_MISSING));
        assertTrue(r.teffK > 3000 && r.teffK < 3500);
    }

    /**
     * Continuity along the main sequence: stars whose colours and absolute magnitudes move linearly between two
     * anchors on either side of a blend zone. A step from one star to the next larger than the two stars' combined
     * 1σ would be a jump (the step of a smooth change shrinks with the step size, a jump does not). Anchors: mean
     * dwarf colours of K5V/M1V and A5V/F2V stars (Pecaut &amp; Mamajek 2013, ApJS 208, 9; from memory, rounded —
     * they only need to be a plausible path through the zone).
     */
    @Test
    void teffLuminosityRadiusAndMassAreContinuousAcrossTheBlends() {
        // {M_V, B-V, V-Ic, V-J, V-H, V-Ks, BP-RP}
        double[] k5 = {7.20, 1.15, 1.24, 2.20, 2.76, 2.87, 1.55};
        double[] m1 = {9.90, 1.48, 2.05, 3.20, 3.82, 4.02, 2.25};
        double[] a5 = {1.90, 0.16, 0.18, 0.33, 0.40, 0.42, 0.28};
        double[] f2 = {3.20, 0.39, 0.45, 0.78, 0.95, 0.98, 0.60};
        checkContinuity(k5, m1, Regime.M_DWARF, Regime.FGK_DWARF);
        checkContinuity(f2, a5, Regime.HOT, Regime.FGK_DWARF);
    }

    private void checkContinuity(double[] from, double[] to, Regime r1, Regime r2) {
        int n = 400;
        StarResult prev = null;
        boolean saw1 = false;
        boolean saw2 = false;
        for (int i = 0; i <= n; i++) {
            double f = (double) i / n;
            double[] p = new double[from.length];
            for (int k = 0; k < p.length; k++) {
                p[k] = from[k] + f * (to[k] - from[k]);
            }
            double v = p[0];
            StarInput in = new StarInput().parallax(100, 0.01).magnitude(Band.V, v, 0.01)
                    .magnitude(Band.B, v + p[1], 0.01).magnitude(Band.IC, v - p[2], 0.01)
                    .magnitude(Band.J, v - p[3], 0.01).magnitude(Band.H, v - p[4], 0.01)
                    .magnitude(Band.KS, v - p[5], 0.01).ebv(0, 0);
            StarResult r = deriver.derive(in, new StarResult());
            String ctx = "step " + i + " of " + n + ": Teff " + r.teffK + " L " + r.lumLsun + " R " + r.radiusRsun
                    + " M " + r.massMsun + " " + r.regime + " " + r.teffFrom() + " " + QualityFlag.names(r.flags);
            assertFalse(Double.isNaN(r.teffK) || Double.isNaN(r.lumLsun) || Double.isNaN(r.radiusRsun)
                    || Double.isNaN(r.massMsun), ctx);
            saw1 |= r.regime == r1;
            saw2 |= r.regime == r2;
            if (prev != null) {
                assertTrue(Math.abs(r.teffK - prev.teffK) <= Math.hypot(r.teffErrK, prev.teffErrK), "Teff " + ctx);
                assertTrue(Math.abs(r.lumLsun - prev.lumLsun) <= Math.hypot(r.lumErrLsun, prev.lumErrLsun), "L " + ctx);
                assertTrue(Math.abs(r.radiusRsun - prev.radiusRsun) <= Math.hypot(r.radiusErrRsun, prev.radiusErrRsun), "R " + ctx);
                assertTrue(Math.abs(r.massMsun - prev.massMsun) <= Math.hypot(r.massErrMsun, prev.massErrMsun), "M " + ctx);
            }
            prev = r;
        }
        assertTrue(saw1 && saw2, "the path crosses from " + r2 + " into " + r1);
    }
}
