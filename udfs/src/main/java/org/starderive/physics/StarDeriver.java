package org.starderive.physics;

import java.util.List;

import static org.starderive.physics.Band.BP;
import static org.starderive.physics.Band.G;
import static org.starderive.physics.Band.KS;
import static org.starderive.physics.Band.RP;
import static org.starderive.physics.Band.V;
import static org.starderive.physics.QualityFlag.*;

/**
 * The single entry point of the physics core: one star's measurements in, every derived parameter with its
 * first-order (analytic) uncertainty and its quality flags out. Allocation-free per star: the caller reuses a
 * {@link StarInput} and a {@link StarResult}. Not thread-safe (it holds work arrays): one instance per thread.
 * Bad values in a star never throw: they give NaN plus a flag.
 *
 * <p>The chain, each step implemented and cited in its own class:
 * <ol>
 *   <li>inputs checked: sentinel magnitudes, NaN/∞, non-positive errors → flags, value ignored;</li>
 *   <li>extinction: A_V = R_V·E(B−V); A_band/A_V from the Cardelli–Clayton–Mathis 1989 law
 *       ({@link CardelliClaytonMathis1989}); colour-dependent coefficients for G/BP/RP ({@link GaiaBandExtinction});</li>
 *   <li>distance from the zero-point-corrected parallax ({@link ParallaxDistance}, {@link EdsdPosterior});</li>
 *   <li>distance modulus μ = 5 log10(d / 10 pc), absolute magnitudes M = m − μ − A;</li>
 *   <li>Teff: every enabled, in-range colour relation of the star's class ({@link TeffRelations}), combined by an
 *       inverse-variance mean; a chi-square test flags disagreement;</li>
 *   <li>BC_V (Flower 1996 / Torres 2010) on its own solar scale; V from G when V is missing (Riello et al. 2021);</li>
 *   <li>L/L⊙ = 10^(−0.4 (M_bol − M_bol,⊙)); L in W with the nominal L⊙ (IAU 2015 B3); M_bol reported on the
 *       IAU 2015 B2 scale;</li>
 *   <li>Stefan–Boltzmann law: R/R⊙ = (L/L⊙)^½ (Teff⊙/Teff)² with the nominal Teff⊙ (IAU 2015 B3), which makes
 *       σ drop out of the ratio; angular diameter θ = 2R/d, computed from the bolometric flux alone so that it
 *       needs no distance;</li>
 *   <li>class ({@link LuminosityClass}); for main-sequence stars the mass from {@link MassLuminosityEker2018},
 *       mean density ρ = M / (4/3 π R³) and log g = log10(G M / R²) in cgs;</li>
 *   <li>for main-sequence stars, the surface-brightness diameter ({@link SurfaceBrightnessKervella2004}) as a
 *       cross-check of the Stefan–Boltzmann one.</li>
 * </ol>
 * First-order errors are propagated source by source: every independent source of error (each band's magnitude,
 * E(B−V), [Fe/H], log g, the relations' scatter, the temperature scale's zero point, the G→V conversion, the
 * distance) carries its derivative through Teff, M_bol, L, R, θ, mass, density and log g, so that shared inputs
 * (V in both the colours and the magnitude) are correlated correctly. They remain linear approximations where errors
 * are large; the Monte Carlo option ({@link MonteCarloDeriver}) is not.
 */
public final class StarDeriver {
    /** Cumulative probabilities of the 16th, 50th and 84th percentiles (±1σ of a Gaussian). */
    static final double P16 = 0.15865525393145707;
    static final double P84 = 0.8413447460685429;
    private static final double LN10 = Math.log(10);
    private static final double TEFF_SANE_MIN_K = 2000.0;
    private static final double TEFF_SANE_MAX_K = 50000.0;
    private static final double MAG_ERR_MAX = 10.0;
    private static final double PARALLAX_ERR_MAX_MAS = 1e5;
    /** Below a nano-arcsecond an error is not a measurement (its square underflows the posterior). */
    private static final double PARALLAX_ERR_MIN_MAS = 1e-6;
    private static final double EBV_MAX = 20.0;
    private static final double DWARF_LOGG_START_ERR = 0.3;
    /** θ in mas of a 1 R⊙ star at 10 pc: 2 R⊙ / 10 pc. */
    private static final double THETA_SUN_AT_10PC_MAS = 2 * Iau2015.R_SUN_M / (10 * DerivedConstants.PARSEC_M) / DerivedConstants.MAS_RAD;

