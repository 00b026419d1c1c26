package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import org.junit.jupiter.api.Test;

class BolometricCorrectionTest {

    @Test
    void publishedPolynomialValues() throws IOException {
        // Flower 1996 / Torres 2010 Table 1 polynomial, values in the resource file
        for (String[] row : ReferenceTable.read("/reference/bc_v_flower1996.csv")) {
            double t = Double.parseDouble(row[0]);
            assertEquals(Double.parseDouble(row[1]), BolometricCorrectionFlower1996.bcV(t), 0.0015, "Teff " + t);
        }
    }

    @Test
    void solarBolometricMagnitudeOnThisScaleIs473() {
        // Torres 2010: use M_bol,sun = 4.73 with these BCs and V_sun = -26.76
        assertEquals(4.73, BolometricCorrectionFlower1996.MBOL_SUN, 0.005);
        // M_V,sun = 4.81 (Willmer 2018, ApJS 236, 47)
        assertEquals(4.81, BolometricCorrectionFlower1996.MV_SUN, 0.005);
    }

    @Test
    void theSunsLuminosityFromItsAbsoluteVAndBc() {
        // M_V,sun = 4.81 (Willmer 2018) and BC_V(5772 K) on the Flower/Torres scale give ~1 L_sun
        double mbol = 4.81 + BolometricCorrectionFlower1996.bcV(5772);
        double l = Math.pow(10, -0.4 * (mbol - BolometricCorrectionFlower1996.MBOL_SUN));
        assertEquals(1.0, l, 0.01);
    }

    @Test
    void derivativeMatchesFiniteDifferenceInEachSegment() {
        for (double t : new double[] {3500, 4500, 6000, 7000, 9000, 20000}) {
            double h = 0.01;
            double fd = (BolometricCorrectionFlower1996.bcV(t + h) - BolometricCorrectionFlower1996.bcV(t - h)) / (2 * h);
            assertEquals(fd, BolometricCorrectionFlower1996.dBcVdTeff(t), 1e-6, "Teff " + t);
        }
        assertTrue(Double.isNaN(BolometricCorrectionFlower1996.bcV(0)));
        assertTrue(Double.isNaN(BolometricCorrectionFlower1996.bcV(Double.NaN)));
    }

    // Flower 1996, ApJ 469, 355, coefficients as corrected by Torres 2010, AJ 140, 1158, Table 1, typed a second time
    private static final double[] COOL = {-0.190537291496456e5, 0.155144866764412e5, -0.421278819301717e4, 0.381476328422343e3};
    private static final double[] MID = {-0.370510203809015e5, 0.385672629965804e5, -0.150651486316025e5,
        0.261724637119416e4, -0.170623810323864e3};
    private static final double[] HOT = {-0.118115450538963e6, 0.137145973583929e6, -0.636233812100225e5,
        0.147412923562646e5, -0.170587278406872e4, 0.788731721804990e2};

    /** BC_V of Flower 1996 / Torres 2010 Table 1 from the coefficients typed above: the middle set for 3.70 ≤ log Teff ≤ 3.90. */
    static double typedBcV(double teffK) {
        double x = Math.log10(teffK);
        return poly(x < 3.70 ? COOL : x <= 3.90 ? MID : HOT, x);
    }

    private static double poly(double[] k, double x) {
        double s = 0;
        for (int i = 0; i < k.length; i++) {
            s += k[i] * Math.pow(x, i);
        }
        return s;
    }

    @Test
    void everySegmentFollowsTorresTable1IncludingTheHotOne() {
        // derived from Flower 1996 / Torres 2010 Table 1: log Teff < 3.70 cool, 3.70-3.90 middle, > 3.90 hot
        double[][] cases = {{3000, 0}, {3500, 0}, {4900, 0}, {5200, 1}, {5772, 1}, {7000, 1}, {7900, 1},
            {8500, 2}, {10000, 2}, {20000, 2}, {40000, 2}};
        double[][] sets = {COOL, MID, HOT};
        for (double[] c : cases) {
            double x = Math.log10(c[0]);
            double ref = poly(sets[(int) c[1]], x);
            assertEquals(ref, BolometricCorrectionFlower1996.bcV(c[0]), 1e-9 * Math.max(1, Math.abs(ref)), "Teff " + c[0]);
        }
    }

    @Test
    void theSegmentEdgesAreLogTeff370And390BothInTheMiddleSegment() {
        // Torres 2010 Table 1: the middle polynomial holds for 3.70 <= log Teff <= 3.90. The neighbouring polynomials
        // differ from it there, so a shifted edge changes the value.
        for (double edge : new double[] {3.70, 3.90}) {
            double t = Math.pow(10, edge);
            assertEquals(edge, Math.log10(t), 0.0, "Teff exactly at log Teff " + edge);
            double mid = poly(MID, edge);
            double other = poly(edge < 3.8 ? COOL : HOT, edge);
            assertTrue(Math.abs(mid - other) > 1e-6, "segments differ at " + edge + ": " + mid + " vs " + other);
            assertEquals(mid, BolometricCorrectionFlower1996.bcV(t), 1e-9, "at log Teff " + edge);
        }
    }

    @Test
    void derivativeOfTheHotAndCoolSegmentsAndTheOutOfDomainPolicy() {
        // derived from Torres 2010 Table 1: d BC / d Teff = (d BC / d log Teff) / (Teff ln 10), by central difference
        for (double t : new double[] {3200, 5772, 12000, 30000}) {
            double h = 1e-4;
            double x = Math.log10(t);
            double[] k = x < 3.70 ? COOL : x <= 3.90 ? MID : HOT;
            double fd = (poly(k, x + h) - poly(k, x - h)) / (2 * h) / (t * Math.log(10));
            assertEquals(fd, BolometricCorrectionFlower1996.dBcVdTeff(t), 1e-6 * Math.max(1e-4, Math.abs(fd)), "Teff " + t);
        }
        // the class's stated policy: NaN for a non-positive Teff only; any positive Teff is evaluated (cool polynomial)
        assertEquals(poly(COOL, Math.log10(0.5)), BolometricCorrectionFlower1996.bcV(0.5), 1e-6 * Math.abs(poly(COOL, Math.log10(0.5))));
        assertTrue(Double.isFinite(BolometricCorrectionFlower1996.dBcVdTeff(0.5)));
        assertTrue(Double.isNaN(BolometricCorrectionFlower1996.dBcVdTeff(0)));
        assertTrue(Double.isNaN(BolometricCorrectionFlower1996.dBcVdTeff(-5000)));
        assertTrue(Double.isNaN(BolometricCorrectionFlower1996.dBcVdTeff(Double.NaN)));
        assertTrue(Double.isNaN(BolometricCorrectionFlower1996.bcV(-5000)));
    }

    @Test
    void calibratedRangeIs2900To52000KInclusive() {
        // the class's stated domain, 2900-52000 K (span of Flower's calibration stars, from memory)
        assertTrue(BolometricCorrectionFlower1996.inRange(2900.0));
        assertTrue(BolometricCorrectionFlower1996.inRange(52000.0));
        assertTrue(BolometricCorrectionFlower1996.inRange(5772.0));
        assertTrue(!BolometricCorrectionFlower1996.inRange(2899.9));
        assertTrue(!BolometricCorrectionFlower1996.inRange(52000.1));
        assertTrue(!BolometricCorrectionFlower1996.inRange(Double.NaN));
    }
}
