package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.TeffEstimatorTest.band;
import static org.starderive.physics.TeffEstimatorTest.bits;
import static org.starderive.physics.TeffEstimatorTest.emptyState;

import java.util.Arrays;
import java.util.List;
import java.util.stream.IntStream;
import org.junit.jupiter.api.Test;
import org.starderive.physics.TeffEstimatorTest.Rel;

/**
 * {@link TeffBlend} on stars in the K7–M0 and late-A–early-F blend zones, against the blend rule of {@link Regime}
 * (our choice: the M-dwarf weight falls linearly from 1 at 4100 K to 0 at 4300 K, the hot weight rises from 0 at
 * 7000 K to 1 at 7500 K) applied here to the published relations typed again ({@link TeffEstimatorTest}): the
 * blended Teff, the mixture spread √(w₁w₂)·(T₂ − T₁), and every first-order contribution as a central difference of
 * the typed blend, weights moving with their temperature. Stars exactly at the blend edges take one regime alone.
 */
class TeffBlendTest {
    /**
     * Flower 1996, ApJ 469, 355, log Teff(B−V), coefficients as corrected by Torres 2010, AJ 140, 1158 (main
     * sequence, subgiants and giants); scatter 2 % of Teff and no zero point (the catalogue's stated choice).
     */
    private static final double[] F96 = {3.979145106714099, -0.654992268598245, 1.740690042385095, -4.608815154057166,
            6.792599779944473, -5.396909891322525, 2.192970376522490, -0.359495739295671};

    static double flowerK(double bv) {
        double logT = 0;
        for (int i = 0; i < F96.length; i++) {
            logT += F96[i] * Math.pow(bv, i);
        }
        return Math.pow(10, logT);
    }

    static final Rel F96_BV = new Rel("F96/B-V", Band.B, Band.V, Double.NaN, 0.0,
            (m0, f, g) -> flowerK(m0[Band.B.ordinal()] - m0[Band.V.ordinal()]));

    /** M-dwarf weight, the rule of {@link Regime}: 1 up to 4100 K, 0 from 4300 K, linear between. */
    static double mWeight(double tK) {
        return tK <= 4100 ? 1 : tK >= 4300 ? 0 : (4300 - tK) / 200;
    }

    /** Hot weight, the rule of {@link Regime}: 0 up to 7000 K, 1 from 7500 K, linear between. */
    static double hotWeight(double tK) {
        return tK <= 7000 ? 0 : tK >= 7500 ? 1 : (tK - 7000) / 500;
    }

    static TeffBlend blend(StarState s) {
        return blend(s, DeriveSettings.defaults());
    }

    /** The blend of the relations {@code settings} enables, each at its catalogue bit (as {@link StarDeriver} sets it up). */
    static TeffBlend blend(StarState s, DeriveSettings settings) {
        List<TeffRelation> all = TeffRelations.all();
        int[] index = IntStream.range(0, all.size()).filter(i -> (settings.relationMask() & (1L << i)) != 0).toArray();
        TeffRelation[] enabled = Arrays.stream(index).mapToObj(all::get).toArray(TeffRelation[]::new);
        return new TeffBlend(settings, s, enabled, index);
    }

    /** A new star's main-sequence blend at log g {@code logg} (no log g error). */
    static TeffBlend blended(StarState s, double logg) {
        TeffBlend b = blend(s);
        b.newStar();
        b.estimate(LuminosityClass.MAIN_SEQUENCE, logg, 0.0);
        return b;
    }

    /**
     * The typed blend of the FGK relations {@code fgk} (their inverse-variance weights held at the star's values, as
     * the first-order rule states) with one other regime's relation {@code other}, weighted by {@code hot} ? the hot
     * ramp : the M-dwarf ramp of the other's Teff. As a relation, so that its partials come from the same differences.
     */
    private static Rel typedBlend(List<Rel> fgk, Rel other, boolean hot, StarState s, double logg) {
        double[] w = TeffEstimatorTest.weights(fgk, s, logg);
        double sw = Arrays.stream(w).sum();
        return new Rel("blend", null, null, 0, 0, (m0, f, g) -> {
            double tf = 0;
            for (int i = 0; i < fgk.size(); i++) {
                tf += w[i] * fgk.get(i).t().teffK(m0, f, g) / sw;
            }
            double to = other.t().teffK(m0, f, g);
            double wo = hot ? hotWeight(to) : mWeight(to);
            return (1 - wo) * tf + wo * to;
        });
    }

