package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.util.HashSet;
import java.util.Set;
import org.junit.jupiter.api.Test;

class TeffRelationsTest {

    @Test
    void solarColoursGiveTheSolarTeffWithinEachRelationsScatter() throws IOException {
        // colours: Casagrande et al. 2010 Table 7 and Ramirez et al. 2012; Teff: IAU 2015 B3 (see resource header)
        for (String[] row : ReferenceTable.read("/reference/solar_colours_teff.csv")) {
            TeffRelation r = TeffRelations.byId(row[0]);
            double x = Double.parseDouble(row[1]);
            double t = r.teff(x, Double.parseDouble(row[2]), Double.parseDouble(row[3]));
            assertTrue(r.inRange(x, 0.0), row[0]);
            assertEquals(Double.parseDouble(row[4]), t, r.scatterK(), row[0] + " from " + row[5]);
        }
    }

    @Test
    void solarVKsAndBVMatchThePublishedChain() {
        // Casagrande et al. 2010 with (V-Ks)sun = 1.544 (their Table 7) gives 5778 K; with (B-V)sun = 0.653
        // (Ramirez et al. 2012) 5741 K -- both values computed by hand from Table 4
        assertEquals(5778, TeffRelations.byId("C10/V-Ks").teff(1.544, 0, 4.44), 1.0);
        assertEquals(5741, TeffRelations.byId("C10/B-V").teff(0.653, 0, 4.44), 1.0);
    }

    @Test
    void gaia2021RelationGivesTheSunFromItsBpRp() {
        // Casagrande et al. 2021 (authors' release check): BP-RP 0.82, log g 4.44, [Fe/H] 0 -> 5762 K
        assertEquals(5762, TeffRelations.byId("C21/BP-RP/dwarf").teff(0.82, 0, 4.44), 1.0);
    }

    @Test
    void rangeEdgesAreInclusiveAndOutsideIsRejected() {
        TeffRelation r = TeffRelations.byId("C10/V-Ks"); // 0.78..3.15, [Fe/H] -5..0.4 (C10 Table 4)
        assertTrue(r.inRange(0.78, 0));
        assertTrue(r.inRange(3.15, 0));
        assertFalse(r.inRange(0.7799, 0));
        assertFalse(r.inRange(3.1501, 0));
        assertFalse(r.inRange(1.5, 0.41));
        assertFalse(r.inRange(Double.NaN, 0));
        assertFalse(r.inRange(1.5, Double.NaN));
    }

    @Test
    void metallicityBelowTheFloorIsEvaluatedAtTheFloor() {
        // Casagrande et al. 2010: [Fe/H] < -3.5 is evaluated at -3.5
        TeffRelation r = TeffRelations.byId("C10/B-V");
        assertEquals(r.teff(0.6, -3.5, 4.4), r.teff(0.6, -4.7, 4.4), 1e-9);
        assertEquals(0.0, r.dTeffDFeh(0.6, -4.7, 4.4), 0);
    }

    @Test
    void analyticDerivativesMatchFiniteDifferences() {
        for (TeffRelation r : TeffRelations.all()) {
            double x = r.form() == TeffRelation.Form.MANN2015 ? 3.0 : 0.5 * (r.colourMin() + r.colourMax());
            double jh = 0.6;
            if (r.aux() == TeffRelation.Aux.JH) {
                double da = (r.teff(x, -0.3, 4.4, jh + 1e-5) - r.teff(x, -0.3, 4.4, jh - 1e-5)) / 2e-5;
                assertEquals(da, r.dTeffDAux(jh), 1e-3 * Math.max(1, Math.abs(da)), r.id());
                assertEquals((r.teff(x + 1e-5, -0.3, 4.4, jh) - r.teff(x - 1e-5, -0.3, 4.4, jh)) / 2e-5,
                        r.dTeffDColour(x, -0.3, 4.4, jh), 1e-2, r.id());
                continue;
            }
            double feh = -0.3;
            double g = r.regime() == Regime.GIANT ? 2.5 : 4.4;
            double h = 1e-5;
            double dx = (r.teff(x + h, feh, g) - r.teff(x - h, feh, g)) / (2 * h);
            double df = (r.teff(x, feh + h, g) - r.teff(x, feh - h, g)) / (2 * h);
            double dg = (r.teff(x, feh, g + h) - r.teff(x, feh, g - h)) / (2 * h);
            assertEquals(dx, r.dTeffDColour(x, feh, g), 1e-3 * Math.max(1, Math.abs(dx)), r.id());
            assertEquals(df, r.dTeffDFeh(x, feh, g), 1e-3 * Math.max(1, Math.abs(df)), r.id());
            assertEquals(dg, r.dTeffDLogg(x, feh), 1e-3 * Math.max(1, Math.abs(dg)), r.id());
        }
    }

    @Test
    void everyRelationHasAUniqueIdACitationAndAPositiveScatter() {
        Set<String> ids = new HashSet<>();
        for (TeffRelation r : TeffRelations.all()) {
            assertTrue(ids.add(r.id()), r.id());
            assertFalse(r.citation().isBlank());
            assertTrue(r.scatterK() > 0);
            assertTrue(r.colourMin() < r.colourMax());
        }
        assertEquals(26, TeffRelations.all().size());
        assertEquals("C10/B-V,GHB09/B-V", TeffRelations.describe(1L | (1L << 8)));
        assertThrows(IllegalArgumentException.class, () -> TeffRelations.byId("nope"));
    }
}
