package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.QualityFlag.*;

import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.junit.jupiter.api.Test;

/**
 * The steps of the chain ({@link InputStep}, {@link DistanceStep}, {@link TeffBlend}, {@link LuminosityRadiusStep},
 * {@link MassStep}) through {@link StarDeriver}, each checked against a value computed here, independently of the
 * core: the published posterior maximised and integrated by Commons Math, error propagation by hand, the input
 * limits of the README flag table at their edges, and the reuse contract of one deriver for many stars.
 */
class ChainStepsTest {

    /**
     * ln of the distance posterior under the exponentially decreasing space density prior, Bailer-Jones 2015, PASP
     * 127, 994, eq. 17/18: r² e^(−r/L) × exp(−(ϖ − 1/r)² / (2σ²)), r in kpc, ϖ and σ in mas. Typed here from the
     * paper, not taken from the core.
     */
    private static double lnPost(double r, double plx, double sig, double l) {
        double d = plx - 1 / r;
        return 2 * Math.log(r) - r / l - d * d / (2 * sig * sig);
    }

    static StarInput sunAt(double parallaxMas, double errMas) {
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.parallaxMas = parallaxMas;
        in.parallaxErrMas = errMas;
        return in;
    }

    @Test
    void posteriorModeAndItsLaplaceWidthMatchTheMaximisedPublishedPosterior() {
        // σ = 0.5 puts the mode at 1.5/ϖ, where the likelihood's own curvature vanishes (the width there is the prior's
        // alone); σ = 0.25 checks the likelihood's term too
        for (double sig : new double[] {0.5, 0.25}) {
            checkModeAndLaplaceWidth(1.0, sig);
        }
    }

    private static void checkModeAndLaplaceWidth(double plx, double sig) {
        double l = DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT;
        StarResult r = new StarDeriver(DeriveSettings.builder().distanceSnrMin(0).posteriorPercentiles(false).build())
                .derive(sunAt(plx, sig), new StarResult());
        assertEquals(StarResult.DistanceMethod.EDSD_MODE, r.distMethod);
        // the maximum found by a general-purpose optimiser (Commons Math Brent) on the published density
        double mode = new BrentOptimizer(1e-14, 1e-14).optimize(new MaxEval(10_000), GoalType.MAXIMIZE,
                new UnivariateObjectiveFunction(x -> lnPost(x, plx, sig, l)), new SearchInterval(0.05, 20)).getPoint();
        assertEquals(1000 * mode, r.distPc, 1e-6 * 1000 * mode, "σ " + sig);
        // Laplace width: (−d² ln p / dr²)^(−1/2) at the mode, by a central finite difference here
        double h = 1e-4 * mode;
        double curv = (lnPost(mode + h, plx, sig, l) - 2 * lnPost(mode, plx, sig, l) + lnPost(mode - h, plx, sig, l)) / (h * h);
        double sr = 1 / Math.sqrt(-curv);
        assertEquals(1000 * (mode - sr), r.distLoPc, 1e-4 * 1000 * mode, "σ " + sig);
        assertEquals(1000 * (mode + sr), r.distHiPc, 1e-4 * 1000 * mode, "σ " + sig);
        // the distance modulus follows the mode: μ = 5 log10(d / 10 pc) (definition)
        assertEquals(5 * Math.log10(1000 * mode / 10), r.distModulusMag, 1e-9, "σ " + sig);
    }

    @Test
    void posteriorMedianAndPercentilesMatchTheIntegratedPublishedPosterior() {
        double plx = 1.0;
        double sig = 0.3; // ϖ/σ = 3.3: below the inverse-parallax threshold, so the posterior is used
        double l = DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT;
        StarResult r = new StarDeriver(DeriveSettings.builder().distanceSnrMin(0).build()).derive(sunAt(plx, sig), new StarResult());
        assertEquals(StarResult.DistanceMethod.EDSD_MEDIAN, r.distMethod);
        double[] expected = posteriorPercentilesPc(plx, sig, l);
        // the core integrates with the trapezoid rule on 128 steps: 0.3 % is its stated accuracy class
        assertEquals(expected[0], r.distLoPc, 3e-3 * expected[1]);
        assertEquals(expected[1], r.distPc, 3e-3 * expected[1]);
        assertEquals(expected[2], r.distHiPc, 3e-3 * expected[1]);
    }

