package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.junit.jupiter.api.Test;

/** {@link TeffRelation} method by method, and {@link TeffRelations#mannTurnover}, against published values. */
class TeffRelationTest {

    /**
     * Mann et al. 2015, ApJ 804, 64, Table 2 as reprinted in the erratum (Mann et al. 2016, ApJ 819, 87), the colour
     * terms a..e of each row, typed a second time here: V-J, V-Ic, BP-RP, each plain, [Fe/H] and (V-J, V-Ic) J-H forms.
     */
    private static final double[][] MANN_ROWS = {
        {2.840, -1.3453, 0.3906, -0.0546, 0.002913},
        {2.515, -1.054, 0.2965, -0.04150, 0.002245},
        {2.769, -1.421, 0.4284, -0.06133, 0.003310},
        {2.455, -1.5701, 0.6891, -0.1500, 0.01254},
        {1.901, -0.6564, 0.1471, -0.01274, 0},
        {1.568, -0.4381, 0.07749, -0.005610, 0},
        {3.245, -2.4309, 1.043, -0.2127, 0.01649},
        {2.835, -1.893, 0.7860, -0.1594, 0.01243},
    };

    private static double mannSlope(double[] k, double x) {
        return k[1] + 2 * k[2] * x + 3 * k[3] * x * x + 4 * k[4] * x * x * x;
    }

    @Test
    void mannTurnoverIsWhereEachPublishedPolynomialStopsFalling() {
        // derived from Mann et al. 2015 Table 2 (erratum): the first colour above 0.5 mag where dTeff/dX reaches 0,
        // found here by Commons Math's Brent solver on the slope typed above; the class steps by 0.001 mag, so its
        // turnover lies within one step at or above the root.
        int turnsNever = 0;
        for (double[] k : MANN_ROWS) {
            double[] withAux = {k[0], k[1], k[2], k[3], k[4], 0, 0};
            double x0 = TeffRelations.mannTurnover(withAux);
            // bracket the first sign change of the slope in 0.25 mag steps; the V-Ic [Fe/H] and J-H rows (e = 0, d < 0)
            // fall everywhere: no turnover below 20 mag
            assertTrue(mannSlope(k, 0.5) < 0);
            double hi = 0.5;
            while (hi < 20 && mannSlope(k, hi) < 0) {
                hi += 0.25;
            }
            if (hi >= 20) {
                turnsNever++;
                assertEquals(20.0, x0, 0.0);
                continue;
            }
            double root = new BrentSolver(1e-12).solve(1000, x -> mannSlope(k, x), hi - 0.25, hi);
            assertTrue(x0 >= root - 1e-9 && x0 <= root + 0.0011, "turnover " + x0 + " vs root " + root);
        }
        assertEquals(2, turnsNever, "the two V-Ic rows without an X^4 term");
        // a polynomial that never turns (slope -1 everywhere) has no turnover below 20 mag; one rising at 0.5 mag turns there
        assertEquals(20.0, TeffRelations.mannTurnover(new double[] {3, -1, 0, 0, 0, 0, 0}), 0.0);
        assertEquals(0.5, TeffRelations.mannTurnover(new double[] {3, 1, 0, 0, 0, 0, 0}), 0.0);
    }

