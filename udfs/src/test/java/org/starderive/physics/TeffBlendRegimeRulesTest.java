package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.TeffBlendTest.F96_BV;
import static org.starderive.physics.TeffBlendTest.blend;
import static org.starderive.physics.TeffBlendTest.blended;
import static org.starderive.physics.TeffBlendTest.flowerK;
import static org.starderive.physics.TeffBlendTest.hotWeight;
import static org.starderive.physics.TeffBlendTest.mWeight;
import static org.starderive.physics.TeffBlendTest.vjk;
import static org.starderive.physics.TeffEstimatorTest.band;
import static org.starderive.physics.TeffEstimatorTest.bits;
import static org.starderive.physics.TeffEstimatorTest.emptyState;
import static org.starderive.physics.TeffEstimatorTest.partials;

import java.util.List;
import java.util.stream.Collectors;
import org.junit.jupiter.api.Test;
import org.starderive.physics.TeffEstimatorTest.Rel;

/**
 * The rules of {@link TeffBlend} that decide which regime's estimate takes part, against the published relations
 * typed again ({@link TeffEstimatorTest}, {@link TeffBlendTest}): the red-edge rule (README, "The coolest M dwarfs": a
 * colour beyond the red edge of the FGK relations by more than twice its error, at an edge cooler than 4100 K, puts the
 * star in the M-dwarf regime) at an edge of exactly 4100 K and either side; what an estimate of no weight may not
 * report (log g use, extrapolation, its relations); the M-dwarf and hot weights together; bounds broken by twice the
 * error, not once; the giant fallback to the dwarf relations; switched-off relations and error sources.
 */
class TeffBlendRegimeRulesTest {
    private static final double NAN = Double.NaN;

    /**
     * V = 10 and B = V + {@code bMinusV} (errors 0.01 mag; A/E(B−V) 4.1 and 3.1, of the sizes the CCM law gives: the
     * blend only reads them), E(B−V) error 0.01, [Fe/H] 0 ± 0.1 assumed; each test adds its other bands.
     */
    private static StarState bAndV(double bMinusV) {
        StarState s = emptyState();
        band(s, Band.B, 10.0 + bMinusV, 0.01, 4.1);
        band(s, Band.V, 10.0, 0.01, 3.1);
        s.sEbv = 0.01;
        return s;
    }

    /**
     * J, Ks and G, no V or BP (no M-dwarf relation applies): J−Ks 0.70, inside the Casagrande et al. 2010 range
     * 0.07–0.80; G−Ks 3.5, 0.7 mag beyond the Casagrande et al. 2021 dwarf red edge 2.80.
     */
    private static StarState jksAndG() {
        StarState s = emptyState();
        band(s, Band.J, 10.70, 0.02, 0.87);
        band(s, Band.KS, 10.0, 0.02, 0.35);
        band(s, Band.G, 13.5, 0.003, 2.6);
        s.sEbv = 0.01;
        return s;
    }

    /** Casagrande et al. 2021 dwarf G−Ks, typed again, at its red edge 2.80 (published range) and log g {@code logg}. */
    private static double typedGksEdgeK(double logg) {
        double[] m0 = new double[Band.COUNT];
        m0[Band.G.ordinal()] = 2.80;
        return TeffEstimatorTest.C21_GK.t().teffK(m0, 0, logg);
    }

