package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.function.ObjDoubleConsumer;
import java.util.function.ToDoubleFunction;
import org.junit.jupiter.api.Test;

/**
 * {@link LuminosityRadiusStep} through {@link StarDeriver#derive}, against the published relations typed a second time
 * here: the bolometric-correction route (BC_V of Flower 1996 as corrected by Torres 2010, on its own solar scale), the
 * M-dwarf route (R from M_Ks, Mann et al. 2015 Table 1 as corrected in the 2016 erratum; L by Stefan–Boltzmann), their
 * blend, M_bol on the IAU 2015 B2 scale and the angular diameter; first-order errors against the typed slopes and
 * against central differences of this typed copy. The star's Teff is the step's input: it is read from the result.
 */
class LuminosityRadiusStepTest {
    // IAU 2015 Resolution B3 nominal solar values, B2 zero point L0, IAU 2012 B2 au, IAU 2015 B2 parsec (typed here)
    static final double TEFF_SUN_K = 5772;
    static final double R_SUN_M = 6.957e8;
    static final double L_SUN_W = 3.828e26;
    static final double L0_W = 3.0128e28;
    static final double AU_M = 149_597_870_700.0;
    static final double PC_M = AU_M * 648_000 / Math.PI;
    static final double MAS_PER_RAD = 180 / Math.PI * 3600 * 1000;
    static final double LN10 = Math.log(10);

    /**
     * M_bol,⊙ on the Flower/Torres BC scale (Torres 2010's scale rule): M_V⊙ + BC_V(Teff⊙), with V⊙ = −26.76 (Torres
     * 2010) and M_V⊙ = V⊙ − 5 log10(1 au / 10 pc).
     */
    static double mbolSunBcScale() {
        return -26.76 - 5 * Math.log10(AU_M / (10 * PC_M)) + BolometricCorrectionTest.typedBcV(TEFF_SUN_K);
    }

    /** L/L⊙ of an absolute bolometric magnitude on the BC scale: 10^(−0.4 (M_bol − M_bol,⊙)). */
    static double lumLsun(double mbolAbs) {
        return Math.pow(10, -0.4 * (mbolAbs - mbolSunBcScale()));
    }

    /** Stefan–Boltzmann: R/R⊙ = (L/L⊙)^½ (Teff⊙/Teff)². */
    static double radiusRsun(double lumLsun, double teffK) {
        return Math.sqrt(lumLsun) * Math.pow(TEFF_SUN_K / teffK, 2);
    }

    /** M_bol on the BC scale of a star of radius R and Teff: L = R² (Teff/Teff⊙)⁴ (Stefan–Boltzmann). */
    static double mbolOfRadius(double radiusRsun, double teffK) {
        return mbolSunBcScale() - 2.5 * Math.log10(radiusRsun * radiusRsun * Math.pow(teffK / TEFF_SUN_K, 4));
    }

    /** θ = 2R/d in mas. */
    static double thetaMas(double radiusRsun, double distPc) {
        return 2 * radiusRsun * R_SUN_M / (distPc * PC_M) * MAS_PER_RAD;
    }

    /** θ from the bolometric flux alone: the Stefan–Boltzmann radius of the star moved to 10 pc, seen from 10 pc. */
    static double thetaFromFluxMas(double v0, double teffK) {
        return thetaMas(radiusRsun(lumLsun(v0 + BolometricCorrectionTest.typedBcV(teffK)), teffK), 10);
    }

    /** The distance modulus of an inverse-parallax distance: μ = 5 log10(d / 10 pc), d = 1000 / ϖ pc. */
    static double mu(double parallaxMas) {
        return 5 * Math.log10(1000 / parallaxMas / 10);
    }

    /** The solar twin of {@link StarDeriverTest#solarTwinAt10pc()} moved to 1000/ϖ pc: every magnitude fainter by μ. */
    static StarInput twinAt(double parallaxMas, double errMas) {
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        for (int b = 0; b < Band.COUNT; b++) {
            in.mag[b] += in.hasMag[b] ? mu(parallaxMas) : 0;
        }
        return in.parallax(parallaxMas, errMas);
    }

    /** Barnard's star ({@link RegimeTest#barnardsStar()}) with another parallax error. */
    static StarInput barnardWithParallaxErr(double errMas) {
        StarInput in = RegimeTest.barnardsStar();
        return in.parallax(in.parallaxMas, errMas);
    }

    /**
     * The K7 dwarf of {@link ErrorSourceTest#stars()} in the K7–M0 blend, without extinction (V₀ = V), with B−V 1.2
     * (inside the Casagrande et al. 2010 B−V range): B enters its Teff, not its M_Ks.
     */
    static StarInput k7InBlend() {
        StarInput in = ErrorSourceTest.stars().get(4).ebv(0, 0.01);
        return in.magnitude(Band.B, in.mag[Band.V.ordinal()] + 1.2, 0.01);
    }

