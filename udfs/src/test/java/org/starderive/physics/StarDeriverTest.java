package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.QualityFlag.*;

import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.junit.jupiter.api.Test;

class StarDeriverTest {
    private final StarDeriver deriver = new StarDeriver(DeriveSettings.defaults());
    private final StarResult out = new StarResult();

    /**
     * The Sun seen from 10 pc: M_V = 4.81 (Willmer 2018, ApJS 236, 47); (B-V) = 0.653 and (V-Ic) = 0.701
     * (Ramirez et al. 2012, ApJ 752, 5); (V-Ks) = 1.544 and (J-Ks) = 0.362 (Casagrande et al. 2010, Table 7).
     */
    static StarInput solarTwinAt10pc() {
        double v = 4.81;
        double ks = v - 1.544;
        return new StarInput()
                .parallax(100.0, 0.01)
                .magnitude(Band.V, v, 0.01)
                .magnitude(Band.B, v + 0.653, 0.01)
                .magnitude(Band.IC, v - 0.701, 0.01)
                .magnitude(Band.KS, ks, 0.01)
                .magnitude(Band.J, ks + 0.362, 0.01)
                .ebv(0.0, 0.0)
                .feh(0.0, 0.05);
    }

    @Test
    void theSunAtTenParsecGivesTheNominalSun() {
        StarResult r = deriver.derive(solarTwinAt10pc(), out);
        // nominal Teff, L, R (IAU 2015 B3); M about 1 (Eker et al. 2018); log g 4.438, rho 1409.8 (derived constants)
        assertEquals(5772, r.teffK, 40);
        assertEquals(1.0, r.lumLsun, 0.03);
        assertEquals(1.0, r.radiusRsun, 0.03);
        assertEquals(1.0, r.massMsun, 0.03);
        assertEquals(4.438, r.loggCgs, 0.03);
        assertEquals(1409.8, r.densityKgM3, 0.1 * 1409.8);
        assertEquals(1.0, r.densitySun, 0.1);
        // 1 R_sun at 10 pc subtends 0.93009 mas (IAU 2015 B2/B3)
        assertEquals(0.93009, r.angDiamMas, 0.03);
        assertEquals(10.0, r.distPc, 1e-3);
        assertEquals(0.0, r.distModulusMag, 1e-3);
        assertEquals(4.81, r.absMag[Band.V.ordinal()], 1e-3);
        // M_bol,sun on the IAU scale: 4.74 (IAU 2015 B2)
        assertEquals(4.74, r.mbolMag, 0.03);
        assertEquals(Iau2015.L_SUN_W, r.lumW, 0.03 * Iau2015.L_SUN_W);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        assertEquals(StarResult.DistanceMethod.INVERSE_PARALLAX, r.distMethod);
        assertEquals("C10/B-V,C10/V-Ic,C10/V-J,C10/V-Ks,C10/J-Ks", r.teffFrom());
        // every input present, valid and in range, parallax at 10^4 sigma, E(B-V) and [Fe/H] measured, colours inside
        // every relation: no condition of the flag table (README) holds, so the whole mask is 0, undefined bits too
        // (QualityFlag.names would not show those, hence the bits in the message)
        assertEquals(0L, r.flags, "flags: " + QualityFlag.names(r.flags) + ", bits " + Long.toBinaryString(r.flags));
        // and the 0 is not a mask that is never written: the same star without its [Fe/H] carries exactly
        // METALLICITY_ASSUMED ("no per-star [Fe/H]: the default was used", README flag table)
        StarInput noFeh = solarTwinAt10pc();
        noFeh.hasFeh = noFeh.hasFehErr = false;
        long oneFlag = new StarDeriver(DeriveSettings.defaults()).derive(noFeh, new StarResult()).flags;
        assertEquals(METALLICITY_ASSUMED.mask(), oneFlag, "flags: " + QualityFlag.names(oneFlag));
        // the surface-brightness diameter (Kervella et al. 2004) agrees with the Stefan-Boltzmann one
        assertEquals(r.angDiamMas, r.angDiamSbrMas, 0.03 * r.angDiamMas);
        // every uncertainty is present and positive
        for (double e : new double[] {r.teffErrK, r.lumErrLsun, r.radiusErrRsun, r.massErrMsun, r.loggErrCgs,
                r.densityErrKgM3, r.angDiamErrMas, r.bcVErr, r.mbolErrMag, r.distModulusErrMag}) {
            assertTrue(e > 0, "uncertainty " + e);
        }
    }

    @Test
    void dereddeningRecoversTheUnreddenedStar() {
        StarResult clean = new StarDeriver(DeriveSettings.defaults()).derive(solarTwinAt10pc(), new StarResult());
        StarInput red = solarTwinAt10pc();
        double ebv = 0.3;
        double rv = 3.1;
        for (Band b : new Band[] {Band.V, Band.B, Band.IC, Band.KS, Band.J}) {
            red.mag[b.ordinal()] += rv * ebv * CardelliClaytonMathis1989.bandOverAv(b, rv);
        }
        red.ebv(ebv, 0.0); // same error as the clean star, so the relation weights are the same
        StarResult r = deriver.derive(red, out);
        assertEquals(clean.teffK, r.teffK, 0.01);
        assertEquals(clean.lumLsun, r.lumLsun, 1e-6);
        assertEquals(rv * ebv, r.avMag, 1e-12);
    }

