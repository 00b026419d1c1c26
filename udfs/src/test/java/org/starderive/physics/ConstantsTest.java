package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

class ConstantsTest {

    @Test
    void nominalSolarTeffFollowsFromNominalLuminosityAndRadius_IAU2015B3() {
        // IAU 2015 B3: the nominal Teff 5772 K is consistent with L, R and sigma (CODATA 2018) to the kelvin
        double t = Math.pow(Iau2015.L_SUN_W / (4 * Math.PI * Iau2015.R_SUN_M * Iau2015.R_SUN_M * Codata2018.SIGMA_SB_W_M2_K4), 0.25);
        assertEquals(5772.0, t, 0.5);
    }

    @Test
    void solarBolometricMagnitudeIs474_IAU2015B2() {
        // IAU 2015 B2: M_bol,sun = 4.74 for the nominal L_sun (4.7399959)
        assertEquals(4.7399959, DerivedConstants.MBOL_SUN_IAU, 1e-6);
    }

    @Test
    void parsecFromAuAndItsDefinition_IAU2015B2() {
        // IAU 2015 B2 quotes 1 pc = 3.085677581491367e16 m (648000/pi au, au from IAU 2012 B2)
        assertEquals(3.085677581491367e16, DerivedConstants.PARSEC_M, 1e1);
    }

    @Test
    void derivedSolarMassDensityAndGravity() {
        // M_sun = (GM)sun (IAU 2015 B3) / G (CODATA 2018) = 1.98841e30 kg, division done by hand
        assertEquals(1.98841e30, DerivedConstants.M_SUN_KG, 0.00001e30);
        // mean solar density and surface gravity from the nominal values: 1409.8 kg m-3 and 274.20 m s-2
        // (IAU 2015 B3 nominal values, arithmetic checked by hand)
        assertEquals(1409.8, DerivedConstants.RHO_SUN_KG_M3, 0.1);
        assertEquals(274.20, DerivedConstants.G_SUN_M_S2, 0.01);
        assertEquals(4.438, DerivedConstants.LOGG_SUN_CGS, 0.001);
    }

    @Test
    void oneSolarRadiusAtTenParsecSubtends093mas() {
        // 2 R_sun / 10 pc in mas: 0.93009 (IAU 2015 B3 R_sun, IAU 2015 B2 parsec)
        double thetaMas = 2 * Iau2015.R_SUN_M / (10 * DerivedConstants.PARSEC_M) / DerivedConstants.MAS_RAD;
        assertEquals(0.93009, thetaMas, 0.00001);
    }

    @Test
    void constantsMustNameTheirSource() {
        assertThrows(IllegalArgumentException.class, () -> Constant.of("x", 1, 0, "m", " "));
        assertThrows(IllegalArgumentException.class, () -> Constant.of("x", Double.NaN, 0, "m", "somewhere"));
        assertThrows(IllegalArgumentException.class, () -> Constant.of("x", 1, Double.NaN, "m", "somewhere"));
        assertEquals("derived from a and b", Constant.derived("y", 2, 0, "m", "a and b").reference());
        assertThrows(IllegalArgumentException.class, () -> Constant.of("x", 1, -1e-12, "m", "somewhere"));
        assertThrows(IllegalArgumentException.class, () -> Constant.of("x", 1, 0, "m", null));
        assertThrows(IllegalArgumentException.class, () -> Constant.of("x", Double.POSITIVE_INFINITY, 0, "m", "somewhere"));
        // an exact or nominal value has uncertainty 0, and it is accepted
        Constant c = Constant.of("au", 149597870700.0, 0, "m", "IAU 2012 Resolution B2");
        assertEquals("au", c.name());
        assertEquals(149597870700.0, c.value(), 0.0);
        assertEquals(0.0, c.uncertainty(), 0.0);
        assertEquals("m", c.unit());
        assertEquals("au = 1.495978707E11 m (IAU 2012 Resolution B2)", c.toString());
        // CODATA 2018: G = 6.67430(15)e-11
        assertEquals(1.5e-15, Constant.of("G", 6.67430e-11, 1.5e-15, "m3 kg-1 s-2", "CODATA 2018").uncertainty(), 0.0);
        assertEquals("G = 6.6743E-11 ± 1.5E-15 m3 kg-1 s-2 (CODATA 2018)",
                Constant.of("G", 6.67430e-11, 1.5e-15, "m3 kg-1 s-2", "CODATA 2018").toString());
    }
}
