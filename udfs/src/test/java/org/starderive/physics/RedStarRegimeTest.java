package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * A colour far beyond the red edge of the FGK dwarf relations puts a star where only the M-dwarf regime holds, and
 * the other colours' FGK estimate must then not be reported. The case that matters: a late M dwarf of a deep survey
 * is too faint for V and BP, so no M-dwarf relation applies, while its J−Ks lies inside the Casagrande et al. 2010
 * range (0.07–0.80, relations sheet section 2) because J−Ks is nearly flat from K5 to late M (common practice) —
 * evaluated there it gives a K-dwarf temperature, 50–80 % too hot. Ranges: Casagrande et al. 2021 G−Ks, dwarfs
 * 0.20–2.80 (relations sheet section 4); Mann et al. 2015 V−J check value 4.413 → 3228 K (relations sheet
 * section 11, derived from the published coefficients).
 */
class RedStarRegimeTest {
    private static final double PLX_MAS = 6.0;

    /** G, RP, I_C, J, H, Ks only (no V, no BP), no reddening: G−Ks and J−Ks as given. */
    private static StarInput noBlueBands(double gMinusKs, double jMinusKs) {
        double ks = 14.0;
        return new StarInput().parallax(PLX_MAS, 0.05)
                .magnitude(Band.G, ks + gMinusKs, 0.003)
                .magnitude(Band.RP, ks + gMinusKs - 1.4, 0.005)
                .magnitude(Band.IC, ks + gMinusKs - 1.3, 0.02)
                .magnitude(Band.J, ks + jMinusKs, 0.02)
                .magnitude(Band.H, ks + jMinusKs - 0.25, 0.02)
                .magnitude(Band.KS, ks, 0.02)
                .ebv(0, 0.005);
    }

    @Test
    void lateMDwarfWithoutVOrBpGetsNoFgkTemperature() {
        // G−Ks 4.2: 1.4 mag beyond the C21 dwarf red edge; J−Ks 0.70: inside the C10 range. With a distance (M_Ks 7.89)
        // the Teff comes from the M_Ks radius (TeffFromRadiusTest checks its numbers), never from J−Ks
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(noBlueBands(4.2, 0.70), new StarResult());
        assertTrue(r.has(QualityFlag.TEFF_FROM_RADIUS), "flags " + QualityFlag.names(r.flags));
        assertEquals(0L, r.teffRelations, "no colour relation, J−Ks least of all: " + r.teffFrom());
        assertEquals(TeffRadiusMann2015.ID, r.teffFrom());
        assertEquals(Regime.M_DWARF, r.regime);
        // below the C21 G−Ks dwarf relation's red edge (4075 K at G−Ks 2.80), where the colour puts the star
        double edge = TeffRelations.byId("C21/G-Ks/dwarf").teff(2.80, 0, 4.6);
        assertTrue(r.teffK < edge, "Teff " + r.teffK + " above the colour's bound " + edge);
        assertFalse(r.has(QualityFlag.COLOUR_OUT_OF_RANGE) || r.has(QualityFlag.TEFF_COLOURS_DISAGREE));
        // the distance does not depend on the colours
        assertEquals(1000 / PLX_MAS, r.distPc, 1e-9);
    }

    @Test
    void withoutADistanceTheLateMDwarfGetsNoTemperatureAtAll() {
        StarInput in = noBlueBands(4.2, 0.70);
        in.hasParallax = in.hasParallaxErr = false;
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertTrue(Double.isNaN(r.teffK), "no Teff: the star is redder than any FGK relation reaches, got " + r.teffK);
        assertTrue(r.has(QualityFlag.COLOUR_OUT_OF_RANGE));
        assertFalse(r.has(QualityFlag.TEFF_COLOURS_DISAGREE) || r.has(QualityFlag.TEFF_FROM_RADIUS));
        assertNull(r.regime);
        assertTrue(Double.isNaN(r.lumLsun) && Double.isNaN(r.radiusRsun) && Double.isNaN(r.massMsun));
    }

    @Test
    void theSameStarInsideTheG_KsRangeKeepsItsFgkTemperature() {
        // control: G−Ks 2.5 lies inside 0.20–2.80, so nothing says the star is cooler than the FGK relations reach
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(noBlueBands(2.5, 0.70), new StarResult());
        assertTrue(r.teffK > 4100 && r.teffK < 5000, "a K dwarf's Teff from G−Ks and J−Ks, got " + r.teffK);
        assertEquals(Regime.FGK_DWARF, r.regime);
        assertFalse(r.has(QualityFlag.COLOUR_OUT_OF_RANGE));
    }

