package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.starderive.physics.QualityFlag.*;

import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.junit.jupiter.api.Test;

/**
 * {@link InputStep}: each input rule at its first rejected and last accepted value (README flag table, {@link StarInput}
 * contract), the Gaia-band extinction coefficients and G → V (relations.md section 4, typed here), the first-order
 * contributions of V₀ and M_Ks against derivatives of those typed copies, and the z × σ perturbation of a draw.
 */
class InputStepTest {
    private static final DeriveSettings DEFAULTS = DeriveSettings.defaults();

    private static StarResult derive(StarInput in) {
        return new StarDeriver(DEFAULTS).derive(in, new StarResult());
    }

    private static String names(StarResult r) {
        return String.valueOf(QualityFlag.names(r.flags));
    }

    // --- typed copies of relations.md section 4 (Casagrande et al. 2021 release; Riello et al. 2021 Table C.2) ---

    private static double rG(double c) { return 2.609 - 0.475 * c + 0.053 * c * c; }

    private static double rBp(double c) { return 2.998 - 0.140 * c - 0.175 * c * c + 0.062 * c * c * c; }

    private static double rRp(double c) { return 1.689 - 0.059 * c; }

    private static double gMinusV(double c) { return -0.02704 + 0.01424 * c - 0.2156 * c * c + 0.01426 * c * c * c; }

    /** (BP−RP)₀: the root of C = (BP−RP) − (R_BP(C) − R_RP(C)) E(B−V), found by Commons Math's Brent solver. */
    private static double dereddenedBpRp(double bpRp, double ebv) {
        return new BrentSolver(1e-13).solve(200, c -> bpRp - (rBp(c) - rRp(c)) * ebv - c, -1, 6);
    }

    private static StarInput gaiaStar(double g, double bp, double rp, double ebv, double ebvErr) {
        return new StarInput().parallax(100, 0.01).magnitude(Band.G, g, 0.01).magnitude(Band.BP, bp, 0.02)
                .magnitude(Band.RP, rp, 0.03).ebv(ebv, ebvErr).feh(0, 0.1);
    }

    /** The step alone on a fresh state: inputs read and V₀ found; returns the flags of both. */
    private static long readAndV(StarState s, StarInput in) {
        InputStep step = new InputStep(DEFAULTS, s);
        return step.read(in, new StarResult()) | step.visualMagnitude();
    }

    @Test
    void aNonFiniteMagnitudeOrANonPositiveErrorIsInvalidNotASentinel() {
        // README flag table: INPUT_INVALID for NaN/∞ values and non-positive errors, MAGNITUDE_SENTINEL only for a value
        // outside the plausible range; either way the band is ignored
        for (double bad : new double[] {Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY}) {
            StarInput in = StarDeriverTest.solarTwinAt10pc();
            in.mag[Band.J.ordinal()] = bad;
            StarResult r = derive(in);
            assertEquals(INPUT_INVALID.mask(), r.flags, bad + ": " + names(r));
            assertFalse(r.teffFrom().contains("J"), r.teffFrom());
        }
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.magErr[Band.J.ordinal()] = 0.0; // the first non-positive error
        StarResult r = derive(in);
        assertEquals(INPUT_INVALID.mask(), r.flags, names(r));
        assertFalse(r.teffFrom().contains("J"), r.teffFrom());
        in.magErr[Band.J.ordinal()] = Double.MIN_NORMAL; // a positive error, however small, is a measurement
        r = derive(in);
        assertFalse(r.has(INPUT_INVALID), names(r));
        assertTrue(r.teffFrom().contains("V-J"), r.teffFrom());
        // StarInput: a quantity is absent when its has-flag is false, whatever its field holds
        in.magErr[Band.J.ordinal()] = 0.01;
        in.hasMagErr[Band.J.ordinal()] = false;
        r = derive(in);
        assertEquals(INPUT_INVALID.mask(), r.flags, "a magnitude without an error: " + names(r));
        assertFalse(r.teffFrom().contains("J"), r.teffFrom());
        in.magErr[Band.J.ordinal()] = Double.NaN; // the same, cleared as StarInput.clear() leaves it
        assertEquals(INPUT_INVALID.mask(), derive(in).flags);
    }

