package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.LuminosityRadiusStepTest.LN10;
import static org.starderive.physics.LuminosityRadiusStepTest.k7InBlend;
import static org.starderive.physics.LuminosityRadiusStepTest.mu;
import static org.starderive.physics.LuminosityRadiusStepTest.onlySource;

import java.util.function.ObjDoubleConsumer;
import java.util.function.ToDoubleFunction;
import org.junit.jupiter.api.Test;

/**
 * {@link MassStep} through {@link StarDeriver#derive}, against the published relations typed a second time: Eker et al.
 * 2018 Table 4 (main-sequence mass from L), Mann et al. 2019 Table 6 (M-dwarf mass from M_Ks), their blend in ln M,
 * ρ = M / (4/3 π R³) and log g = log10(G M / R²) with IAU 2015 B3 (GM⊙, R⊙) and CODATA 2018 (G); errors against the
 * typed slopes and central differences; the relations' range edges. The star's L and R are the step's inputs (checked
 * in {@link LuminosityRadiusStepTest}): they are read from the result.
 */
class MassStepTest {
    private static final double GM_SUN = 1.3271244e20; // IAU 2015 B3
    private static final double G = 6.67430e-11; // CODATA 2018
    private static final double R_SUN_M = LuminosityRadiusStepTest.R_SUN_M;

    /** log10 M of Eker et al. 2018 Table 4 on segment i, where log L lies on that segment alone. */
    private static double ekerLogMass(int segment, double lumLsun) {
        return MassLuminosityTest.segLogM(segment, Math.log10(lumLsun));
    }

    /** d log M / d log L of segment i (1/α), by central difference of the typed segment. */
    private static double ekerSlope(int segment) {
        return (MassLuminosityTest.segLogM(segment, 0.01) - MassLuminosityTest.segLogM(segment, -0.01)) / 0.02;
    }

    /** d ln M / d M_Ks of Mann et al. 2019 ([Fe/H] form), by central difference of the typed relation. */
    private static double mannSlope(double mKs, double feh) {
        double h = 1e-4;
        return LN10 * (MannRelationsTest.logMassFeh(mKs + h, feh) - MannRelationsTest.logMassFeh(mKs - h, feh)) / (2 * h);
    }

    /** ρ and log g of mass M and radius R by their definitions, in kg m⁻³ and cgs. */
    private static void assertDensityAndLogg(StarResult r, double massMsun, String what) {
        double rM = r.radiusRsun * R_SUN_M;
        double rho = massMsun * GM_SUN / G / (4.0 / 3.0 * Math.PI * rM * rM * rM);
        assertEquals(rho, r.densityKgM3, 1e-9 * rho, what);
        assertEquals(massMsun / Math.pow(r.radiusRsun, 3), r.densitySun, 1e-9 * r.densitySun, what);
        assertEquals(Math.log10(massMsun * GM_SUN / (rM * rM) * 100), r.loggCgs, 1e-9, what);
    }

    /** First-order relative errors of M, ρ and g from the per-source parts d ln M and d ln R (ρ ∝ M R⁻³, g ∝ M R⁻²). */
    private static void assertMassErrors(StarResult r, double dLnM, double dLnR, String what) {
        double tol = 1e-6 * (Math.abs(dLnM) + Math.abs(dLnR));
        assertEquals(Math.abs(dLnM), r.massErrMsun / r.massMsun, tol, what + ": mass");
        assertEquals(Math.abs(dLnM - 3 * dLnR), r.densityErrKgM3 / r.densityKgM3, tol, what + ": density");
        assertEquals(Math.abs(dLnM - 2 * dLnR) / LN10, r.loggErrCgs, tol, what + ": log g");
    }

    @Test
    void aSunLikeDwarfsMassIsEker2018sOnItsSegment() {
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(LuminosityRadiusStepTest.twinAt(50, 0.01), new StarResult());
        double logL = Math.log10(r.lumLsun);
        // log L of segment 0.72–1.05 M⊙ alone: above 1.05's segment start (log L 0.102) and 0.72's segment top (−0.754)
        assertTrue(logL > -0.75 && logL < 0.10, "log L " + logL);
        double mass = Math.pow(10, ekerLogMass(2, r.lumLsun));
        assertEquals(mass, r.massMsun, 1e-9 * mass);
        assertEquals(0.0, r.massMksWeight, 0.0);
        assertDensityAndLogg(r, mass, "twin");
    }