    private final DeriveSettings settings;
    private final TeffRelation[] relations;
    private final int[] relationIndex;
    private final double[] ccmOverAv = new double[Band.COUNT];
    private final EdsdPosterior posterior = EdsdPosterior.standard();
    private final double[] probs = {P16, 0.5, P84};
    private final double[] quantiles = new double[3];

    // per-star work
    private final double[] mObs = new double[Band.COUNT];
    private final double[] m0 = new double[Band.COUNT];
    private final double[] sm = new double[Band.COUNT];
    private final double[] rBand = new double[Band.COUNT];
    private final double[] tEst;
    private final double[] wEst;
    private double ebv;
    private double sEbv;
    private double feh;
    private double sFeh;
    private double v0;
    private boolean vObserved;
    private double mu;
    private double sMu;
    // Teff estimate state
    private double tMean;
    private double tErr;
    private long tMask;
    private double tChi2;
    private int tCount;
    private boolean tAnyColour;
    private boolean tExtrapolated;
    private boolean tUsesLogg;
    private boolean tAnyOutOfRange;
    private boolean tBoundBroken;
    private final double[] gradBand = new double[Band.COUNT];
    // chain state: first-order error contributions of each independent source (value = derivative × σ of the source)
    private static final int SRC_EBV = Band.COUNT;
    private static final int SRC_FEH = Band.COUNT + 1;
    private static final int SRC_LOGG = Band.COUNT + 2;
    private static final int SRC_SCATTER = Band.COUNT + 3;
    private static final int SRC_ZP = Band.COUNT + 4;
    private static final int SRC_GV = Band.COUNT + 5;
    private static final int SRC_MU = Band.COUNT + 6;
    private static final int NSRC = Band.COUNT + 7;
    /** Contributions to Teff. */
    private final double[] cT = new double[NSRC];
    /** Contributions to V₀. */
    private final double[] cV = new double[NSRC];
    /** Contributions to the absolute bolometric magnitude. */
    private final double[] cMbol = new double[NSRC];
    /** Contributions to ln R. */
    private final double[] cLnR = new double[NSRC];
    private final double[] work = new double[NSRC];
    private double sMbol;
    // Monte Carlo draw overrides (NaN / null: off)
    private double drawDistPc = Double.NaN;
    private double[] drawTeffOffsetK;
    /** In a Monte Carlo draw only values are needed: the first-order error propagation is skipped (profiled at about a
     *  quarter of a draw's cost). Values are computed by exactly the same code either way. */
    private boolean valuesOnly;
    /** In a Monte Carlo draw: the star's class (null: classify as usual) and its log g to start the iteration from. */
    private LuminosityClass drawClass;
    private double drawLogg = Double.NaN;

    public StarDeriver(DeriveSettings settings) {
        this.settings = settings;
        List<TeffRelation> all = TeffRelations.all();
        int n = Long.bitCount(settings.relationMask());
        this.relations = new TeffRelation[n];
        this.relationIndex = new int[n];
        int k = 0;
        for (int i = 0; i < all.size(); i++) {
            if ((settings.relationMask() & (1L << i)) != 0) {
                relations[k] = all.get(i);
                relationIndex[k] = i;
                k++;
            }
        }
        this.tEst = new double[n];
        this.wEst = new double[n];
        for (Band b : Band.values()) {
            ccmOverAv[b.ordinal()] = CardelliClaytonMathis1989.bandOverAv(b, settings.rv());
        }
    }

    public DeriveSettings settings() { return settings; }

    /** The enabled relations, in the order used by {@link #deriveDraw} offsets. */
    TeffRelation[] enabledRelations() { return relations; }

    /** The posterior work object (for sampling distances in Monte Carlo). */
    EdsdPosterior posterior() { return posterior; }

    /**
     * One Monte Carlo draw: the chain with the distance fixed to {@code distPc} (NaN: computed as usual) and each
     * enabled relation's Teff shifted by {@code teffOffsetK[k]} (its scatter and zero point drawn by the caller),
     * keeping the star's class {@code cls} (not reclassified per draw; null: classified as usual) and starting the log g
     * iteration of the Gaia-band relations at {@code logg} (NaN: the solar value). Values only, no errors.
     */
    StarResult deriveDraw(StarInput in, StarResult out, double distPc, double[] teffOffsetK, LuminosityClass cls, double logg) {
        drawDistPc = distPc;
        drawTeffOffsetK = teffOffsetK;
        valuesOnly = true;
        drawClass = cls;
        drawLogg = logg;
        try {
            return derive(in, out);
        } finally {
            drawDistPc = Double.NaN;
            drawTeffOffsetK = null;
            valuesOnly = false;
            drawClass = null;
            drawLogg = Double.NaN;
        }
    }