    /** 16th, 50th, 84th percentiles in pc of the published posterior, integrated by Commons Math (Legendre–Gauss). */
    static double[] posteriorPercentilesPc(double plx, double sig, double l) {
        double peak = lnPost(1 / plx, plx, sig, l);
        UnivariateFunction dens = x -> Math.exp(lnPost(x, plx, sig, l) - peak);
        IterativeLegendreGaussIntegrator gauss = new IterativeLegendreGaussIntegrator(16, 1e-12, 1e-12);
        double top = 60 * l;
        double total = gauss.integrate(1_000_000, dens, 1e-6, top);
        double[] expected = new double[3];
        double[] p = {0.15865525393145707, 0.5, 0.8413447460685429}; // ±1σ of a Gaussian (common practice)
        for (int k = 0; k < 3; k++) {
            double pk = p[k];
            expected[k] = 1000 * new BrentSolver(1e-12).solve(1000,
                    x -> new IterativeLegendreGaussIntegrator(16, 1e-12, 1e-12).integrate(1_000_000, dens, 1e-6, x) / total - pk,
                    0.05, 20);
        }
        return expected;
    }

    @Test
    void parallaxRulesHoldExactlyAtTheirEdges() {
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        // README flag table: PARALLAX_LOW_SNR below parallax_snr_min (5); inverse parallax from 5 up
        StarResult r = d.derive(sunAt(10, 2), new StarResult());
        assertFalse(r.has(PARALLAX_LOW_SNR) || r.has(DISTANCE_WITHHELD), String.valueOf(QualityFlag.names(r.flags)));
        assertEquals(StarResult.DistanceMethod.INVERSE_PARALLAX, r.distMethod);
        assertEquals(100.0, r.distPc, 1e-9); // d = 1/ϖ (definition of the parsec)
        assertEquals(1000 / 12.0, r.distLoPc, 1e-9);
        assertEquals(1000 / 8.0, r.distHiPc, 1e-9);
        r = d.derive(sunAt(10, 2.0001), new StarResult());
        assertTrue(r.has(PARALLAX_LOW_SNR) && r.has(DISTANCE_WITHHELD), String.valueOf(QualityFlag.names(r.flags)));
        // the largest plausible parallax (parallax_max_mas, 800 by default) is accepted; beyond it, refused
        r = d.derive(sunAt(800, 0.1), new StarResult());
        assertEquals(1.25, r.distPc, 1e-12);
        assertFalse(r.has(PARALLAX_IMPLAUSIBLE));
        r = d.derive(sunAt(800.001, 0.1), new StarResult());
        assertTrue(r.has(PARALLAX_IMPLAUSIBLE) && Double.isNaN(r.distPc));
        assertTrue(Double.isNaN(r.parallaxCorrMas), "an implausible parallax is not reported as corrected");
        // a parallax error of 1 nano-arcsecond is still a measurement; below it, invalid
        r = d.derive(sunAt(10, 1e-6), new StarResult());
        assertFalse(r.has(INPUT_INVALID));
        assertEquals(100.0, r.distPc, 1e-9);
        r = d.derive(sunAt(10, 0.99e-6), new StarResult());
        assertTrue(r.has(INPUT_INVALID) && Double.isNaN(r.distPc));
        // a corrected parallax of exactly 0 is non-positive
        r = new StarDeriver(DeriveSettings.builder().distanceSnrMin(0).build()).derive(sunAt(0.0, 1.0), new StarResult());
        assertTrue(r.has(PARALLAX_NONPOSITIVE) && r.has(PARALLAX_LOW_SNR));
        assertTrue(r.distPc > 0, "the posterior gives a distance for ϖ = 0");
    }