    @Test
    void publishedDomainsAreExposedAsTyped() {
        // Casagrande et al. 2010 Table 4, V-Ks: 0.78-3.15 mag, [Fe/H] -5.0-0.4, evaluated at -3.5 at most; zero point 15 K
        TeffRelation vk = TeffRelations.byId("C10/V-Ks");
        assertEquals(0.78, vk.colourMin(), 0.0);
        assertEquals(3.15, vk.colourMax(), 0.0);
        assertEquals(-5.0, vk.fehMin(), 0.0);
        assertEquals(0.4, vk.fehMax(), 0.0);
        assertEquals(-3.5, vk.fehEvalFloor(), 0.0);
        assertEquals(15.0, vk.zeroPointK(), 0.0);
        assertEquals(25.0, vk.scatterK(), 0.0);
        assertEquals(TeffRelation.Form.THETA, vk.form());
        assertEquals("V-Ks", vk.colourName());
        assertEquals(6, TeffRelations.index(vk), "ids and bits are user-visible: the list order is fixed");
        assertTrue(vk.toString().contains("Casagrande et al. 2010"));
        // its [Fe/H] edges are inside the range (inclusive, as the colour edges are)
        assertTrue(vk.inRange(1.5, -5.0));
        assertTrue(vk.inRange(1.5, 0.4));
        assertTrue(!vk.inRange(1.5, -5.01));
        // Mann et al. 2015: calibrated 2700-4100 K; Casagrande et al. 2021: add 20 K for the zero point
        TeffRelation m = TeffRelations.byId("M15/V-J");
        assertEquals(2700.0, m.teffMinK(), 0.0);
        assertEquals(4100.0, m.teffMaxK(), 0.0);
        assertTrue(m.inTeffWindow(2700.0) && m.inTeffWindow(4100.0) && m.inTeffWindow(3500.0));
        assertTrue(!m.inTeffWindow(2699.0) && !m.inTeffWindow(4101.0) && !m.inTeffWindow(Double.NaN));
        assertEquals(20.0, TeffRelations.byId("C21/BP-RP/dwarf").zeroPointK(), 0.0);
        // the ids list is the catalogue
        assertEquals(TeffRelations.all().size(), TeffRelations.ids().size());
        assertTrue(TeffRelations.ids().contains("C10/V-Ks"));
        assertEquals(null, TeffRelations.describe(0L));
        assertEquals("F96/B-V", TeffRelations.describe(1L << (TeffRelations.all().size() - 1)));
    }

    @Test
    void flowerScatterIsTwoPercentOfTeff() {
        // Flower 1996 tabulates no scatter: 2 % of Teff (TeffRelations' stated choice); the scalar form is at 10,000 K
        TeffRelation f = TeffRelations.byId("F96/B-V");
        assertEquals(140.0, f.scatterK(7000.0), 1e-9);
        assertEquals(200.0, f.scatterK(), 1e-9);
        assertEquals(0.0, f.teffMinK(), 0.0);
        assertEquals(Double.POSITIVE_INFINITY, f.teffMaxK(), 0.0);
    }