    /** Derives everything for {@code in} into {@code out} (cleared first) and returns {@code out}. */
    public StarResult derive(StarInput in, StarResult out) {
        out.clear();
        long flags = 0;
        flags |= readPhotometry(in);
        flags |= readExtinction(in, out);
        flags |= readMetallicity(in);
        deredden();
        if (Double.isNaN(drawDistPc)) {
            flags |= distance(in, out);
        } else {
            // a Monte Carlo draw: the distance is the sampled one, known exactly within the draw
            out.distMethod = StarResult.DistanceMethod.INVERSE_PARALLAX;
            out.distPc = drawDistPc;
            out.distLoPc = out.distHiPc = drawDistPc;
        }
        boolean haveDist = out.distPc > 0 && Double.isFinite(out.distPc);
        if (haveDist) {
            mu = 5 * Math.log10(out.distPc / 10.0);
            sMu = 5 / LN10 * 0.5 * (out.distHiPc - out.distLoPc) / out.distPc;
            out.distModulusMag = mu;
            out.distModulusErrMag = sMu;
            for (int b = 0; b < Band.COUNT; b++) {
                if (!Double.isNaN(m0[b])) {
                    out.absMag[b] = m0[b] - mu;
                    out.absMagErr[b] = Math.sqrt(sm[b] * sm[b] + sMu * sMu + sq(rBand[b] * sEbv));
                }
            }
        } else {
            mu = sMu = Double.NaN;
        }
        flags |= visualMagnitude();

        // Teff, luminosity and class, iterated: the class picks the relations; the Gaia relations need log g.
        LuminosityClass cls = LuminosityClass.MAIN_SEQUENCE;
        double logg = DerivedConstants.LOGG_SUN_CGS;
        double sLogg = DWARF_LOGG_START_ERR;
        boolean fixedClass = drawClass != null;
        if (fixedClass && drawClass == LuminosityClass.EVOLVED) {
            cls = LuminosityClass.EVOLVED;
            estimateEvolved();
        } else {
            if (fixedClass && !Double.isNaN(drawLogg)) {
                logg = drawLogg;
                sLogg = 0.1;
            }
            estimateTeff(cls, logg, sLogg);
        }
        boolean classKnown = false;
        for (int iter = 0; iter < 5; iter++) {
            chain(out, haveDist);
            if (!haveDist || !(out.lumLsun > 0)) {
                break;
            }
            classKnown = true;
            if (cls == LuminosityClass.EVOLVED) {
                break;
            }
            double logL = Math.log10(out.lumLsun);
            if (logL > MassLuminosityEker2018.LOGL_MAX) {
                if (fixedClass) {
                    break;
                }
                cls = LuminosityClass.EVOLVED;
                estimateEvolved();
                continue;
            }
            double logM = MassLuminosityEker2018.logMass(logL);
            if (Double.isNaN(logM)) {
                break; // fainter than the relation: a dwarf, but no mass
            }
            double g = DerivedConstants.LOGG_SUN_CGS + logM - 2 * Math.log10(out.radiusRsun);
            if (!fixedClass && g < LuminosityClass.dwarfLoggBoundary(out.teffK)) {
                cls = LuminosityClass.EVOLVED;
                estimateEvolved();
                continue;
            }
            if (tUsesLogg && Math.abs(g - logg) > 0.005) {
                logg = g;
                sLogg = 0.1;
                estimateTeff(cls, logg, sLogg);
                continue;
            }
            break;
        }
        out.lumClass = classKnown ? cls : null;

        // flags that describe the final Teff
        if (Double.isNaN(out.teffK)) {
            if (tAnyColour) {
                flags |= COLOUR_OUT_OF_RANGE.mask();
            } else {
                flags |= PHOTOMETRY_MISSING.mask();
            }
        } else {
            if (tExtrapolated) {
                flags |= TEFF_EXTRAPOLATED.mask();
            }
            if (tAnyOutOfRange) {
                flags |= COLOUR_OUT_OF_RANGE.mask();
            }
            if ((tCount >= 2 && tChi2 > settings.teffDisagreeChi2(tCount - 1)) || tBoundBroken) {
                flags |= TEFF_COLOURS_DISAGREE.mask();
            }
            if (!classKnown) {
                flags |= LUM_CLASS_ASSUMED.mask();
            }
            if (Double.isNaN(v0)) {
                flags |= PHOTOMETRY_MISSING.mask();
            }
            boolean coolDwarf = cls == LuminosityClass.MAIN_SEQUENCE
                    && out.teffK < BolometricCorrectionFlower1996.COOL_DWARF_LIMIT_K;
            if (!BolometricCorrectionFlower1996.inRange(out.teffK) || coolDwarf) {
                flags |= BC_UNRELIABLE.mask();
            }
        }

        if (classKnown && cls == LuminosityClass.MAIN_SEQUENCE) {
            massChain(out);
            crossCheckDiameter(out);
            if (out.angDiamSbrMas > 0 && out.angDiamMas > 0) {
                double rel = Math.hypot(out.angDiamErrMas / out.angDiamMas,
                        SurfaceBrightnessKervella2004.relativeError(sm[V.ordinal()], sm[KS.ordinal()]));
                if (Math.abs(Math.log(out.angDiamMas / out.angDiamSbrMas)) > settings.diameterDisagreeSigma() * rel) {
                    flags |= DIAMETER_DISAGREE.mask();
                }
            }
        }
        if (Double.isNaN(out.massMsun)) {
            flags |= MASS_NOT_APPLICABLE.mask();
        }
        out.teffRelations = Double.isNaN(out.teffK) ? 0 : tMask;
        out.teffChi2 = tCount >= 2 ? tChi2 : Double.NaN;
        out.flags = flags;
        sanitize(out);
        return out;
    }