    /** A red giant of 4700 K and 10 R_sun at 500 pc, its V-Ks made with the giant relation (round trip). */
    static StarInput giantAt500pc() {
        double teff = 4700;
        TeffRelation giantVKs = TeffRelations.byId("GHB09/V-Ks");
        double vks = new BrentSolver(1e-10).solve(100, x -> giantVKs.teff(x, 0, 2.5) - teff, 1.2, 3.3);
        double lum = 100 * Math.pow(teff / Iau2015.TEFF_SUN_K, 4);
        double mbol = BolometricCorrectionFlower1996.MBOL_SUN - 2.5 * Math.log10(lum);
        double v = mbol - BolometricCorrectionFlower1996.bcV(teff) + 5 * Math.log10(500 / 10.0);
        return new StarInput().parallax(2.0, 0.01).magnitude(Band.V, v, 0.01).magnitude(Band.KS, v - vks, 0.01)
                .ebv(0, 0).feh(0, 0.1);
    }

    @Test
    void aGiantIsClassedEvolvedAndGetsNoMass() {
        double teff = 4700;
        StarResult r = deriver.derive(giantAt500pc(), out);
        assertEquals(LuminosityClass.EVOLVED, r.lumClass);
        assertEquals(Regime.GIANT, r.regime, "a giant relation gave its Teff: the giant regime (Regime table)");
        assertEquals("GHB09/V-Ks", r.teffFrom());
        assertEquals(teff, r.teffK, 1);
        assertEquals(10.0, r.radiusRsun, 0.05);
        assertTrue(Double.isNaN(r.massMsun) && Double.isNaN(r.loggCgs) && Double.isNaN(r.densityKgM3));
        assertTrue(r.has(MASS_NOT_APPLICABLE));
    }

    @Test
    void lowSignificanceParallaxUsesThePosteriorAndIsFlagged() {
        StarInput in = solarTwinAt10pc();
        in.parallaxMas = 1.0;
        in.parallaxErrMas = 0.22; // ϖ/σ = 4.5: below the inverse-parallax threshold
        assertTrue(deriver.derive(in, new StarResult()).has(DISTANCE_WITHHELD), "by default no distance below 5");
        StarResult r = new StarDeriver(DeriveSettings.builder().distanceSnrMin(4).build()).derive(in, out);
        assertTrue(r.has(PARALLAX_LOW_SNR));
        assertFalse(r.has(DISTANCE_WITHHELD));
        assertEquals(StarResult.DistanceMethod.EDSD_MEDIAN, r.distMethod);
        assertTrue(r.distLoPc < r.distPc && r.distPc < r.distHiPc);
    }

    @Test
    void insignificantParallaxGetsNoDistanceByDefaultButTeffAndDiameterStill() {
        StarInput in = solarTwinAt10pc();
        in.parallaxMas = 1.0;
        in.parallaxErrMas = 0.5; // ϖ/σ = 2 < distance_snr_min 5
        StarResult r = deriver.derive(in, out);
        assertTrue(r.has(DISTANCE_WITHHELD) && r.has(PARALLAX_LOW_SNR));
        assertEquals(StarResult.DistanceMethod.NONE, r.distMethod);
        assertTrue(Double.isNaN(r.distPc) && Double.isNaN(r.lumLsun) && Double.isNaN(r.radiusRsun) && Double.isNaN(r.massMsun));
        assertEquals(5772, r.teffK, 100); // Teff and the bolometric-flux angular diameter need no distance
        assertTrue(r.angDiamMas > 0);
        // distance_snr_min 0 gives every star its posterior distance
        StarResult all = new StarDeriver(DeriveSettings.builder().distanceSnrMin(0).build()).derive(in, new StarResult());
        assertFalse(all.has(DISTANCE_WITHHELD));
        assertEquals(StarResult.DistanceMethod.EDSD_MEDIAN, all.distMethod);
        assertTrue(all.lumLsun > 0);
    }

    @Test
    void negativeParallaxStillGetsAPosteriorDistanceWhenAsked() {
        StarInput in = solarTwinAt10pc();
        in.parallaxMas = -0.5;
        in.parallaxErrMas = 0.5;
        assertTrue(deriver.derive(in, new StarResult()).has(DISTANCE_WITHHELD), "withheld by default");
        StarResult r = new StarDeriver(DeriveSettings.builder().distanceSnrMin(0).build()).derive(in, out);
        assertTrue(r.has(PARALLAX_NONPOSITIVE) && r.has(PARALLAX_LOW_SNR));
        assertTrue(r.distPc > 0);
        // with the inverse parallax forced (and no S/N threshold withholding it first) there is no distance for a
        // negative parallax
        StarResult inv = new StarDeriver(DeriveSettings.builder().distanceMethod(DeriveSettings.DistanceMethod.INVERSE)
                .distanceSnrMin(0).build()).derive(in, new StarResult());
        assertFalse(inv.has(DISTANCE_WITHHELD), "the inverse was tried, not withheld");
        assertTrue(Double.isNaN(inv.distPc));
        assertTrue(inv.has(PARALLAX_NONPOSITIVE));
    }

    @Test
    void zeroPointIsSubtractedFromTheParallax() {
        StarInput in = solarTwinAt10pc();
        StarResult r = new StarDeriver(DeriveSettings.builder().parallaxZeroPointMas(-0.02).build()).derive(in, out);
        assertEquals(100.02, r.parallaxCorrMas, 1e-9);
        assertEquals(1000 / 100.02, r.distPc, 1e-9);
    }