    /**
     * A star in the K7–M0 blend without V or G: BP−RP 1.75 puts the Mann BP−RP temperature in the blend (Regime:
     * 4100–4300 K), M_Ks 5.6 lies inside Mann et al. 2015's range. J−Ks 0.85 lies beyond Casagrande et al. 2010's
     * J−Ks range (0.07–0.80), not on its edge, where a J error would switch that relation on and off.
     */
    static StarInput blendStarWithoutV() {
        return new StarInput().parallax(50, 0.1).magnitude(Band.BP, 10.75, 0.01).magnitude(Band.RP, 9, 0.01)
                .magnitude(Band.J, 7.95, 0.02).magnitude(Band.H, 7.3, 0.02).magnitude(Band.KS, 7.1, 0.02)
                .ebv(0, 0.01).feh(0, 0.1);
    }

    /** {@link #k7InBlend} with every magnitude brighter by {@code dm}: the same colours and Teff, M_Ks 4.895 − dm
     * (Ks 6.40 at 20 pc). */
    static StarInput k7Brighter(double dm) {
        StarInput in = k7InBlend();
        for (int b = 0; b < Band.COUNT; b++) {
            in.mag[b] -= in.hasMag[b] ? dm : 0;
        }
        return in;
    }

    /** The star derived with only error source {@code j} on. */
    static StarResult onlySource(StarInput in, int j) {
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        d.errorSources(1L << j);
        return d.derive(in, new StarResult());
    }

    /**
     * |d f / d x| × σ by a central difference over one input x (±σ/100, applied by {@code shift}), f evaluated on the
     * derived star: the typed chain at the Teff (and route weight) the core gives for the shifted input.
     */
    static double term(StarInput in, ObjDoubleConsumer<StarInput> shift, double sigma, ToDoubleFunction<StarResult> f) {
        double h = sigma / 100;
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        shift.accept(in, h);
        double up = f.applyAsDouble(d.derive(in, new StarResult()));
        shift.accept(in, -2 * h);
        double down = f.applyAsDouble(d.derive(in, new StarResult()));
        shift.accept(in, h);
        return Math.abs(up - down) / (2 * h) * sigma;
    }

    /** {@link #term} over band b's magnitude, σ its error. */
    static double bandTerm(StarInput in, Band band, ToDoubleFunction<StarResult> f) {
        int b = band.ordinal();
        return term(in, (s, dx) -> s.mag[b] += dx, in.magErr[b], f);
    }

    /** Mann et al. 2015 radius ([Fe/H] form) of a star without extinction, from its current Ks, parallax and [Fe/H]. */
    static double mannRadius(StarInput in) {
        return MannRelationsTest.radiusFeh(in.mag[Band.KS.ordinal()] - mu(in.parallaxMas), in.feh);
    }

    /**
     * M_bol (BC scale) of a star without extinction in the K7–M0 blend: w M_bol(radius route) + (1 − w) M_bol(BC route),
     * at Teff and radius-route weight w, from the star's current inputs. A route of weight 0 is left out (a star
     * without V has no BC route; one outside Mann et al. 2015's M_Ks range has no radius route).
     */
    static double blendMbol(StarInput in, double w, double teffK) {
        double mbolBc = in.mag[Band.V.ordinal()] + BolometricCorrectionTest.typedBcV(teffK) - mu(in.parallaxMas);
        return weighted(w, mbolOfRadius(mannRadius(in), teffK), mbolBc);
    }

    /** w a + (1 − w) b, where a part of weight 0 is left out (it may be NaN: that route does not exist). */
    static double weighted(double w, double a, double b) {
        return (w == 0 ? 0 : w * a) + (w == 1 ? 0 : (1 - w) * b);
    }

    /** {@link #blendMbol} at the derived star's Teff and weight. */
    static double blendMbol(StarInput in, StarResult x) {
        return blendMbol(in, x.radiusMksWeight, x.teffK);
    }

    /** ln θ of the same star: w ln(2R/d) + (1 − w) ln θ(bolometric flux), blended in log. */
    static double blendLnTheta(StarInput in, double w, double teffK) {
        return weighted(w, Math.log(thetaMas(mannRadius(in), 1000 / in.parallaxMas)),
                Math.log(thetaFromFluxMas(in.mag[Band.V.ordinal()], teffK)));
    }

    static double blendLnTheta(StarInput in, StarResult x) {
        return blendLnTheta(in, x.radiusMksWeight, x.teffK);
    }

