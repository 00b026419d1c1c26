package org.starderive.sample;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.sample.IndependentRelations.*;

import org.junit.jupiter.api.Test;
import org.starderive.physics.Band;
import org.starderive.physics.BolometricCorrectionFlower1996;
import org.starderive.physics.CardelliClaytonMathis1989;
import org.starderive.physics.GaiaBandExtinction;
import org.starderive.physics.GaiaToJohnsonRiello2021;
import org.starderive.physics.MassLuminosityEker2018;
import org.starderive.physics.MassMann2019;
import org.starderive.physics.RadiusMann2015;
import org.starderive.physics.TeffRadiusMann2015;
import org.starderive.physics.TeffRelation;
import org.starderive.physics.TeffRelations;

/**
 * The synthetic survey's second typed copy of the published relations: first against check values computed
 * from the published coefficients (reference sheet of the project, "derived" values, and the papers' own solar
 * figures), then against the physics core over grids of colour, [Fe/H] and log g. Two typed copies made apart
 * and agreeing to 1e-9 leave a typo in either nowhere to hide: a changed coefficient in the core fails here.
 */
class IndependentRelationsTest {

    @Test
    void checkValuesComputedFromThePublishedCoefficients() {
        // Mann et al. 2015 Table 1 (erratum): M_Ks 5.15 -> R 0.584, 6.55 -> 0.367, 7.36 -> 0.271, 8.20 -> 0.195
        assertEquals(0.584, mannRadius(5.15), 0.0006);
        assertEquals(0.367, mannRadius(6.55), 0.0006);
        assertEquals(0.271, mannRadius(7.36), 0.0006);
        assertEquals(0.195, mannRadius(8.20), 0.0006);
        // Mann et al. 2019 Table 6, n = 5: M_Ks 5.15 -> 0.575 M_sun, 6.55 -> 0.353, 7.36 -> 0.244, 8.20 -> 0.164
        assertEquals(0.575, Math.pow(10, mannLogMass(5.15)), 0.0006);
        assertEquals(0.353, Math.pow(10, mannLogMass(6.55)), 0.0006);
        assertEquals(0.244, Math.pow(10, mannLogMass(7.36)), 0.0006);
        assertEquals(0.164, Math.pow(10, mannLogMass(8.20)), 0.0006);
        assertEquals(6.55, mannMksOfMass(Math.pow(10, mannLogMass(6.55))), 1e-9);
        // Mann et al. 2015 Table 1, Teff-radius: at X = 1 the cubic is the sum of its coefficients, 0.3875 R_sun at
        // 3500 K (arithmetic); the inverse on the rising branch returns the Teff it was given
        assertEquals(0.3875, mannRadiusOfTeff(3500), 1e-12);
        assertEquals(3300, mannTeffOfRadius(mannRadiusOfTeff(3300)), 1e-6);
        assertTrue(Double.isNaN(mannTeffOfRadius(0.12)) && Double.isNaN(mannTeffOfRadius(0.7)), "outside 2800-4100 K");
        // Flower 1996 / Torres 2010: B-V 0.00 -> 9531 K, 0.65 -> 5718 K, -0.20 -> 16958 K
        assertEquals(9531, flowerTeff(0.00), 1);
        assertEquals(5718, flowerTeff(0.65), 1);
        assertEquals(16958, flowerTeff(-0.20), 2);
        // BC_V (same papers): 5772 K -> -0.081, 5000 K -> -0.286, 4000 K -> -1.124, 6500 K -> +0.007
        assertEquals(-0.081, bcV(5772), 0.0006);
        assertEquals(-0.286, bcV(5000), 0.0006);
        assertEquals(-1.124, bcV(4000), 0.0006);
        assertEquals(0.007, bcV(6500), 0.0006);
        // Torres 2010: M_V,sun 4.812 from V_sun -26.76; with BC_V,sun -0.081 the scale's M_bol,sun is 4.73
        assertEquals(4.812, MV_SUN_MAG, 0.0006);
        assertEquals(4.731, MBOL_SUN_MAG, 0.0006);
        // log g_sun = 4.438 (IAU 2015 B3 nominal values)
        assertEquals(4.438, LOGG_SUN_CGS, 0.0005);
        // Mann et al. 2015 plain V-J relation, sheet check values: 2.833 -> 3885 K, 3.769 -> 3440 K, 4.413 -> 3228 K
        double[] plainVj = {2.840, -1.3453, 0.3906, -0.0546, 0.002913, 0, 0};
        assertEquals(3885, mannTeff(plainVj, 2.833, 0), 1);
        assertEquals(3440, mannTeff(plainVj, 3.769, 0), 1);
        assertEquals(3228, mannTeff(plainVj, 4.413, 0), 1);
        // Casagrande et al. 2010, Table 7 solar colours on their scale: V-Ks 1.544 gives 5778 K (sheet's chain check);
        // B-V 0.641 by hand from Table 4: theta = 0.5665 + 0.4809 x 0.641 - 0.0060 x 0.641^2 = 0.87229 -> 5778 K
        assertEquals(5778, thetaTeff(C10_BV, 0.641, 0), 2);
        assertEquals(5778, thetaTeff(C10_VK, 1.544, 0), 3);
        // Casagrande et al. 2021 release: the Sun (BP-RP 0.82, log g 4.44, [Fe/H] 0) gives 5762 K
        assertEquals(5762, c21BpRpTeff(0.82, 0, 4.44), 3);
        // CCM89 own table: J 0.282, H 0.190, K 0.114 (sheet), at J 1.25, H 1.60, K 2.2 um (nominal wavelengths from memory)
        assertEquals(0.282, ccm(1.25, 3.1), 0.0015);
        assertEquals(0.190, ccm(1.60, 3.1), 0.0015);
        assertEquals(0.114, ccm(2.2, 3.1), 0.0015);
        assertEquals(1.0, ccm(LAMBDA_V, 3.1), 0.01);
    }