    @Test
    void absoluteMagnitudeErrorsAddMeasurementDistanceAndExtinctionInQuadrature() {
        // the Sun at 10 pc with ϖ = 100 ± 1 mas and E(B−V) = 0.1 ± 0.05
        StarInput in = sunAt(100, 1);
        in.ebv(0.1, 0.05);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        // σ_μ from the interval 1/(ϖ ± σ): 5/ln10 × ½ (d_hi − d_lo) / d (first-order propagation, common practice)
        double dLo = 1000 / 101.0;
        double dHi = 1000 / 99.0;
        double sMu = 5 / Math.log(10) * 0.5 * (dHi - dLo) / 10.0;
        assertEquals(sMu, r.distModulusErrMag, 1e-12);
        double rKs = ksOverEbvCcm89();
        int k = Band.KS.ordinal();
        double expected = Math.sqrt(0.01 * 0.01 + sMu * sMu + Math.pow(rKs * 0.05, 2));
        assertEquals(expected, r.absMagErr[k], 1e-6);
        // M = m − μ − A (definition): Ks of the twin is 4.81 − 1.544
        assertEquals(4.81 - 1.544 - 5 * Math.log10(10.0 / 10.0) - rKs * 0.1, r.absMag[k], 1e-6);
    }

    /**
     * R_Ks = A_Ks / E(B−V) = R_V · A_Ks/A_V at R_V = 3.1: A_Ks/A_V of the Cardelli–Clayton–Mathis 1989 law (eq. 2a/2b
     * infrared, 3a/3b optical; typed from the paper), at 2MASS Ks 2.159 µm (Cohen et al. 2003) relative to V at
     * 0.545 µm (Bessell et al. 1998, from memory).
     */
    static double ksOverEbvCcm89() {
        double x = 1 / 2.159;
        double aKs = 0.574 * Math.pow(x, 1.61) - 0.527 * Math.pow(x, 1.61) / 3.1;
        double y = 1 / 0.545 - 1.82;
        double aV = 1 + 0.17699 * y - 0.50447 * y * y - 0.02427 * Math.pow(y, 3) + 0.72085 * Math.pow(y, 4)
                + 0.01979 * Math.pow(y, 5) - 0.77530 * Math.pow(y, 6) + 0.32999 * Math.pow(y, 7);
        double bV = 1.41338 * y + 2.28305 * y * y + 1.07233 * Math.pow(y, 3) - 5.38434 * Math.pow(y, 4)
                - 0.62251 * Math.pow(y, 5) + 5.30260 * Math.pow(y, 6) - 2.09002 * Math.pow(y, 7);
        return 3.1 * aKs / (aV + bV / 3.1);
    }