    @Test
    void aSunLikeDwarfsMassErrorsFollowTheDistanceAndEkersScatter() {
        StarInput in = LuminosityRadiusStepTest.twinAt(50, 1);
        // μ: L ∝ 10^(0.4 μ) at fixed V₀ and BC, so d log L/dμ = 0.4, d ln R/dμ = 0.2 ln10 (R ∝ L^½)
        StarResult r = onlySource(in, ErrorSource.MU);
        double sMu = r.distModulusErrMag;
        assertMassErrors(r, LN10 * ekerSlope(2) * 0.4 * sMu, 0.2 * LN10 * sMu, "distance");
        // the relation's own scatter: 0.05 dex in log L at fixed mass (MassLuminosityEker2018 Javadoc: the project's
        // choice, no published figure), i.e. ln10 × 0.05 / α in ln M; R does not move
        r = onlySource(in, ErrorSource.MASS_REL);
        assertMassErrors(r, LN10 * 0.05 * ekerSlope(2), 0, "Eker scatter");
    }

    @Test
    void barnardsStarsMassIsMann2019sWithItsErrors() {
        StarInput in = LuminosityRadiusStepTest.barnardWithParallaxErr(5);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double mKs = in.mag[Band.KS.ordinal()] - mu(in.parallaxMas);
        double mass = Math.pow(10, MannRelationsTest.logMassFeh(mKs, -0.40));
        assertEquals(mass, r.massMsun, 1e-9 * mass);
        assertEquals(1.0, r.massMksWeight, 0.0);
        assertDensityAndLogg(r, mass, "Barnard");
        // μ moves M_Ks = Ks − μ, and so both Mann relations: d ln X / dμ = −d ln X / d M_Ks
        r = onlySource(in, ErrorSource.MU);
        double sMu = r.distModulusErrMag;
        double h = 1e-4;
        double dLnRdMks = (Math.log(MannRelationsTest.radiusFeh(mKs + h, -0.4)) - Math.log(MannRelationsTest.radiusFeh(mKs - h, -0.4))) / (2 * h);
        assertMassErrors(r, -mannSlope(mKs, -0.4) * sMu, -dLnRdMks * sMu, "distance");
        // [Fe/H]: M ∝ (1 + f [Fe/H]) (Mann et al. 2019), R ∝ (1 + 0.04458 [Fe/H]) (Mann et al. 2015)
        r = onlySource(in, ErrorSource.FEH);
        assertMassErrors(r, -0.0035 / (1 - 0.0035 * -0.4) * 0.08, 0.04458 / (1 + 0.04458 * -0.4) * 0.08, "[Fe/H]");
        // the relations' own scatter: 2.1 % in M for the [Fe/H] form (Mann et al. 2019), 2.70 % in R (Mann et al. 2015)
        assertMassErrors(onlySource(in, ErrorSource.MASS_REL), 0.021, 0, "mass scatter");
        assertMassErrors(onlySource(in, ErrorSource.RADIUS_REL), 0, 0.0270, "radius scatter");
        // without a measured [Fe/H], the plain form and its 2.0 % scatter
        in.hasFeh = in.hasFehErr = false;
        r = onlySource(in, ErrorSource.MASS_REL);
        assertEquals(Math.pow(10, MannRelationsTest.logMass(mKs)), r.massMsun, 1e-9 * r.massMsun);
        assertMassErrors(r, 0.020, 0, "mass scatter without [Fe/H]");
    }

    /**
     * ln M of a K7 blend star typed: w ln M(Mann 2019, M_Ks) + (1 − w) ln M(Eker 2018 segment i, L of the typed L/R
     * blend); a relation of weight 0 is left out (outside its range).
     */
    private static double blendLnMass(StarInput in, StarResult x, int segment) {
        double mKs = in.mag[Band.KS.ordinal()] - mu(in.parallaxMas);
        double lum = LuminosityRadiusStepTest.lumLsun(LuminosityRadiusStepTest.blendMbol(in, x));
        return LN10 * LuminosityRadiusStepTest.weighted(x.massMksWeight, MannRelationsTest.logMassFeh(mKs, in.feh),
                ekerLogMass(segment, lum));
    }

    private static double blendLnRadius(StarInput in, StarResult x) {
        return Math.log(LuminosityRadiusStepTest.radiusRsun(
                LuminosityRadiusStepTest.lumLsun(LuminosityRadiusStepTest.blendMbol(in, x)), x.teffK));
    }

    @Test
    void inTheBlendLnMIsTheWeightedMeanOfBothRelationsAndItsErrorsFollowTheTypedBlend() {
        StarInput in = k7InBlend();
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        // the same M-dwarf weight as the radius (one Teff weight for the whole chain)
        assertEquals(r.radiusMksWeight, r.massMksWeight, 0.0);
        assertTrue(r.massMksWeight > 0.1 && r.massMksWeight < 0.9, "w " + r.massMksWeight);
        double logL = Math.log10(r.lumLsun);
        assertTrue(logL > -1.68 && logL < -0.83, "log L on Eker's 0.45–0.72 M⊙ segment alone: " + logL);
        assertMassMatchesTypedBlend(in, r, 1, "K7");
    }