    private static double sq(double x) { return x * x; }

    private static double norm(double[] c) {
        double s2 = 0;
        for (double v : c) {
            s2 += v * v;
        }
        return Math.sqrt(s2);
    }

    private long readPhotometry(StarInput in) {
        long flags = 0;
        for (int b = 0; b < Band.COUNT; b++) {
            mObs[b] = Double.NaN;
            sm[b] = Double.NaN;
            if (!in.hasMag[b]) {
                continue;
            }
            double v = in.mag[b];
            if (!Double.isFinite(v)) {
                flags |= INPUT_INVALID.mask();
                continue;
            }
            if (!(v >= settings.magMin() && v <= settings.magMax())) {
                flags |= MAGNITUDE_SENTINEL.mask();
                continue;
            }
            double e = in.hasMagErr[b] ? in.magErr[b] : Double.NaN;
            if (!(e > 0 && e <= MAG_ERR_MAX)) {
                flags |= INPUT_INVALID.mask();
                continue;
            }
            mObs[b] = v;
            sm[b] = e;
        }
        return flags;
    }

    private long readExtinction(StarInput in, StarResult out) {
        long flags = 0;
        boolean valid = in.hasEbv && in.ebv >= 0 && in.ebv <= EBV_MAX;
        if (valid) {
            ebv = in.ebv;
            if (!in.hasEbvErr) {
                sEbv = settings.ebvErrDefault();
            } else if (in.ebvErr >= 0 && in.ebvErr <= EBV_MAX) {
                sEbv = in.ebvErr;
            } else {
                sEbv = settings.ebvErrDefault();
                flags |= INPUT_INVALID.mask();
            }
        } else {
            if (in.hasEbv) {
                flags |= INPUT_INVALID.mask();
            }
            flags |= EXTINCTION_ASSUMED.mask();
            ebv = settings.ebvDefault();
            sEbv = settings.ebvErrDefault();
        }
        out.ebvUsed = ebv;
        out.avMag = settings.rv() * ebv;
        return flags;
    }

    private long readMetallicity(StarInput in) {
        long flags = 0;
        boolean valid = in.hasFeh && in.feh >= -5 && in.feh <= 1;
        if (valid) {
            feh = in.feh;
            if (!in.hasFehErr) {
                sFeh = settings.fehErrDefault();
            } else if (in.fehErr >= 0 && in.fehErr <= 5) {
                sFeh = in.fehErr;
            } else {
                sFeh = settings.fehErrDefault();
                flags |= INPUT_INVALID.mask();
            }
        } else {
            if (in.hasFeh) {
                flags |= INPUT_INVALID.mask();
            }
            flags |= METALLICITY_ASSUMED.mask();
            feh = settings.fehDefault();
            sFeh = settings.fehErrDefault();
        }
        return flags;
    }