    @Test
    void missingParallaxStillGivesTeffAndAngularDiameter() {
        StarInput in = solarTwinAt10pc();
        in.hasParallax = false;
        StarResult r = deriver.derive(in, out);
        assertTrue(r.has(PARALLAX_MISSING) && r.has(LUM_CLASS_ASSUMED) && r.has(MASS_NOT_APPLICABLE));
        assertEquals(5772, r.teffK, 40);
        assertEquals(0.93009, r.angDiamMas, 0.03);
        assertTrue(Double.isNaN(r.lumLsun) && Double.isNaN(r.distPc));
        assertNull(r.lumClass);
        // class unknown: no surface-brightness cross-check, whose relation holds for dwarfs and subgiants only
        // (Kervella et al. 2004), although V and Ks are measured
        assertTrue(Double.isNaN(r.angDiamSbrMas), "θ_SB " + r.angDiamSbrMas);
    }

    @Test
    void sentinelsNaNsAndBadErrorsAreFlaggedAndIgnored() {
        StarInput in = solarTwinAt10pc();
        in.mag[Band.B.ordinal()] = 99.99;
        StarResult r = deriver.derive(in, out);
        assertTrue(r.has(MAGNITUDE_SENTINEL));
        assertFalse(r.teffFrom().contains("B-V"));

        in = solarTwinAt10pc();
        in.mag[Band.J.ordinal()] = Double.NaN;
        in.magErr[Band.IC.ordinal()] = -0.01;
        r = deriver.derive(in, out);
        assertTrue(r.has(INPUT_INVALID));
        assertEquals("C10/B-V,C10/V-Ks", r.teffFrom());

        in = solarTwinAt10pc();
        in.parallaxErrMas = 0;
        r = deriver.derive(in, out);
        assertTrue(r.has(INPUT_INVALID));
        assertTrue(Double.isNaN(r.distPc));

        in = solarTwinAt10pc();
        in.parallaxMas = 5000; // a parallax in microarcseconds read as mas
        r = deriver.derive(in, out);
        assertTrue(r.has(PARALLAX_IMPLAUSIBLE));
        assertTrue(Double.isNaN(r.distPc));
    }

    @Test
    void coloursOutsideEveryRangeGiveNoTeffUnlessExtrapolationIsAllowed() {
        StarInput in = new StarInput().parallax(10, 0.1).magnitude(Band.V, 15, 0.01).magnitude(Band.KS, 9, 0.01);
        StarResult r = deriver.derive(in, out);
        assertTrue(r.has(COLOUR_OUT_OF_RANGE));
        assertFalse(r.has(TEFF_EXTRAPOLATED));
        assertTrue(Double.isNaN(r.teffK) && Double.isNaN(r.lumLsun));

        StarDeriver lax = new StarDeriver(DeriveSettings.builder().allowExtrapolation(true).build());
        r = lax.derive(in, new StarResult());
        // with a Teff, COLOUR_OUT_OF_RANGE is not set (it means "no Teff"); the guess carries TEFF_EXTRAPOLATED
        assertTrue(r.has(TEFF_EXTRAPOLATED) && !r.has(COLOUR_OUT_OF_RANGE), QualityFlag.names(r.flags).toString());
        assertTrue(r.teffK > 2000 && r.teffK < 4000, "extrapolated Teff " + r.teffK);
    }

    @Test
    void disagreeingColoursAreFlagged() {
        StarInput in = solarTwinAt10pc();
        in.mag[Band.B.ordinal()] = in.mag[Band.V.ordinal()] + 1.0; // B-V says a K star, the rest say G2
        StarResult r = deriver.derive(in, out);
        assertTrue(r.has(TEFF_COLOURS_DISAGREE), "chi2 " + r.teffChi2);
        StarResult ok = deriver.derive(solarTwinAt10pc(), new StarResult());
        assertFalse(ok.has(TEFF_COLOURS_DISAGREE), "chi2 " + ok.teffChi2);
    }

    @Test
    void aColourBeyondTheRedEdgeBoundsTeffAndFlagsAnInRangeEstimateAboveIt() {
        // an M dwarf: V-Ks = 4.9 is redder than the C10 V-Ks range (<= 3.15); without V-J it would rest on the
        // FGK J-Ks relation alone (~4200 K); with V-J = 4.12 it is an M dwarf (Mann et al. 2015) and the C10 red
        // edges (cooler than ~4270 K) agree with it
        StarInput in = new StarInput().parallax(100, 0.05).magnitude(Band.V, 14.0, 0.01).magnitude(Band.KS, 9.1, 0.01)
                .magnitude(Band.J, 9.88, 0.01).ebv(0, 0).feh(0, 0.1);
        StarResult r = deriver.derive(in, out);
        assertFalse(r.has(COLOUR_OUT_OF_RANGE) || r.has(TEFF_COLOURS_DISAGREE), QualityFlag.names(r.flags).toString());
        assertEquals(Regime.M_DWARF, r.regime);
        assertEquals("M15/V-J+FeH", r.teffFrom());
        assertTrue(r.teffK < 3500, "Teff " + r.teffK);
        // ... but a B-V of 1.60 (C10 red edge 1.29, about 4300 K) with a J-Ks that says 6000 K is a contradiction
        StarInput hot = new StarInput().parallax(100, 0.05).magnitude(Band.B, 15.6, 0.01).magnitude(Band.V, 14.0, 0.01)
                .magnitude(Band.KS, 12.7, 0.01).magnitude(Band.J, 13.0, 0.01).ebv(0, 0).feh(0, 0.1);
        r = deriver.derive(hot, out);
        assertTrue(r.has(TEFF_COLOURS_DISAGREE), QualityFlag.names(r.flags).toString());
    }

