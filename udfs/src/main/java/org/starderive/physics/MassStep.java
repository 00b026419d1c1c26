package org.starderive.physics;

import static org.starderive.physics.Band.KS;

/**
 * The mass step of {@link StarDeriver}, for main-sequence stars only: mass from L by the main-sequence
 * mass–luminosity relation of Eker et al. 2018 ({@link MassLuminosityEker2018}) or, for M dwarfs, from the absolute
 * Ks magnitude by Mann et al. 2019 ({@link MassMann2019}), blended in ln M with the M-dwarf weight where both apply
 * (their disagreement entering as the blend source); then the mean density ρ = M / (4/3 π R³) and the surface
 * gravity log g = log10(G M / R²) in cgs, with the solar values of {@link DerivedConstants}. Each relation's own
 * scatter is an error source ({@link ErrorSource#MASS_REL}).
 */
final class MassStep {
    private static final double LN10 = Math.log(10);
    private static final int NSRC = ErrorSource.COUNT;

    private final StarState s;
    private final TeffBlend t;
    private final LuminosityRadiusStep lr;

    MassStep(StarState s, TeffBlend t, LuminosityRadiusStep lr) {
        this.s = s;
        this.t = t;
        this.lr = lr;
    }

    /** Mass, density and log g with their errors into {@code out}, from the L and R already there. */
    void mass(StarResult out) {
        if (!(out.lumLsun > 0 && out.radiusRsun > 0)) {
            return;
        }
        boolean vo = s.valuesOnly;
        double wM = t.wM;
        double logL = Math.log10(out.lumLsun);
        double logME = MassLuminosityEker2018.logMass(logL);
        double mKs = out.absMag[KS.ordinal()];
        double fehForm = s.fehMeasured ? s.feh : Double.NaN;
        double logMM = wM > 0 ? MassMann2019.logMass(mKs, fehForm) : Double.NaN;
        double w = Double.isNaN(logMM) ? 0 : Double.isNaN(logME) ? 1 : wM;
        if (w == 0 && Double.isNaN(logME)) {
            return;
        }
        double ekerSlope = MassLuminosityEker2018.dLogMassDLogL(logL); // serves the scatter and the errors below
        double ekerLnScatter = MassLuminosityEker2018.lnMassScatterAtSlope(ekerSlope);
        double mannFrac = MassMann2019.scatterFrac(fehForm);
        double lnM = (w < 1 ? (1 - w) * (logME * LN10 + s.dz(ErrorSource.MASS_REL, ekerLnScatter)) : 0)
                + (w > 0 ? w * (logMM * LN10 + s.dz(ErrorSource.MASS_REL, mannFrac)) : 0);
        // both mass relations blended: their disagreement enters as the blend source
        double spreadLnM = w > 0 && w < 1 ? Math.sqrt(w * (1 - w)) * LN10 * (logMM - logME) : 0;
        spreadLnM = s.blendSpread(2, spreadLnM);
        lnM += s.dz(ErrorSource.BLEND, spreadLnM);
        double logM = lnM / LN10;
        double m = Math.exp(lnM);
        double r = out.radiusRsun;
        double varLnM = vo ? Double.NaN : 0;
        double varLnRho = varLnM;
        double varLnG = varLnM;
        if (!vo) {
            double[] cMbol = lr.cMbol;
            double[] cLnR = lr.cLnR;
            double[] cKs = s.cKs;
            double[] dwM = t.dwM;
            double slope = w < 1 ? ekerSlope : 0;
            double dM = w > 0 ? MassMann2019.dLnMdMks(mKs, fehForm) : 0;
            for (int j = 0; j < NSRC; j++) {
                double e = w < 1 ? LN10 * slope * -0.4 * cMbol[j] : 0;
                double mm = w > 0 ? dM * cKs[j] : 0;
                if (j == ErrorSource.FEH && w > 0) {
                    mm += MassMann2019.dLnMdFeh(fehForm) * s.sFeh;
                }
                if (j == ErrorSource.MASS_REL) {
                    e = ekerLnScatter;
                    mm = mannFrac;
                }
                // each term only where its relation carries weight (Eker's scatter is NaN below its mass range)
                double lnMj = s.on(j) ? (w < 1 ? (1 - w) * e : 0) + (w > 0 ? w * mm : 0)
                        + (j == ErrorSource.BLEND ? spreadLnM : 0)
                        + (w > 0 && w < 1 ? dwM[j] * LN10 * (logMM - logME) : 0) : 0;
                varLnM += lnMj * lnMj;
                varLnRho += sq(lnMj - 3 * cLnR[j]);
                varLnG += sq(lnMj - 2 * cLnR[j]);
            }
        }
        out.massMsun = m;
        out.massMksWeight = w;
        out.massErrMsun = m * Math.sqrt(varLnM);
        out.densitySun = m / (r * r * r);
        out.densityKgM3 = out.densitySun * DerivedConstants.RHO_SUN_KG_M3;
        out.densityErrKgM3 = out.densityKgM3 * Math.sqrt(varLnRho);
        out.loggCgs = DerivedConstants.LOGG_SUN_CGS + logM - 2 * Math.log10(r);
        out.loggErrCgs = Math.sqrt(varLnG) / LN10;
    }

    private static double sq(double x) { return x * x; }
}