    /** One bad input per star: exactly the flags the README's flag table names for it, against a clean twin. */
    @Test
    void inputLimitsHoldAtTheirEdgesOneBadInputAtATime() {
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        assertEquals(0L, d.derive(sunAt(100, 0.01), new StarResult()).flags);
        // a magnitude error up to 10 mag is a (poor) measurement; above it, invalid and the band ignored
        StarInput in = sunAt(100, 0.01);
        in.magnitude(Band.J, in.mag[Band.J.ordinal()], 10.0);
        StarResult r = d.derive(in, new StarResult());
        assertFalse(r.has(INPUT_INVALID), String.valueOf(QualityFlag.names(r.flags)));
        assertTrue(r.teffFrom().contains("V-J"));
        in.magnitude(Band.J, in.mag[Band.J.ordinal()], 10.01);
        r = d.derive(in, new StarResult());
        assertEquals(INPUT_INVALID.mask(), r.flags, String.valueOf(QualityFlag.names(r.flags)));
        assertFalse(r.teffFrom().contains("V-J"), r.teffFrom());
        // E(B−V) from 0 to 20 mag is used; above it, invalid and the default assumed
        in = sunAt(100, 0.01);
        in.ebv(20.0, 0.01);
        r = d.derive(in, new StarResult());
        assertFalse(r.has(EXTINCTION_ASSUMED) || r.has(INPUT_INVALID), String.valueOf(QualityFlag.names(r.flags)));
        assertEquals(20.0, r.ebvUsed, 0);
        assertEquals(62.0, r.avMag, 1e-12); // A_V = R_V E(B−V) (definition of R_V), R_V = 3.1
        in.ebv(20.01, 0.01);
        r = d.derive(in, new StarResult());
        assertEquals(INPUT_INVALID.mask() | EXTINCTION_ASSUMED.mask(), r.flags, String.valueOf(QualityFlag.names(r.flags)));
        assertEquals(0.0, r.ebvUsed, 0);
        // an E(B−V) error up to 20 mag is used; above it, invalid and the default error used, E(B−V) itself kept
        in.ebv(0.0, 20.0);
        r = d.derive(in, new StarResult());
        assertFalse(r.has(INPUT_INVALID) || r.has(EXTINCTION_ASSUMED), String.valueOf(QualityFlag.names(r.flags)));
        in.ebv(0.0, 20.01);
        assertEquals(INPUT_INVALID.mask(), d.derive(in, new StarResult()).flags);
        // [Fe/H] from −5 to +1 dex is used; outside, invalid and the default assumed
        in = sunAt(100, 0.01);
        in.feh(1.0, 0.05);
        assertEquals(0L, d.derive(in, new StarResult()).flags & (INPUT_INVALID.mask() | METALLICITY_ASSUMED.mask()));
        in.feh(1.01, 0.05);
        assertEquals(INPUT_INVALID.mask() | METALLICITY_ASSUMED.mask(), d.derive(in, new StarResult()).flags & (INPUT_INVALID.mask() | METALLICITY_ASSUMED.mask()));
        in.feh(-5.0, 0.05);
        assertFalse(d.derive(in, new StarResult()).has(METALLICITY_ASSUMED));
        in.feh(-5.01, 0.05);
        assertTrue(d.derive(in, new StarResult()).has(METALLICITY_ASSUMED));
        // an [Fe/H] error up to 5 dex is used; above it, invalid (the [Fe/H] itself kept)
        in.feh(0.0, 5.0);
        assertEquals(0L, d.derive(in, new StarResult()).flags & (INPUT_INVALID.mask() | METALLICITY_ASSUMED.mask()));
        in.feh(0.0, 5.01);
        assertEquals(INPUT_INVALID.mask(), d.derive(in, new StarResult()).flags & (INPUT_INVALID.mask() | METALLICITY_ASSUMED.mask()));
        // magnitudes inside the plausible range (−5 … 35 by default) are used; outside, a sentinel
        in = sunAt(100, 0.01);
        in.magnitude(Band.H, 35.0, 0.1);
        r = d.derive(in, new StarResult());
        assertFalse(r.has(MAGNITUDE_SENTINEL) || r.has(INPUT_INVALID), String.valueOf(QualityFlag.names(r.flags)));
        assertTrue(r.has(TEFF_COLOURS_DISAGREE), "an H of 35 mag is used (and contradicts the other colours)");
        in.magnitude(Band.H, 35.01, 0.1);
        assertEquals(MAGNITUDE_SENTINEL.mask(), d.derive(in, new StarResult()).flags);
        in.magnitude(Band.H, -5.0, 0.1);
        assertFalse(d.derive(in, new StarResult()).has(MAGNITUDE_SENTINEL));
        in.magnitude(Band.H, -5.01, 0.1);
        assertEquals(MAGNITUDE_SENTINEL.mask(), d.derive(in, new StarResult()).flags);
    }

    /**
     * One deriver serves many stars (one per Spark task thread): a star's result must not depend on the star before
     * it. Stars of different kinds in turn — V from G (cool dwarf, Gaia bands only), V measured (solar twin), an
     * evolved star, a star without parallax — each equal, field by field, to a fresh deriver's result.
     */
    @Test
    void aStarsResultDoesNotDependOnTheStarBeforeIt() {
        StarInput gaiaDwarf = new StarInput().parallax(50, 0.05).magnitude(Band.G, 10.0, 0.003)
                .magnitude(Band.BP, 11.0, 0.003).magnitude(Band.RP, 9.0, 0.003).magnitude(Band.KS, 6.2, 0.02).ebv(0, 0);
        StarInput twin = sunAt(100, 0.5);
        twin.ebv(0.05, 0.02);
        StarInput noPlx = StarDeriverTest.solarTwinAt10pc();
        noPlx.hasParallax = noPlx.hasParallaxErr = false;
        StarInput giant = new StarInput().parallax(2.0, 0.01).magnitude(Band.V, 9.5, 0.01).magnitude(Band.KS, 7.0, 0.01)
                .ebv(0, 0).feh(-0.5, 0.1);
        StarInput[] stars = {gaiaDwarf, twin, giant, noPlx, twin, gaiaDwarf, giant};
        StarDeriver reused = new StarDeriver(DeriveSettings.defaults());
        StarResult a = new StarResult();
        for (int i = 0; i < stars.length; i++) {
            reused.derive(stars[i], a);
            StarResult fresh = new StarDeriver(DeriveSettings.defaults()).derive(stars[i], new StarResult());
            assertSame(fresh, a, "star " + i);
        }
    }