    private void deredden() {
        double rv = settings.rv();
        for (int b = 0; b < Band.COUNT; b++) {
            rBand[b] = rv * ccmOverAv[b];
        }
        double bp = mObs[BP.ordinal()];
        double rp = mObs[RP.ordinal()];
        double c0 = !Double.isNaN(bp) && !Double.isNaN(rp) ? GaiaBandExtinction.dereddenedBpRp(bp - rp, ebv) : 1.0;
        c0 = Math.max(-0.5, Math.min(5.0, c0));
        rBand[G.ordinal()] = GaiaBandExtinction.rG(c0);
        rBand[BP.ordinal()] = GaiaBandExtinction.rBp(c0);
        rBand[RP.ordinal()] = GaiaBandExtinction.rRp(c0);
        for (int b = 0; b < Band.COUNT; b++) {
            m0[b] = mObs[b] - rBand[b] * ebv;
        }
    }

    private long distance(StarInput in, StarResult out) {
        if (!in.hasParallax) {
            return PARALLAX_MISSING.mask();
        }
        double plx = in.parallaxMas;
        double err = in.hasParallaxErr ? in.parallaxErrMas : Double.NaN;
        if (!Double.isFinite(plx) || !(err >= PARALLAX_ERR_MIN_MAS && err <= PARALLAX_ERR_MAX_MAS)) {
            return INPUT_INVALID.mask();
        }
        double p = plx - settings.parallaxZeroPointMas();
        if (Math.abs(p) > settings.parallaxMaxMas()) {
            return PARALLAX_IMPLAUSIBLE.mask();
        }
        long flags = 0;
        out.parallaxCorrMas = p;
        double snr = p / err;
        if (p <= 0) {
            flags |= PARALLAX_NONPOSITIVE.mask();
        }
        if (!(snr >= settings.parallaxSnrMin())) {
            flags |= PARALLAX_LOW_SNR.mask();
        }
        if (settings.distanceSnrMin() > 0 && !(snr >= settings.distanceSnrMin())) {
            return flags | DISTANCE_WITHHELD.mask();
        }
        DeriveSettings.DistanceMethod m = settings.distanceMethod();
        boolean inverse = m == DeriveSettings.DistanceMethod.INVERSE
                || (m == DeriveSettings.DistanceMethod.AUTO && p > 0 && snr >= settings.parallaxSnrMin());
        double lengthKpc = settings.priorLengthKpc();
        if (inverse) {
            if (p > 0) {
                out.distMethod = StarResult.DistanceMethod.INVERSE_PARALLAX;
                out.distPc = ParallaxDistance.inverseParallaxPc(p);
                out.distLoPc = ParallaxDistance.inverseParallaxPc(p + err);
                out.distHiPc = ParallaxDistance.inverseParallaxPc(p - err); // NaN when p <= err: no upper bound
            }
        } else if (settings.posteriorPercentiles()) {
            if (posterior.percentilesKpc(p, err, lengthKpc, probs, quantiles)) {
                out.distMethod = StarResult.DistanceMethod.EDSD_MEDIAN;
                out.distLoPc = 1000 * quantiles[0];
                out.distPc = 1000 * quantiles[1];
                out.distHiPc = 1000 * quantiles[2];
            }
        } else {
            double mode = ParallaxDistance.edsdModeKpc(p, err, lengthKpc);
            if (mode > 0) {
                // Laplace approximation at the mode: σ_r = (−d² ln p / dr²)^(−1/2)
                double curv = -2 / (mode * mode)
                        - (1 / Math.pow(mode, 4) - 2 * (p - 1 / mode) / (mode * mode * mode)) / (err * err);
                double sr = curv < 0 ? 1 / Math.sqrt(-curv) : Double.NaN;
                out.distMethod = StarResult.DistanceMethod.EDSD_MODE;
                out.distPc = 1000 * mode;
                out.distLoPc = 1000 * Math.max(mode - sr, 0);
                out.distHiPc = 1000 * (mode + sr);
            }
        }
        return flags;
    }

