package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * One table of error sources, two paths: with only one {@link ErrorSource} switched on, the first-order 1σ error
 * and half the 16–84 % range of Monte Carlo draws must agree for Teff, L, R and mass, for every source and every kind
 * of star. (A Gaussian's 16–84 % half-range is its σ: common practice.) Tolerance: 8 %, for the draw noise of 4000
 * draws (about 2 %) and the chain's curvature over ±1σ, plus 2 % of the quantity's total error for second-order
 * couplings the first-order path leaves out (a dwarf's log g feeding back on the Gaia-band Teff; the colour
 * dependence of the G/BP/RP extinction coefficients) — they matter only for sources far below the total.
 */
class ErrorSourceTest {
    private static final int DRAWS = 4000;
    /** Position (from 1) of the blend star in {@link #stars()}. */
    private static final int BLEND_STAR = 5;

    static List<StarInput> stars() {
        List<StarInput> l = new ArrayList<>();
        // a G dwarf seen in the Gaia-like bands and 2MASS (V from G: the G->V scatter; Gaia relations: log g)
        l.add(new StarInput().parallax(10, 0.2).magnitude(Band.G, 9.9, 0.01).magnitude(Band.BP, 10.25, 0.01)
                .magnitude(Band.RP, 9.43, 0.01).magnitude(Band.J, 8.85, 0.02).magnitude(Band.KS, 8.45, 0.02)
                .ebv(0.05, 0.02));
        // a red-clump giant in Johnson-Cousins and 2MASS bands ([Fe/H] measured; the log g prior of evolved stars)
        l.add(new StarInput().parallax(1.0, 0.02).magnitude(Band.B, 11.8, 0.01).magnitude(Band.V, 10.8, 0.01)
                .magnitude(Band.IC, 9.75, 0.01).magnitude(Band.J, 9.0, 0.02).magnitude(Band.H, 8.45, 0.02)
                .magnitude(Band.KS, 8.35, 0.02).magnitude(Band.G, 10.45, 0.01).magnitude(Band.BP, 11.0, 0.01)
                .magnitude(Band.RP, 9.85, 0.01).ebv(0.02, 0.01).feh(-0.2, 0.1));
        // an M dwarf (radius and mass relations of Mann et al.)
        l.add(RegimeTest.barnardsStar());
        // an A star (hot regime)
        l.add(new StarInput().parallax(20, 0.1).magnitude(Band.V, 5.0, 0.01).magnitude(Band.B, 5.0, 0.01)
                .ebv(0.01, 0.005).feh(0, 0.1));
        // a K7 dwarf in the blend of the FGK and M-dwarf regimes (Mann Teff about 4250 K): the blend source (only it is
        // compared here: inside a blend the weights and the relations' range edges make the other sources nonlinear
        // at the size of their errors, where a first-order error is not expected to match the draws)
        l.add(new StarInput().parallax(50, 0.1).magnitude(Band.V, 9.64, 0.01).magnitude(Band.IC, 8.21, 0.01)
                .magnitude(Band.J, 7.25, 0.02).magnitude(Band.H, 6.55, 0.02).magnitude(Band.KS, 6.40, 0.02)
                .ebv(0.01, 0.01).feh(0, 0.1));
        // M dwarfs without V and BP: Teff from the M_Ks radius through the Teff-radius relation (TeffFromRadiusTest),
        // plain form (Proxima) and [Fe/H] form (Barnard's star without V and I_C)
        l.add(TeffFromRadiusTest.proximaWithoutV());
        StarInput barnardNoV = RegimeTest.barnardsStar();
        barnardNoV.hasMag[Band.V.ordinal()] = false;
        barnardNoV.hasMag[Band.IC.ordinal()] = false;
        barnardNoV.magnitude(Band.G, 8.19, 0.01);
        l.add(barnardNoV);
        return l;
    }

    @Test
    void eachSourceGivesTheSameWidthInBothPaths() {
        DeriveSettings settings = DeriveSettings.defaults();
        int compared = 0;
        List<String> seen = new ArrayList<>();
        int starNo = 0;
        for (StarInput in : stars()) {
            starNo++;
            for (int j = 0; j < ErrorSource.COUNT; j++) {
                if (starNo == BLEND_STAR && j != ErrorSource.BLEND) {
                    continue;
                }
                StarDeriver first = new StarDeriver(settings);
                StarResult all = first.derive(in, new StarResult());
                double[] total = {all.teffErrK, all.lumErrLsun, all.radiusErrRsun, all.massErrMsun};
                first.errorSources(1L << j);
                StarResult r = first.derive(in, new StarResult());
                MonteCarloDeriver mc = new MonteCarloDeriver(settings, DRAWS, 11);
                mc.errorSources(1L << j);
                double[][] p = new double[MonteCarloDeriver.NQ][3];
                mc.percentiles(in, starNo * 100L + j, p);
                double[] value = {r.teffK, r.lumLsun, r.radiusRsun, r.massMsun};
                double[] err = {r.teffErrK, r.lumErrLsun, r.radiusErrRsun, r.massErrMsun};
                int[] q = {1, 2, 3, 4};
                for (int k = 0; k < 4; k++) {
                    String ctx = "star " + starNo + " source " + ErrorSource.name(j) + " quantity "
                            + MonteCarloDeriver.QUANTITIES[q[k]] + ": first order " + err[k] + ", draws " + p[q[k]][0]
                            + " .. " + p[q[k]][2] + " about " + value[k];
                    if (Double.isNaN(value[k])) {
                        continue;
                    }
                    double half = 0.5 * (p[q[k]][2] - p[q[k]][0]);
                    if (!(err[k] > 1e-4 * value[k]) && !(half > 1e-4 * value[k])) {
                        continue; // this source does not reach this quantity, in either path
                    }
                    assertEquals(err[k], half, 0.08 * Math.max(err[k], half) + 0.02 * total[k], ctx);
                    compared++;
                    String name = ErrorSource.name(j);
                    if (!seen.contains(name)) {
                        seen.add(name);
                    }
                }
            }
        }
        // every kind of source must have been exercised somewhere
        for (String s : new String[] {"mag_v", "mag_g", "mag_ks", "ebv", "feh", "logg", "scatter", "scatter_m_dwarf", "zero_point",
                "g_to_v", "distance", "radius_relation", "mass_relation", "blend", "teff_radius_relation"}) {
            assertTrue(seen.contains(s), "source never compared: " + s + " (compared: " + seen + ")");
        }
        assertTrue(compared > 40, "comparisons: " + compared);
    }
}