    private static void same(double expected, double actual, String what) {
        assertEquals(expected, actual, 1e-9 * Math.max(1, Math.abs(expected)), what);
    }

    private static void sameTheta(String id, double[] coef, double lo, double hi) {
        TeffRelation r = TeffRelations.byId(id);
        for (double x = lo; x <= hi + 1e-9; x += (hi - lo) / 7) {
            for (double feh : new double[] {-1.5, -0.5, 0, 0.2}) {
                same(r.teff(x, feh, 4.4), thetaTeff(coef, x, feh), id + " at " + x + ", [Fe/H] " + feh);
            }
        }
    }

    @Test
    void agreesWithThePhysicsCoreEverywhere() {
        sameTheta("C10/B-V", C10_BV, 0.18, 1.29);
        sameTheta("C10/V-Rc", C10_VR, 0.24, 0.80);
        sameTheta("C10/V-Ic", C10_VI, 0.46, 1.47);
        sameTheta("C10/V-J", C10_VJ, 0.61, 2.44);
        sameTheta("C10/V-H", C10_VH, 0.67, 3.01);
        sameTheta("C10/V-Ks", C10_VK, 0.78, 3.15);
        sameTheta("GHB09/B-V", GHB_BV, 0.3, 1.4);
        sameTheta("GHB09/V-J", GHB_VJ, 1.0, 2.4);
        sameTheta("GHB09/V-H", GHB_VH, 0.8, 3.1);
        sameTheta("GHB09/V-Ks", GHB_VK, 1.1, 3.4);
        TeffRelation c21 = TeffRelations.byId("C21/BP-RP/dwarf");
        for (double x = 0.2; x <= 2.0; x += 0.15) {
            for (double feh : new double[] {-1.5, -0.3, 0, 0.3}) {
                for (double logg : new double[] {3.5, 4.5}) {
                    same(c21.teff(x, feh, logg), c21BpRpTeff(x, feh, logg), "C21 BP-RP " + x + " " + feh + " " + logg);
                }
            }
        }
        TeffRelation vjJh = TeffRelations.byId("M15/V-J+JH");
        TeffRelation viJh = TeffRelations.byId("M15/V-Ic+JH");
        TeffRelation bpRp = TeffRelations.byId("M15/BP-RP");
        for (double jh : new double[] {0.5, 0.6, 0.7}) {
            for (double x = 2.6; x <= 5.0; x += 0.3) {
                same(vjJh.teff(x, 0, 5, jh), mannTeff(M15_VJ_JH, x, jh), "M15 V-J+JH " + x + " " + jh);
            }
            for (double x = 1.7; x <= 3.2; x += 0.2) {
                same(viJh.teff(x, 0, 5, jh), mannTeff(M15_VI_JH, x, jh), "M15 V-Ic+JH " + x + " " + jh);
            }
        }
        for (double x = 1.9; x <= 3.8; x += 0.2) {
            same(bpRp.teff(x, 0, 5), mannTeff(M15_BPRP, x, 0), "M15 BP-RP " + x);
        }
        for (double mks = 4.7; mks <= 9.7; mks += 0.25) {
            same(RadiusMann2015.radiusRsun(mks, Double.NaN), mannRadius(mks), "Mann 2015 R at " + mks);
            same(MassMann2019.logMass(mks, Double.NaN), mannLogMass(mks), "Mann 2019 M at " + mks);
        }
        for (double t = 2810; t <= 4090; t += 40) { // inside the branch: at its ends the two copies may round apart
            same(TeffRadiusMann2015.radiusRsun(t, Double.NaN), mannRadiusOfTeff(t), "Mann 2015 R(Teff) at " + t);
            double r = mannRadiusOfTeff(t);
            same(TeffRadiusMann2015.teffK(r, Double.NaN), mannTeffOfRadius(r), "Mann 2015 Teff(R) at " + r);
        }
        TeffRelation f96 = TeffRelations.byId("F96/B-V");
        for (double bv = -0.35; bv <= 0.5; bv += 0.05) {
            same(f96.teff(bv, 0, 4), flowerTeff(bv), "Flower Teff at " + bv);
        }
        for (double t = 2900; t < 40000; t *= 1.07) {
            same(BolometricCorrectionFlower1996.bcV(t), bcV(t), "BC_V at " + t);
        }
        same(BolometricCorrectionFlower1996.MBOL_SUN, MBOL_SUN_MAG, "M_bol,sun of the BC scale");
        for (double m = 0.18; m < 31; m *= 1.1) {
            same(MassLuminosityEker2018.logLuminosity(m), ekerLogL(m), "Eker log L at " + m);
        }
        Band[] ccmBands = {Band.B, Band.V, Band.RC, Band.IC, Band.J, Band.H, Band.KS};
        double[] lambdas = {LAMBDA_B, LAMBDA_V, LAMBDA_RC, LAMBDA_IC, LAMBDA_J, LAMBDA_H, LAMBDA_KS};
        for (int i = 0; i < ccmBands.length; i++) {
            for (double rv : new double[] {2.5, 3.1, 5.0}) {
                same(CardelliClaytonMathis1989.bandOverAv(ccmBands[i], rv), ccm(lambdas[i], rv) / ccm(LAMBDA_V, rv),
                        "CCM " + ccmBands[i] + " R_V " + rv);
            }
        }
        for (double c = -0.3; c <= 4.5; c += 0.3) {
            same(GaiaBandExtinction.rG(c), rG(c), "R_G " + c);
            same(GaiaBandExtinction.rBp(c), rBp(c), "R_BP " + c);
            same(GaiaBandExtinction.rRp(c), rRp(c), "R_RP " + c);
            same(GaiaToJohnsonRiello2021.gMinusV(c), gMinusV(c), "G-V " + c);
        }
    }
}