    /** Blended Teff, spread, contributions and error of {@code b} against the typed blend. */
    private static void assertBlend(TeffBlend b, List<Rel> fgk, Rel other, boolean hot, StarState s, double logg) {
        double tf = TeffEstimatorTest.weightedMean(fgk, s, logg);
        double to = other.t().teffK(s.m0, s.feh, logg);
        double wo = hot ? hotWeight(to) : mWeight(to);
        Rel typed = typedBlend(fgk, other, hot, s, logg);
        assertEquals(typed.t().teffK(s.m0, s.feh, logg), b.mean, 1e-6);
        assertEquals(hot ? 0 : wo, b.wM, 1e-12);
        double[] g = TeffEstimatorTest.partials(List.of(typed), s, logg, 0)[0];
        for (int q = 0; q <= ErrorSource.LOGG; q++) {
            assertEquals(g[q], b.c[q], 1e-5, "contribution of " + ErrorSource.name(q));
        }
        // the two regimes' disagreement: the spread of the two-component mixture
        double spread = Math.sqrt(wo * (1 - wo)) * (to - tf);
        assertEquals(spread, b.c[ErrorSource.BLEND], 1e-6);
        assertEquals(StarDeriver.norm(b.c), b.err, 0.0);
        double zp = 0; // the zero points share one z: their contributions add linearly (ErrorSource table)
        double[] w = TeffEstimatorTest.weights(fgk, s, logg);
        for (int i = 0; i < fgk.size(); i++) {
            zp += (1 - wo) * w[i] * fgk.get(i).zpK() / Arrays.stream(w).sum();
        }
        assertEquals(zp, b.c[ErrorSource.ZP], 1e-6);
    }

    /** V, J, Ks only, no reddening: V−J and J−Ks as given; [Fe/H] not measured (0 ± 0.1 assumed). */
    static StarState vjk(double vMinusJ, double jMinusKs) {
        StarState s = emptyState();
        band(s, Band.V, 8.0 + vMinusJ + jMinusKs, 0.02, 3.1);
        band(s, Band.J, 8.0 + jMinusKs, 0.025, 0.87);
        band(s, Band.KS, 8.0, 0.02, 0.35);
        s.sEbv = 0.02;
        return s;
    }

    private static final List<Rel> C10_VJK = List.of(TeffEstimatorTest.C10_VJ, TeffEstimatorTest.C10_VK,
            TeffEstimatorTest.C10_JK);

    /**
     * A K7 dwarf: V−J 2.40 gives 4210 K by Mann et al. 2015 (M-dwarf weight 0.45) and about 4240 K by Casagrande et
     * al. 2010; J−Ks 0.65. Blended, with the M-dwarf weight's own slope −1/200 per K in every contribution.
     */
    @Test
    void k7DwarfBlendsMannAndCasagrandeWithTheMovingWeight() {
        StarState s = vjk(2.40, 0.65);
        TeffBlend b = blended(s, 4.6);
        double tm = TeffEstimatorTest.M15_VJ.t().teffK(s.m0, 0, 4.6);
        assertTrue(tm > 4150 && tm < 4250, "inside the blend zone: " + tm);
        assertBlend(b, C10_VJK, TeffEstimatorTest.M15_VJ, false, s, 4.6);
        assertEquals(Regime.FGK_DWARF, b.regime, "the FGK weight 0.55 dominates");
        assertEquals(3, b.count);
        assertEquals(bits(C10_VJK) | bits("M15/V-J"), b.relationMask);
        assertEquals(TeffEstimatorTest.glsChi2(C10_VJK, s, 4.6), b.chi2(), 1e-7, "the dominant regime's colours");
        // the M-dwarf weight's contributions: its slope times the Mann Teff's contributions
        double[] gm = TeffEstimatorTest.partials(List.of(TeffEstimatorTest.M15_VJ), s, 4.6, 0)[0];
        for (int q = 0; q < Band.COUNT; q++) {
            assertEquals(-gm[q] / 200, b.dwM[q], 1e-9, ErrorSource.name(q));
        }
        assertTrue(b.anyColour && !b.extrapolated && !b.boundBroken && !b.usesLogg);
    }