    @Test
    void errorOfTheMeanCarriesASharedExtinctionErrorInFull() {
        // photometry nearly exact, [Fe/H] known, only E(B-V) uncertain (0.30 +- 0.03): every colour shifts together,
        // so the mean over five colours cannot average this error down. Reference: the spread of the deriver's own
        // mean Teff over E(B-V) drawn from N(0.30, 0.03) (reddened magnitudes fixed, as observed).
        double ebv0 = 0.3;
        double sEbv = 0.03;
        StarInput in = solarTwinAt10pc();
        for (Band b : new Band[] {Band.V, Band.B, Band.IC, Band.KS, Band.J}) {
            in.mag[b.ordinal()] += 3.1 * ebv0 * CardelliClaytonMathis1989.bandOverAv(b, 3.1);
        }
        for (int b = 0; b < Band.COUNT; b++) {
            in.magErr[b] = 1e-4;
        }
        in.feh(0, 0);
        in.ebv(ebv0, sEbv);
        StarResult r = deriver.derive(in, new StarResult());
        java.util.SplittableRandom rnd = new java.util.SplittableRandom(5);
        double sum = 0;
        double sum2 = 0;
        int n = 4000;
        StarResult tmp = new StarResult();
        for (int i = 0; i < n; i++) {
            double z = Math.sqrt(-2 * Math.log(1 - rnd.nextDouble())) * Math.cos(2 * Math.PI * rnd.nextDouble());
            in.ebv = ebv0 + sEbv * z;
            double t = deriver.derive(in, tmp).teffK;
            sum += t;
            sum2 += t * t;
        }
        double mcSd = Math.sqrt(sum2 / n - sq(sum / n));
        // the relations' own scatter enters as 1 / sum(1/sigma_i^2) (weights are 1/sigma^2 here), plus the 15 K zero point
        double invW = 0;
        for (String id : r.teffFrom().split(",")) {
            invW += 1 / sq(TeffRelations.byId(id).scatterK());
        }
        double expected = Math.sqrt(sq(mcSd) + 1 / invW + sq(15));
        assertTrue(mcSd > 50, "the extinction term dominates here: " + mcSd);
        assertEquals(expected, r.teffErrK, 0.1 * expected, "mc sd " + mcSd);
    }

    private static double sq(double x) { return x * x; }

    @Test
    void coolDwarfFromGaiaBandsGetsVFromGAndAnUnreliableBc() {
        // an M dwarf at 20 pc with only G, BP, RP: BP-RP = 2.0 (Casagrande et al. 2021 dwarf limit)
        StarInput in = new StarInput().parallax(50, 0.05).magnitude(Band.G, 10.0, 0.003)
                .magnitude(Band.BP, 11.0, 0.003).magnitude(Band.RP, 9.0, 0.003).ebv(0, 0);
        StarResult r = deriver.derive(in, out);
        assertTrue(r.has(V_FROM_G) && r.has(BC_UNRELIABLE) && r.has(METALLICITY_ASSUMED));
        assertTrue(r.teffK < 4000, "Teff " + r.teffK);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
    }

    @Test
    void absentExtinctionAndMetallicityAreAssumedAndFlagged() {
        StarInput in = solarTwinAt10pc();
        in.hasEbv = false;
        in.hasFeh = false;
        StarResult r = deriver.derive(in, out);
        assertTrue(r.has(EXTINCTION_ASSUMED) && r.has(METALLICITY_ASSUMED));
        in.ebv(-0.1, 0.01);
        r = deriver.derive(in, out);
        assertTrue(r.has(EXTINCTION_ASSUMED) && r.has(INPUT_INVALID));
    }

    @Test
    void noPhotometryAtAll() {
        StarResult r = deriver.derive(new StarInput().parallax(10, 0.1), out);
        assertTrue(r.has(PHOTOMETRY_MISSING));
        assertTrue(Double.isNaN(r.teffK));
        assertEquals(100, r.distPc, 1e-9);
    }