    /**
     * The edge of C21 G−Ks moves with log g (about −28 K per dex at 2.80): 4105.6 K at log g 3.5, 4091.6 K at 4.0
     * (typed relation). At the log g where it is exactly 4100 K the rule holds ("at an edge of 4100 K or cooler"): the
     * J−Ks estimate is dropped and, with no M-dwarf relation, the star has no Teff; just hotter, it is kept.
     */
    @Test
    void redEdgeRuleHoldsAtAnEdgeOfExactly4100K() {
        TeffRelation gks = TeffRelations.byId("C21/G-Ks/dwarf");
        double lo = 3.5;
        double hi = 4.0;
        for (int i = 0; i < 200; i++) { // the edge's Teff falls with log g: the first log g where it is <= 4100 K
            double mid = 0.5 * (lo + hi);
            if (gks.teff(2.80, 0, mid, NAN) > 4100) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        double logg = hi;
        // the device of a star placed on an edge: of the neighbouring doubles, the one where the edge is 4100 K to the bit
        for (int i = 0; i < 400 && gks.teff(2.80, 0, logg, NAN) != 4100.0; i++) {
            logg = Math.nextUp(logg);
        }
        assertEquals(4100.0, gks.teff(2.80, 0, logg, NAN), 0.0, "set-up: the edge at 4100 K exactly");
        assertEquals(4100.0, typedGksEdgeK(logg), 1e-6, "the published relation puts the edge there too");

        TeffBlend b = blended(jksAndG(), logg);
        assertTrue(Double.isNaN(b.mean), "edge at 4100 K: the FGK estimate is dropped, got " + b.mean);
        assertNull(b.regime);
        assertTrue(b.anyColour, "colours present (COLOUR_OUT_OF_RANGE, not PHOTOMETRY_MISSING)");

        // either side: log g 3.5, edge 4105.6 K, the J−Ks estimate is kept; log g 4.0, edge 4091.6 K, dropped
        assertTrue(typedGksEdgeK(3.5) > 4100 && typedGksEdgeK(4.0) < 4100);
        StarState s = jksAndG();
        b = blended(s, 3.5);
        assertEquals(TeffEstimatorTest.C10_JK.t().teffK(s.m0, 0, 3.5), b.mean, 1e-6);
        assertEquals(Regime.FGK_DWARF, b.regime);
        b = blended(jksAndG(), 4.0);
        assertTrue(Double.isNaN(b.mean));
    }

    /** The K7 dwarf of {@link TeffBlendTest} with G−Ks 3.5, beyond the C21 dwarf edge (4074.9 K at log g 4.6). */
    private static StarState k7WithRedGks() {
        StarState s = vjk(2.40, 0.65);
        band(s, Band.G, 11.5, 0.003, 2.6);
        return s;
    }

    /**
     * The red-edge rule leaves a Mann et al. 2015 estimate inside the K7–M0 zone (V−J 2.40: 4210 K, ramp weight 0.45)
     * alone: it takes the whole weight (Regime: one regime's value is used alone), so its weight cannot move and its
     * contributions are the Mann relation's own, with no FGK scatter and no blend spread.
     */
    @Test
    void redEdgeRuleLeavesAnMDwarfEstimateInTheZoneAlone() {
        assertTrue(typedGksEdgeK(4.6) < 4100, "the C21 edge is cooler than 4100 K at log g 4.6");
        StarState s = k7WithRedGks();
        TeffBlend b = blended(s, 4.6);
        Rel mann = TeffEstimatorTest.M15_VJ;
        double tm = mann.t().teffK(s.m0, 0, 4.6);
        assertTrue(mWeight(tm) > 0.4 && mWeight(tm) < 0.5, "inside the blend zone: " + tm);
        assertEquals(tm, b.mean, 1e-6);
        assertEquals(1.0, b.wM, 0.0);
        assertEquals(Regime.M_DWARF, b.regime);
        assertEquals(bits("M15/V-J"), b.relationMask);
        double[] g = partials(List.of(mann), s, 4.6, 0)[0];
        for (int q = 0; q <= ErrorSource.FEH; q++) {
            assertEquals(g[q], b.c[q], 1e-5, "contribution of " + ErrorSource.name(q));
            assertEquals(0.0, b.dwM[q], 0.0, "a whole weight does not move: " + ErrorSource.name(q));
        }
        assertEquals(mann.sigmaK(), b.c[ErrorSource.SCATTER_M], 1e-9);
        assertEquals(0.0, b.c[ErrorSource.SCATTER], 0.0);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
    }

    /**
     * The same rule with a Flower 1996 estimate inside the late-A zone (B−V 0.30: 7216 K, ramp weight 0.43): the hot
     * estimate alone, with its own contributions (scatter 2 % of Teff, the catalogue's stated choice).
     */
    @Test
    void redEdgeRuleLeavesAHotEstimateInTheZoneAlone() {
        StarState s = bAndV(0.30);
        band(s, Band.KS, 8.0, 0.02, 0.35); // V−Ks 2.0: inside the C10 range, an FGK estimate that takes no weight
        band(s, Band.G, 11.5, 0.003, 2.6);
        TeffBlend b = blended(s, 4.6);
        double th = flowerK(0.30);
        assertTrue(hotWeight(th) > 0.4 && hotWeight(th) < 0.5, "inside the blend zone: " + th);
        assertEquals(th, b.mean, 1e-6);
        assertEquals(Regime.HOT, b.regime);
        assertEquals(bits("F96/B-V"), b.relationMask);
        double[] g = partials(List.of(F96_BV), s, 4.6, 0)[0];
        for (int q = 0; q <= ErrorSource.FEH; q++) {
            assertEquals(g[q], b.c[q], 1e-5, "contribution of " + ErrorSource.name(q));
        }
        assertEquals(0.02 * th, b.c[ErrorSource.SCATTER_HOT], 1e-6);
        assertEquals(0.0, b.c[ErrorSource.SCATTER], 0.0);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
    }

    /**
     * V−J 2.40 (Mann: 4210 K, M-dwarf weight 0.45) and B−V 0.28 (Flower: 7320 K, hot weight 0.64) on one star: the
     * two ramps leave the FGK estimate 1 − 0.45 − 0.64 < 0, so it takes no share, and the other two, as the weights of
     * a mixture, are scaled to sum to 1 (common practice); their disagreement is the mixture spread.
     */
    private static StarState mannAndFlowerColours() {
        StarState s = bAndV(0.28);
        band(s, Band.J, 7.60, 0.02, 0.87);
        return s;
    }

    @Test
    void mDwarfAndHotWeightsTogetherLeaveTheFgkEstimateNoShare() {
        StarState s = mannAndFlowerColours();
        TeffBlend b = blended(s, 4.5);
        double tm = TeffEstimatorTest.M15_VJ.t().teffK(s.m0, 0, 4.5);
        double th = flowerK(0.28);
        double wm = mWeight(tm);
        double wh = hotWeight(th);
        assertTrue(wm + wh > 1, "the two ramps overlap: " + wm + " + " + wh);
        double wmShare = wm / (wm + wh);
        double whShare = wh / (wm + wh);
        assertEquals(wmShare * tm + whShare * th, b.mean, 1e-6);
        assertEquals(wmShare, b.wM, 1e-12);
        assertEquals(Math.sqrt(wmShare * whShare) * (th - tm), b.c[ErrorSource.BLEND], 1e-6, "the mixture spread");
        assertEquals(Regime.HOT, b.regime, "the larger share");
        assertEquals(bits("M15/V-J", "F96/B-V"), b.relationMask, "no FGK relation");
        assertEquals(0.0, b.c[ErrorSource.SCATTER], 0.0, "no FGK scatter");
    }

    /**
     * The same star's first-order contributions: central differences of the typed mixture, both weights moving with
     * their temperatures (the class states that the weights' own derivatives enter the first-order errors).
     */
    @Test
    void mDwarfAndHotMixtureErrorsCarryBothMovingWeights() {
        StarState s = mannAndFlowerColours();
        TeffBlend b = blended(s, 4.5);
        Rel mixture = new Rel("mixture", null, null, 0, 0, (m0, f, g) -> {
            double tm = TeffEstimatorTest.M15_VJ.t().teffK(m0, f, g);
            double th = F96_BV.t().teffK(m0, f, g);
            return (mWeight(tm) * tm + hotWeight(th) * th) / (mWeight(tm) + hotWeight(th));
        });
        double[] g = partials(List.of(mixture), s, 4.5, 0)[0];
        for (int q = 0; q <= ErrorSource.FEH; q++) {
            // central differences of a curved mixture: good to about 1e-6 relative here (1e-5 allowed; common practice)
            assertEquals(g[q], b.c[q], 1e-5 * Math.abs(g[q]) + 1e-5, "contribution of " + ErrorSource.name(q));
        }
        // the M-dwarf share a/(a + b) moves with both temperatures (TeffBlend#dwM: its first-order contributions; the
        // central differences of this ratio are good to about 2e-6 relative)
        Rel mShare = new Rel("M-dwarf share", null, null, 0, 0, (m0, f, g2) -> {
            double a = mWeight(TeffEstimatorTest.M15_VJ.t().teffK(m0, f, g2));
            return a / (a + hotWeight(F96_BV.t().teffK(m0, f, g2)));
        });
        double[] dw = partials(List.of(mShare), s, 4.5, 0)[0];
        for (int q = 0; q <= ErrorSource.FEH; q++) {
            assertEquals(dw[q], b.dwM[q], 1e-5 * Math.abs(dw[q]) + 1e-9, "M-dwarf share, " + ErrorSource.name(q));
        }
        assertTrue(Math.abs(b.dwM[Band.V.ordinal()]) > 1e-3, "V moves both temperatures: " + b.dwM[Band.V.ordinal()]);
    }

    /**
     * V−J 2.35 (Mann: 4256 K, M-dwarf weight 0.22) and B−V 0.32 (Flower: 7114 K, hot weight 0.23) on one star whose
     * two colours are also inside the Casagrande et al. 2010 ranges: the FGK estimate keeps 1 − 0.22 − 0.23, and
     * each moving weight enters the errors against the FGK estimate it replaces, d(blend) = Σ w dT + Σ (T_k − T_FGK)
     * dw_k (the rule of TeffBlend, differentiated). Checked against central differences of the typed three-way blend
     * (FGK inverse-variance weights held, as the class formula states).
     */
    @Test
    void threeRegimesBlendWithBothRampsAgainstTheFgkEstimate() {
        StarState s = bAndV(0.32);
        band(s, Band.J, 10.0 - 2.35, 0.02, 0.87);
        TeffBlend b = blended(s, 4.5);
        List<Rel> fgk = List.of(TeffEstimatorTest.C10_BV, TeffEstimatorTest.C10_VJ);
        double[] w = TeffEstimatorTest.weights(fgk, s, 4.5);
        Rel threeWay = new Rel("three-way blend", null, null, 0, 0, (m0, f, g) -> {
            double tf = (w[0] * fgk.get(0).t().teffK(m0, f, g) + w[1] * fgk.get(1).t().teffK(m0, f, g)) / (w[0] + w[1]);
            double tm = TeffEstimatorTest.M15_VJ.t().teffK(m0, f, g);
            double th = F96_BV.t().teffK(m0, f, g);
            return (1 - mWeight(tm) - hotWeight(th)) * tf + mWeight(tm) * tm + hotWeight(th) * th;
        });
        double tm = TeffEstimatorTest.M15_VJ.t().teffK(s.m0, 0, 4.5);
        double th = flowerK(0.32);
        assertTrue(mWeight(tm) > 0.2 && hotWeight(th) > 0.2 && mWeight(tm) + hotWeight(th) < 0.5, tm + " K, " + th + " K");
        assertEquals(threeWay.t().teffK(s.m0, 0, 4.5), b.mean, 1e-6);
        assertEquals(mWeight(tm), b.wM, 1e-12);
        assertEquals(bits("C10/B-V", "C10/V-J", "M15/V-J", "F96/B-V"), b.relationMask);
        double[] g = partials(List.of(threeWay), s, 4.5, 0)[0];
        for (int q = 0; q <= ErrorSource.FEH; q++) {
            assertEquals(g[q], b.c[q], 1e-5 * Math.abs(g[q]) + 1e-5, "contribution of " + ErrorSource.name(q));
        }
    }

    /**
     * A hot star (B−V 0.10: Flower 8454 K, weight 1) whose BP−RP 0.25 lies inside the Casagrande et al. 2021 dwarf
     * range and whose B−V is 0.08 beyond the Casagrande et al. 2010 blue edge 0.18 (extrapolated, extrapolation on):
     * the FGK estimate takes no weight, so the star's Teff neither uses log g nor is extrapolated. Controls: an FGK
     * estimate with weight does report them (J−Ks 0.85, beyond the C10 edge 0.80; BP−RP 0.55), and a Flower B−V
     * extrapolated beyond its red end 0.50 (B−V 0.60, weight 0) does not.
     */
    @Test
    void anEstimateWithoutWeightReportsNeitherLogGUseNorExtrapolation() {
        DeriveSettings extrapolate = DeriveSettings.builder().allowExtrapolation(true).build();
        StarState s = bAndV(0.10);
        band(s, Band.BP, 10.10, 0.004, 3.2);
        band(s, Band.RP, 9.85, 0.005, 1.9);
        TeffBlend b = estimated(s, extrapolate, 4.2);
        assertEquals(flowerK(0.10), b.mean, 1e-6);
        assertEquals(Regime.HOT, b.regime);
        assertEquals(bits("F96/B-V"), b.relationMask);
        assertFalse(b.usesLogg, "the C21 estimate takes no weight");
        assertFalse(b.extrapolated, "the extrapolated C10 estimate takes no weight");

        StarState jk = oneColour(Band.J, Band.KS, 0.85);
        b = estimated(jk, extrapolate, 4.5);
        assertEquals(TeffEstimatorTest.C10_JK.t().teffK(jk.m0, 0, 4.5), b.mean, 1e-6);
        assertTrue(b.extrapolated, "C10 J−Ks 0.85 extrapolated, the whole weight");

        StarState bprp = oneColour(Band.BP, Band.RP, 0.55);
        b = estimated(bprp, extrapolate, 4.5);
        assertEquals(TeffEstimatorTest.C21_BPRP.t().teffK(bprp.m0, 0, 4.5), b.mean, 1e-6);
        assertTrue(b.usesLogg);

        StarState bv = bAndV(0.60);
        b = estimated(bv, extrapolate, 4.5);
        assertEquals(TeffEstimatorTest.C10_BV.t().teffK(bv.m0, 0, 4.5), b.mean, 1e-6);
        assertEquals(bits("C10/B-V"), b.relationMask);
        assertFalse(b.extrapolated, "Flower B−V 0.60 extrapolated to about 5900 K, hot weight 0");
    }

    /** One colour, blue − red = {@code colour}, errors 0.01 mag, no reddening; [Fe/H] 0 ± 0.1 assumed. */
    private static StarState oneColour(Band blue, Band red, double colour) {
        StarState s = emptyState();
        band(s, blue, 10.0 + colour, 0.01, 0);
        band(s, red, 10.0, 0.01, 0);
        return s;
    }

    private static TeffBlend estimated(StarState s, DeriveSettings settings, double logg) {
        TeffBlend b = blend(s, settings);
        b.newStar();
        b.estimate(LuminosityClass.MAIN_SEQUENCE, logg, 0.0);
        return b;
    }

    /** Settings with every relation but those named. */
    private static DeriveSettings without(String... ids) {
        List<String> off = List.of(ids);
        return DeriveSettings.builder().relations(TeffRelations.all().stream().map(TeffRelation::id)
                .filter(id -> !off.contains(id)).collect(Collectors.toList())).build();
    }

    /**
     * With a relation switched off, a colour of another enabled relation still counts as present (README flag table:
     * COLOUR_OUT_OF_RANGE "colours present, but none inside a calibrated range", PHOTOMETRY_MISSING "no colour of any
     * relation"): B−V 0.90 without C10 B−V is beyond the Flower range −0.40…0.50; V−J 1.50 without C10 V−J gives
     * 5360 K by Mann et al. 2015, beyond its zone.
     */
    @Test
    void aColourOfAnEnabledOtherRegimeCountsAsPresent() {
        StarState s = bAndV(0.90);
        TeffBlend b = estimated(s, without("C10/B-V"), 4.5);
        assertTrue(Double.isNaN(b.mean));
        assertTrue(b.anyColour, "the hot relation's colour");

        s = emptyState();
        band(s, Band.V, 10.0, 0.01, 3.1);
        band(s, Band.J, 8.5, 0.02, 0.87);
        b = estimated(s, without("C10/V-J"), 4.5);
        assertTrue(Double.isNaN(b.mean));
        assertTrue(b.anyColour, "the M-dwarf relation's colour");
    }

    /** Typed error of one relation's estimate: the shared sources, its scatter and its zero point in quadrature. */
    private static double typedErr(Rel r, StarState s, double logg) {
        double[] g = partials(List.of(r), s, logg, 0)[0];
        double v = r.sigmaK() * r.sigmaK() + r.zpK() * r.zpK();
        for (int q = 0; q <= ErrorSource.LOGG; q++) {
            v += g[q] * g[q];
        }
        return Math.sqrt(v);
    }

    /** Sets the colour of {@code r} (its blue band moved) so its typed Teff is {@code k} typed errors from {@code boundK}. */
    private static void placeAt(StarState s, Rel r, double boundK, double k, double logg) {
        int blue = r.blue().ordinal();
        int red = r.red().ordinal();
        double lo = 0;
        double hi = 3;
        for (int i = 0; i < 60; i++) { // (T − bound) / σ falls as the colour reddens
            double mid = 0.5 * (lo + hi);
            s.m0[blue] = s.m0[red] + mid;
            if ((r.t().teffK(s.m0, s.feh, logg) - boundK) / typedErr(r, s, logg) > k) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
    }

    /**
     * A Teff breaks a bound from an out-of-range colour only beyond twice its error (README: TEFF_COLOURS_DISAGREE, "an
     * out-of-range colour contradicts Teff"; the 2σ margin of {@link TeffEstimator}): B−V 1.35 beyond the C10 red
     * edge 1.29 bounds Teff by C10 B−V(1.29) = 4282.5 K, and V−I_C is set so the C10 V−I_C Teff is 1.5 and 2.5 typed
     * errors above it; on the blue side V−I_C 0.30 beyond the edge 0.46 bounds by 6837.4 K, B−V set 1.5 and 2.5
     * errors below.
     */
    @Test
    void aBoundIsBrokenBeyondTwiceTheErrorNotOnce() {
        double[] m0 = new double[Band.COUNT];
        m0[Band.B.ordinal()] = 1.29;
        double upper = TeffEstimatorTest.C10_BV.t().teffK(m0, 0, 4.4);
        m0[Band.B.ordinal()] = 0;
        m0[Band.V.ordinal()] = 0.46;
        double lower = TeffEstimatorTest.C10_VI.t().teffK(m0, 0, 4.4);
        for (double k : new double[] {1.5, 2.5}) {
            StarState s = bAndV(1.35);
            band(s, Band.IC, 9.0, 0.01, 1.8);
            placeAt(s, TeffEstimatorTest.C10_VI, upper, k, 4.4);
            s.m0[Band.B.ordinal()] = s.m0[Band.V.ordinal()] + 1.35;
            TeffBlend b = blended(s, 4.4);
            assertEquals(TeffEstimatorTest.C10_VI.t().teffK(s.m0, 0, 4.4), b.mean, 1e-6);
            assertEquals(upper + k * typedErr(TeffEstimatorTest.C10_VI, s, 4.4), b.mean, 1e-4, "set-up");
            assertEquals(k > 2, b.boundBroken, k + " errors above the red-side bound");

            s = bAndV(0.40);
            band(s, Band.IC, 9.70, 0.01, 1.8);
            placeAt(s, TeffEstimatorTest.C10_BV, lower, -k, 4.4);
            b = blended(s, 4.4);
            assertEquals(TeffEstimatorTest.C10_BV.t().teffK(s.m0, 0, 4.4), b.mean, 1e-6, "Flower's weight is 0 there");
            assertEquals(k > 2, b.boundBroken, k + " errors below the blue-side bound");
        }
    }

    /** V−J 10, far beyond the Mann et al. 2015 V−J turnover (6.40, 2811 K by the typed relation), and BP−RP. */
    private static StarState beyondTheMannTurnover(double bpMinusRp) {
        StarState s = emptyState();
        band(s, Band.V, 18.0, 0.01, 3.1);
        band(s, Band.J, 8.0, 0.02, 0.87);
        band(s, Band.BP, 10.0 + bpMinusRp, 0.004, 3.2);
        band(s, Band.RP, 10.0, 0.005, 1.9);
        s.sEbv = 0.01;
        return s;
    }

    /**
     * A colour beyond a Mann turnover says the star is cooler than about 2800 K if it is an M dwarf: a main-sequence
     * Teff of 3467 K (Mann BP−RP 2.6; the C21 dwarf BP−RP edge 2.00 is cooler than 4100 K, so the FGK estimates take
     * no weight) breaks that bound; an evolved star takes no M-dwarf relation (Regime), so its giant C21 BP−RP Teff
     * (BP−RP 2.0, inside the giant range 0.20–2.55) is bounded only by the giant V−J edge (GHB09 2.4: 4157 K).
     */
    @Test
    void aMannTurnoverBoundsOnlyAMainSequenceStar() {
        StarState s = beyondTheMannTurnover(2.6);
        TeffBlend b = blended(s, 4.5);
        assertEquals(TeffEstimatorTest.M15_BPRP.t().teffK(s.m0, 0, 4.5), b.mean, 1e-6);
        assertEquals(Regime.M_DWARF, b.regime);
        assertTrue(b.boundBroken, "3467 K against the turnover's 2811 K, error " + b.err);

        s = beyondTheMannTurnover(2.0);
        b = blend(s);
        b.newStar();
        b.estimateEvolved();
        double logg = DeriveSettings.GIANT_LOGG_PRIOR_DEFAULT;
        assertEquals(TeffEstimatorTest.C21_BPRP.t().teffK(s.m0, 0, logg), b.mean, 1e-6);
        assertEquals(Regime.GIANT, b.regime);
        assertFalse(b.boundBroken, "below the giant V−J edge; the Mann turnover is no bound for a giant");
    }

    /**
     * With the blend source switched off (ErrorSource table; {@link StarDeriver#errorSources}) the spread is no
     * contribution, and nothing else changes: the K7 dwarf of {@link TeffBlendTest}.
     */
    @Test
    void theBlendSourceSwitchedOffContributesNothing() {
        StarState on = vjk(2.40, 0.65);
        TeffBlend all = blended(on, 4.6);
        StarState off = vjk(2.40, 0.65);
        off.sourceMask = ~(1L << ErrorSource.BLEND);
        TeffBlend b = blended(off, 4.6);
        assertEquals(all.mean, b.mean, 0.0);
        assertTrue(Math.abs(all.c[ErrorSource.BLEND]) > 1, "the spread when on: " + all.c[ErrorSource.BLEND]);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
        for (int q = 0; q < ErrorSource.COUNT; q++) {
            if (q != ErrorSource.BLEND) {
                assertEquals(all.c[q], b.c[q], 0.0, ErrorSource.name(q));
            }
        }
        assertEquals(Math.sqrt(all.err * all.err - Math.pow(all.c[ErrorSource.BLEND], 2)), b.err, 1e-9,
                "the other sources in quadrature");
    }

    /**
     * An evolved star beyond every giant relation falls back on the dwarf relations (TeffBlend) and is named for them:
     * B−V 0.90 at [Fe/H] +0.3 lies outside the González Hernández &amp; Bonifacio 2009 giant [Fe/H] range (up to 0.2)
     * and inside the Casagrande et al. 2010 one (up to 0.4); V−I_C has no giant relation at all (GHB09 Table 5), yet
     * its colour is present.
     */
    @Test
    void anEvolvedStarBeyondTheGiantRelationsTakesTheDwarfOnes() {
        StarState s = bAndV(0.90);
        s.feh = 0.3;
        s.fehMeasured = true;
        TeffBlend b = blend(s);
        b.newStar();
        b.estimateEvolved();
        assertEquals(TeffEstimatorTest.C10_BV.t().teffK(s.m0, 0.3, 2.5), b.mean, 1e-6);
        assertEquals(Regime.FGK_DWARF, b.regime);
        assertEquals(bits("C10/B-V"), b.relationMask);

        StarState vi = oneColour(Band.V, Band.IC, 1.0);
        b = blend(vi);
        b.newStar();
        b.estimateEvolved();
        assertEquals(TeffEstimatorTest.C10_VI.t().teffK(vi.m0, 0, 2.5), b.mean, 1e-6);
        assertEquals(Regime.FGK_DWARF, b.regime);
        assertTrue(b.anyColour);
    }
    /**
     * The blue-edge rule, the red-edge rule's mirror: a B−V beyond the blue edge 0.18 of the Casagrande et al. 2010
     * B−V relation (published range 0.18–1.29) by more than twice its error, where that edge is hotter than the hot
     * zone's top (C10 at 0.18: θ = 0.5665 + 0.4809·0.18 − 0.0060·0.18² → 7720 K, typed), leaves only the hot regime.
     * B−V −0.45 is inside Flower's nominal range (−0.40…0.50, extrapolated a little) but Flower 1996 / Torres 2010
     * gives 278,000 K there — above the sanity cap and far above the calibration stars' 52,500 K (ReadMe of the
     * catalogue, relations.md section 12): the star gets no Teff, also with extrapolation on, rather than the C10
     * relation extrapolated 0.63 mag beyond its edge (12–16 kK, as it did before this rule). B−V −0.30 still gets
     * Flower's 33.6 kK. The same in a Monte Carlo draw (values only), which must see the same bound.
     */
    @Test
    void aColourBeyondTheBlueEdgeLeavesOnlyTheHotRegimeAlsoWhenExtrapolating() {
        DeriveSettings extrapolate = DeriveSettings.builder().allowExtrapolation(true).build();
        double c10EdgeK = 5040.0 / (0.5665 + 0.4809 * 0.18 - 0.0060 * 0.18 * 0.18); // Casagrande et al. 2010, typed
        assertTrue(c10EdgeK > Regime.HOT_BLEND_HI_K, "the C10 B−V blue edge lies above the hot zone: " + c10EdgeK);
        assertEquals(c10EdgeK, TeffEstimatorTest.C10_BV.t().teffK(bAndV(0.18).m0, 0, 4.3), 1e-6, "typed twice alike");
        assertTrue(flowerK(-0.45) > 60_000, "Flower at B−V −0.45: " + flowerK(-0.45));

        for (boolean draw : new boolean[] {false, true}) {
            StarState blue = bAndV(-0.45);
            blue.valuesOnly = draw;
            TeffBlend b = estimated(blue, extrapolate, 4.3);
            assertTrue(Double.isNaN(b.mean), "B−V −0.45, draw " + draw + ": no Teff, got " + b.mean);
            assertEquals(0L, b.relationMask);
            assertTrue(b.anyColour, "the colour was there (COLOUR_OUT_OF_RANGE, not no colour)");

            StarState hot = bAndV(-0.30);
            hot.valuesOnly = draw;
            b = estimated(hot, extrapolate, 4.3);
            assertEquals(flowerK(-0.30), b.mean, 1e-6 * b.mean, "B−V −0.30, draw " + draw);
            assertEquals(33_617, b.mean, 1, "Flower 1996 / Torres 2010 at −0.30, evaluated apart from the coefficients of relations.md section 12");
            assertEquals(Regime.HOT, b.regime);
            assertEquals(bits("F96/B-V"), b.relationMask);
        }
    }

    /**
     * The blue-edge rule without B and V: an A star of about 8400 K seen in G, BP, RP and Ks only. BP−RP 0.10 lies
     * 0.10 mag beyond the blue edge 0.20 of the Casagrande et al. 2021 dwarf BP−RP relation (published range), an edge
     * hotter than the hot zone's top (typed copy below); G−Ks 0.35 is inside the C21 dwarf G−Ks range and gives a
     * temperature ~500 K too cool, read near the relation's blue end. With only Flower's B−V in the hot regime, the
     * star gets no Teff (COLOUR_OUT_OF_RANGE), in a draw too, rather than the cool G−Ks value without a warning.
     * Without the BP−RP colour the same G−Ks is used as before (the rule needs a colour beyond the edge).
     */
    @Test
    void aGaiaColourBeyondTheBlueEdgeLeavesNoTeffWithoutBAndV() {
        double edgeK = TeffEstimatorTest.C21_BPRP.t().teffK(oneColour(Band.BP, Band.RP, 0.20).m0, 0, 4.3);
        assertTrue(edgeK > Regime.HOT_BLEND_HI_K, "C21 dwarf BP−RP at its blue edge 0.20, typed: " + edgeK);
        for (boolean draw : new boolean[] {false, true}) {
            StarState s = emptyState();
            band(s, Band.G, 10.0, 0.003, 0);
            band(s, Band.BP, 10.05, 0.003, 0);
            band(s, Band.RP, 9.95, 0.003, 0);
            band(s, Band.KS, 9.65, 0.02, 0);
            s.valuesOnly = draw;
            TeffBlend b = estimated(s, DeriveSettings.defaults(), 4.3);
            assertTrue(Double.isNaN(b.mean), "BP−RP 0.10, draw " + draw + ": no Teff, got " + b.mean);
            assertTrue(b.anyColour);

            StarState gks = oneColour(Band.G, Band.KS, 0.35);
            gks.valuesOnly = draw;
            b = estimated(gks, DeriveSettings.defaults(), 4.3);
            assertEquals(TeffEstimatorTest.C21_GK.t().teffK(gks.m0, 0, 4.3), b.mean, 1e-6, "G−Ks alone, draw " + draw);
        }
    }
}