    /** V₀ and its error: measured V, or G converted with BP−RP (Riello et al. 2021). */
    private long visualMagnitude() {
        int vi = V.ordinal();
        vObserved = !Double.isNaN(m0[vi]);
        if (!valuesOnly) {
            java.util.Arrays.fill(cV, 0);
        }
        if (vObserved) {
            v0 = m0[vi];
            cV[vi] = sm[vi];
            cV[SRC_EBV] = -rBand[vi] * sEbv;
            return 0;
        }
        v0 = Double.NaN;
        int g = G.ordinal();
        int bp = BP.ordinal();
        int rp = RP.ordinal();
        if (Double.isNaN(m0[g]) || Double.isNaN(m0[bp]) || Double.isNaN(m0[rp])) {
            return 0;
        }
        double c0 = m0[bp] - m0[rp];
        if (!GaiaToJohnsonRiello2021.inRange(c0)) {
            return 0;
        }
        v0 = m0[g] - GaiaToJohnsonRiello2021.gMinusV(c0);
        double dc = GaiaToJohnsonRiello2021.dGMinusVdC(c0);
        cV[g] = sm[g];
        cV[bp] = -dc * sm[bp];
        cV[rp] = dc * sm[rp];
        cV[SRC_EBV] = (-rBand[g] + dc * (rBand[bp] - rBand[rp])) * sEbv;
        cV[SRC_GV] = GaiaToJohnsonRiello2021.SCATTER_MAG;
        return V_FROM_G.mask();
    }

    /** Evolved stars: giant relations with the log g prior; main-sequence (dwarf and subgiant) ones if none apply. */
    private void estimateEvolved() {
        estimateTeff(LuminosityClass.EVOLVED, settings.giantLoggPrior(), settings.giantLoggPriorErr());
        if (tCount == 0) {
            boolean anyGiantColour = tAnyColour;
            boolean anyGiantOut = tAnyOutOfRange;
            estimateTeff(LuminosityClass.MAIN_SEQUENCE, settings.giantLoggPrior(), settings.giantLoggPriorErr());
            tAnyColour |= anyGiantColour;
            tAnyOutOfRange |= anyGiantOut;
        }
    }

    /**
     * Inverse-variance mean of the Teff of every usable relation of class {@code cls}.
     *
     * <p>Weights: w_i = 1 / (σ_rel,i² + (∂T_i/∂X_i)² σ_X,i²). The error of the mean is propagated to first order
     * through every shared input, not averaged down as if the colours were independent: the gradient of the mean
     * with respect to each band magnitude (a band appears in several colours), E(B−V), [Fe/H] and log g is
     * accumulated, and σ²(T̄) = Σ_b (∂T̄/∂m_b)² σ_b² + (∂T̄/∂E)² σ_E² + (∂T̄/∂[Fe/H])² σ_[Fe/H]² + (∂T̄/∂log g)² σ_g²
     * + Σ_i (w_i/W)² σ_rel,i² + zero point². Colours outside a relation's range are not used, but a colour beyond an
     * edge by more than twice its error bounds Teff (redder than the red edge: cooler than that edge's Teff); an
     * in-range mean that breaks such a bound is flagged as a disagreement.
     */
    private void estimateTeff(LuminosityClass cls, double logg, double sLogg) {
        double sumW = 0;
        double sumWT = 0;
        double zp = 0;
        int n = 0;
        long mask = 0;
        boolean anyColour = false;
        boolean anyOut = false;
        boolean extrapolated = false;
        boolean usesLogg = false;
        double tUpper = Double.POSITIVE_INFINITY;
        double tLower = 0;
        java.util.Arrays.fill(gradBand, 0);
        double gEbv = 0;
        double gFeh = 0;
        double gLogg = 0;
        double scatterVar = 0;
        for (int k = 0; k < relations.length; k++) {
            TeffRelation r = relations[k];
            if (r.appliesTo() != cls) {
                continue;
            }
            int bi = r.blue().ordinal();
            int ri = r.red().ordinal();
            if (Double.isNaN(m0[bi]) || Double.isNaN(m0[ri])) {
                continue;
            }
            anyColour = true;
            double x = m0[bi] - m0[ri];
            double sx2 = sm[bi] * sm[bi] + sm[ri] * sm[ri] + sq((rBand[bi] - rBand[ri]) * sEbv);
            boolean in = r.inRange(x, feh);
            if (!in) {
                anyOut = true;
                double margin = 2 * Math.sqrt(sx2);
                if (x > r.colourMax() + margin) {
                    tUpper = Math.min(tUpper, r.teff(r.colourMax(), feh, logg));
                } else if (x < r.colourMin() - margin) {
                    tLower = Math.max(tLower, r.teff(r.colourMin(), feh, logg));
                }
                if (!settings.allowExtrapolation()) {
                    continue;
                }
            }
            double t = r.teff(x, feh, logg);
            if (drawTeffOffsetK != null) {
                t += drawTeffOffsetK[k];
            }
            if (!(t >= TEFF_SANE_MIN_K && t <= TEFF_SANE_MAX_K)) {
                continue;
            }
            double dx = r.dTeffDColour(x, feh, logg);
            double w = 1 / (dx * dx * sx2 + sq(r.scatterK()));
            tEst[n] = t;
            wEst[n] = w;
            n++;
            sumW += w;
            sumWT += w * t;
            gradBand[bi] += w * dx;
            gradBand[ri] -= w * dx;
            gEbv -= w * dx * (rBand[bi] - rBand[ri]);
            gFeh += w * r.dTeffDFeh(x, feh, logg);
            gLogg += w * r.dTeffDLogg(x, feh);
            scatterVar += w * w * sq(r.scatterK());
            zp = Math.max(zp, r.zeroPointK());
            mask |= 1L << relationIndex[k];
            extrapolated |= !in;
            usesLogg |= r.form() == TeffRelation.Form.GAIA2021;
        }
        tCount = n;
        tAnyColour = anyColour;
        tAnyOutOfRange = anyOut;
        tExtrapolated = extrapolated;
        tUsesLogg = usesLogg;
        tMask = mask;
        tBoundBroken = false;
        if (n == 0) {
            tMean = tErr = tChi2 = Double.NaN;
            return;
        }
        tMean = sumWT / sumW;
        if (valuesOnly) {
            tErr = tChi2 = Double.NaN;
            return;
        }
        java.util.Arrays.fill(cT, 0);
        for (int b = 0; b < Band.COUNT; b++) {
            cT[b] = gradBand[b] == 0 ? 0 : gradBand[b] * sm[b] / sumW;
        }
        cT[SRC_EBV] = gEbv * sEbv / sumW;
        cT[SRC_FEH] = gFeh * sFeh / sumW;
        cT[SRC_LOGG] = gLogg * sLogg / sumW;
        cT[SRC_SCATTER] = Math.sqrt(scatterVar) / sumW;
        cT[SRC_ZP] = zp;
        tErr = norm(cT);
        double chi2 = 0;
        for (int i = 0; i < n; i++) {
            chi2 += wEst[i] * sq(tEst[i] - tMean);
        }
        tChi2 = chi2;
        tBoundBroken = tMean > tUpper + 2 * tErr || tMean < tLower - 2 * tErr;
    }