    @Test
    void badSettingsAreRejectedWithTheRule() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> DeriveSettings.builder().parallaxSnrMin(Double.NaN).build());
        assertTrue(e.getMessage().contains("parallax SNR threshold") && e.getMessage().contains("must be"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> DeriveSettings.builder().priorLengthKpc(0).build());
        assertThrows(IllegalArgumentException.class, () -> DeriveSettings.builder().rv(-3.1).build());
        assertThrows(IllegalArgumentException.class, () -> DeriveSettings.builder().parallaxZeroPointMas(Double.POSITIVE_INFINITY).build());
        assertThrows(IllegalArgumentException.class, () -> DeriveSettings.builder().relations(java.util.List.of()).build());
    }

    /** Casagrande et al. 2021 BP−RP, relations.md section 4 (typed here): Teff at colour x, log g g, [Fe/H] f. */
    private static double teffC21BpRp(double x, double g, double f) {
        return 7980.8845 - 4138.3457 * x + 1264.9366 * x * x - 130.4388 * x * x * x
                + g * (285.8393 - 324.2196 * x + 106.8511 * x * x - 4.9825 * x * x * x)
                + f * (4.5138 - 203.7774 * x + 126.6981 * x * x - 14.7442 * x * x * x) + 40.7376 * f * g * x;
    }

    @Test
    void aSubsetOfRelationsIsAllThatIsUsed() {
        // only C10 V−Ks enabled: θ = 5040 K / Teff = a0 + a1 X + a2 X² at [Fe/H] 0 (Casagrande et al. 2010, Table 4,
        // relations.md section 2), X = (V−Ks)⊙ = 1.544
        StarDeriver one = new StarDeriver(DeriveSettings.builder().relations(java.util.List.of("C10/V-Ks")).build());
        StarResult r = one.derive(solarTwinAt10pc(), new StarResult());
        assertEquals("C10/V-Ks", r.teffFrom());
        double x = 1.544;
        assertEquals(5040 / (0.5057 + 0.2600 * x - 0.0146 * x * x), r.teffK, 1e-6);
        // one estimate has no chi-square (no degree of freedom)
        assertTrue(Double.isNaN(r.teffChi2), "chi2 " + r.teffChi2);
    }

    /**
     * Only the Mann et al. 2015 relations enabled: Barnard's star ({@link RegimeTest#barnardsStar()}) without I_C, so
     * V−J is its one colour. Of the forms of one colour only the first usable is used (TeffEstimator), in the order of
     * TeffRelations — [Fe/H], J−H, plain: the order of Mann et al. 2015's Table 2 scatters, 42, 48 and 55 K — and the
     * [Fe/H] form only for a measured [Fe/H]. Table 2 (erratum): Teff / 3500 K = a + bX + cX² + dX³ + eX⁴ + f [Fe/H]
     * (typed in MannRelationsTest), or + f (J−H) + g (J−H)², or plain (typed here; relations.md section 11).
     */
    @Test
    void withOnlyTheMannRelationsEachColourIsUsedOnceInItsBestForm() {
        DeriveSettings m15 = DeriveSettings.builder().relations(TeffRelations.ids().stream()
                .filter(id -> id.startsWith("M15/")).collect(java.util.stream.Collectors.toList())).build();
        StarInput in = RegimeTest.barnardsStar();
        in.hasMag[Band.IC.ordinal()] = false;
        double x = 9.511 - 5.244;
        double jh = 5.244 - 4.834;
        StarResult r = new StarDeriver(m15).derive(in, new StarResult());
        assertEquals("M15/V-J+FeH", r.teffFrom(), "V−J once, in its [Fe/H] form");
        assertEquals(MannRelationsTest.teffVjFehK(x, -0.40), r.teffK, 1e-6);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        // no measured [Fe/H]: the J−H form
        in.hasFeh = in.hasFehErr = false;
        r = new StarDeriver(m15).derive(in, new StarResult());
        assertEquals("M15/V-J+JH", r.teffFrom());
        assertEquals(3500 * (2.769 - 1.421 * x + 0.4284 * x * x - 0.06133 * Math.pow(x, 3) + 0.003310 * Math.pow(x, 4)
                + 0.1333 * jh + 0.05416 * jh * jh), r.teffK, 1e-6);
        // nor H: the plain form
        in.hasMag[Band.H.ordinal()] = false;
        r = new StarDeriver(m15).derive(in, new StarResult());
        assertEquals("M15/V-J", r.teffFrom());
        assertEquals(3500 * (2.840 - 1.3453 * x + 0.3906 * x * x - 0.0546 * Math.pow(x, 3) + 0.002913 * Math.pow(x, 4)),
                r.teffK, 1e-6);
    }

    @Test
    void aGaiaDwarfsTeffIsTheGaiaRelationAtItsOwnLogg() {
        // a K dwarf seen in G, BP, RP only, at 20 pc: the C21 BP−RP relation needs log g, which the chain iterates
        // until it is the star's own log g = log10(G M / R²) (to 0.005 dex); [Fe/H] the default 0
        StarInput in = new StarInput().parallax(50, 0.01).magnitude(Band.G, 9.5, 0.003)
                .magnitude(Band.BP, 10.2, 0.003).magnitude(Band.RP, 8.6, 0.003).ebv(0, 0);
        StarResult r = deriver.derive(in, out);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        assertEquals("C21/BP-RP/dwarf", r.teffFrom());
        assertTrue(Math.abs(r.loggCgs - DerivedConstants.LOGG_SUN_CGS) > 0.1, "a log g unlike the Sun's: " + r.loggCgs);
        double x = 10.2 - 8.6;
        double slope = Math.abs(teffC21BpRp(x, 5, 0) - teffC21BpRp(x, 4, 0)); // K per dex, linear in log g
        assertEquals(teffC21BpRp(x, r.loggCgs, 0), r.teffK, 0.005 * slope + 1e-6, "log g " + r.loggCgs);
        // without a distance the Sun's log g is assumed (log g⊙ = 4.438, relations.md section 1)
        in.hasParallax = false;
        r = deriver.derive(in, out);
        assertEquals(teffC21BpRp(x, 4.438, 0), r.teffK, 0.0005 * slope + 1e-6);
    }

    @Test
    void aDeriveAfterADrawHasItsErrorsAgain() {
        // a Monte Carlo draw gives values only; the same deriver's next star must carry its errors as a fresh one does
        StarInput in = solarTwinAt10pc();
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        d.deriveDraw(in, new StarResult(), Double.NaN, new double[d.enabledRelations().length],
                new double[ErrorSource.COUNT], null, Double.NaN);
        StarResult after = d.derive(in, new StarResult());
        StarResult fresh = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertTrue(after.teffErrK > 0, "Teff error " + after.teffErrK);
        assertEquals(fresh.teffErrK, after.teffErrK, 0);
        assertEquals(fresh.lumErrLsun, after.lumErrLsun, 0);
        assertEquals(fresh.massErrMsun, after.massErrMsun, 0);
    }

    @Test
    void theDiameterCrossCheckFlagsBeyondItsThresholdOnlyForMeasuredV() {
        // the twin at 100 pc (θ about 0.09 mas) with Ks 0.1 mag too bright. Kervella et al. 2004 (relations.md section 9):
        // log θ = 0.0755 (V−K) + 0.5170 − 0.2 K, so σ_lnθ,SB = ln10 · hypot(0.0755 σ_V, 0.2755 σ_K) with the relation's
        // 1 % scatter in quadrature; flagged when |ln(θ_SB/θ)| > k · hypot(σ_θ/θ, σ_lnθ,SB), k = diameter_disagree_sigma
        StarInput in = sunAt100pc();
        in.hasMag[Band.J.ordinal()] = false; // J−Ks would take part in the Teff: only the diameter test is under test
        in.mag[Band.KS.ordinal()] -= 0.1;
        StarResult r = deriver.derive(in, out);
        double sb = Math.hypot(Math.log(10) * Math.hypot(0.0755 * 0.01, 0.2755 * 0.01), 0.01);
        double k = Math.abs(Math.log(r.angDiamSbrMas / r.angDiamMas)) / Math.hypot(r.angDiamErrMas / r.angDiamMas, sb);
        assertTrue(r.angDiamSbrMas < 1 && k > 0.5, "θ_SB " + r.angDiamSbrMas + ", k " + k);
        StarResult below = new StarDeriver(DeriveSettings.builder().diameterDisagreeSigma(0.999 * k).build()).derive(in, new StarResult());
        StarResult above = new StarDeriver(DeriveSettings.builder().diameterDisagreeSigma(1.001 * k).build()).derive(in, new StarResult());
        assertTrue(below.has(DIAMETER_DISAGREE), "threshold just below " + k);
        assertFalse(above.has(DIAMETER_DISAGREE), "threshold just above " + k);
        // no Ks: no surface-brightness diameter, and nothing flagged
        StarInput noKs = sunAt100pc();
        noKs.hasMag[Band.KS.ordinal()] = false;
        r = deriver.derive(noKs, out);
        assertEquals(0L, r.flags, QualityFlag.names(r.flags).toString());
        assertTrue(Double.isNaN(r.angDiamSbrMas));
        // V from G: the relation is in Johnson V, so no cross-check (StarDeriver: "where V was measured")
        StarInput gaia = ErrorSourceTest.stars().get(0);
        r = deriver.derive(gaia, out);
        assertTrue(r.has(V_FROM_G) && r.angDiamMas > 0, QualityFlag.names(r.flags).toString());
        assertTrue(Double.isNaN(r.angDiamSbrMas) && !r.has(DIAMETER_DISAGREE));
    }

    private static StarInput sunAt100pc() {
        StarInput in = solarTwinAt10pc();
        for (Band b : Band.values()) {
            in.mag[b.ordinal()] += 5;
        }
        in.parallax(10, 0.001);
        return in;
    }

    @Test
    void aSupergiantGetsTheGiantRelationsAndNoMainSequenceCheck() {
        // the twin's colours at 20 kpc (log L above the Eker et al. 2018 main sequence): evolved, so its Teff comes
        // from the giant relations (Regime table: GIANT) and no dwarf surface-brightness diameter is made (Kervella
        // et al. 2004: dwarfs and subgiants only)
        StarResult r = deriver.derive(ChainStepsTest.sunAt(0.05, 0.0005), out);
        assertEquals(LuminosityClass.EVOLVED, r.lumClass);
        assertEquals(Regime.GIANT, r.regime, r.teffFrom());
        assertTrue(r.teffFrom().startsWith("GHB09/"), r.teffFrom());
        assertTrue(Double.isNaN(r.angDiamSbrMas));
        // no Teff at all: no regime, no relations, no chi-square
        StarResult none = deriver.derive(new StarInput().parallax(10, 0.1).magnitude(Band.V, 15, 0.01)
                .magnitude(Band.KS, 9, 0.01), new StarResult());
        assertTrue(none.has(COLOUR_OUT_OF_RANGE));
        assertNull(none.regime);
        assertEquals(0L, none.teffRelations);
        assertTrue(Double.isNaN(none.teffChi2));
    }

    /** One Monte Carlo draw of {@code in} with deviates {@code z}, no relation offsets, class and log g as given. */
    static StarResult draw(StarDeriver d, StarInput in, double[] z, LuminosityClass cls, double logg) {
        return d.deriveDraw(in, new StarResult(), Double.NaN, new double[d.enabledRelations().length], z, cls, logg);
    }

    @Test
    void aDrawKeepsTheClassItIsGivenAndStartsFromItsLogg() {
        // StarDeriver.deriveDraw and docs/uncertainties.md: draws keep the star's class and start the log g
        // iteration at its log g; every other source is moved by z × σ
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        double[] z = new double[ErrorSource.COUNT];
        StarResult r = draw(d, solarTwinAt10pc(), z, LuminosityClass.EVOLVED, Double.NaN);
        assertEquals(LuminosityClass.EVOLVED, r.lumClass);
        assertEquals(Regime.GIANT, r.regime, r.teffFrom());
        r = draw(d, ChainStepsTest.sunAt(0.05, 0.0005), z, LuminosityClass.MAIN_SEQUENCE, Double.NaN);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass, "kept although brighter than the main sequence");
        assertEquals(Regime.FGK_DWARF, r.regime, r.teffFrom());
        // a Gaia-band K dwarf without parallax: its Teff is the C21 BP−RP relation at the given log g
        StarInput k = new StarInput().magnitude(Band.G, 9.5, 0.003).magnitude(Band.BP, 10.2, 0.003)
                .magnitude(Band.RP, 8.6, 0.003).ebv(0, 0);
        double x = 10.2 - 8.6;
        r = draw(d, k, z, LuminosityClass.MAIN_SEQUENCE, 4.0);
        assertEquals(teffC21BpRp(x, 4.0, 0), r.teffK, 1e-6);
        // a class without a log g (a dwarf outside the mass relations): the solar value, log g⊙ = 4.438 (relations.md
        // section 1), moved by nothing here (z = 0)
        r = draw(d, k, z, LuminosityClass.MAIN_SEQUENCE, Double.NaN);
        assertEquals(teffC21BpRp(x, 4.438, 0), r.teffK, 0.0005 * Math.abs(teffC21BpRp(x, 5, 0) - teffC21BpRp(x, 4, 0)));
        // no class given: log g⊙ moved by z σ_logg, the σ_logg of the first-order path (its Teff error with only the
        // log g source on is |∂Teff/∂log g| σ_logg); C21 is linear in log g
        d.errorSources(1L << ErrorSource.LOGG);
        double errK = d.derive(k, new StarResult()).teffErrK;
        d.errorSources(-1L);
        double slope = teffC21BpRp(x, 5, 0) - teffC21BpRp(x, 4, 0);
        assertTrue(errK > 1, "log g error term " + errK);
        z[ErrorSource.LOGG] = 1;
        r = draw(d, k, z, null, Double.NaN);
        assertEquals(teffC21BpRp(x, 4.438, 0) + Math.signum(slope) * errK, r.teffK, 0.0005 * Math.abs(slope));
    }

    @Test
    void aDrawGivesValuesOnlyAndNoDiameterCrossCheck() {
        // StarDeriver.deriveDraw: "Values only, no errors"; the surface-brightness cross-check flags the nominal star
        // only. The twin at 10 pc with Ks 0.4 mag too bright: its Kervella et al. 2004 diameter is 29 % larger
        // (ChainStepsTest), so the nominal star is flagged DIAMETER_DISAGREE
        StarInput in = ChainStepsTest.sunAt(100, 0.01);
        in.hasMag[Band.J.ordinal()] = false;
        in.mag[Band.KS.ordinal()] -= 0.4;
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        StarResult nominal = d.derive(in, new StarResult());
        assertTrue(nominal.has(DIAMETER_DISAGREE) && nominal.angDiamSbrMas > 0, QualityFlag.names(nominal.flags).toString());
        StarResult r = draw(d, in, new double[ErrorSource.COUNT], LuminosityClass.MAIN_SEQUENCE, nominal.loggCgs);
        assertTrue(r.teffK > 0 && r.lumLsun > 0 && r.radiusRsun > 0 && r.massMsun > 0 && r.angDiamMas > 0);
        for (double e : new double[] {r.teffErrK, r.lumErrLsun, r.radiusErrRsun, r.massErrMsun, r.loggErrCgs,
                r.angDiamErrMas, r.mbolErrMag}) {
            assertTrue(Double.isNaN(e), "a draw carries no error, got " + e);
        }
        assertTrue(Double.isNaN(r.angDiamSbrMas), "no cross-check in a draw: " + r.angDiamSbrMas);
        assertFalse(r.has(DIAMETER_DISAGREE));
    }

    @Test
    void aGiantCoolerThan4000KIsNotJudgedByTheDwarfsBcRule() {
        // README flag table, BC_UNRELIABLE: a BC outside its calibration, or the BC of a *dwarf* below 4000 K. A giant
        // with V−J 4.0 (beyond the GHB09 range; extrapolation switched on) is about 3760 K: its BC (Flower 1996,
        // calibrated 2900–52000 K) is used, in range, and it is no dwarf
        StarInput in = new StarInput().parallax(2.0, 0.01).magnitude(Band.V, 10, 0.01).magnitude(Band.J, 6.0, 0.01)
                .ebv(0, 0).feh(0, 0.1);
        StarResult r = new StarDeriver(DeriveSettings.builder().allowExtrapolation(true).build()).derive(in, out);
        assertEquals(LuminosityClass.EVOLVED, r.lumClass);
        assertTrue(r.teffK > 2900 && r.teffK < 4000 && !Double.isNaN(r.bcV), "Teff " + r.teffK + ", BC " + r.bcV);
        assertEquals(TEFF_EXTRAPOLATED.mask() | MASS_NOT_APPLICABLE.mask(), r.flags, QualityFlag.names(r.flags).toString());
    }

    /**
     * README flag table, BC_UNRELIABLE: L "on the BC of a dwarf below 4000 K (no M-dwarf radius: no Ks or no
     * distance)". A K7–M0 blend dwarf without V or G has no BC route at all: its L is the M-dwarf radius's alone, so it
     * is not flagged even below 4000 K (the core reports a BC_V for such a star all the same, as its M-dwarf weight is
     * below 1: the flag must not follow that). BP−RP 1.627 with [Fe/H]
     * −0.5 (Mann et al. 2015: about 4250 K, M-dwarf weight about 0.25; Casagrande et al. 2021: about 4000 K) and J−Ks
     * 1.2, extrapolated from Casagrande et al. 2010's edge 0.80 (about 3340 K), bring the blend below 4000 K;
     * M_Ks 5.6 at 20 pc. Mann et al. 2015 radius ([Fe/H] form) and Stefan–Boltzmann typed in MannRelationsTest and
     * LuminosityRadiusStepTest.
     */
    @Test
    void aBlendDwarfWithoutVIsNotFlaggedForABcItsLuminosityDoesNotUse() {
        StarInput in = new StarInput().parallax(50, 0.1).magnitude(Band.BP, 10.627, 0.01).magnitude(Band.RP, 9.0, 0.01)
                .magnitude(Band.J, 8.3, 0.02).magnitude(Band.KS, 7.1, 0.02).ebv(0, 0.01).feh(-0.5, 0.1);
        StarResult r = new StarDeriver(DeriveSettings.builder().allowExtrapolation(true).build()).derive(in, out);
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        assertTrue(r.teffK < BolometricCorrectionFlower1996.COOL_DWARF_LIMIT_K && r.teffFrom().contains("M15/")
                && r.teffFrom().contains("C10/J-Ks"), "a blend below 4000 K: " + r.teffK + " K, " + r.teffFrom());
        assertTrue(r.massMksWeight > 0 && r.massMksWeight < 1, "M-dwarf weight " + r.massMksWeight);
        assertEquals(1.0, r.radiusMksWeight, 0.0, "no V: the radius route alone");
        double radius = MannRelationsTest.radiusFeh(7.1 - LuminosityRadiusStepTest.mu(50), -0.5);
        double lum = radius * radius * Math.pow(r.teffK / LuminosityRadiusStepTest.TEFF_SUN_K, 4);
        assertEquals(lum, r.lumLsun, 1e-9 * lum);
        assertFalse(r.has(BC_UNRELIABLE), QualityFlag.names(r.flags).toString());
    }

    @Test
    void aGiantExtrapolatedBelowTheBcCalibrationIsFlagged() {
        // README flag table, BC_UNRELIABLE: L rests on a BC outside its calibration (Flower 1996: 2900–52000 K,
        // BolometricCorrectionFlower1996). An M giant with V−H 9.0 and [Fe/H] −1 (extrapolation on): González Hernández
        // & Bonifacio 2009 V−H, θ = b0 + b1 X + b2 X² + b3 X [Fe/H] + b4 [Fe/H] + b5 [Fe/H]² (Table 5, relations.md,
        // typed here), gives about 2840 K; its red edge 3.1 is at about 4150 K, above the 4100 K of the red-edge rule
        double x = 9.0;
        double feh = -1.0;
        double teff = 5040 / (0.5321 + 0.2649 * x - 0.0146 * x * x - 0.0069 * x * feh + 0.0211 * feh + 0.0009 * feh * feh);
        double edge = 5040 / (0.5321 + 0.2649 * 3.1 - 0.0146 * 3.1 * 3.1 - 0.0069 * 3.1 * feh + 0.0211 * feh + 0.0009 * feh * feh);
        assertTrue(teff < 2900 && edge > Regime.M_BLEND_LO_K, teff + " K, edge " + edge + " K");
        // V for about 3000 L_sun at 1 kpc (M_bol on the Flower/Torres scale, typed in LuminosityRadiusStepTest): luminous
        double v = LuminosityRadiusStepTest.mbolSunBcScale() - 2.5 * Math.log10(3000) - BolometricCorrectionTest.typedBcV(teff) + 10;
        StarInput in = new StarInput().parallax(1.0, 0.01).magnitude(Band.V, v, 0.01).magnitude(Band.H, v - x, 0.01)
                .ebv(0, 0).feh(feh, 0.1);
        StarResult r = new StarDeriver(DeriveSettings.builder().allowExtrapolation(true).build()).derive(in, out);
        assertEquals(LuminosityClass.EVOLVED, r.lumClass);
        assertEquals("GHB09/V-H", r.teffFrom());
        assertEquals(teff, r.teffK, 1e-6);
        assertEquals(BC_UNRELIABLE.mask() | TEFF_EXTRAPOLATED.mask() | MASS_NOT_APPLICABLE.mask(), r.flags,
                QualityFlag.names(r.flags).toString());
    }

    @Test
    void aOneColourTeffIsNeverFlaggedForDisagreeingColours() {
        // TEFF_COLOURS_DISAGREE is a chi-square test of the colours against each other (README flag table): one colour
        // has no degree of freedom (n − 1 = 0, TeffEstimator), so it can never disagree, at any colour of its range
        // and whatever its errors. Stars without a parallax (no class iteration), one pair of bands each, 801 colours
        // per pair: a one-colour χ² is 0 but for rounding, which leaves it above 0 for a few stars in a thousand
        Band[][] pairs = {{Band.V, Band.KS}, {Band.B, Band.V}, {Band.J, Band.KS}};
        double[][] ranges = {{0.80, 3.10}, {0.40, 1.25}, {0.10, 0.78}}; // inside C10's ranges (Table 4), B−V red of Flower's hot zone
        double[] errs = {0.01, 0.013, 0.029, 0.05};
        for (int p = 0; p < pairs.length; p++) {
            for (int i = 0; i <= 800; i++) {
                double colour = ranges[p][0] + (ranges[p][1] - ranges[p][0]) * i / 800;
                double err = errs[i % errs.length];
                StarInput in = new StarInput().magnitude(pairs[p][0], 10 + colour, err).magnitude(pairs[p][1], 10, err)
                        .ebv(0, 0.01).feh(0, 0.1);
                StarResult r = deriver.derive(in, out);
                String what = pairs[p][0] + "−" + pairs[p][1] + " " + colour + ": " + r.teffFrom();
                assertTrue(r.teffK > 0 && Long.bitCount(r.teffRelations) == 1, what);
                assertFalse(r.has(TEFF_COLOURS_DISAGREE), what + ", flags " + QualityFlag.names(r.flags));
                assertTrue(Double.isNaN(r.teffChi2), what + ", chi2 " + r.teffChi2);
            }
        }
    }

    @Test
    void flagBitsAreUniqueAndStable() {
        java.util.Set<Integer> bits = new java.util.HashSet<>();
        for (QualityFlag f : QualityFlag.values()) {
            assertTrue(bits.add(f.bit()), f.name());
        }
        // part of the output format (README): pin a few
        assertEquals(0, PARALLAX_LOW_SNR.bit());
        assertEquals(7, COLOUR_OUT_OF_RANGE.bit());
        assertEquals(13, MASS_NOT_APPLICABLE.bit());
        assertEquals(20, DUPLICATE_ID.bit());
        assertEquals(21, ID_MISSING.bit());
    }
}