    private static void assertSame(StarResult e, StarResult a, String what) {
        double[][] pairs = {
                {e.teffK, a.teffK}, {e.teffErrK, a.teffErrK}, {e.lumLsun, a.lumLsun}, {e.lumErrLsun, a.lumErrLsun},
                {e.radiusRsun, a.radiusRsun}, {e.radiusErrRsun, a.radiusErrRsun}, {e.massMsun, a.massMsun},
                {e.massErrMsun, a.massErrMsun}, {e.loggCgs, a.loggCgs}, {e.loggErrCgs, a.loggErrCgs},
                {e.densityKgM3, a.densityKgM3}, {e.densityErrKgM3, a.densityErrKgM3}, {e.angDiamMas, a.angDiamMas},
                {e.angDiamErrMas, a.angDiamErrMas}, {e.angDiamSbrMas, a.angDiamSbrMas}, {e.bcV, a.bcV},
                {e.bcVErr, a.bcVErr}, {e.mbolMag, a.mbolMag}, {e.mbolErrMag, a.mbolErrMag}, {e.distPc, a.distPc},
                {e.distModulusErrMag, a.distModulusErrMag}, {e.teffChi2, a.teffChi2}};
        for (int k = 0; k < pairs.length; k++) {
            assertEquals(Double.doubleToLongBits(pairs[k][0]), Double.doubleToLongBits(pairs[k][1]),
                    what + ", field " + k + ": fresh " + pairs[k][0] + ", reused " + pairs[k][1]);
        }
        for (int b = 0; b < Band.COUNT; b++) {
            assertEquals(Double.doubleToLongBits(e.absMagErr[b]), Double.doubleToLongBits(a.absMagErr[b]), what + ", abs mag err " + b);
        }
        assertEquals(e.flags, a.flags, what + ": flags");
        assertEquals(e.teffRelations, a.teffRelations, what + ": relations");
        assertEquals(e.regime, a.regime, what + ": regime");
        assertEquals(e.lumClass, a.lumClass, what + ": class");
    }

    @Test
    void aDwarfWhoseKsIsWrongGetsDiameterDisagree() {
        // Kervella et al. 2004: log θ = 0.0755 (V−K) + 0.5170 − 0.2 K; a Ks 0.4 mag too bright makes θ_SB 29 % larger,
        // many times the combined error of the two diameters of a well-measured twin (σ 0.01 mag)
        StarInput in = sunAt(100, 0.01);
        in.hasMag[Band.J.ordinal()] = false; // keep V−Ks out of disagreement with J−Ks: only the diameter test is under test
        in.mag[Band.KS.ordinal()] -= 0.4;
        in.hasMag[Band.KS.ordinal()] = true;
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        StarResult r = d.derive(in, new StarResult());
        assertTrue(r.has(DIAMETER_DISAGREE), String.valueOf(QualityFlag.names(r.flags)));
        double theta = Math.pow(10, 0.0755 * (4.81 - (4.81 - 1.544 - 0.4)) + 0.5170 - 0.2 * (4.81 - 1.544 - 0.4));
        assertEquals(theta, r.angDiamSbrMas, 1e-9 * theta);
        // the same threshold made wide enough (100 σ) lets it pass
        StarResult wide = new StarDeriver(DeriveSettings.builder().diameterDisagreeSigma(100).build()).derive(in, new StarResult());
        assertFalse(wide.has(DIAMETER_DISAGREE), String.valueOf(QualityFlag.names(wide.flags)));
    }