    @Test
    void extinctionAndMetallicityTakeTheirDefaultsWhenAbsentAndFlagOnlyWhatTheTableSays() {
        // E(B−V) without its error: the default error (ebv_err_default 0) is used, nothing flagged, whatever the field
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.ebv(0.1, 5.0);
        in.hasEbvErr = false;
        StarResult r = derive(in);
        assertEquals(0L, r.flags, names(r));
        assertEquals(0.1, r.ebvUsed, 0);
        // no extinction term in M_Ks's error: σ² = σ_Ks² + σ_μ², σ_μ from 1/(ϖ ± σ) as in ChainStepsTest
        double sMu = 5 / Math.log(10) * 0.5 * (1000 / 99.99 - 1000 / 100.01) / 10.0;
        assertEquals(Math.hypot(0.01, sMu), r.absMagErr[Band.KS.ordinal()], 1e-12);
        in.ebvErr = Double.NaN;
        assertEquals(0L, derive(in).flags);
        // an error of 0 is accepted (an E(B−V) known exactly), the first negative one is not
        in.ebv(0.1, 0.0);
        assertEquals(0L, derive(in).flags);
        in.ebv(0.1, -1e-9);
        r = derive(in);
        assertEquals(INPUT_INVALID.mask(), r.flags, names(r));
        assertEquals(0.1, r.ebvUsed, 0, "the E(B−V) itself is kept");
        // no E(B−V): EXTINCTION_ASSUMED alone (absent is not invalid), the default 0 used whatever the field holds
        in.ebv(0.3, 0.01);
        in.hasEbv = false;
        r = derive(in);
        assertEquals(EXTINCTION_ASSUMED.mask(), r.flags, names(r));
        assertEquals(DeriveSettings.EBV_DEFAULT, r.ebvUsed, 0);
        // [Fe/H] alike: no error → default error, not flagged; an error of 0 accepted, a negative one invalid
        in = StarDeriverTest.solarTwinAt10pc();
        in.feh(0.0, 7.0);
        in.hasFehErr = false;
        assertEquals(0L, derive(in).flags);
        in.feh(0.0, 0.0);
        assertEquals(0L, derive(in).flags);
        in.feh(0.0, -1e-9);
        assertEquals(INPUT_INVALID.mask(), derive(in).flags);
        in.feh(0.3, 0.05);
        in.hasFeh = false;
        assertEquals(METALLICITY_ASSUMED.mask(), derive(in).flags);
    }

    @Test
    void gaiaBandsAreDereddenedWithTheCoefficientsAtTheStarsOwnDereddenedColour() {
        // relations.md section 4: R = A/E(B−V) at C = (BP−RP)₀; at 10 pc (ϖ = 100 mas) M = m − R E(B−V)
        double ebv = 0.2;
        for (double bpRp : new double[] {0.7, 1.9}) { // (BP−RP)₀ about 0.45 and 1.65: either side of C = 1
            double g = 10;
            double bp = 10.5;
            double rp = bp - bpRp;
            double c = dereddenedBpRp(bpRp, ebv);
            StarResult r = derive(gaiaStar(g, bp, rp, ebv, 0.01));
            assertEquals(g - rG(c) * ebv, r.absMag[Band.G.ordinal()], 1e-6, "G at BP−RP " + bpRp);
            assertEquals(bp - rBp(c) * ebv, r.absMag[Band.BP.ordinal()], 1e-6, "BP at BP−RP " + bpRp);
            assertEquals(rp - rRp(c) * ebv, r.absMag[Band.RP.ordinal()], 1e-6, "RP at BP−RP " + bpRp);
        }
        // without BP or RP there is no colour for the coefficients, but without reddening every band is still used:
        // G with Ks alone gives the Casagrande et al. 2021 G−Ks Teff
        for (Band missing : new Band[] {Band.BP, Band.RP}) {
            StarInput in = gaiaStar(9.9, 10.25, 9.43, 0, 0).magnitude(Band.KS, 8.45, 0.02);
            in.hasMag[missing.ordinal()] = false;
            StarResult r = derive(in);
            assertEquals(9.9, r.absMag[Band.G.ordinal()], 1e-12, "without " + missing);
            assertTrue(r.teffFrom().contains("G-Ks"), "without " + missing + ": " + r.teffFrom());
        }
    }