    @Test
    void bcRouteGivesTheTypedLuminosityRadiusBolometricMagnitudeAndDiameter() {
        double plx = 50;
        StarInput in = twinAt(plx, 0.01);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double t = r.teffK;
        double v0 = in.mag[Band.V.ordinal()];
        assertEquals(0.0, r.radiusMksWeight, 0.0, "a G dwarf takes the BC route alone");
        assertEquals(1000 / plx, r.distPc, 1e-9);
        // BC_V (Flower 1996 / Torres 2010) and its error: |dBC/dTeff| σ_Teff, the slope by central difference
        assertEquals(BolometricCorrectionTest.typedBcV(t), r.bcV, 1e-9);
        double slope = (BolometricCorrectionTest.typedBcV(t + 0.5) - BolometricCorrectionTest.typedBcV(t - 0.5)) / 1.0;
        assertEquals(Math.abs(slope) * r.teffErrK, r.bcVErr, 1e-6 * r.bcVErr);
        // M_bol = V₀ + BC_V − μ on the BC scale; L = 10^(−0.4 (M_bol − M_bol,⊙)); R by Stefan–Boltzmann
        double mbol = v0 + BolometricCorrectionTest.typedBcV(t) - mu(plx);
        double lum = lumLsun(mbol);
        assertEquals(lum, r.lumLsun, 1e-9 * lum);
        assertEquals(lum * L_SUN_W, r.lumW, 1e-9 * lum * L_SUN_W);
        assertEquals(radiusRsun(lum, t), r.radiusRsun, 1e-9);
        // reported on the IAU 2015 B2 scale: −2.5 log10(L / L0)
        assertEquals(-2.5 * Math.log10(lum * L_SUN_W / L0_W), r.mbolMag, 1e-9);
        // θ from the bolometric flux, which equals 2R/d on this route
        assertEquals(thetaFromFluxMas(v0, t), r.angDiamMas, 1e-9 * r.angDiamMas);
        assertEquals(thetaMas(radiusRsun(lum, t), 1000 / plx), r.angDiamMas, 1e-9 * r.angDiamMas);
    }

    @Test
    void withoutADistanceOnlyTheFluxDiameterIsDerived() {
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.hasParallax = false;
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double v0 = in.mag[Band.V.ordinal()];
        assertEquals(thetaFromFluxMas(v0, r.teffK), r.angDiamMas, 1e-9 * r.angDiamMas);
        assertEquals(BolometricCorrectionTest.typedBcV(r.teffK), r.bcV, 1e-9);
        // README flag table, PARALLAX_MISSING: "no distance, no absolute quantities"
        assertNothingAbsolute(r, "no distance");
        // θ's error: ln θ = ½ ln L(10 pc) + 2 ln(Teff⊙/Teff) moves with V directly and through Teff (only V's error on)
        StarResult onlyV = onlySource(in, Band.V.ordinal());
        double expected = bandTerm(in, Band.V, x -> thetaFromFluxMas(in.mag[Band.V.ordinal()], x.teffK));
        assertEquals(expected, onlyV.angDiamErrMas, 0.01 * expected);
    }

    @Test
    void mDwarfRouteGivesTheMann2015RadiusAndTheStefanBoltzmannLuminosity() {
        StarInput in = RegimeTest.barnardsStar();
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double t = r.teffK;
        double d = 1000 / in.parallaxMas;
        double mKs = in.mag[Band.KS.ordinal()] - mu(in.parallaxMas);
        assertEquals(1.0, r.radiusMksWeight, 0.0, "Barnard's star takes the radius route alone");
        // Mann et al. 2015 Table 1 (erratum), the [Fe/H] form for the measured [Fe/H] of −0.40
        double radius = MannRelationsTest.radiusFeh(mKs, -0.40);
        assertEquals(radius, r.radiusRsun, 1e-9 * radius);
        double lum = radius * radius * Math.pow(t / TEFF_SUN_K, 4);
        assertEquals(lum, r.lumLsun, 1e-9 * lum);
        assertEquals(-2.5 * Math.log10(lum * L_SUN_W / L0_W), r.mbolMag, 1e-9);
        assertEquals(thetaMas(radius, d), r.angDiamMas, 1e-9 * r.angDiamMas);
        // the BC route is not used: no BC_V is reported (the step's contract: BC_V only where it entered L)
        assertTrue(Double.isNaN(r.bcV) && Double.isNaN(r.bcVErr), "bc_v " + r.bcV);
    }

    @Test
    void anMDwarfWithoutVInTheBlendZoneTakesTheRadiusRouteAlone() {
        // BP−RP 1.75 puts the Mann BP−RP temperature in the K7–M0 blend (Regime: 4100–4300 K); without V (nor G)
        // there is no BC route, so R and L are the radius route's alone whatever the Teff weight
        StarInput in = blendStarWithoutV();
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        assertTrue(r.teffFrom().contains("M15/") && r.teffFrom().contains("C21/"), "a blend: " + r.teffFrom());
        assertEquals(1.0, r.radiusMksWeight, 0.0);
        double radius = MannRelationsTest.radiusFeh(7.1 - mu(50), 0.0);
        assertEquals(radius, r.radiusRsun, 1e-9 * radius);
        assertEquals(radius * radius * Math.pow(r.teffK / TEFF_SUN_K, 4), r.lumLsun, 1e-9 * r.lumLsun);
        assertEquals(thetaMas(radius, 20), r.angDiamMas, 1e-9 * r.angDiamMas);
    }