    /**
     * The scatter of each relation is independent between relations (ErrorSource table: one z per relation), so the
     * FGK and M-dwarf scatter contributions of a blend add in quadrature, each with its derivative of the blend:
     * (1 − w_M) for the FGK mean, w_M + dw_M/dT (T_M − T_F) for the Mann one.
     */
    @Test
    void blendedScatterAddsTheIndependentRelationsInQuadrature() {
        // (before 40cc313 both went into one source, added linearly: 91.3 K here instead of 80.0 K)
        StarState s = vjk(2.40, 0.65);
        TeffBlend b = blended(s, 4.6);
        double[] w = TeffEstimatorTest.weights(C10_VJK, s, 4.6);
        double sw = Arrays.stream(w).sum();
        double tf = TeffEstimatorTest.weightedMean(C10_VJK, s, 4.6);
        double tm = TeffEstimatorTest.M15_VJ.t().teffK(s.m0, 0, 4.6);
        double wm = mWeight(tm);
        double mannPart = (wm - (tm - tf) / 200) * TeffEstimatorTest.M15_VJ.sigmaK();
        double fgkVar = 0;
        for (int i = 0; i < w.length; i++) {
            fgkVar += Math.pow((1 - wm) * w[i] / sw * C10_VJK.get(i).sigmaK(), 2);
        }
        // each regime's scatter is a source of its own, so the two add in quadrature wherever errors are combined
        assertEquals(Math.abs(mannPart), Math.abs(b.c[ErrorSource.SCATTER_M]), 1e-6, "Mann 2015 scatter");
        assertEquals(Math.sqrt(fgkVar), Math.abs(b.c[ErrorSource.SCATTER]), 1e-6, "C10 scatter");
        assertEquals(80.0, Math.hypot(b.c[ErrorSource.SCATTER], b.c[ErrorSource.SCATTER_M]), 0.05,
                "the two in quadrature (80.0 K from the typed relations)");
    }

    /**
     * A late-A star: B−V 0.28 gives 7320 K by Flower 1996 (hot weight 0.64) and about 7190 K by Casagrande et al.
     * 2010; the hot estimate dominates.
     */
    @Test
    void lateAStarBlendsFlowerAndCasagrande() {
        StarState s = emptyState();
        band(s, Band.B, 6.28, 0.01, 4.1);
        band(s, Band.V, 6.0, 0.01, 3.1);
        s.sEbv = 0.01;
        s.feh = 0.1;
        s.fehMeasured = true;
        TeffBlend b = blended(s, 4.2);
        assertBlend(b, List.of(TeffEstimatorTest.C10_BV), F96_BV, true, s, 4.2);
        assertEquals(Regime.HOT, b.regime);
        assertEquals(1, b.count);
        assertEquals(bits("C10/B-V", "F96/B-V"), b.relationMask);
        assertEquals(0.0, b.wM, 0.0);
        assertEquals(0.0, b.chi2(), 1e-12, "one colour in the dominant regime");
    }