    /**
     * The definitions that tie the outputs together, with the constants typed here from their standards: IAU 2015
     * Resolution B3 (R⊙ = 6.957e8 m, L⊙ = 3.828e26 W, Teff⊙ = 5772 K, GM⊙ = 1.3271244e20 m³ s⁻²), B2 (L₀ = 3.0128e28 W), IAU 2012 B2 (au = 149 597 870 700 m; pc = au · 648000/π), CODATA 2018 (G = 6.67430e-11 m³ kg⁻¹ s⁻²).
     * Checked on stars of three regimes and both L/R routes: Barnard's star (M-dwarf radius route), the solar twin
     * (BC route), Sirius A (hot star).
     */
    @Test
    void outputsObeyTheirDefinitionsWithTheStandardsConstants() {
        double rSunM = 6.957e8;
        double lSunW = 3.828e26;
        double teffSunK = 5772;
        double gmSun = 1.3271244e20;
        double g = 6.67430e-11;
        double pcM = 149_597_870_700.0 * 648_000 / Math.PI;
        double masPerRad = 180 / Math.PI * 3600 * 1000;
        StarInput sirius = new StarInput().parallax(379.21, 1.58).magnitude(Band.V, -1.46, 0.01)
                .magnitude(Band.B, -1.46, 0.01).ebv(0, 0.005).feh(0.5, 0.1);
        StarInput[] stars = {RegimeTest.barnardsStar(), sunAt(100, 0.01), sirius};
        Regime[] regimes = {Regime.M_DWARF, Regime.FGK_DWARF, Regime.HOT};
        for (int i = 0; i < stars.length; i++) {
            StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(stars[i], new StarResult());
            String what = regimes[i].toString();
            assertEquals(regimes[i], r.regime, what);
            // Stefan–Boltzmann: L = R² (Teff/Teff⊙)⁴
            assertEquals(r.radiusRsun * r.radiusRsun * Math.pow(r.teffK / teffSunK, 4), r.lumLsun, 1e-9 * r.lumLsun, what);
            assertEquals(r.lumLsun * lSunW, r.lumW, 1e-9 * r.lumW, what);
            // M_bol = −2.5 log10(L / L₀), L₀ = 3.0128e28 W (IAU 2015 B2 zero point; M_bol,⊙ = 4.74 rounded)
            assertEquals(-2.5 * Math.log10(r.lumW / 3.0128e28), r.mbolMag, 1e-9, what);
            // θ = 2R/d
            double theta = 2 * r.radiusRsun * rSunM / (r.distPc * pcM) * masPerRad;
            assertEquals(theta, r.angDiamMas, 1e-9 * theta, what);
            // ρ = M / (4/3 π R³), M⊙ = GM⊙ / G
            double mKg = r.massMsun * gmSun / g;
            double rM = r.radiusRsun * rSunM;
            double rho = mKg / (4.0 / 3.0 * Math.PI * rM * rM * rM);
            assertEquals(rho, r.densityKgM3, 1e-4 * rho, what);
            assertEquals(r.massMsun / Math.pow(r.radiusRsun, 3), r.densitySun, 1e-9 * r.densitySun, what);
            // log g = log10(G M / R²) in cgs (1 m s⁻² = 100 cm s⁻²)
            assertEquals(Math.log10(r.massMsun * gmSun / (rM * rM) * 100), r.loggCgs, 1e-6, what);
            // the relative errors of ρ and log g exceed neither their parts' sum nor fall below the mass part alone
            // when R and M errors are independent (error propagation, common practice): ρ ∝ M R⁻³
            double relM = r.massErrMsun / r.massMsun;
            double relR = r.radiusErrRsun / r.radiusRsun;
            double relRho = r.densityErrKgM3 / r.densityKgM3;
            assertTrue(relRho <= relM + 3 * relR + 1e-12, what + ": density error " + relRho);
            assertTrue(relRho >= Math.abs(relM - 3 * relR) - 1e-12, what + ": density error " + relRho);
            double sLnG = r.loggErrCgs * Math.log(10);
            assertTrue(sLnG <= relM + 2 * relR + 1e-12 && sLnG >= Math.abs(relM - 2 * relR) - 1e-12, what + ": log g error " + sLnG);
        }
    }

    @Test
    void aSolarColouredStarBrighterThanAnyMainSequenceStarIsEvolved() {
        // the solar twin's colours at 20 kpc with its V kept: M_V = 4.81 − 16.5 = −11.7, L ≈ 10^6.6 L⊙ — brighter than
        // the top of the main-sequence mass–luminosity relation (Eker et al. 2018, 31 M⊙, log L ≈ 5.6): a supergiant
        // by its luminosity alone (common practice), so evolved, with no main-sequence mass
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(sunAt(0.05, 0.0005), new StarResult());
        assertTrue(Math.log10(r.lumLsun) > MassLuminosityEker2018.LOGL_MAX, "log L " + Math.log10(r.lumLsun));
        assertEquals(LuminosityClass.EVOLVED, r.lumClass);
        assertTrue(Double.isNaN(r.massMsun) && r.has(MASS_NOT_APPLICABLE));
        assertFalse(r.has(LUM_CLASS_ASSUMED), "the class is known from the distance");
    }

