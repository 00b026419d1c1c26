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
}