    @Test
    void aKDwarfWithoutVGetsNeitherRouteAndAStarWithoutTeffNothing() {
        // a K dwarf (BP−RP 1.2) without V or G: no BC route; its M_Ks 5.0 lies inside Mann et al. 2015's range, but the
        // M-dwarf radius relation is for M dwarfs (K7–M7) only: no L, R or θ, and PHOTOMETRY_MISSING (README flag table)
        StarInput k = new StarInput().parallax(100, 0.1).magnitude(Band.BP, 7.7, 0.01).magnitude(Band.RP, 6.5, 0.01)
                .magnitude(Band.J, 5.6, 0.02).magnitude(Band.KS, 5.0, 0.02).ebv(0, 0.01).feh(0, 0.1);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(k, new StarResult());
        assertTrue(r.teffK > 4500 && r.teffK < 5300, "a K dwarf: " + r.teffK);
        assertTrue(r.has(QualityFlag.PHOTOMETRY_MISSING), String.valueOf(QualityFlag.names(r.flags)));
        assertNothingAbsolute(r, "K dwarf without V");
        assertTrue(Double.isNaN(r.angDiamMas) && Double.isNaN(r.angDiamErrMas), "θ " + r.angDiamMas);
        // a star whose colours lie outside every relation: no Teff, so nothing of this step either
        StarInput none = new StarInput().parallax(10, 0.1).magnitude(Band.V, 15, 0.01).magnitude(Band.KS, 9, 0.01);
        r = new StarDeriver(DeriveSettings.defaults()).derive(none, new StarResult());
        assertTrue(Double.isNaN(r.teffK) && r.has(QualityFlag.COLOUR_OUT_OF_RANGE));
        assertNothingAbsolute(r, "no Teff");
        for (double x : new double[] {r.angDiamMas, r.angDiamErrMas, r.bcV, r.bcVErr}) {
            assertTrue(Double.isNaN(x), "no Teff: expected no value, got " + x);
        }
    }

    private static void assertNothingAbsolute(StarResult r, String what) {
        for (double x : new double[] {r.mbolMag, r.mbolErrMag, r.lumLsun, r.lumErrLsun, r.lumW, r.radiusRsun,
                r.radiusErrRsun, r.radiusMksWeight, r.massMsun}) {
            assertTrue(Double.isNaN(x), what + ": expected no value, got " + x);
        }
    }

    @Test
    void inTheBlendMbolIsTheWeightedMeanOfBothRoutesAndLnThetaLikewise() {
        StarInput in = k7InBlend();
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double w = r.radiusMksWeight;
        assertTrue(w > 0.1 && w < 0.9, "inside the K7–M0 blend: w " + w);
        double lum = lumLsun(blendMbol(in, r));
        assertEquals(lum, r.lumLsun, 1e-9 * lum);
        assertEquals(radiusRsun(lum, r.teffK), r.radiusRsun, 1e-9 * r.radiusRsun);
        assertEquals(BolometricCorrectionTest.typedBcV(r.teffK), r.bcV, 1e-9, "the BC route carries weight 1 − w");
        assertEquals(Math.exp(blendLnTheta(in, r)), r.angDiamMas, 1e-9 * r.angDiamMas);
    }

    /**
     * In the blend every source moves Teff, the weight w and both routes: the first-order errors of M_bol, ln R and
     * ln θ, one source at a time, against central differences of the typed blend. θ is blended in log with the weight
     * w of the radius route, and w moves with every source of the Mann temperature (V, I_C, J, [Fe/H] here):
     * d ln θ = w d ln θ_R + (1 − w) d ln θ_BC + (ln θ_R − ln θ_BC) dw, as M_bol's error already does. (Before 40cc313
     * the step left out the dw term for θ: for V alone it gave σ_θ/θ = 0.0022 where the typed blend gives 0.0092.)
     */
    @Test
    void inTheBlendEachInputsErrorMatchesCentralDifferencesOfTheTypedBlend() {
        assertEachInputMatchesTypedBlend(k7InBlend(), "K7");
    }

