package org.starderive.physics;

import static org.starderive.physics.Band.KS;

/**
 * The luminosity and radius step of {@link StarDeriver}, from the current Teff estimate ({@link TeffBlend}). Two
 * routes, blended with the M-dwarf weight where both apply:
 * <ul>
 *   <li><b>bolometric correction</b> (FGK dwarfs, giants, hot stars; M dwarfs without a usable M_Ks): BC_V of Flower
 *       1996 with the coefficients of Torres 2010 ({@link BolometricCorrectionFlower1996}) on its own solar scale,
 *       L/L⊙ = 10^(−0.4 (M_bol − M_bol,⊙)), and R/R⊙ = (L/L⊙)^½ (Teff⊙/Teff)² by the Stefan–Boltzmann law with the
 *       nominal solar effective temperature (IAU 2015 Resolution B3);</li>
 *   <li><b>M-dwarf radius</b>: R from the absolute Ks magnitude (Mann et al. 2015, {@link RadiusMann2015}) and
 *       L = R² (Teff/Teff⊙)⁴ (Stefan–Boltzmann), no bolometric correction.</li>
 * </ul>
 * M_bol is reported on the IAU 2015 Resolution B2 scale. The angular diameter is θ = 2R/d on the radius route and
 * from the bolometric flux alone (θ = θ⊙(10 pc) · √(L at 10 pc) · (Teff⊙/Teff)²) otherwise, so that a star without
 * a distance still gets one. First-order errors are carried source by source ({@link ErrorSource}); where the routes
 * are blended their disagreement enters as the blend source.
 */
final class LuminosityRadiusStep {
    private static final double LN10 = Math.log(10);
    private static final int NSRC = ErrorSource.COUNT;
    /** θ in mas of a 1 R⊙ star at 10 pc: 2 R⊙ / 10 pc. */
    private static final double THETA_SUN_AT_10PC_MAS = 2 * Iau2015.R_SUN_M / (10 * DerivedConstants.PARSEC_M) / DerivedConstants.MAS_RAD;

    private final StarState s;
    private final TeffBlend t;
    /** First-order contributions of each error source to the absolute M_bol and to ln R (read by the mass step). */
    final double[] cMbol = new double[NSRC];
    final double[] cLnR = new double[NSRC];
    private final double[] cMbolM = new double[NSRC];
    private final double[] cLnRM = new double[NSRC];
    private final double[] work = new double[NSRC];
    private final double[] workM = new double[NSRC];
    /** Weight of the M-dwarf radius route in the last chain (0: the BC route alone). */
    double wRadiusM;

    LuminosityRadiusStep(StarState s, TeffBlend t) {
        this.s = s;
        this.t = t;
    }

    /** Whether the M-dwarf radius relation can be used: a distance and an absolute Ks inside its range. */
    boolean mRadiusRoute(boolean haveDist) {
        return haveDist && RadiusMann2015.inRange(s.m0[KS.ordinal()] - s.mu);
    }