    /**
     * The K7 blend star brighter in every band keeps its colours, Teff and Teff weight: at M_Ks 4.49 (Ks 0.4 mag
     * brighter) both mass relations apply while L comes from the BC route alone (Mann et al. 2015's radius holds for
     * M_Ks > 4.6 only); at M_Ks 3.89 (1.0 mag brighter) Mann et al. 2019 (4.0 < M_Ks < 11.0) gives no mass and Eker
     * et al. 2018 is used alone, although the Teff weight still moves with the inputs.
     */
    @Test
    void aBrighterBlendStarTakesTheMassRelationsWhoseRangesItIsIn() {
        StarInput both = LuminosityRadiusStepTest.k7Brighter(0.4);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(both, new StarResult());
        assertEquals(0.0, r.radiusMksWeight, 0.0);
        assertTrue(r.massMksWeight > 0.1 && r.massMksWeight < 0.9, "w " + r.massMksWeight);
        double logL = Math.log10(r.lumLsun);
        assertTrue(logL > -1.68 && logL < -0.83, "log L on Eker's 0.45–0.72 M⊙ segment alone: " + logL);
        assertMassMatchesTypedBlend(both, r, 1, "M_Ks 4.49");

        StarInput ekerOnly = LuminosityRadiusStepTest.k7Brighter(1.0);
        r = new StarDeriver(DeriveSettings.defaults()).derive(ekerOnly, new StarResult());
        assertEquals(6.40 - 1.0 - mu(50), r.absMag[Band.KS.ordinal()], 1e-9);
        assertEquals(0.0, r.massMksWeight, 0.0);
        logL = Math.log10(r.lumLsun);
        assertTrue(logL > -0.75 && logL < 0.10, "log L on Eker's 0.72–1.05 M⊙ segment alone: " + logL);
        assertMassMatchesTypedBlend(ekerOnly, r, 2, "M_Ks 3.89");
    }

    /**
     * M, ρ and g of the blend star {@code in} (r its result) against the typed blend on Eker segment {@code segment};
     * then one source at a time against central differences of the typed blend (ρ ∝ M R⁻³, g ∝ M R⁻²).
     */
    private static void assertMassMatchesTypedBlend(StarInput in, StarResult r, int segment, String star) {
        double mass = Math.exp(blendLnMass(in, r, segment));
        assertEquals(mass, r.massMsun, 1e-9 * mass, star);
        assertDensityAndLogg(r, mass, star);
        ToDoubleFunction<StarResult> lnM = x -> blendLnMass(in, x, segment);
        ToDoubleFunction<StarResult> lnRho = x -> blendLnMass(in, x, segment) - 3 * blendLnRadius(in, x);
        ToDoubleFunction<StarResult> lnG = x -> blendLnMass(in, x, segment) - 2 * blendLnRadius(in, x);
        for (Band band : new Band[] {Band.V, Band.IC, Band.J, Band.KS}) {
            int b = band.ordinal();
            assertMassTermsClose(in, b, (s, dx) -> s.mag[b] += dx, in.magErr[b], lnM, lnRho, lnG, star + ", band " + band);
        }
        assertMassTermsClose(in, ErrorSource.FEH, (s, dx) -> s.feh += dx, in.fehErr, lnM, lnRho, lnG, star + ", [Fe/H]");
        assertMassTermsClose(in, ErrorSource.MU, (s, dx) -> s.parallaxMas += dx, in.parallaxErrMas, lnM, lnRho, lnG,
                star + ", distance");
    }

    /** Source j alone: the relative errors of M, ρ and g against {@link LuminosityRadiusStepTest#assertTermClose}. */
    private static void assertMassTermsClose(StarInput in, int j, ObjDoubleConsumer<StarInput> shift, double sigma,
                                             ToDoubleFunction<StarResult> lnM, ToDoubleFunction<StarResult> lnRho,
                                             ToDoubleFunction<StarResult> lnG, String what) {
        StarResult one = onlySource(in, j);
        LuminosityRadiusStepTest.assertTermClose(in, shift, sigma, one, lnM, one.massErrMsun / one.massMsun, what + " ln M");
        LuminosityRadiusStepTest.assertTermClose(in, shift, sigma, one, lnRho, one.densityErrKgM3 / one.densityKgM3, what + " ln ρ");
        LuminosityRadiusStepTest.assertTermClose(in, shift, sigma, one, lnG, one.loggErrCgs * LN10, what + " ln g");
    }

