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

    @Test
    void gaiaCoefficientsFollowThePublishedPolynomialsAtNonZeroColour() {
        // Casagrande et al. 2021 (authors' release): R_G = 2.609 - 0.475 C + 0.053 C^2,
        // R_BP = 2.998 - 0.140 C - 0.175 C^2 + 0.062 C^3, R_RP = 1.689 - 0.059 C, typed here again
        for (double c : new double[] {-0.3, 0.5, 0.82, 1.5, 2.5, 3.8}) {
            double rg = 2.609 - 0.475 * c + 0.053 * c * c;
            double rbp = 2.998 - 0.140 * c - 0.175 * c * c + 0.062 * c * c * c;
            double rrp = 1.689 - 0.059 * c;
            assertEquals(rg, GaiaBandExtinction.rG(c), 1e-12, "R_G at C=" + c);
            assertEquals(rbp, GaiaBandExtinction.rBp(c), 1e-12, "R_BP at C=" + c);
            assertEquals(rrp, GaiaBandExtinction.rRp(c), 1e-12, "R_RP at C=" + c);
            assertEquals(rg, GaiaBandExtinction.r(Band.G, c), 1e-12);
            assertEquals(rbp, GaiaBandExtinction.r(Band.BP, c), 1e-12);
            assertEquals(rrp, GaiaBandExtinction.r(Band.RP, c), 1e-12);
        }
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> GaiaBandExtinction.r(Band.V, 1.0));
        assertTrue(e.getMessage().contains("must be G, BP or RP"), e.getMessage());
    }
}