    /**
     * A blend star may lie inside one route's range only: without V there is no BC route (w = 1 while the Teff weight
     * of the M-dwarf regime is inside (0, 1) and moves with BP, RP, J), and at M_Ks 4.49, brighter than Mann et al.
     * 2015's 4.6, there is no radius route (w = 0 while the Teff weight moves). The absent route must not enter through
     * the moving weight: L, R and θ are the present route's, and each source's error that route's central difference.
     */
    @Test
    void aBlendStarInsideOneRoutesRangeOnlyTakesThatRouteWithItsErrors() {
        StarInput noV = blendStarWithoutV();
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(noV, new StarResult());
        // the mass step's M-dwarf weight is the Teff weight (both mass relations apply: MassStepTest)
        assertTrue(r.massMksWeight > 0.1 && r.massMksWeight < 0.9, "a blend: " + r.massMksWeight);
        assertEquals(1.0, r.radiusMksWeight, 0.0);
        assertEachInputMatchesTypedBlend(noV, "no V");

        StarInput bright = k7Brighter(0.4);
        r = new StarDeriver(DeriveSettings.defaults()).derive(bright, new StarResult());
        assertEquals(6.40 - 0.4 - mu(50), r.absMag[Band.KS.ordinal()], 1e-9);
        assertTrue(r.massMksWeight > 0.1 && r.massMksWeight < 0.9, "a blend: " + r.massMksWeight);
        assertEquals(0.0, r.radiusMksWeight, 0.0, "Mann et al. 2015: valid for 4.6 < M_Ks < 9.8");
        double v0 = bright.mag[Band.V.ordinal()];
        double lum = lumLsun(v0 + BolometricCorrectionTest.typedBcV(r.teffK) - mu(bright.parallaxMas));
        assertEquals(lum, r.lumLsun, 1e-9 * lum);
        assertEquals(radiusRsun(lum, r.teffK), r.radiusRsun, 1e-9 * r.radiusRsun);
        assertEquals(thetaFromFluxMas(v0, r.teffK), r.angDiamMas, 1e-9 * r.angDiamMas);
        assertEachInputMatchesTypedBlend(bright, "M_Ks 4.49");
    }

