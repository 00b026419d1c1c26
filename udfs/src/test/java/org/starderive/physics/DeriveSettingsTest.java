package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.function.BiConsumer;
import java.util.function.Function;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.junit.jupiter.api.Test;

/**
 * The range rules of {@link DeriveSettings.Builder}, each at its edges: the last accepted value round-trips through
 * the getter, the first rejected one throws a message naming the setting, the value and the rule. The rules are the
 * class's own (stated in its messages); where a rule follows a fact of the trade the source is named beside it.
 */
class DeriveSettingsTest {

    private static void accepts(BiConsumer<DeriveSettings.Builder, Double> set, Function<DeriveSettings, Double> get, double v) {
        DeriveSettings.Builder b = DeriveSettings.builder();
        set.accept(b, v);
        assertEquals(v, get.apply(b.build()), 0.0, "accepted value " + v);
    }

    private static void rejects(BiConsumer<DeriveSettings.Builder, Double> set, double v, String... fragments) {
        DeriveSettings.Builder b = DeriveSettings.builder();
        set.accept(b, v);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, b::build, "value " + v);
        for (String f : fragments) {
            assertTrue(e.getMessage().contains(f), "'" + e.getMessage() + "' should contain '" + f + "'");
        }
    }

    @Test
    void distanceSettingsAtTheirEdges() {
        accepts(DeriveSettings.Builder::parallaxZeroPointMas, DeriveSettings::parallaxZeroPointMas, -0.017);
        rejects(DeriveSettings.Builder::parallaxZeroPointMas, Double.NaN, "parallax zero point: NaN mas (must be finite)");
        accepts(DeriveSettings.Builder::parallaxSnrMin, DeriveSettings::parallaxSnrMin, 1e-9);
        accepts(DeriveSettings.Builder::parallaxSnrMin, DeriveSettings::parallaxSnrMin, 10.0);
        rejects(DeriveSettings.Builder::parallaxSnrMin, 0.0, "parallax SNR threshold: 0.0 (must be finite and > 0)");
        rejects(DeriveSettings.Builder::parallaxSnrMin, Double.POSITIVE_INFINITY, "must be finite and > 0");
        accepts(DeriveSettings.Builder::distanceSnrMin, DeriveSettings::distanceSnrMin, 0.0);
        accepts(DeriveSettings.Builder::distanceSnrMin, DeriveSettings::distanceSnrMin, 1000.0);
        accepts(DeriveSettings.Builder::distanceSnrMin, DeriveSettings::distanceSnrMin, 3.0);
        rejects(DeriveSettings.Builder::distanceSnrMin, 1000.001, "distance SNR minimum: 1000.001 (must be between 0 and 1000)");
        rejects(DeriveSettings.Builder::distanceSnrMin, -0.001, "must be between 0 and 1000");
        rejects(DeriveSettings.Builder::distanceSnrMin, Double.NaN, "must be between 0 and 1000");
        // Proxima Cen's 768 mas is the largest stellar parallax (common practice); the threshold itself must be > 0
        accepts(DeriveSettings.Builder::parallaxMaxMas, DeriveSettings::parallaxMaxMas, 1000.0);
        rejects(DeriveSettings.Builder::parallaxMaxMas, -1.0, "largest plausible parallax: -1.0 mas (must be finite and > 0)");
        accepts(DeriveSettings.Builder::priorLengthKpc, DeriveSettings::priorLengthKpc, 0.5);
        rejects(DeriveSettings.Builder::priorLengthKpc, 0.0, "prior length scale: 0.0 kpc (must be > 0 and <= 100.0)");
        rejects(DeriveSettings.Builder::priorLengthKpc, Double.NaN, "prior length scale: NaN kpc (must be > 0 and <= 100.0)");
        // our bound: a length scale of several Galactic disc radii is no longer a density of the Galaxy's stars
        accepts(DeriveSettings.Builder::priorLengthKpc, DeriveSettings::priorLengthKpc, 100.0);
        rejects(DeriveSettings.Builder::priorLengthKpc, 100.001, "prior length scale: 100.001 kpc (must be > 0 and <= 100.0)");
        assertEquals(DeriveSettings.DistanceMethod.EDSD,
                DeriveSettings.builder().distanceMethod(DeriveSettings.DistanceMethod.EDSD).build().distanceMethod());
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> DeriveSettings.builder().distanceMethod(null).build());
        assertTrue(e.getMessage().contains("distance method: null (must be one of auto, inverse, edsd)"), e.getMessage());
        assertEquals(false, DeriveSettings.builder().posteriorPercentiles(false).build().posteriorPercentiles());
        assertEquals(true, DeriveSettings.builder().posteriorPercentiles(true).build().posteriorPercentiles());
    }

    @Test
    void extinctionAndMetallicitySettingsAtTheirEdges() {
        accepts(DeriveSettings.Builder::rv, DeriveSettings::rv, 5.0);
        rejects(DeriveSettings.Builder::rv, 0.0, "R_V: 0.0 (must be finite and > 0)");
        accepts(DeriveSettings.Builder::ebvDefault, DeriveSettings::ebvDefault, 0.0);
        accepts(DeriveSettings.Builder::ebvDefault, DeriveSettings::ebvDefault, 0.3);
        rejects(DeriveSettings.Builder::ebvDefault, -1e-9, "default E(B-V): -1.0E-9 mag (must be finite and >= 0)");
        rejects(DeriveSettings.Builder::ebvDefault, Double.POSITIVE_INFINITY, "must be finite and >= 0");
        accepts(DeriveSettings.Builder::ebvErrDefault, DeriveSettings::ebvErrDefault, 0.05);
        rejects(DeriveSettings.Builder::ebvErrDefault, -0.01, "default E(B-V) error: -0.01 mag (must be finite and >= 0)");
        // [Fe/H] from -5 (the floor of Casagrande et al. 2010 Table 4) to +1 dex
        accepts(DeriveSettings.Builder::fehDefault, DeriveSettings::fehDefault, -5.0);
        accepts(DeriveSettings.Builder::fehDefault, DeriveSettings::fehDefault, 1.0);
        accepts(DeriveSettings.Builder::fehDefault, DeriveSettings::fehDefault, -0.3);
        rejects(DeriveSettings.Builder::fehDefault, 1.5, "default [Fe/H]: 1.5 dex (must be between -5 and 1)");
        rejects(DeriveSettings.Builder::fehDefault, -5.01, "must be between -5 and 1");
        rejects(DeriveSettings.Builder::fehDefault, Double.NaN, "must be between -5 and 1");
        accepts(DeriveSettings.Builder::fehErrDefault, DeriveSettings::fehErrDefault, 0.0);
        accepts(DeriveSettings.Builder::fehErrDefault, DeriveSettings::fehErrDefault, 0.3);
        rejects(DeriveSettings.Builder::fehErrDefault, -0.1, "default [Fe/H] error: -0.1 dex (must be finite and >= 0)");
    }

    @Test
    void flagAndPriorSettingsAtTheirEdges() {
        accepts(DeriveSettings.Builder::teffDisagreeP, DeriveSettings::teffDisagreeP, 0.05);
        accepts(DeriveSettings.Builder::teffDisagreeP, DeriveSettings::teffDisagreeP, 1e-6);
        accepts(DeriveSettings.Builder::teffDisagreeP, DeriveSettings::teffDisagreeP, 0.999);
        rejects(DeriveSettings.Builder::teffDisagreeP, 0.0, "Teff disagreement p-value: 0.0 (must be in (0, 1))");
        rejects(DeriveSettings.Builder::teffDisagreeP, 1.0, "must be in (0, 1)");
        accepts(DeriveSettings.Builder::diameterDisagreeSigma, DeriveSettings::diameterDisagreeSigma, 5.0);
        rejects(DeriveSettings.Builder::diameterDisagreeSigma, 0.0, "diameter disagreement threshold: 0.0 sigma (must be finite and > 0)");
        // log g 0-5: the range of the Casagrande et al. 2021 relations
        accepts(DeriveSettings.Builder::giantLoggPrior, DeriveSettings::giantLoggPrior, 0.0);
        accepts(DeriveSettings.Builder::giantLoggPrior, DeriveSettings::giantLoggPrior, 5.0);
        accepts(DeriveSettings.Builder::giantLoggPrior, DeriveSettings::giantLoggPrior, 2.2);
        rejects(DeriveSettings.Builder::giantLoggPrior, 5.01, "giant log g prior: 5.01 (must be between 0 and 5)");
        rejects(DeriveSettings.Builder::giantLoggPrior, -0.01, "must be between 0 and 5");
        accepts(DeriveSettings.Builder::giantLoggPriorErr, DeriveSettings::giantLoggPriorErr, 0.3);
        rejects(DeriveSettings.Builder::giantLoggPriorErr, -0.3, "giant log g prior error: -0.3 dex (must be finite and >= 0)");
        accepts(DeriveSettings.Builder::hotTeffErrFracMax, DeriveSettings::hotTeffErrFracMax, 1.0);
        accepts(DeriveSettings.Builder::hotTeffErrFracMax, DeriveSettings::hotTeffErrFracMax, 0.2);
        rejects(DeriveSettings.Builder::hotTeffErrFracMax, 1.001, "hot-star Teff error fraction: 1.001 (must be in (0, 1])");
        rejects(DeriveSettings.Builder::hotTeffErrFracMax, 0.0, "must be in (0, 1]");
        assertEquals(true, DeriveSettings.builder().allowExtrapolation(true).build().allowExtrapolation());
        assertEquals(false, DeriveSettings.builder().allowExtrapolation(false).build().allowExtrapolation());
    }

    @Test
    void magnitudeRangeMustBeFiniteAndOrdered() {
        accepts(DeriveSettings.Builder::magMin, DeriveSettings::magMin, -2.0);
        accepts(DeriveSettings.Builder::magMax, DeriveSettings::magMax, 30.0);
        accepts(DeriveSettings.Builder::magMin, DeriveSettings::magMin, 34.999);
        rejects(DeriveSettings.Builder::magMin, 35.0, "plausible magnitude range: 35.0 to 35.0 (minimum must be below maximum)");
        rejects(DeriveSettings.Builder::magMax, -5.0, "minimum must be below maximum");
        rejects(DeriveSettings.Builder::magMax, Double.NaN, "faintest plausible magnitude: NaN mag (must be finite)");
        rejects(DeriveSettings.Builder::magMin, Double.NEGATIVE_INFINITY, "brightest plausible magnitude: -Infinity mag (must be finite)");
    }

    @Test
    void relationSelectionSetsTheBitsOfTheNamedRelations() {
        DeriveSettings s = DeriveSettings.builder().relations(List.of("C10/B-V", "C10/V-Ks")).build();
        assertEquals(1L | (1L << 6), s.relationMask());
        assertEquals((1L << TeffRelations.all().size()) - 1, DeriveSettings.defaults().relationMask(), "all by default");
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> DeriveSettings.builder().relations(List.of()).build());
        assertTrue(e.getMessage().contains("relation selection: none enabled"), e.getMessage());
    }

    @Test
    void toBuilderKeepsEverySetting() {
        DeriveSettings a = DeriveSettings.builder().parallaxZeroPointMas(-0.02).parallaxSnrMin(7).distanceSnrMin(2)
                .parallaxMaxMas(900).distanceMethod(DeriveSettings.DistanceMethod.INVERSE).priorLengthKpc(0.8)
                .posteriorPercentiles(false).rv(3.3).ebvDefault(0.1).ebvErrDefault(0.02).fehDefault(-0.2)
                .fehErrDefault(0.15).allowExtrapolation(true).teffDisagreeP(0.05).diameterDisagreeSigma(4)
                .giantLoggPrior(2.2).giantLoggPriorErr(0.4).magMin(-3).magMax(30).hotTeffErrFracMax(0.2)
                .relations(List.of("C10/V-J")).build();
        DeriveSettings b = a.toBuilder().build();
        assertEquals(a.parallaxZeroPointMas(), b.parallaxZeroPointMas(), 0.0);
        assertEquals(a.parallaxSnrMin(), b.parallaxSnrMin(), 0.0);
        assertEquals(a.distanceSnrMin(), b.distanceSnrMin(), 0.0);
        assertEquals(a.parallaxMaxMas(), b.parallaxMaxMas(), 0.0);
        assertEquals(a.distanceMethod(), b.distanceMethod());
        assertEquals(a.priorLengthKpc(), b.priorLengthKpc(), 0.0);
        assertEquals(a.posteriorPercentiles(), b.posteriorPercentiles());
        assertEquals(a.rv(), b.rv(), 0.0);
        assertEquals(a.ebvDefault(), b.ebvDefault(), 0.0);
        assertEquals(a.ebvErrDefault(), b.ebvErrDefault(), 0.0);
        assertEquals(a.fehDefault(), b.fehDefault(), 0.0);
        assertEquals(a.fehErrDefault(), b.fehErrDefault(), 0.0);
        assertEquals(a.allowExtrapolation(), b.allowExtrapolation());
        assertEquals(a.teffDisagreeP(), b.teffDisagreeP(), 0.0);
        assertEquals(a.diameterDisagreeSigma(), b.diameterDisagreeSigma(), 0.0);
        assertEquals(a.giantLoggPrior(), b.giantLoggPrior(), 0.0);
        assertEquals(a.giantLoggPriorErr(), b.giantLoggPriorErr(), 0.0);
        assertEquals(a.magMin(), b.magMin(), 0.0);
        assertEquals(a.magMax(), b.magMax(), 0.0);
        assertEquals(a.relationMask(), b.relationMask());
        assertEquals(a.hotTeffErrFracMax(), b.hotTeffErrFracMax(), 0.0);
    }

    @Test
    void chiSquareThresholdsAreTheUpperQuantilesOfTheChiSquareDistribution() {
        // reference: Commons Math's chi-square distribution (a general-purpose library); the 1 and 2 dof values at
        // p = 0.01 are also the standard table values 6.635 and 9.210 (from memory)
        DeriveSettings s = DeriveSettings.defaults();
        assertEquals(6.635, s.teffDisagreeChi2(1), 0.001);
        assertEquals(9.210, s.teffDisagreeChi2(2), 0.001);
        DeriveSettings p05 = DeriveSettings.builder().teffDisagreeP(0.05).build();
        for (int k = 1; k <= 24; k++) {
            assertEquals(new ChiSquaredDistribution(k).inverseCumulativeProbability(0.95), p05.teffDisagreeChi2(k), 1e-9, "dof " + k);
        }
        // beyond 24 degrees of freedom the 24-dof threshold is used (the class's cap)
        assertEquals(p05.teffDisagreeChi2(24), p05.teffDisagreeChi2(30), 0.0);
    }

    @Test
    void defaultsAreTheDocumentedDefaults() {
        // the _DEFAULT constants are the documented defaults (README configuration table); the builder starts there
        DeriveSettings d = DeriveSettings.defaults();
        assertEquals(DeriveSettings.PARALLAX_ZERO_POINT_MAS_DEFAULT, d.parallaxZeroPointMas(), 0.0);
        assertEquals(DeriveSettings.PARALLAX_SNR_MIN_DEFAULT, d.parallaxSnrMin(), 0.0);
        assertEquals(DeriveSettings.DISTANCE_SNR_MIN_DEFAULT, d.distanceSnrMin(), 0.0);
        assertEquals(DeriveSettings.PARALLAX_MAX_MAS_DEFAULT, d.parallaxMaxMas(), 0.0);
        assertEquals(DeriveSettings.DISTANCE_METHOD_DEFAULT, d.distanceMethod());
        assertEquals(DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT, d.priorLengthKpc(), 0.0);
        assertEquals(DeriveSettings.POSTERIOR_PERCENTILES_DEFAULT, d.posteriorPercentiles());
        assertEquals(DeriveSettings.RV_DEFAULT, d.rv(), 0.0);
        assertEquals(DeriveSettings.EBV_DEFAULT, d.ebvDefault(), 0.0);
        assertEquals(DeriveSettings.EBV_ERR_DEFAULT, d.ebvErrDefault(), 0.0);
        assertEquals(DeriveSettings.FEH_DEFAULT, d.fehDefault(), 0.0);
        assertEquals(DeriveSettings.FEH_ERR_DEFAULT, d.fehErrDefault(), 0.0);
        assertEquals(DeriveSettings.ALLOW_EXTRAPOLATION_DEFAULT, d.allowExtrapolation());
        assertEquals(DeriveSettings.TEFF_DISAGREE_P_DEFAULT, d.teffDisagreeP(), 0.0);
        assertEquals(DeriveSettings.DIAMETER_DISAGREE_SIGMA_DEFAULT, d.diameterDisagreeSigma(), 0.0);
        assertEquals(DeriveSettings.GIANT_LOGG_PRIOR_DEFAULT, d.giantLoggPrior(), 0.0);
        assertEquals(DeriveSettings.GIANT_LOGG_PRIOR_ERR_DEFAULT, d.giantLoggPriorErr(), 0.0);
        assertEquals(DeriveSettings.MAG_MIN_DEFAULT, d.magMin(), 0.0);
        assertEquals(DeriveSettings.MAG_MAX_DEFAULT, d.magMax(), 0.0);
        assertEquals(DeriveSettings.HOT_TEFF_ERR_FRAC_MAX_DEFAULT, d.hotTeffErrFracMax(), 0.0);
        // R_V = 3.1, the diffuse-ISM value (Cardelli, Clayton & Mathis 1989)
        assertEquals(3.1, d.rv(), 0.0);
    }
}