    /** BC, bolometric magnitudes, L, R and angular diameter from the current Teff estimate. */
    private void chain(StarResult out, boolean haveDist) {
        out.teffK = tMean;
        out.teffErrK = tErr;
        out.bcV = out.bcVErr = out.mbolMag = out.mbolErrMag = Double.NaN;
        out.lumLsun = out.lumErrLsun = out.lumW = out.radiusRsun = out.radiusErrRsun = Double.NaN;
        out.angDiamMas = out.angDiamErrMas = Double.NaN;
        if (Double.isNaN(tMean)) {
            return;
        }
        double t = tMean;
        out.bcV = BolometricCorrectionFlower1996.bcV(t);
        double beta = BolometricCorrectionFlower1996.dBcVdTeff(t);
        out.bcVErr = Math.abs(beta) * tErr;
        if (Double.isNaN(v0)) {
            return;
        }
        double mbolApp = v0 + out.bcV;
        double tRatio2 = sq(Iau2015.TEFF_SUN_K / t);
        // apparent bolometric magnitude and ln θ: V₀ and Teff share sources (V is in the colours), so their
        // contributions are added source by source before squaring
        if (!valuesOnly) {
            for (int j = 0; j < NSRC; j++) {
                cMbol[j] = cV[j] + beta * cT[j];
                work[j] = -0.2 * LN10 * cMbol[j] - 2 * cT[j] / t;
            }
        }
        double lumAt10pc = Math.pow(10, -0.4 * (mbolApp - BolometricCorrectionFlower1996.MBOL_SUN));
        out.angDiamMas = THETA_SUN_AT_10PC_MAS * Math.sqrt(lumAt10pc) * tRatio2;
        out.angDiamErrMas = valuesOnly ? Double.NaN : out.angDiamMas * norm(work);
        if (!haveDist) {
            return;
        }
        double mbolAbs = mbolApp - mu;
        if (valuesOnly) {
            sMbol = Double.NaN;
        } else {
            cMbol[SRC_MU] = -sMu;
            sMbol = norm(cMbol);
            for (int j = 0; j < NSRC; j++) {
                cLnR[j] = -0.2 * LN10 * cMbol[j] - 2 * cT[j] / t;
            }
        }
        out.mbolMag = mbolAbs - BolometricCorrectionFlower1996.MBOL_SUN + DerivedConstants.MBOL_SUN_IAU;
        out.mbolErrMag = sMbol;
        out.lumLsun = Math.pow(10, -0.4 * (mbolAbs - BolometricCorrectionFlower1996.MBOL_SUN));
        out.lumErrLsun = out.lumLsun * 0.4 * LN10 * sMbol;
        out.lumW = out.lumLsun * Iau2015.L_SUN_W;
        out.radiusRsun = Math.sqrt(out.lumLsun) * tRatio2;
        out.radiusErrRsun = valuesOnly ? Double.NaN : out.radiusRsun * norm(cLnR);
    }