    /**
     * The blend of a star whose relation {@code id} gives exactly {@code teffK}: the star's colour puts that relation
     * within a few K below it (bisection on the typed copy {@code typed}), and a per-relation offset (the device of a
     * Monte Carlo draw) moves it onto the edge to the last bit: teffK − T is exact for T within a factor 2 (Sterbenz
     * lemma), so T + (teffK − T) = teffK.
     */
    private static TeffBlend atTeff(String id, Rel typed, double teffK, StarState s, double logg) {
        Band blue = typed.blue();
        double lo = -1;
        double hi = 5;
        for (int i = 0; i < 60; i++) { // Teff falls as the blue band gets fainter
            double mid = 0.5 * (lo + hi);
            s.m0[blue.ordinal()] = s.m0[typed.red().ordinal()] + mid;
            if (typed.t().teffK(s.m0, s.feh, logg) > teffK - 2) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        s.m0[blue.ordinal()] = s.m0[typed.red().ordinal()] + hi;
        TeffRelation r = TeffRelations.byId(id);
        double[] off = new double[TeffRelations.all().size()];
        off[TeffRelations.index(r)] = teffK - r.teff(s.m0[blue.ordinal()] - s.m0[typed.red().ordinal()], s.feh, logg, Double.NaN);
        TeffBlend b = blend(s);
        b.drawTeffOffsetK = off;
        b.newStar();
        b.estimate(LuminosityClass.MAIN_SEQUENCE, logg, 0.0);
        return b;
    }

    /** V and J: Casagrande V−J is the FGK estimate, Mann V−J (plain form) the M-dwarf one. */
    private static TeffBlend atMannTeff(double teffK) {
        StarState s = emptyState();
        band(s, Band.V, 0, 0.02, 3.1);
        band(s, Band.J, 0.0, 0.02, 0.87);
        return atTeff("M15/V-J", TeffEstimatorTest.M15_VJ, teffK, s, 4.6);
    }

    @Test
    void starsExactlyAtTheK7M0EdgesTakeOneRegimeAlone() {
        // 4300 K: M-dwarf weight 0, the Casagrande estimate alone, no spread, no Mann relation reported
        TeffBlend b = atMannTeff(4300);
        assertEquals(Regime.FGK_DWARF, b.regime);
        assertEquals(bits("C10/V-J"), b.relationMask);
        assertEquals(0.0, b.wM, 0.0);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
        assertEquals(0.0, b.dwM[Band.V.ordinal()], 0.0, "the weight's slope is 0 at the edge");
        // 4100 K: M-dwarf weight 1, Mann alone
        b = atMannTeff(4100);
        assertEquals(Regime.M_DWARF, b.regime);
        assertEquals(4100.0, b.mean, 0.0);
        assertEquals(bits("M15/V-J"), b.relationMask);
        assertEquals(1.0, b.wM, 0.0);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
        assertEquals(0.0, b.dwM[Band.V.ordinal()], 0.0);
        // 4200 K: weights equal; the M-dwarf regime is named (ties go to it), both relations reported
        b = atMannTeff(4200);
        assertEquals(0.5, b.wM, 0.0);
        assertEquals(Regime.M_DWARF, b.regime);
        assertEquals(1, b.count);
        assertEquals(bits("C10/V-J", "M15/V-J"), b.relationMask);
    }

    private static TeffBlend atFlowerTeff(double teffK) {
        StarState s = emptyState();
        band(s, Band.B, 0, 0.01, 4.1);
        band(s, Band.V, 0.0, 0.01, 3.1);
        return atTeff("F96/B-V", F96_BV, teffK, s, 4.2);
    }

    @Test
    void starsExactlyAtTheLateAEdgesTakeOneRegimeAlone() {
        TeffBlend b = atFlowerTeff(7000); // hot weight 0: Casagrande B−V alone
        assertEquals(Regime.FGK_DWARF, b.regime);
        assertEquals(bits("C10/B-V"), b.relationMask);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
        b = atFlowerTeff(7500); // hot weight 1: Flower alone
        assertEquals(Regime.HOT, b.regime);
        assertEquals(7500.0, b.mean, 0.0);
        assertEquals(bits("F96/B-V"), b.relationMask);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
        b = atFlowerTeff(7250); // equal weights: the hot regime is named
        assertEquals(Regime.HOT, b.regime);
        assertEquals(bits("C10/B-V", "F96/B-V"), b.relationMask);
    }

    /**
     * An evolved star takes the giant relations (González Hernández &amp; Bonifacio 2009, Table 5: V−J 1.0–2.4, V−Ks
     * 1.1–3.4, J−Ks 0.1–0.9; no zero point given) and is never blended with the M-dwarf relations, though its V−J
     * 2.35 gives 4256 K by Mann et al. 2015; with only a colour outside every giant range (J−Ks 0.08) the dwarf
     * relation is used and the regime is the dwarfs'.
     */
    @Test
    void evolvedStarTakesTheGiantRelationsAndNoMDwarfWeight() {
        StarState s = vjk(2.35, 0.65);
        TeffBlend b = blend(s);
        b.newStar();
        b.estimateEvolved();
        List<Rel> giant = List.of(
                TeffEstimatorTest.GHB09_VJ,
                TeffEstimatorTest.theta("GHB09/", Band.V, Band.KS, new double[] {0.5293, 0.2489, -0.0119, -0.0042, 0.0135, 0.0010}, 23, 0),
                TeffEstimatorTest.theta("GHB09/", Band.J, Band.KS, new double[] {0.6517, 0.6312, 0.0168, -0.0381, 0.0256, 0.0013}, 94, 0));
        assertEquals(TeffEstimatorTest.weightedMean(giant, s, 2.5), b.mean, 1e-6);
        assertEquals(Regime.GIANT, b.regime);
        assertEquals(0.0, b.wM, 0.0);
        assertEquals(bits(giant), b.relationMask);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
        // no M-dwarf weight, so none of its slope either: the contributions are the giant mean's own (weights held)
        double[] w = TeffEstimatorTest.weights(giant, s, 2.5);
        double[][] g = TeffEstimatorTest.partials(giant, s, 2.5, 0);
        for (int q = 0; q <= ErrorSource.FEH; q++) {
            double expected = 0;
            for (int i = 0; i < giant.size(); i++) {
                expected += w[i] * g[i][q] / Arrays.stream(w).sum();
            }
            assertEquals(expected, b.c[q], 1e-5, "contribution of " + ErrorSource.name(q));
            assertEquals(0.0, b.dwM[q], 0.0);
        }
        // J−Ks 0.08 only, 0.02 below the giant range (4σ): the Casagrande et al. 2010 dwarf relation
        StarState blue = emptyState();
        band(blue, Band.J, 8.08, 0.003, 0.87);
        band(blue, Band.KS, 8.0, 0.003, 0.35);
        b = blend(blue);
        b.newStar();
        b.estimateEvolved();
        assertEquals(TeffEstimatorTest.C10_JK.t().teffK(blue.m0, 0, 2.5), b.mean, 1e-6);
        assertEquals(Regime.FGK_DWARF, b.regime);
        assertEquals(bits("C10/J-Ks"), b.relationMask);
        assertTrue(b.anyColour && !b.boundBroken);
    }

    @Test
    void noUsableColourGivesNoTeff() {
        StarState s = emptyState();
        band(s, Band.J, 9.0, 0.02, 0.87); // one band: no colour
        TeffBlend b = blended(s, 4.4);
        assertTrue(Double.isNaN(b.mean) && Double.isNaN(b.err) && Double.isNaN(b.chi2()));
        assertNull(b.regime);
        assertEquals(0, b.count);
        assertEquals(0L, b.relationMask);
        assertFalse(b.anyColour || b.extrapolated || b.boundBroken);
        assertEquals(0.0, b.wM, 0.0);
    }

    /**
     * Where only one regime's relations give a value inside a blend zone, that value is used alone (Regime): V−I_C 1.55
     * gives 4167 K by Mann et al. 2015 (plain form) and lies beyond the Casagrande et al. 2010 edge 1.47. The Mann
     * estimate takes the whole weight, which then does not move with it: its contributions are the Mann relation's own.
     */
    @Test
    void aLoneMDwarfEstimateInTheBlendZoneIsUsedAlone() {
        StarState s = emptyState();
        band(s, Band.V, 9.55, 0.01, 3.1);
        band(s, Band.IC, 8.0, 0.01, 1.8);
        s.sEbv = 0.01;
        TeffBlend b = blended(s, 4.6);
        Rel mannVi = TeffEstimatorTest.m15(Band.V, Band.IC, "", new double[] {2.455, -1.5701, 0.6891, -0.1500, 0.01254, 0, 0}, 53);
        double tm = mannVi.t().teffK(s.m0, 0, 4.6);
        assertTrue(tm > 4100 && tm < 4300, "inside the blend zone: " + tm);
        assertEquals(tm, b.mean, 1e-6);
        assertEquals(1.0, b.wM, 0.0);
        assertEquals(Regime.M_DWARF, b.regime);
        assertEquals(bits("M15/V-Ic"), b.relationMask);
        double[] g = TeffEstimatorTest.partials(List.of(mannVi), s, 4.6, 0)[0];
        for (int q = 0; q <= ErrorSource.FEH; q++) {
            assertEquals(g[q], b.c[q], 1e-5, "contribution of " + ErrorSource.name(q));
        }
        assertEquals(mannVi.sigmaK(), b.c[ErrorSource.SCATTER_M], 1e-9);
        assertEquals(0.0, b.c[ErrorSource.SCATTER], 0.0);
        assertEquals(0.0, b.c[ErrorSource.BLEND], 0.0);
    }

    /**
     * A colour far beyond a red edge while the others agree on a hotter star: the blended Teff breaks the bound by
     * more than twice its error (TEFF_COLOURS_DISAGREE). B−V 1.35 beyond the Casagrande et al. 2010 edge 1.29 (the
     * bound: about 4280 K, above the M-dwarf edge), V−I_C 0.71 (about 5700 K).
     */
    @Test
    void aTeffBeyondItsBoundByTwiceItsErrorBreaksTheBound() {
        StarState s = emptyState();
        band(s, Band.B, 7.35, 0.01, 4.1);
        band(s, Band.V, 6.0, 0.01, 3.1);
        band(s, Band.IC, 5.29, 0.01, 1.8);
        s.sEbv = 0.01;
        TeffBlend b = blended(s, 4.4);
        assertEquals(TeffEstimatorTest.weightedMean(List.of(TeffEstimatorTest.C10_VI), s, 4.4), b.mean, 1e-6);
        assertTrue(b.boundBroken);
        // B−V 1.29 + 1.9σ: inside the 2σ margin, no bound
        s.m0[Band.B.ordinal()] = 6.0 + 1.29 + 1.9 * Math.sqrt(2e-4 + 1e-4);
        b.newStar();
        b.estimate(LuminosityClass.MAIN_SEQUENCE, 4.4, 0.0);
        assertFalse(b.boundBroken);
        // the blue side: V−I_C 0.30, bluer than the edge 0.46 (a bound near 7000 K), B−V 0.90 (about 5000 K)
        s.m0[Band.B.ordinal()] = 6.9;
        s.m0[Band.IC.ordinal()] = 5.7;
        b.newStar();
        b.estimate(LuminosityClass.MAIN_SEQUENCE, 4.4, 0.0);
        assertEquals(TeffEstimatorTest.weightedMean(List.of(TeffEstimatorTest.C10_BV), s, 4.4), b.mean, 1e-6);
        assertTrue(b.boundBroken);
    }

    /**
     * A Monte Carlo draw: an evolved star's Gaia-band Teff at the log g prior moved by z·σ (DeriveSettings giant log g
     * prior), and the blend spread of the nominal star scaled by the draw's z (StarState). Casagrande et al. 2021 giant
     * BP−RP, typed in {@link TeffEstimatorTest}; the giant range 0.20–2.55 covers BP−RP 1.2.
     */
    @Test
    void drawsMoveTheGiantLogGAndScaleTheNominalSpread() {
        StarState s = emptyState();
        band(s, Band.BP, 10.2, 0.004, 3.2);
        band(s, Band.RP, 9.0, 0.005, 1.9);
        DeriveSettings d = DeriveSettings.defaults();
        TeffBlend b = blend(s);
        b.newStar();
        b.estimateEvolved();
        double nominal = b.mean;
        assertEquals(Regime.GIANT, b.regime);
        assertTrue(b.usesLogg);
        assertEquals(TeffEstimatorTest.C21_BPRP.t().teffK(s.m0, 0, d.giantLoggPrior()), nominal, 1e-6);
        assertEquals(TeffEstimatorTest.partials(List.of(TeffEstimatorTest.C21_BPRP), s, d.giantLoggPrior(),
                d.giantLoggPriorErr())[0][ErrorSource.LOGG], b.c[ErrorSource.LOGG], 1e-5);
        s.valuesOnly = true;
        s.drawZ = new double[ErrorSource.COUNT];
        s.drawZ[ErrorSource.LOGG] = 1.0;
        b.newStar();
        b.estimateEvolved();
        double logg = d.giantLoggPrior() + d.giantLoggPriorErr();
        assertEquals(TeffEstimatorTest.C21_BPRP.t().teffK(s.m0, 0, logg), b.mean, 1e-6);
        assertTrue(Double.isNaN(b.err) && Double.isNaN(b.chi2()));

        // the K7 dwarf: its nominal spread kept, then a draw with z_BLEND = 2 moves the blended Teff by 2 spreads
        StarState k7 = vjk(2.40, 0.65);
        TeffBlend kb = blend(k7);
        kb.newStar();
        kb.estimate(LuminosityClass.MAIN_SEQUENCE, 4.6, 0.0);
        k7.valuesOnly = true;
        k7.drawZ = new double[ErrorSource.COUNT];
        k7.drawZ[ErrorSource.BLEND] = 2.0;
        kb.newStar();
        kb.estimate(LuminosityClass.MAIN_SEQUENCE, 4.6, 0.0);
        double tf = TeffEstimatorTest.weightedMean(C10_VJK, k7, 4.6);
        double tm = TeffEstimatorTest.M15_VJ.t().teffK(k7.m0, 0, 4.6);
        double wm = mWeight(tm);
        assertEquals((1 - wm) * tf + wm * tm + 2 * Math.sqrt(wm * (1 - wm)) * (tm - tf), kb.mean, 1e-6);
        // bounds only flag the nominal estimate (TeffEstimator): a draw, with no error of its own, breaks none
        assertTrue(Double.isNaN(kb.err));
        assertFalse(kb.boundBroken);
    }
}
