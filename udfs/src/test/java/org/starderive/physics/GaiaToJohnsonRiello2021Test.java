package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class GaiaToJohnsonRiello2021Test {

    /** Riello et al. 2021, A&amp;A 649, A3, Table C.2: G − V = −0.02704 + 0.01424 C − 0.2156 C² + 0.01426 C³, typed again. */
    private static double gMinusV(double c) {
        return -0.02704 + 0.01424 * c - 0.2156 * Math.pow(c, 2) + 0.01426 * Math.pow(c, 3);
    }

    @Test
    void gMinusVAndItsSlopeFollowTableC2() {
        // derived from Riello et al. 2021 Table C.2 (the typed copy above); slope by central difference
        for (double c : new double[] {-0.4, 0.0, 0.82, 1.5, 3.0, 4.9}) {
            assertEquals(gMinusV(c), GaiaToJohnsonRiello2021.gMinusV(c), 1e-12, "C=" + c);
            double h = 1e-6;
            assertEquals((gMinusV(c + h) - gMinusV(c - h)) / (2 * h), GaiaToJohnsonRiello2021.dGMinusVdC(c), 1e-8, "C=" + c);
        }
    }

    @Test
    void validColourRangeIsTheOpenIntervalOfTableC2() {
        // Riello et al. 2021 Table C.2: valid for -0.5 < BP-RP < 5.0
        assertTrue(GaiaToJohnsonRiello2021.inRange(-0.49));
        assertTrue(GaiaToJohnsonRiello2021.inRange(0.82));
        assertTrue(GaiaToJohnsonRiello2021.inRange(4.99));
        assertFalse(GaiaToJohnsonRiello2021.inRange(-0.5));
        assertFalse(GaiaToJohnsonRiello2021.inRange(5.0));
        assertFalse(GaiaToJohnsonRiello2021.inRange(-0.6));
        assertFalse(GaiaToJohnsonRiello2021.inRange(5.1));
        assertFalse(GaiaToJohnsonRiello2021.inRange(Double.NaN));
    }
}