    @Test
    void inTheBlendTheRelationsDisagreementEntersAsTheBlendSource() {
        StarInput in = k7InBlend();
        StarResult r = onlySource(in, ErrorSource.BLEND);
        double w = r.massMksWeight;
        double mKs = in.mag[Band.KS.ordinal()] - mu(in.parallaxMas);
        double[] s = LuminosityRadiusStepTest.blendSourceTerms(in, r);
        // Eker's mass moves with L (d log L = −0.4 d M_bol); the two masses' disagreement is the mixture's spread
        double logMEker = ekerLogMass(1, r.lumLsun);
        double spread = Math.sqrt(w * (1 - w)) * LN10 * (MannRelationsTest.logMassFeh(mKs, 0.0) - logMEker);
        double dLnM = (1 - w) * LN10 * ekerSlope(1) * -0.4 * s[1] + spread;
        assertMassErrors(r, dLnM, s[2], "blend");
    }

    @Test
    void mannMassHoldsStrictlyInsideMKs4To11() {
        // Mann et al. 2019: valid for 4.0 < M_Ks < 11.0; the same M dwarf at exactly 10 pc as the radius-edge test
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        for (double mKs : new double[] {4.01, 10.99}) {
            StarResult r = d.derive(LuminosityRadiusStepTest.mDwarfAt10pc(mKs), new StarResult());
            assertEquals(1.0, r.massMksWeight, 0.0, "M_Ks " + mKs);
            assertEquals(Math.pow(10, MannRelationsTest.logMassFeh(mKs, 0.0)), r.massMsun, 1e-9 * r.massMsun, "M_Ks " + mKs);
        }
        // at 4.0 only Eker et al. 2018 gives a mass (this star's L lies on its 0.72–1.05 M⊙ segment alone)
        StarResult r = d.derive(LuminosityRadiusStepTest.mDwarfAt10pc(4.0), new StarResult());
        assertEquals(LuminosityClass.MAIN_SEQUENCE, r.lumClass, "M_Ks 4.0 is not brighter than an M dwarf (Regime)");
        assertTrue(Math.log10(r.lumLsun) > -0.75 && Math.log10(r.lumLsun) < 0.10, "log L " + Math.log10(r.lumLsun));
        assertEquals(0.0, r.massMksWeight, 0.0);
        assertEquals(Math.pow(10, ekerLogMass(2, r.lumLsun)), r.massMsun, 1e-9 * r.massMsun);
        // at 11.0 neither: its L is below Eker's lowest mass, 0.179 M⊙ (log L = 2.028 log10 0.179 − 0.976)
        r = d.derive(LuminosityRadiusStepTest.mDwarfAt10pc(11.0), new StarResult());
        assertTrue(Math.log10(r.lumLsun) < 2.028 * Math.log10(0.179) - 0.976, "log L " + Math.log10(r.lumLsun));
        assertNoMass(r, "M_Ks 11.0");
    }

    @Test
    void belowEkersRangeAnMDwarfsMassCarriesMann2019sScatterAlone() {
        // M_Ks 10.5: inside Mann et al. 2019 (4.0–11.0), L below Eker et al. 2018's lowest mass (log L −2.49), and
        // outside Mann et al. 2015's radius range (R from the BC route). Only Mann's own scatter, 2.1 % in M for the
        // [Fe/H] form, moves M (and so ρ and g); R does not move with it
        StarResult r = onlySource(LuminosityRadiusStepTest.mDwarfAt10pc(10.5), ErrorSource.MASS_REL);
        assertTrue(Math.log10(r.lumLsun) < 2.028 * Math.log10(0.179) - 0.976, "log L " + Math.log10(r.lumLsun));
        assertEquals(1.0, r.massMksWeight, 0.0);
        assertMassErrors(r, 0.021, 0, "Mann scatter below Eker's range");
    }

    @Test
    void aBlendStarFainterThanEkersRangeTakesMann2019sMassAlone() {
        // the K7 blend star 5.6 mag fainter in every band (same colours and Teff weight): M_Ks 10.49 lies inside Mann
        // et al. 2019 (4.0–11.0), its L below Eker et al. 2018's lowest mass (log L −2.49), so Mann's mass is used alone
        StarInput in = LuminosityRadiusStepTest.k7Brighter(-5.6);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double mKs = 6.40 + 5.6 - mu(50);
        assertEquals(mKs, r.absMag[Band.KS.ordinal()], 1e-9);
        assertTrue(Math.log10(r.lumLsun) < 2.028 * Math.log10(0.179) - 0.976, "log L " + Math.log10(r.lumLsun));
        assertEquals(1.0, r.massMksWeight, 0.0);
        double mass = Math.pow(10, MannRelationsTest.logMassFeh(mKs, 0.0));
        assertEquals(mass, r.massMsun, 1e-9 * mass);
        assertDensityAndLogg(r, mass, "faint K7");
        assertMassErrors(onlySource(in, ErrorSource.MASS_REL), 0.021, 0, "faint K7, Mann scatter");
    }