    @Test
    void vFromGFollowsRiello2021InsideItsColourRangeOnly() {
        // V₀ = G₀ − (G−V)(C), C = (BP−RP)₀, valid −0.5 < C < 5.0 (Riello et al. 2021, Table C.2)
        double ebv = 0.1;
        double sEbv = 0.05;
        StarInput in = gaiaStar(10, 10.5, 9.7, ebv, sEbv);
        StarState s = new StarState();
        assertEquals(V_FROM_G.mask(), readAndV(s, in));
        double c = dereddenedBpRp(0.8, ebv);
        double[] r = {rG(c), rBp(c), rRp(c)};
        // V₀ from the observed G, BP, RP and E(B−V), the coefficients held at the star's C (first order)
        java.util.function.DoubleUnaryOperator[] v0 = {
            x -> x - r[0] * ebv - gMinusV(10.5 - 9.7 - (r[1] - r[2]) * ebv),
            x -> 10 - r[0] * ebv - gMinusV(x - 9.7 - (r[1] - r[2]) * ebv),
            x -> 10 - r[0] * ebv - gMinusV(10.5 - x - (r[1] - r[2]) * ebv),
            x -> 10 - r[0] * x - gMinusV(10.5 - 9.7 - (r[1] - r[2]) * x)};
        double[] at = {10, 10.5, 9.7, ebv};
        double[] sigma = {0.01, 0.02, 0.03, sEbv};
        int[] source = {Band.G.ordinal(), Band.BP.ordinal(), Band.RP.ordinal(), ErrorSource.EBV};
        assertEquals(v0[0].applyAsDouble(10), s.v0, 1e-9);
        assertFalse(s.vObserved);
        for (int i = 0; i < 4; i++) {
            // contribution = ∂V₀/∂x × σ_x, the derivative by a central difference of the typed copy
            double h = 1e-4;
            double dv = (v0[i].applyAsDouble(at[i] + h) - v0[i].applyAsDouble(at[i] - h)) / (2 * h);
            assertEquals(dv * sigma[i], s.cV[source[i]], 1e-8, "source " + source[i]);
        }
        assertEquals(0.03, s.cV[ErrorSource.GV], 0, "the relation's scatter (relations.md, from memory)");
        // all three bands are needed
        for (Band missing : new Band[] {Band.G, Band.BP, Band.RP}) {
            StarInput lacking = gaiaStar(10, 10.5, 9.7, 0, 0);
            lacking.hasMag[missing.ordinal()] = false;
            assertEquals(0L, readAndV(s, lacking), "without " + missing);
            assertTrue(Double.isNaN(s.v0), "without " + missing);
        }
        // the range is open at both ends
        double[][] edges = {{5.0, 0}, {4.99, 1}, {-0.5, 0}, {-0.49, 1}};
        for (double[] e : edges) {
            StarInput edge = gaiaStar(10, 11.0 + e[0], 11.0, 0, 0);
            long flags = readAndV(s, edge);
            assertEquals(e[1] == 1 ? V_FROM_G.mask() : 0L, flags, "BP−RP " + e[0]);
            assertEquals(e[1] == 1, !Double.isNaN(s.v0), "BP−RP " + e[0]);
            if (e[1] == 1) {
                assertEquals(10 - gMinusV(e[0]), s.v0, 1e-9, "BP−RP " + e[0]);
            }
        }
    }

    @Test
    void absoluteKsContributionsAreItsDerivativesTimesTheErrors() {
        // M_Ks = Ks − R_Ks E(B−V) − μ (definition): ∂/∂Ks = 1, ∂/∂E(B−V) = −R_Ks, ∂/∂μ = −1
        StarState s = new StarState();
        InputStep step = new InputStep(DEFAULTS, s);
        StarInput in = new StarInput().magnitude(Band.KS, 6.0, 0.02).ebv(0.1, 0.05);
        step.read(in, new StarResult());
        s.sMu = 0.03;
        step.absoluteKs();
        assertEquals(0.02, s.cKs[Band.KS.ordinal()], 0);
        assertEquals(-ChainStepsTest.ksOverEbvCcm89() * 0.05, s.cKs[ErrorSource.EBV], 1e-6);
        assertEquals(-0.03, s.cKs[ErrorSource.MU], 0);
        // a source switched off contributes nothing (StarState.sourceMask: both uncertainty paths)
        s.sourceMask = 1L << Band.KS.ordinal();
        step.absoluteKs();
        assertEquals(0.02, s.cKs[Band.KS.ordinal()], 0);
        assertEquals(0.0, s.cKs[ErrorSource.EBV], 0);
        assertEquals(0.0, s.cKs[ErrorSource.MU], 0);
    }

    @Test
    void aDrawPerturbsEachInputByItsDeviateTimesItsError() {
        // InputStep: in a Monte Carlo draw each value is moved by z × σ of its error source
        double[] z = new double[ErrorSource.COUNT];
        z[Band.V.ordinal()] = 1.5;
        z[ErrorSource.EBV] = -0.5;
        z[ErrorSource.FEH] = 2.0;
        StarState s = new StarState();
        s.drawZ = z;
        StarInput in = StarDeriverTest.solarTwinAt10pc();
        in.ebv(0.2, 0.04);
        in.feh(-0.3, 0.1);
        readAndV(s, in);
        assertEquals(4.81 + 1.5 * 0.01, s.mObs[Band.V.ordinal()], 1e-12);
        assertEquals(0.2 - 0.5 * 0.04, s.ebv, 1e-12);
        assertEquals(-0.3 + 2.0 * 0.1, s.feh, 1e-12);
        // E(B−V) cannot be negative (common practice): a deviate below −E/σ gives 0
        z[ErrorSource.EBV] = -6;
        readAndV(s, in);
        assertEquals(0.0, s.ebv, 0);
        // V from G: the relation's 0.03 mag scatter is a source of its own
        z[ErrorSource.EBV] = 0;
        z[ErrorSource.GV] = 1;
        readAndV(s, gaiaStar(10, 10.5, 9.7, 0, 0));
        assertEquals(10 - gMinusV(0.8) + 0.03, s.v0, 1e-9);
    }
}