    /**
     * The M-dwarf + hot mixture (TeffBlendRegimeRulesTest) on a whole star at 10 pc: V−J 2.40 (Mann et al. 2015 with
     * [Fe/H] 0: about 4180 K, M-dwarf ramp 0.60) and B−V 0.28 (Flower 1996: about 7320 K, hot ramp 0.64) leave the FGK
     * estimate no share, so the two ramps are normalised, a/(a + b) and b/(a + b) (Regime; common practice for the
     * weights of a mixture). M_Ks 5.0 lies inside Mann et al. 2015's radius range and V is measured: both L routes,
     * blended with the M-dwarf share a/(a + b), which moves with B through the Flower temperature.
     */
    @Test
    void inTheMDwarfAndHotMixtureEachInputsErrorMatchesCentralDifferencesOfTheTypedBlend() {
        StarInput in = new StarInput().parallax(100, 0.1).magnitude(Band.V, 8.0, 0.01).magnitude(Band.B, 8.28, 0.01)
                .magnitude(Band.J, 5.60, 0.02).magnitude(Band.KS, 5.0, 0.02).ebv(0, 0.01).feh(0, 0.1);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double a = TeffBlendTest.mWeight(MannRelationsTest.teffVjFehK(2.40, 0));
        double b = TeffBlendTest.hotWeight(TeffBlendTest.flowerK(0.28));
        assertTrue(a > 0 && b > 0 && a + b > 1, "the ramps overlap: " + a + " + " + b);
        assertEquals(a / (a + b), r.radiusMksWeight, 1e-9, r.teffFrom());
        assertEquals("M15/V-J+FeH,F96/B-V", r.teffFrom(), "no FGK relation takes part");
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass);
        assertEquals(lumLsun(blendMbol(in, r)), r.lumLsun, 1e-9 * r.lumLsun);
        assertEachInputMatchesTypedBlend(in, "M-dwarf + hot");
    }

    /**
     * Each band of {@code in}, its [Fe/H] and its distance alone: M_bol, ln R and ln θ against central differences of the
     * typed blend ({@link #blendMbol}, {@link #blendLnTheta}) at the Teff and weight the core gives for the shifted input.
     */
    static void assertEachInputMatchesTypedBlend(StarInput in, String star) {
        for (Band band : Band.values()) {
            int b = band.ordinal();
            if (in.hasMag[b]) {
                assertSourceMatchesTypedBlend(in, b, (s, dx) -> s.mag[b] += dx, in.magErr[b], star + ", band " + band);
            }
        }
        assertSourceMatchesTypedBlend(in, ErrorSource.FEH, (s, dx) -> s.feh += dx, in.fehErr, star + ", [Fe/H]");
        assertSourceMatchesTypedBlend(in, ErrorSource.MU, (s, dx) -> s.parallaxMas += dx, in.parallaxErrMas, star + ", distance");
    }

    private static void assertSourceMatchesTypedBlend(StarInput in, int j, ObjDoubleConsumer<StarInput> shift, double sigma,
                                                      String what) {
        StarResult r = onlySource(in, j);
        ToDoubleFunction<StarResult> mbol = x -> blendMbol(in, x);
        assertTermClose(in, shift, sigma, r, mbol, r.mbolErrMag, what + ": M_bol");
        assertTermClose(in, shift, sigma, r, x -> Math.log(radiusRsun(lumLsun(mbol.applyAsDouble(x)), x.teffK)),
                r.radiusErrRsun / r.radiusRsun, what + ": ln R");
        assertTermClose(in, shift, sigma, r, x -> blendLnTheta(in, x), r.angDiamErrMas / r.angDiamMas, what + ": ln θ");
    }

    /**
     * {@link #term} of f against {@code actual}, to 2 % of the sum of the term and its part through Teff, |∂f/∂Teff| σ_Teff
     * (the typed f by central difference over ±1 K at the star's weight; σ_Teff with only this source on), plus 1e-5:
     * Teff's own first-order error, this step's input, differs from central differences of the derived Teff by up to
     * 1.2 % in the blend (TeffBlend, upstream), which is not 2 % of the term where the direct and the Teff-driven parts
     * nearly cancel (V in M_bol of {@link #k7Brighter} 0.4: 0.010 − 0.008 mag). f reads Teff and the two weights of x.
     */
    static void assertTermClose(StarInput in, ObjDoubleConsumer<StarInput> shift, double sigma, StarResult r,
                                ToDoubleFunction<StarResult> f, double actual, String what) {
        double expected = term(in, shift, sigma, f);
        assertEquals(expected, actual, 0.02 * (expected + teffPart(r, f)) + 1e-5, what);
    }

    /** |∂f/∂Teff| σ_Teff of result r: the typed f by central difference over ±1 K at r's weights. */
    static double teffPart(StarResult r, ToDoubleFunction<StarResult> f) {
        StarResult at = new StarResult();
        at.radiusMksWeight = r.radiusMksWeight;
        at.massMksWeight = r.massMksWeight;
        at.teffK = r.teffK + 1;
        double up = f.applyAsDouble(at);
        at.teffK = r.teffK - 1;
        return Math.abs(up - f.applyAsDouble(at)) / 2 * r.teffErrK;
    }

    /**
     * The blend source alone in a blend star with one route only: Teff moves by the Teff regimes' spread (TeffBlend,
     * upstream: read as σ_Teff), and the routes have no disagreement to add, so M_bol, ln R and ln θ move through Teff
     * alone (on the radius route R and θ = 2R/d not at all).
     */
    @Test
    void withOneRouteOnlyTheBlendSourceMovesLRAndThetaThroughTeffAlone() {
        for (StarInput in : new StarInput[] {blendStarWithoutV(), k7Brighter(0.4)}) {
            StarResult r = onlySource(in, ErrorSource.BLEND);
            String what = "w " + r.radiusMksWeight;
            assertTrue(r.teffErrK > 1, what + ": the Teff regimes disagree, σ_Teff " + r.teffErrK);
            ToDoubleFunction<StarResult> mbol = x -> blendMbol(in, x);
            assertEquals(teffPart(r, mbol), r.mbolErrMag, 1e-6 * r.mbolErrMag + 1e-9, what + ": M_bol");
            double lnR = teffPart(r, x -> Math.log(radiusRsun(lumLsun(mbol.applyAsDouble(x)), x.teffK)));
            assertEquals(lnR, r.radiusErrRsun / r.radiusRsun, 1e-6 * lnR + 1e-9, what + ": ln R");
            double lnTheta = teffPart(r, x -> blendLnTheta(in, x));
            assertEquals(lnTheta, r.angDiamErrMas / r.angDiamMas, 1e-6 * lnTheta + 1e-9, what + ": ln θ");
        }
    }

    /**
     * The blend source alone: the K7 star's two Teff estimates disagree, which moves Teff by the spread of the
     * two-component mixture s_T = √(w(1 − w)) (T_M − T_FGK) (common practice), and the two routes' M_bol disagree,
     * which adds √(w(1 − w)) (M_bol,R − M_bol,BC) to M_bol. The Mann temperature follows from w by the blend of
     * Regime's Javadoc (the project's choice: w falls linearly from 1 at 4100 K to 0 at 4300 K), and the FGK one from
     * the blended Teff = w T_M + (1 − w) T_FGK.
     */
    @Test
    void inTheBlendTheRoutesDisagreementEntersAsTheBlendSource() {
        StarInput in = k7InBlend();
        StarResult r = onlySource(in, ErrorSource.BLEND);
        double[] s = blendSourceTerms(in, r);
        assertEquals(Math.abs(s[0]), r.teffErrK, 1e-6 * Math.abs(s[0]));
        assertEquals(Math.abs(s[1]), r.mbolErrMag, 1e-6 * Math.abs(s[1]));
        assertEquals(Math.abs(s[2]), r.radiusErrRsun / r.radiusRsun, 1e-6 * Math.abs(s[2]));
        // θ has no disagreement term of its own: only Teff moves it (the BC part)
        double h = 0.01;
        double t = r.teffK;
        double w = r.radiusMksWeight;
        double sLnTheta = (blendLnTheta(in, w, t + h) - blendLnTheta(in, w, t - h)) / (2 * h) * s[0];
        assertEquals(Math.abs(sLnTheta), r.angDiamErrMas / r.angDiamMas, 1e-6 * Math.abs(sLnTheta));
    }

    /**
     * The signed contributions of the blend source to Teff, M_bol and ln R of a blend star without extinction (r its
     * result): Teff moves by s_T (both routes' M_bol move with it, the typed slope by central difference) and M_bol
     * gains the routes' own spread; ln R = ½ ln L + 2 ln(Teff⊙/Teff) with ln L = −0.4 ln10 M_bol.
     */
    static double[] blendSourceTerms(StarInput in, StarResult r) {
        double w = r.radiusMksWeight;
        double t = r.teffK;
        double tM = 4300 - 200 * w;
        double tF = (t - w * tM) / (1 - w);
        double sT = Math.sqrt(w * (1 - w)) * (tM - tF);
        double h = 0.01;
        double dMbolDt = (blendMbol(in, w, t + h) - blendMbol(in, w, t - h)) / (2 * h);
        double mbolBc = in.mag[Band.V.ordinal()] + BolometricCorrectionTest.typedBcV(t) - mu(in.parallaxMas);
        double spread = Math.sqrt(w * (1 - w)) * (mbolOfRadius(mannRadius(in), t) - mbolBc);
        double sMbol = dMbolDt * sT + spread;
        return new double[] {sT, sMbol, -0.2 * LN10 * sMbol - 2 * sT / t};
    }

    /**
     * Central difference and first-order error agree to 2 %, plus 1e-5 (in mag or in ln, under 0.1 % of any of these
     * stars' total errors) for a contribution whose parts nearly cancel (V in the blend star's ln M): in the
     * blend the step's input, Teff's own first-order error, differs from central differences of the derived Teff by
     * up to 1.2 % (I_C, J of the K7 star; TeffBlend, upstream of this step).
     */
    static void assertClose(double expected, double actual, String what) {
        assertEquals(expected, actual, 0.02 * expected + 1e-5, what);
    }

    @Test
    void distanceErrorMovesMbolLAndRButNotTheFluxDiameterOnTheBcRoute() {
        StarResult r = onlySource(twinAt(50, 1), ErrorSource.MU);
        double sMu = r.distModulusErrMag;
        assertTrue(sMu > 0.01, "σ_μ " + sMu);
        // M_bol = V₀ + BC − μ: σ = σ_μ; L ∝ 10^(−0.4 M_bol); R ∝ L^½
        assertEquals(sMu, r.mbolErrMag, 1e-9);
        assertEquals(0.4 * LN10 * sMu, r.lumErrLsun / r.lumLsun, 1e-9);
        assertEquals(0.2 * LN10 * sMu, r.radiusErrRsun / r.radiusRsun, 1e-9);
        assertEquals(0.0, r.angDiamErrMas, 1e-12, "θ from the bolometric flux does not depend on the distance");
        assertEquals(0.0, r.bcVErr, 1e-12, "Teff of a G dwarf does not depend on the distance");
    }

    @Test
    void distanceErrorOnTheRadiusRouteFollowsTheMann2015Slope() {
        StarInput in = barnardWithParallaxErr(5);
        StarResult r = onlySource(in, ErrorSource.MU);
        double sMu = r.distModulusErrMag;
        double mKs = in.mag[Band.KS.ordinal()] - mu(in.parallaxMas);
        // d ln R / d μ = −d ln R / d M_Ks, by central difference of the typed Mann et al. 2015 relation
        double h = 1e-4;
        double dLnRdMu = -(Math.log(MannRelationsTest.radiusFeh(mKs + h, -0.4)) - Math.log(MannRelationsTest.radiusFeh(mKs - h, -0.4))) / (2 * h);
        assertEquals(Math.abs(dLnRdMu) * sMu, r.radiusErrRsun / r.radiusRsun, 1e-6 * r.radiusErrRsun / r.radiusRsun);
        // L = R² (Teff/Teff⊙)⁴ at a Teff that does not depend on the distance
        assertEquals(2 * Math.abs(dLnRdMu) * sMu, r.lumErrLsun / r.lumLsun, 1e-6 * r.lumErrLsun / r.lumLsun);
        assertEquals(5 / LN10 * Math.abs(dLnRdMu) * sMu, r.mbolErrMag, 1e-6 * r.mbolErrMag);
        // θ = 2R/d: ln θ moves by d ln R/dμ − d ln d/dμ, with d ln d / dμ = ln10 / 5 (μ = 5 log10(d / 10 pc))
        double expected = Math.abs(dLnRdMu - LN10 / 5) * sMu;
        assertEquals(expected, r.angDiamErrMas / r.angDiamMas, 1e-6 * expected);
    }

    @Test
    void radiusRelationScatterIsMann2015sInEitherForm() {
        // Mann et al. 2015 Table 1 (erratum): σ = 2.70 % for the [Fe/H] form, 2.89 % without [Fe/H]
        StarInput withFeh = RegimeTest.barnardsStar();
        StarInput noFeh = RegimeTest.barnardsStar();
        noFeh.hasFeh = noFeh.hasFehErr = false;
        double[] frac = {0.0270, 0.0289};
        StarInput[] stars = {withFeh, noFeh};
        for (int i = 0; i < 2; i++) {
            StarResult r = onlySource(stars[i], ErrorSource.RADIUS_REL);
            assertEquals(frac[i], r.radiusErrRsun / r.radiusRsun, 1e-9, "form " + i);
            assertEquals(frac[i], r.angDiamErrMas / r.angDiamMas, 1e-9, "form " + i);
            assertEquals(2 * frac[i], r.lumErrLsun / r.lumLsun, 1e-9, "form " + i);
            assertEquals(5 / LN10 * frac[i], r.mbolErrMag, 1e-9, "form " + i);
        }
    }

    @Test
    void bandErrorsMatchCentralDifferencesOfTheTypedChain() {
        // V on the BC route (V₀ and Teff both move); Ks on the radius route (M_Ks moves, Teff from V−J, V−I_C does not)
        // σ_ϖ 1 mas: a distance error (σ_μ 0.04 mag) larger than the band's own, which must stay out of it
        StarInput twin = twinAt(50, 1);
        double mu = mu(50);
        ToDoubleFunction<StarResult> mbol = x -> twin.mag[Band.V.ordinal()] + BolometricCorrectionTest.typedBcV(x.teffK) - mu;
        for (Band band : new Band[] {Band.B, Band.V}) {
            StarResult r = onlySource(twin, band.ordinal());
            String what = "twin, band " + band;
            assertClose(bandTerm(twin, band, mbol), r.mbolErrMag, what + " M_bol");
            assertClose(bandTerm(twin, band, x -> Math.log(radiusRsun(lumLsun(mbol.applyAsDouble(x)), x.teffK))),
                    r.radiusErrRsun / r.radiusRsun, what + " ln R");
            assertClose(bandTerm(twin, band, x -> Math.log(thetaFromFluxMas(twin.mag[Band.V.ordinal()], x.teffK))),
                    r.angDiamErrMas / r.angDiamMas, what + " ln θ");
        }

        StarInput barnard = RegimeTest.barnardsStar();
        StarResult m = onlySource(barnard, Band.KS.ordinal());
        double muB = mu(barnard.parallaxMas);
        ToDoubleFunction<StarResult> radius = x -> MannRelationsTest.radiusFeh(barnard.mag[Band.KS.ordinal()] - muB, -0.4);
        double sLnRm = bandTerm(barnard, Band.KS, x -> Math.log(radius.applyAsDouble(x)));
        assertEquals(sLnRm, m.radiusErrRsun / m.radiusRsun, 1e-4 * sLnRm);
        assertEquals(sLnRm, m.angDiamErrMas / m.angDiamMas, 1e-4 * sLnRm);
        double sMbolM = bandTerm(barnard, Band.KS, x -> mbolOfRadius(radius.applyAsDouble(x), x.teffK));
        assertEquals(sMbolM, m.mbolErrMag, 1e-4 * sMbolM);
    }

    /**
     * An M dwarf (V−J 4.0: Mann et al. 2015 Teff about 3370 K; V−Ks 4.85) at exactly 10 pc (ϖ = 100 mas: μ = 0)
     * without extinction, so that its M_Ks is {@code mKs} to the last bit.
     */
    static StarInput mDwarfAt10pc(double mKs) {
        return new StarInput().parallax(100, 0.01).magnitude(Band.V, mKs + 4.85, 0.01)
                .magnitude(Band.J, mKs + 0.85, 0.01).magnitude(Band.KS, mKs, 0.01).ebv(0, 0).feh(0, 0.1);
    }

    @Test
    void mannRadiusRouteHoldsStrictlyInsideMKs46To98() {
        // Mann et al. 2015: valid for 4.6 < M_Ks < 9.8
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        double[] mKs = {4.6, 4.61, 9.79, 9.8};
        boolean[] radiusRoute = {false, true, true, false};
        for (int i = 0; i < mKs.length; i++) {
            StarResult r = d.derive(mDwarfAt10pc(mKs[i]), new StarResult());
            assertEquals(mKs[i], r.absMag[Band.KS.ordinal()], 0.0);
            assertEquals(radiusRoute[i] ? 1.0 : 0.0, r.radiusMksWeight, 0.0, "M_Ks " + mKs[i]);
            // README flag table, BC_UNRELIABLE: L on the BC of a dwarf below 4000 K, where there is no M-dwarf radius
            assertEquals(!radiusRoute[i], r.has(QualityFlag.BC_UNRELIABLE), "M_Ks " + mKs[i]);
            double expected = radiusRoute[i] ? MannRelationsTest.radiusFeh(mKs[i], 0.0)
                    : radiusRsun(lumLsun(mKs[i] + 4.85 + BolometricCorrectionTest.typedBcV(r.teffK)), r.teffK);
            assertEquals(expected, r.radiusRsun, 1e-9 * expected, "M_Ks " + mKs[i]);
        }
    }
}