    @Test
    void constructorChecksTheNumberOfCoefficientsOfEachForm() {
        // the published forms: THETA 6 (C10 Table 4), GAIA2021 15 (C21), MANN2015 5 + 2 auxiliary (M15 Table 2),
        // FLOWER1996 8 (Torres 2010 Table 1)
        Object[][] forms = {{TeffRelation.Form.THETA, 6}, {TeffRelation.Form.GAIA2021, 15}, {TeffRelation.Form.MANN2015, 7},
            {TeffRelation.Form.FLOWER1996, 8}};
        for (Object[] f : forms) {
            TeffRelation.Form form = (TeffRelation.Form) f[0];
            int n = (Integer) f[1];
            TeffRelation ok = new TeffRelation("t", form, Band.B, Band.V, Regime.FGK_DWARF, 0, 1, -1, 1, -1,
                    new double[n], 50, 0, "test");
            assertEquals(form, ok.form());
            // the short constructor: no temperature window and an absolute scatter
            assertEquals(0.0, ok.teffMinK(), 0.0);
            assertEquals(Double.POSITIVE_INFINITY, ok.teffMaxK(), 0.0);
            assertEquals(50.0, ok.scatterK(4000.0), 0.0);
            for (int wrong : new int[] {n - 1, n + 1}) {
                IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                        () -> new TeffRelation("t", form, Band.B, Band.V, Regime.FGK_DWARF, 0, 1, -1, 1, -1,
                                new double[wrong], 50, 0, "test"));
                assertTrue(e.getMessage().contains(wrong + " coefficients (must be " + n + " for form " + form + ")"),
                        e.getMessage());
            }
        }
    }

    @Test
    void formsWithoutATermHaveNoDerivativeInIt() {
        // M15 Table 2: only the J-H forms have a J-H term, only the [Fe/H] forms an [Fe/H] term; C10 has no J-H term
        assertEquals(0.0, TeffRelations.byId("M15/V-J+FeH").dTeffDAux(0.6), 0.0);
        assertEquals(0.0, TeffRelations.byId("M15/V-J").dTeffDAux(0.6), 0.0);
        assertEquals(0.0, TeffRelations.byId("C10/V-Ks").dTeffDAux(0.6), 0.0);
        assertEquals(0.0, TeffRelations.byId("M15/V-J+JH").dTeffDFeh(3.0, 0.1, 4.8), 0.0);
        // the [Fe/H] form: f = 0.05262 (M15 Table 2, V-J with [Fe/H]) times 3500 K
        assertEquals(3500 * 0.05262, TeffRelations.byId("M15/V-J+FeH").dTeffDFeh(3.0, 0.1, 4.8), 1e-9);
        // the slope at a known Teff is the plain slope for the polynomial forms (C10 Table 4, M15 Table 2)
        TeffRelation vk = TeffRelations.byId("C10/V-Ks");
        assertEquals(vk.dTeffDColour(1.6, -0.4, 4.4), vk.dTeffDColourAt(1.6, -0.4, 4.4, Double.NaN, 5000.0), 0.0);
        TeffRelation vj = TeffRelations.byId("M15/V-J");
        assertEquals(vj.dTeffDColour(3.5, 0, 4.8), vj.dTeffDColourAt(3.5, 0, 4.8, Double.NaN, 3300.0), 0.0);
        // a J-H form evaluated without J-H has no temperature
        assertTrue(Double.isNaN(TeffRelations.byId("M15/V-J+JH").teff(3.0, 0.0, 4.8)));
    }

    @Test
    void aColourGivingANonPositiveThetaHasNoTemperature() {
        // C10 Table 4 B-V: theta = 0.5665 + 0.4809 X - 0.0060 X^2 at [Fe/H] 0 is negative for X = -2 (far outside
        // the calibrated 0.18-1.29): 5040 K / theta would be a negative temperature
        double theta = 0.5665 + 0.4809 * -2 - 0.0060 * 4;
        assertTrue(theta < 0);
        assertTrue(Double.isNaN(TeffRelations.byId("C10/B-V").teff(-2, 0, 4.4)));
    }

    @Test
    void flowerSlopeIsTheDerivativeOfThePublishedPolynomial() {
        // Flower 1996 / Torres 2010 log Teff(B-V), MS/subgiants/giants coefficients typed again; central difference
        double[] c = {3.979145106714099, -0.654992268598245, 1.740690042385095, -4.608815154057166, 6.792599779944473,
            -5.396909891322525, 2.192970376522490, -0.359495739295671};
        TeffRelation f = TeffRelations.byId("F96/B-V");
        for (double x : new double[] {-0.3, -0.1, 0.0, 0.2, 0.45}) {
            double h = 1e-6;
            double fd = (Math.pow(10, poly(c, x + h)) - Math.pow(10, poly(c, x - h))) / (2 * h);
            assertEquals(Math.pow(10, poly(c, x)), f.teff(x, 0, 4), 1e-9 * Math.pow(10, poly(c, x)), "B-V " + x);
            assertEquals(fd, f.dTeffDColour(x, 0, 4), 1e-6 * Math.abs(fd), "B-V " + x);
            assertEquals(fd, f.dTeffDColourAt(x, 0, 4, Double.NaN, f.teff(x, 0, 4)), 1e-6 * Math.abs(fd), "B-V " + x);
        }
    }

    private static double poly(double[] c, double x) {
        double s = 0;
        for (int i = 0; i < c.length; i++) {
            s += c[i] * Math.pow(x, i);
        }
        return s;
    }
}
