package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import org.junit.jupiter.api.Test;

class ExtinctionTest {

    @Test
    void ccm89ReproducesItsOwnTable3InTheInfrared() throws IOException {
        // Cardelli, Clayton & Mathis 1989, Table 3 (values in the resource file, with its header)
        for (String[] row : ReferenceTable.read("/reference/ccm89_table3.csv")) {
            double lambda = Double.parseDouble(row[1]);
            double expected = Double.parseDouble(row[2]);
            assertEquals(expected, CardelliClaytonMathis1989.aLambdaOverAv(lambda, 3.1), 0.0015, row[0]);
        }
    }

    @Test
    void ccm89IsOneAtItsReferenceWavelengthAndNaNOutsideItsDomain() {
        // CCM89 eq. 3: at x = 1.82 (y = 0) a = 1, b = 0 for any R_V
        assertEquals(1.0, CardelliClaytonMathis1989.aLambdaOverAv(1 / 1.82, 3.1), 1e-12);
        assertEquals(1.0, CardelliClaytonMathis1989.aLambdaOverAv(1 / 1.82, 5.0), 1e-12);
        assertTrue(Double.isNaN(CardelliClaytonMathis1989.aLambdaOverAv(0.1, 3.1)));
        assertTrue(Double.isNaN(CardelliClaytonMathis1989.aLambdaOverAv(5.0, 3.1)));
    }

    @Test
    void bandRatiosAreNormalisedToOurVBandAndFallWithWavelength() {
        assertEquals(1.0, CardelliClaytonMathis1989.bandOverAv(Band.V, 3.1), 1e-12);
        double prev = Double.POSITIVE_INFINITY;
        for (Band b : new Band[] {Band.B, Band.V, Band.RC, Band.IC, Band.J, Band.H, Band.KS}) {
            double r = CardelliClaytonMathis1989.bandOverAv(b, 3.1);
            assertTrue(r < prev, "extinction must fall with wavelength at " + b);
            prev = r;
        }
        assertTrue(Double.isNaN(CardelliClaytonMathis1989.bandOverAv(Band.G, 3.1)));
    }

    @Test
    void gaiaCoefficientsAtZeroColourAndDereddeningConverges() {
        // Casagrande et al. 2021 (constant terms of the published polynomials)
        assertEquals(2.609, GaiaBandExtinction.rG(0), 1e-12);
        assertEquals(2.998, GaiaBandExtinction.rBp(0), 1e-12);
        assertEquals(1.689, GaiaBandExtinction.rRp(0), 1e-12);
        // the iterated (BP-RP)0 satisfies its own definition: C0 = C - (R_BP(C0) - R_RP(C0)) E(B-V)
        double c = 1.3;
        double ebv = 0.4;
        double c0 = GaiaBandExtinction.dereddenedBpRp(c, ebv);
        assertEquals(c - (GaiaBandExtinction.rBp(c0) - GaiaBandExtinction.rRp(c0)) * ebv, c0, 1e-4);
        assertEquals(c, GaiaBandExtinction.dereddenedBpRp(c, 0), 0);
    }
}