    /**
     * One Monte Carlo draw with the relations' scatter at +1σ (StarDeriver.deriveDraw: every source moves by z σ):
     * in the K7 blend one z moves both mass relations, as the first-order path adds their scatters linearly
     * ((1 − w) ln10 · 0.05 / α + w · 0.021 in ln M: Eker et al. 2018 Table 4 segment 0.45–0.72 M⊙ with the project's
     * 0.05 dex, Mann et al. 2019), and the radius relation's 2.70 % (Mann et al. 2015) moves ln R by w · 0.027 (it
     * enters M_bol with weight w; L = R² (Teff/Teff⊙)⁴ at a fixed Teff).
     */
    @Test
    void aDrawMovesEachRelationsScatterByZSigma() {
        StarInput in = k7InBlend();
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        StarResult nominal = d.derive(in, new StarResult());
        double w = nominal.massMksWeight;
        double[] z = new double[ErrorSource.COUNT];
        z[ErrorSource.MASS_REL] = 1;
        StarResult r = StarDeriverTest.draw(d, in, z, LuminosityClass.MAIN_SEQUENCE, Double.NaN);
        assertEquals(nominal.teffK, r.teffK, 1e-9);
        double dLnM = (1 - w) * LN10 * 0.05 * ekerSlope(1) + w * 0.021;
        assertEquals(dLnM, Math.log(r.massMsun / nominal.massMsun), 1e-9);
        assertEquals(nominal.radiusRsun, r.radiusRsun, 1e-12);
        z[ErrorSource.MASS_REL] = 0;
        z[ErrorSource.RADIUS_REL] = 1;
        r = StarDeriverTest.draw(d, in, z, LuminosityClass.MAIN_SEQUENCE, Double.NaN);
        assertEquals(w * 0.0270, Math.log(r.radiusRsun / nominal.radiusRsun), 1e-9);
        assertEquals(2 * w * 0.0270, Math.log(r.lumLsun / nominal.lumLsun), 1e-9);
    }

    @Test
    void ekersMassStopsAtItsLowestMassAndAGStarThereGetsNoMannMass() {
        // the solar twin made fainter by δ at 10 pc keeps its Teff: log L = −0.4 δ (within the Eker range down to
        // 0.179 M⊙, log L −2.49: Eker et al. 2018 Table 4); its M_Ks 3.27 + δ lies inside Mann et al. 2019's range,
        // which a G dwarf must not use (Mann et al. 2019: M dwarfs only)
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        double logLMin = 2.028 * Math.log10(0.179) - 0.976;
        StarInput in = LuminosityRadiusStepTest.twinAt(100, 0.01);
        for (int b = 0; b < Band.COUNT; b++) {
            in.mag[b] += 6.0;
        }
        StarResult r = d.derive(in, new StarResult());
        assertTrue(Math.log10(r.lumLsun) > logLMin && Math.log10(r.lumLsun) < 2.028 * Math.log10(0.45) - 0.976);
        assertEquals(0.0, r.massMksWeight, 0.0);
        assertEquals(Math.pow(10, ekerLogMass(0, r.lumLsun)), r.massMsun, 1e-9 * r.massMsun);
        for (int b = 0; b < Band.COUNT; b++) {
            in.mag[b] += 0.5;
        }
        r = d.derive(in, new StarResult());
        assertTrue(Math.log10(r.lumLsun) < logLMin, "log L " + Math.log10(r.lumLsun));
        assertTrue(r.absMag[Band.KS.ordinal()] > 4.0 && r.absMag[Band.KS.ordinal()] < 11.0);
        assertNoMass(r, "a G dwarf below Eker's range");
    }

    private static void assertNoMass(StarResult r, String what) {
        assertTrue(r.has(QualityFlag.MASS_NOT_APPLICABLE), what);
        for (double x : new double[] {r.massMsun, r.massErrMsun, r.massMksWeight, r.densityKgM3, r.loggCgs}) {
            assertTrue(Double.isNaN(x), what + ": expected no value, got " + x);
        }
    }
}