    private void massChain(StarResult out) {
        if (!(out.lumLsun > 0 && out.radiusRsun > 0)) {
            return;
        }
        double logL = Math.log10(out.lumLsun);
        double logM = MassLuminosityEker2018.logMass(logL);
        if (Double.isNaN(logM)) {
            return;
        }
        double m = Math.pow(10, logM);
        double slope = MassLuminosityEker2018.dLogMassDLogL(logL);
        double r = out.radiusRsun;
        // ln M = ln10 · slope · (−0.4 M_bol); ln ρ = ln M − 3 ln R; log g = (ln M − 2 ln R) / ln10, source by source
        // (a Monte Carlo draw needs no errors: NaN, and the loop is skipped)
        double varLnM = valuesOnly ? Double.NaN : 0;
        double varLnRho = varLnM;
        double varLnG = varLnM;
        for (int j = 0; j < NSRC && !valuesOnly; j++) {
            double lnM = LN10 * slope * -0.4 * cMbol[j];
            varLnM += lnM * lnM;
            varLnRho += sq(lnM - 3 * cLnR[j]);
            varLnG += sq(lnM - 2 * cLnR[j]);
        }
        out.massMsun = m;
        out.massErrMsun = m * Math.sqrt(varLnM);
        out.densitySun = m / (r * r * r);
        out.densityKgM3 = out.densitySun * DerivedConstants.RHO_SUN_KG_M3;
        out.densityErrKgM3 = out.densityKgM3 * Math.sqrt(varLnRho);
        out.loggCgs = DerivedConstants.LOGG_SUN_CGS + logM - 2 * Math.log10(r);
        out.loggErrCgs = Math.sqrt(varLnG) / LN10;
    }

    private void crossCheckDiameter(StarResult out) {
        int k = KS.ordinal();
        if (!vObserved || Double.isNaN(m0[k])) {
            return;
        }
        out.angDiamSbrMas = SurfaceBrightnessKervella2004.angularDiameterMas(v0, m0[k]);
    }

    /** No infinity leaves the core: anything not finite becomes NaN (NULL). */
    private static void sanitize(StarResult o) {
        o.parallaxCorrMas = fin(o.parallaxCorrMas);
        o.distPc = fin(o.distPc);
        o.distLoPc = fin(o.distLoPc);
        o.distHiPc = fin(o.distHiPc);
        o.distModulusMag = fin(o.distModulusMag);
        o.distModulusErrMag = fin(o.distModulusErrMag);
        for (int b = 0; b < Band.COUNT; b++) {
            o.absMag[b] = fin(o.absMag[b]);
            o.absMagErr[b] = fin(o.absMagErr[b]);
        }
        o.teffK = fin(o.teffK);
        o.teffErrK = fin(o.teffErrK);
        o.teffChi2 = fin(o.teffChi2);
        o.bcV = fin(o.bcV);
        o.bcVErr = fin(o.bcVErr);
        o.mbolMag = fin(o.mbolMag);
        o.mbolErrMag = fin(o.mbolErrMag);
        o.lumLsun = fin(o.lumLsun);
        o.lumErrLsun = fin(o.lumErrLsun);
        o.lumW = fin(o.lumW);
        o.radiusRsun = fin(o.radiusRsun);
        o.radiusErrRsun = fin(o.radiusErrRsun);
        o.massMsun = fin(o.massMsun);
        o.massErrMsun = fin(o.massErrMsun);
        o.densityKgM3 = fin(o.densityKgM3);
        o.densityErrKgM3 = fin(o.densityErrKgM3);
        o.densitySun = fin(o.densitySun);
        o.loggCgs = fin(o.loggCgs);
        o.loggErrCgs = fin(o.loggErrCgs);
        o.angDiamMas = fin(o.angDiamMas);
        o.angDiamErrMas = fin(o.angDiamErrMas);
        o.angDiamSbrMas = fin(o.angDiamSbrMas);
    }

    private static double fin(double v) { return Double.isFinite(v) ? v : Double.NaN; }
}