    @Test
    void monteCarloDrawsJudgeTheRegimeTheSameWay() {
        double[][] q = new double[MonteCarloDeriver.NQ][3];
        StarInput in = noBlueBands(4.2, 0.70);
        new MonteCarloDeriver(DeriveSettings.defaults(), 200, 7).percentiles(in, 11, q);
        int teff = java.util.Arrays.asList(MonteCarloDeriver.QUANTITIES).indexOf("teff");
        assertTrue(teff >= 0, "teff is a Monte Carlo quantity");
        // every draw takes the radius route too: the median is the nominal Teff within 0.15 of its error, not a
        // K dwarf's 4300-5300 K from J−Ks
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertEquals(r.teffK, q[teff][1], 0.15 * r.teffErrK, "drawn median");
        assertTrue(q[teff][2] < 4100, "84th percentile " + q[teff][2]);
        // without a distance, no drawn Teff either
        in.hasParallax = in.hasParallaxErr = false;
        new MonteCarloDeriver(DeriveSettings.defaults(), 200, 7).percentiles(in, 11, q);
        assertTrue(Double.isNaN(q[teff][1]), "no drawn Teff without a distance, got median " + q[teff][1]);
    }

    @Test
    void monteCarloDrawsKeepTheNominalRouteNearAnEdgesMargin() {
        // G−Ks 2.832: beyond the C21 dwarf red edge (2.80) by 1.6σ of the colour (σ ≈ 0.020: G 0.003, Ks 0.02), short
        // of the 2σ that would say "cooler than every FGK relation": the nominal Teff is the K dwarf's from J−Ks.
        // About a third of the draws put G−Ks beyond the margin; were each draw to judge the route by its own colours,
        // those would take the M_Ks radius route (~3000-3300 K) and pull the 16th percentile 1000 K down. Draws keep
        // the nominal route as they keep the class (common practice: a Monte Carlo draw perturbs the measurements,
        // not the choice of model), so the drawn distribution stays around the nominal Teff
        StarInput in = noBlueBands(2.832, 0.70);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertEquals(Regime.FGK_DWARF, r.regime, "flags " + QualityFlag.names(r.flags));
        assertFalse(r.has(QualityFlag.TEFF_FROM_RADIUS));
        assertTrue(r.teffK > 4100, "a K dwarf's Teff from J−Ks, got " + r.teffK);
        double[][] q = new double[MonteCarloDeriver.NQ][3];
        new MonteCarloDeriver(DeriveSettings.defaults(), 400, 3).percentiles(in, 5, q);
        int teff = java.util.Arrays.asList(MonteCarloDeriver.QUANTITIES).indexOf("teff");
        assertEquals(r.teffK, q[teff][1], 0.2 * r.teffErrK, "drawn median");
        assertTrue(q[teff][0] > r.teffK - 2 * r.teffErrK, "16th percentile " + q[teff][0] + " against " + r.teffK
                + " ± " + r.teffErrK + ": draws took another route");
        // the half-width of the drawn 68 % interval is the first-order error (one relation, no route switch)
        assertEquals(r.teffErrK, (q[teff][2] - q[teff][0]) / 2, 0.15 * r.teffErrK, "drawn half-width");
    }

    @Test
    void anMDwarfWithVStillGetsItsMannTemperature() {
        // V−J 4.413 (Mann et al. 2015 check value 3228 K); G−Ks 3.98, beyond the C21 dwarf edge: the M-dwarf
        // regime takes the star, and the FGK estimate (here from J−Ks) is not blended in
        double ks = 10.0;
        double j = ks + 0.85;
        StarInput in = new StarInput().parallax(40, 0.05)
                .magnitude(Band.V, j + 4.413, 0.01)
                .magnitude(Band.J, j, 0.02)
                .magnitude(Band.KS, ks, 0.02)
                .magnitude(Band.G, ks + 3.98, 0.003)
                .ebv(0, 0.005);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertEquals(Regime.M_DWARF, r.regime);
        assertEquals(3228, r.teffK, 1.0, "Mann et al. 2015 V−J alone");
    }
}