    /**
     * TEFF_COLOURS_DISAGREE at p = 0.01 with n − 1 degrees of freedom for n colours: a star with two colours (1 degree
     * of freedom) is flagged from χ² = 6.635 on, the 99th percentile of χ²₁ (standard tables, e.g. Abramowitz &amp;
     * Stegun 1964, Table 26.8; also Commons Math's ChiSquaredDistribution). Between that and the 3-degree value (11.345)
     * only the right number of degrees of freedom flags the star.
     */
    @Test
    void twoColoursAreJudgedWithOneDegreeOfFreedom() {
        StarDeriver d = new StarDeriver(DeriveSettings.defaults());
        // the solar twin with only V, B and Ks: two colours, B−V and V−Ks; B shifted until χ² lies in (6.635, 11.345)
        boolean seen = false;
        for (double shift = 0.0; shift <= 0.3 && !seen; shift += 0.002) {
            StarInput in = sunAt(100, 0.01);
            in.hasMag[Band.IC.ordinal()] = false;
            in.hasMag[Band.J.ordinal()] = false;
            in.mag[Band.B.ordinal()] += shift;
            StarResult r = d.derive(in, new StarResult());
            assertEquals(2, Long.bitCount(r.teffRelations), r.teffFrom());
            if (r.teffChi2 < 6.635) {
                assertFalse(r.has(TEFF_COLOURS_DISAGREE), "chi2 " + r.teffChi2);
            } else if (r.teffChi2 < 11.345) {
                assertTrue(r.has(TEFF_COLOURS_DISAGREE), "chi2 " + r.teffChi2);
                seen = true;
            }
        }
        assertTrue(seen, "no shift of B put chi2 between the 1- and 3-degree critical values");
    }

    @Test
    void hotStarUncertaintyFlagFollowsItsThresholdExactly() {
        // the B star of RegimeTest with E(B−V) ± 0.05: flagged when its relative Teff error exceeds the threshold
        StarInput in = new StarInput().parallax(5, 0.05).magnitude(Band.V, 6.0, 0.01).magnitude(Band.B, 5.9, 0.01)
                .ebv(0.1, 0.05).feh(0, 0.1);
        StarResult r = new StarDeriver(DeriveSettings.defaults()).derive(in, new StarResult());
        double frac = r.teffErrK / r.teffK;
        StarResult below = new StarDeriver(DeriveSettings.builder().hotTeffErrFracMax(frac * 0.999).build()).derive(in, new StarResult());
        StarResult above = new StarDeriver(DeriveSettings.builder().hotTeffErrFracMax(frac * 1.001).build()).derive(in, new StarResult());
        assertTrue(below.has(HOT_TEFF_UNCERTAIN), "threshold just below the error fraction " + frac);
        assertFalse(above.has(HOT_TEFF_UNCERTAIN), "threshold just above the error fraction " + frac);
        // a Teff error exactly at the threshold does not exceed it (README flag table: "exceeds"): the threshold
        // nearest the fraction whose product with Teff is the error to the last bit
        double exact = frac;
        for (double t : new double[] {Math.nextUp(frac), Math.nextDown(frac)}) {
            exact = exact * r.teffK == r.teffErrK ? exact : t;
        }
        assertEquals(r.teffErrK, exact * r.teffK, 0.0, "no threshold hits the error exactly");
        assertFalse(new StarDeriver(DeriveSettings.builder().hotTeffErrFracMax(exact).build()).derive(in, new StarResult())
                .has(HOT_TEFF_UNCERTAIN), "an error equal to the threshold");
        // a cool star is never judged by it, however small the threshold
        StarResult twin = new StarDeriver(DeriveSettings.builder().hotTeffErrFracMax(1e-6).build()).derive(sunAt(100, 0.01), new StarResult());
        assertFalse(twin.has(HOT_TEFF_UNCERTAIN));
    }
}