    /** BC, bolometric magnitudes, L, R and angular diameter from the current Teff estimate into {@code out}. */
    void chain(StarResult out, boolean haveDist) {
        double tMean = t.mean;
        double tErr = t.err;
        double[] cT = t.c;
        double wM = t.wM;
        out.teffK = tMean;
        out.teffErrK = tErr;
        out.bcV = out.bcVErr = out.mbolMag = out.mbolErrMag = Double.NaN;
        out.lumLsun = out.lumErrLsun = out.lumW = out.radiusRsun = out.radiusErrRsun = Double.NaN;
        out.angDiamMas = out.angDiamErrMas = Double.NaN;
        out.radiusMksWeight = Double.NaN;
        wRadiusM = 0;
        if (Double.isNaN(tMean)) {
            return;
        }
        double temp = tMean;
        boolean vo = s.valuesOnly;
        double tRatio2 = sq(Iau2015.TEFF_SUN_K / temp);
        // the BC_V route (FGK, giants, hot stars; M dwarfs without a usable M_Ks)
        double mbolAbsBc = Double.NaN;
        double lnThetaBc = Double.NaN;
        // BC_V and its slope from one log10 Teff
        double logT = BolometricCorrectionFlower1996.logTeff(temp);
        double beta = BolometricCorrectionFlower1996.dBcVdTeff(temp, logT);
        double bc = BolometricCorrectionFlower1996.bcV(temp, logT);
        if (wM < 1 || !mRadiusRoute(haveDist)) {
            out.bcV = bc;
            out.bcVErr = Math.abs(beta) * tErr;
        }
        if (!Double.isNaN(s.v0)) {
            double mbolApp = s.v0 + bc;
            if (!vo) {
                // V₀ and Teff share sources (V is in the colours): contributions are added source by source
                double[] cV = s.cV;
                for (int j = 0; j < NSRC; j++) {
                    cMbol[j] = cV[j] + beta * cT[j];
                    work[j] = -0.2 * LN10 * cMbol[j] - 2 * cT[j] / temp;
                }
            }
            double lumAt10pc = Math.pow(10, -0.4 * (mbolApp - BolometricCorrectionFlower1996.MBOL_SUN));
            lnThetaBc = Math.log(THETA_SUN_AT_10PC_MAS * Math.sqrt(lumAt10pc) * tRatio2);
            if (haveDist) {
                mbolAbsBc = mbolApp - s.mu;
                if (!vo) {
                    cMbol[ErrorSource.MU] = s.on(ErrorSource.MU) ? -s.sMu : 0;
                }
            }
        }
        // the M-dwarf route: R from M_Ks (Mann et al. 2015), L from Stefan–Boltzmann
        double mbolAbsM = Double.NaN;
        double lnRM = Double.NaN;
        if (wM > 0 && mRadiusRoute(haveDist)) {
            double mKs = out.absMag[KS.ordinal()];
            double fehForm = s.fehMeasured ? s.feh : Double.NaN;
            double frac = RadiusMann2015.scatterFrac(fehForm);
            lnRM = Math.log(RadiusMann2015.radiusRsun(mKs, fehForm)) + s.dz(ErrorSource.RADIUS_REL, frac);
            double lnLM = 2 * lnRM + 4 * Math.log(temp / Iau2015.TEFF_SUN_K);
            mbolAbsM = BolometricCorrectionFlower1996.MBOL_SUN - 2.5 / LN10 * lnLM;
            if (!vo) {
                double dR = RadiusMann2015.dLnRdMks(mKs, fehForm);
                double[] cKs = s.cKs;
                for (int j = 0; j < NSRC; j++) {
                    cLnRM[j] = dR * cKs[j];
                }
                cLnRM[ErrorSource.FEH] += RadiusMann2015.dLnRdFeh(fehForm) * s.sFeh;
                cLnRM[ErrorSource.RADIUS_REL] = frac;
                s.mask(cLnRM);
                for (int j = 0; j < NSRC; j++) {
                    cMbolM[j] = -2.5 / LN10 * (2 * cLnRM[j] + 4 * cT[j] / temp);
                    // ln θ = ln R − ln d, and ln d grows with μ as ln10/5
                    workM[j] = cLnRM[j] - (j == ErrorSource.MU && s.on(j) ? LN10 / 5 * s.sMu : 0);
                }
            }
            wRadiusM = Double.isNaN(mbolAbsBc) ? 1 : wM;
        }
        double w = wRadiusM;
        // angular diameter: θ = 2R/d on the radius route, from the bolometric flux otherwise; blended in log
        double lnThetaM = w > 0 ? lnRM + Math.log(THETA_SUN_AT_10PC_MAS * 10 / out.distPc) : Double.NaN;
        double lnTheta = w == 0 ? lnThetaBc : w == 1 ? lnThetaM : w * lnThetaM + (1 - w) * lnThetaBc;
        out.angDiamMas = Math.exp(lnTheta);
        if (!vo && !Double.isNaN(lnTheta)) {
            // blended, the weight moves with the M-dwarf Teff: d ln θ = w d ln θ_R + (1 − w) d ln θ_BC
            // + (ln θ_R − ln θ_BC) dw, as for M_bol below
            boolean blended = w > 0 && w < 1;
            double[] dwM = t.dwM;
            double v2 = 0;
            for (int j = 0; j < NSRC; j++) {
                v2 += sq((w > 0 ? w * workM[j] : 0) + (w < 1 ? (1 - w) * work[j] : 0)
                        + (blended ? dwM[j] * (lnThetaM - lnThetaBc) : 0));
            }
            out.angDiamErrMas = out.angDiamMas * Math.sqrt(v2);
        }
        if (!haveDist) {
            return;
        }
        double mbolAbs = w == 0 ? mbolAbsBc : w == 1 ? mbolAbsM : w * mbolAbsM + (1 - w) * mbolAbsBc;
        if (Double.isNaN(mbolAbs)) {
            return;
        }
        // both routes blended: their disagreement enters as the blend source (same z as the blended Teff)
        double spreadMbol = w > 0 && w < 1 ? Math.sqrt(w * (1 - w)) * (mbolAbsM - mbolAbsBc) : 0;
        spreadMbol = s.blendSpread(1, spreadMbol);
        mbolAbs += s.dz(ErrorSource.BLEND, spreadMbol);
        double sMbol = Double.NaN;
        if (!vo) {
            for (int j = 0; j < NSRC; j++) {
                double bcPart = w < 1 ? (1 - w) * cMbol[j] : 0;
                double mPart = w > 0 ? w * cMbolM[j] : 0;
                work[j] = bcPart + mPart;
            }
            if (s.on(ErrorSource.BLEND)) {
                work[ErrorSource.BLEND] += spreadMbol;
            }
            if (w > 0 && w < 1) {
                double[] dwM = t.dwM;
                for (int j = 0; j < NSRC; j++) {
                    work[j] += dwM[j] * (mbolAbsM - mbolAbsBc);
                }
            }
            sMbol = StarDeriver.norm(work);
            for (int j = 0; j < NSRC; j++) {
                // ln R = ½ ln L − 2 ln(Teff/Teff⊙) with ln L = −0.4 ln10 M_bol: holds for both routes and their blend
                cLnR[j] = -0.2 * LN10 * work[j] - 2 * cT[j] / temp;
                cMbol[j] = work[j];
            }
        }
        out.mbolMag = mbolAbs - BolometricCorrectionFlower1996.MBOL_SUN + DerivedConstants.MBOL_SUN_IAU;
        out.mbolErrMag = sMbol;
        out.lumLsun = Math.pow(10, -0.4 * (mbolAbs - BolometricCorrectionFlower1996.MBOL_SUN));
        out.lumErrLsun = out.lumLsun * 0.4 * LN10 * sMbol;
        out.lumW = out.lumLsun * Iau2015.L_SUN_W;
        out.radiusRsun = Math.sqrt(out.lumLsun) * tRatio2;
        out.radiusErrRsun = vo ? Double.NaN : out.radiusRsun * StarDeriver.norm(cLnR);
        out.radiusMksWeight = w;
    }

    private static double sq(double x) { return x * x; }
}
