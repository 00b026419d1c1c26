package org.starderive.physics;

import java.util.Arrays;
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
 *   <li>Teff by calibration {@link Regime}: each regime's in-range colour relations ({@link TeffRelations}) give an
 *       inverse-variance mean ({@link TeffEstimator}); M-dwarf, FGK and hot estimates are blended across the
 *       K7–M0 and late-A–early-F zones; a chi-square test flags disagreement;</li>
 *   <li>L and R: BC_V (Flower 1996 / Torres 2010) on its own solar scale, L/L⊙ = 10^(−0.4 (M_bol − M_bol,⊙)) and
 *       the Stefan–Boltzmann law R/R⊙ = (L/L⊙)^½ (Teff⊙/Teff)² with the nominal Teff⊙ (IAU 2015 B3); for M dwarfs R
 *       from M_Ks ({@link RadiusMann2015}) and L = R² (Teff/Teff⊙)⁴; V from G when V is missing (Riello et al. 2021);
 *       M_bol reported on the IAU 2015 B2 scale; angular diameter θ = 2R/d, or from the bolometric flux alone;</li>
 *   <li>class ({@link LuminosityClass}): a red star by its M_Ks, others by the log g boundary; for main-sequence stars
 *       the mass from {@link MassLuminosityEker2018} or, for M dwarfs, {@link MassMann2019}, mean density
 *       ρ = M / (4/3 π R³) and log g = log10(G M / R²) in cgs;</li>
 *   <li>for main-sequence stars, the surface-brightness diameter ({@link SurfaceBrightnessKervella2004}) as a
 *       cross-check of the Stefan–Boltzmann one.</li>
 * </ol>
 * First-order errors are propagated source by source over the table of {@link ErrorSource}: every independent source
 * carries its derivative through Teff, M_bol, L, R, θ, mass, density and log g, so that shared inputs are correlated
 * correctly. The Monte Carlo path ({@link MonteCarloDeriver}) runs this same chain with every source perturbed by
 * z × σ ({@link #deriveDraw}).
 */
public final class StarDeriver {
    /** Cumulative probabilities of the 16th, 50th and 84th percentiles (±1σ of a Gaussian). */
    static final double P16 = 0.15865525393145707;
    static final double P84 = 0.8413447460685429;
    private static final double LN10 = Math.log(10);
    private static final double MAG_ERR_MAX = 10.0;
    private static final double PARALLAX_ERR_MAX_MAS = 1e5;
    /** Below a nano-arcsecond an error is not a measurement (its square underflows the posterior). */
    private static final double PARALLAX_ERR_MIN_MAS = 1e-6;
    private static final double EBV_MAX = 20.0;
    private static final double DWARF_LOGG_START_ERR = 0.3;
    private static final int CLASS_ITERATIONS_MAX = 8;
    /** θ in mas of a 1 R⊙ star at 10 pc: 2 R⊙ / 10 pc. */
    private static final double THETA_SUN_AT_10PC_MAS = 2 * Iau2015.R_SUN_M / (10 * DerivedConstants.PARSEC_M) / DerivedConstants.MAS_RAD;
    private static final int NSRC = ErrorSource.COUNT;

    private final DeriveSettings settings;
    private final TeffRelation[] relations;
    private final double[] ccmOverAv = new double[Band.COUNT];
    private final EdsdPosterior posterior = EdsdPosterior.standard();
    private final double[] probs = {P16, 0.5, P84};
    private final double[] quantiles = new double[3];

    // per-star state
    private final StarState s = new StarState();
    private final TeffEstimator estMain;
    private final TeffEstimator estAlt;
    private final TeffEstimator estM;
    /** Whether estM and estHot hold this star's (or draw's) estimates. */
    private boolean regimeEstimatesFresh;
    private final TeffEstimator estHot;
    private double v0;
    private boolean vObserved;
    private double mu;
    private double sMu;
    // the blended Teff estimate
    private double tMean;
    private double tErr;
    private long tMask;
    private double tChi2;
    private int tCount;
    private boolean tAnyColour;
    private boolean tExtrapolated;
    private boolean tUsesLogg;
    private boolean tBoundBroken;
    private double wM;
    /** Contributions of each source to the M-dwarf weight (its derivative times the M estimate's contribution). */
    private final double[] dwM = new double[ErrorSource.COUNT];
    private double wHot;
    private Regime tRegime;
    /** First-order contributions of each error source to Teff, V₀, absolute M_bol, ln R, ln θ and M_Ks. */
    private final double[] cT = new double[NSRC];
    private final double[] cV = new double[NSRC];
    private final double[] cMbol = new double[NSRC];
    private final double[] cLnR = new double[NSRC];
    private final double[] cKs = new double[NSRC];
    private final double[] cMbolM = new double[NSRC];
    private final double[] cLnRM = new double[NSRC];
    private final double[] work = new double[NSRC];
    private final double[] workM = new double[NSRC];
    /** Whether the M-dwarf radius route gave L and R in the last chain (then its weight is {@link #wM}). */
    private double wRadiusM;
    // Monte Carlo draw overrides (NaN / null: off)
    private double drawDistPc = Double.NaN;
    private double[] drawTeffOffsetK;
    /** Standard normal deviates per {@link ErrorSource} in a Monte Carlo draw (null: none). */
    private double[] drawZ;
    private LuminosityClass drawClass;
    private double drawLogg = Double.NaN;

    public StarDeriver(DeriveSettings settings) {
        this.settings = settings;
        List<TeffRelation> all = TeffRelations.all();
        int n = Long.bitCount(settings.relationMask());
        this.relations = new TeffRelation[n];
        int[] relationIndex = new int[n];
        int k = 0;
        for (int i = 0; i < all.size(); i++) {
            if ((settings.relationMask() & (1L << i)) != 0) {
                relations[k] = all.get(i);
                relationIndex[k] = i;
                k++;
            }
        }
        boolean extrapolate = settings.allowExtrapolation();
        this.estMain = new TeffEstimator(s, relations, relationIndex, extrapolate);
        this.estAlt = new TeffEstimator(s, relations, relationIndex, extrapolate);
        this.estM = new TeffEstimator(s, relations, relationIndex, extrapolate);
        this.estHot = new TeffEstimator(s, relations, relationIndex, extrapolate);
        for (Band b : Band.values()) {
            ccmOverAv[b.ordinal()] = CardelliClaytonMathis1989.bandOverAv(b, settings.rv());
        }
    }

    public DeriveSettings settings() { return settings; }

    /**
     * Switches error sources on and off (bit j: {@link ErrorSource} j), in the first-order errors and in Monte Carlo
     * draws alike; all are on by default. For tests that compare the two paths one source at a time.
     */
    void errorSources(long mask) { s.sourceMask = mask; }

    long errorSources() { return s.sourceMask; }

    /** The enabled relations, in the order used by {@link #deriveDraw} offsets. */
    TeffRelation[] enabledRelations() { return relations; }

    /** The posterior work object (for sampling distances in Monte Carlo). */
    EdsdPosterior posterior() { return posterior; }

    /**
     * One Monte Carlo draw: the chain with the distance fixed to {@code distPc} (NaN: computed as usual), each
     * enabled relation's Teff shifted by {@code teffOffsetK[k]} (its scatter and zero point drawn by the caller), every
     * other error source j perturbed by {@code z[j]} times its σ ({@link ErrorSource}), keeping the star's class
     * {@code cls} (null: classified as usual) and starting the log g iteration of the Gaia-band relations at
     * {@code logg} (NaN: the solar value). Values only, no errors.
     */
    StarResult deriveDraw(StarInput in, StarResult out, double distPc, double[] teffOffsetK, double[] z,
                          LuminosityClass cls, double logg) {
        drawDistPc = distPc;
        drawTeffOffsetK = teffOffsetK;
        drawZ = z;
        s.valuesOnly = true;
        drawClass = cls;
        drawLogg = logg;
        try {
            return derive(in, out);
        } finally {
            drawDistPc = Double.NaN;
            drawTeffOffsetK = null;
            drawZ = null;
            s.valuesOnly = false;
            drawClass = null;
            drawLogg = Double.NaN;
        }
    }

    /**
     * The blend spreads (Teff, M_bol, ln M) of the star's nominal derivation: a Monte Carlo draw scales the nominal
     * spread by its z (a spread recomputed inside the draw would make the blend term quadratic in z).
     */
    private final double[] nominalSpread = new double[3];

    private double blendSpread(int k, double computed) {
        if (drawZ == null) {
            nominalSpread[k] = computed;
            return computed;
        }
        return nominalSpread[k];
    }

    /** z × σ of source {@code j} in a draw; 0 outside draws. */
    private double dz(int j, double sigma) {
        return drawZ == null ? 0.0 : drawZ[j] * sigma;
    }

    /** Derives everything for {@code in} into {@code out} (cleared first) and returns {@code out}. */
    public StarResult derive(StarInput in, StarResult out) {
        out.clear();
        regimeEstimatesFresh = false;
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
                if (!Double.isNaN(s.m0[b])) {
                    out.absMag[b] = s.m0[b] - mu;
                    out.absMagErr[b] = Math.sqrt(s.sm[b] * s.sm[b] + sMu * sMu + sq(s.rBand[b] * s.sEbv));
                }
            }
        } else {
            mu = sMu = Double.NaN;
        }
        flags |= visualMagnitude();
        absoluteKs(out);

        // Teff, luminosity and class, iterated: the class picks the relations; the Gaia relations need log g
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
                sLogg = 0; // derived from the chain, not an independent source
            } else {
                logg += dz(ErrorSource.LOGG, sLogg); // assumed until a distance gives L and R
            }
            estimate(LuminosityClass.MAIN_SEQUENCE, logg, sLogg);
        }
        boolean classKnown = false;
        boolean stale = true; // the chain does not yet describe the current estimate
        for (int iter = 0; iter < CLASS_ITERATIONS_MAX; iter++) {
            chain(out, haveDist);
            stale = false;
            if (!haveDist || !(out.lumLsun > 0)) {
                break;
            }
            classKnown = true;
            if (cls == LuminosityClass.EVOLVED) {
                break;
            }
            double mKs = out.absMag[KS.ordinal()];
            if (wM >= 0.5 && !Double.isNaN(mKs)) {
                // a red star: an M dwarf, or a giant if brighter than any M dwarf in Ks
                if (!fixedClass && mKs < Regime.M_DWARF_MKS_MIN) {
                    cls = LuminosityClass.EVOLVED;
                    estimateEvolved();
                    stale = true;
                    continue;
                }
                break;
            }
            double logL = Math.log10(out.lumLsun);
            if (logL > MassLuminosityEker2018.LOGL_MAX) {
                if (fixedClass) {
                    break;
                }
                cls = LuminosityClass.EVOLVED;
                estimateEvolved();
                stale = true;
                continue;
            }
            double logM = MassLuminosityEker2018.logMass(logL);
            if (Double.isNaN(logM)) {
                break; // fainter than the relation: a dwarf, but no mass from it
            }
            double g = DerivedConstants.LOGG_SUN_CGS + logM - 2 * Math.log10(out.radiusRsun);
            if (!fixedClass && g < LuminosityClass.dwarfLoggBoundary(out.teffK)) {
                cls = LuminosityClass.EVOLVED;
                estimateEvolved();
                stale = true;
                continue;
            }
            if (tUsesLogg && Math.abs(g - logg) > 0.005) {
                // a dwarf's log g now comes from the chain itself: not an independent error source (its feedback on
                // Teff through the Gaia-band relations is left out of the first-order errors; draws iterate it)
                logg = g;
                sLogg = 0;
                estimate(LuminosityClass.MAIN_SEQUENCE, logg, sLogg);
                stale = true;
                continue;
            }
            break;
        }
        if (stale) {
            // the iteration cap was reached right after a re-estimate: every field must describe the final estimate
            chain(out, haveDist);
        }
        out.lumClass = classKnown ? cls : null;
        out.regime = Double.isNaN(out.teffK) ? null : tRegime;

        // flags that describe the final Teff
        if (Double.isNaN(out.teffK)) {
            flags |= tAnyColour ? COLOUR_OUT_OF_RANGE.mask() : PHOTOMETRY_MISSING.mask();
        } else {
            if (tExtrapolated) {
                flags |= TEFF_EXTRAPOLATED.mask();
            }
            if ((tCount >= 2 && tChi2 > settings.teffDisagreeChi2(tCount - 1)) || tBoundBroken) {
                flags |= TEFF_COLOURS_DISAGREE.mask();
            }
            if (!classKnown) {
                flags |= LUM_CLASS_ASSUMED.mask();
            }
            if (Double.isNaN(out.lumLsun) && haveDist) {
                flags |= PHOTOMETRY_MISSING.mask();
            }
            boolean bcUsed = wRadiusM < 1 && !Double.isNaN(out.bcV);
            boolean coolDwarf = cls == LuminosityClass.MAIN_SEQUENCE
                    && out.teffK < BolometricCorrectionFlower1996.COOL_DWARF_LIMIT_K;
            if (bcUsed && (!BolometricCorrectionFlower1996.inRange(out.teffK) || coolDwarf)) {
                flags |= BC_UNRELIABLE.mask();
            }
            if (tRegime == Regime.HOT && out.teffErrK > settings.hotTeffErrFracMax() * out.teffK) {
                flags |= HOT_TEFF_UNCERTAIN.mask();
            }
        }

        if (classKnown && cls == LuminosityClass.MAIN_SEQUENCE) {
            massChain(out);
        }
        if (classKnown && cls == LuminosityClass.MAIN_SEQUENCE && !s.valuesOnly) {
            // the surface-brightness cross-check only flags the nominal star: a draw has no use for it
            crossCheckDiameter(out);
            if (out.angDiamSbrMas > 0 && out.angDiamMas > 0) {
                double rel = Math.hypot(out.angDiamErrMas / out.angDiamMas,
                        SurfaceBrightnessKervella2004.relativeError(s.sm[V.ordinal()], s.sm[KS.ordinal()]));
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
            s.mObs[b] = Double.NaN;
            s.sm[b] = Double.NaN;
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
            s.mObs[b] = v + dz(b, e);
            s.sm[b] = e;
        }
        return flags;
    }

    private long readExtinction(StarInput in, StarResult out) {
        long flags = 0;
        boolean valid = in.hasEbv && in.ebv >= 0 && in.ebv <= EBV_MAX;
        if (valid) {
            s.ebv = in.ebv;
            if (!in.hasEbvErr) {
                s.sEbv = settings.ebvErrDefault();
            } else if (in.ebvErr >= 0 && in.ebvErr <= EBV_MAX) {
                s.sEbv = in.ebvErr;
            } else {
                s.sEbv = settings.ebvErrDefault();
                flags |= INPUT_INVALID.mask();
            }
        } else {
            if (in.hasEbv) {
                flags |= INPUT_INVALID.mask();
            }
            flags |= EXTINCTION_ASSUMED.mask();
            s.ebv = settings.ebvDefault();
            s.sEbv = settings.ebvErrDefault();
        }
        s.ebv = Math.max(0, s.ebv + dz(ErrorSource.EBV, s.sEbv));
        out.ebvUsed = s.ebv;
        out.avMag = settings.rv() * s.ebv;
        return flags;
    }

    private long readMetallicity(StarInput in) {
        long flags = 0;
        boolean valid = in.hasFeh && in.feh >= -5 && in.feh <= 1;
        s.fehMeasured = valid;
        if (valid) {
            s.feh = in.feh;
            if (!in.hasFehErr) {
                s.sFeh = settings.fehErrDefault();
            } else if (in.fehErr >= 0 && in.fehErr <= 5) {
                s.sFeh = in.fehErr;
            } else {
                s.sFeh = settings.fehErrDefault();
                flags |= INPUT_INVALID.mask();
            }
        } else {
            if (in.hasFeh) {
                flags |= INPUT_INVALID.mask();
            }
            flags |= METALLICITY_ASSUMED.mask();
            s.feh = settings.fehDefault();
            s.sFeh = settings.fehErrDefault();
        }
        s.feh += dz(ErrorSource.FEH, s.sFeh);
        return flags;
    }

    private void deredden() {
        double rv = settings.rv();
        for (int b = 0; b < Band.COUNT; b++) {
            s.rBand[b] = rv * ccmOverAv[b];
        }
        double bp = s.mObs[BP.ordinal()];
        double rp = s.mObs[RP.ordinal()];
        double c0 = !Double.isNaN(bp) && !Double.isNaN(rp) ? GaiaBandExtinction.dereddenedBpRp(bp - rp, s.ebv) : 1.0;
        c0 = Math.max(-0.5, Math.min(5.0, c0));
        s.rBand[G.ordinal()] = GaiaBandExtinction.rG(c0);
        s.rBand[BP.ordinal()] = GaiaBandExtinction.rBp(c0);
        s.rBand[RP.ordinal()] = GaiaBandExtinction.rRp(c0);
        for (int b = 0; b < Band.COUNT; b++) {
            s.m0[b] = s.mObs[b] - s.rBand[b] * s.ebv;
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
        double[] m0 = s.m0;
        vObserved = !Double.isNaN(m0[vi]);
        if (!s.valuesOnly) {
            Arrays.fill(cV, 0);
        }
        if (vObserved) {
            v0 = m0[vi];
            cV[vi] = s.sm[vi];
            cV[ErrorSource.EBV] = -s.rBand[vi] * s.sEbv;
            s.mask(cV);
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
        v0 = m0[g] - GaiaToJohnsonRiello2021.gMinusV(c0) + dz(ErrorSource.GV, GaiaToJohnsonRiello2021.SCATTER_MAG);
        double dc = GaiaToJohnsonRiello2021.dGMinusVdC(c0);
        cV[g] = s.sm[g];
        cV[bp] = -dc * s.sm[bp];
        cV[rp] = dc * s.sm[rp];
        cV[ErrorSource.EBV] = (-s.rBand[g] + dc * (s.rBand[bp] - s.rBand[rp])) * s.sEbv;
        cV[ErrorSource.GV] = GaiaToJohnsonRiello2021.SCATTER_MAG;
        s.mask(cV);
        return V_FROM_G.mask();
    }

    /** Contributions to the absolute Ks magnitude (the M-dwarf radius and mass relations' variable). */
    private void absoluteKs(StarResult out) {
        if (s.valuesOnly) {
            return;
        }
        Arrays.fill(cKs, 0);
        int k = KS.ordinal();
        cKs[k] = s.sm[k];
        cKs[ErrorSource.EBV] = -s.rBand[k] * s.sEbv;
        cKs[ErrorSource.MU] = Double.isNaN(sMu) ? 0 : -sMu;
        s.mask(cKs);
    }

    /** Evolved stars: giant relations with the log g prior; main-sequence (FGK) ones if none apply; hot blend. */
    private void estimateEvolved() {
        double sLogg = settings.giantLoggPriorErr();
        double logg = settings.giantLoggPrior() + dz(ErrorSource.LOGG, sLogg);
        estimate(LuminosityClass.EVOLVED, logg, sLogg);
    }

    /**
     * Teff of class {@code cls}: the regimes' estimates blended (see {@link Regime}). Main sequence: M dwarf, FGK and
     * hot; evolved: giant (FGK dwarf relations if no giant relation applies) and hot.
     */
    private void estimate(LuminosityClass cls, double logg, double sLogg) {
        double[] off = drawTeffOffsetK;
        TeffEstimator f = estMain;
        if (cls == LuminosityClass.EVOLVED) {
            f.estimate(Regime.GIANT, logg, sLogg, off, 0);
            if (f.n == 0) {
                boolean anyColour = f.anyColour;
                boolean anyOut = f.anyOut;
                double upper = f.tUpper;
                double lower = f.tLower;
                f.estimate(Regime.FGK_DWARF, logg, sLogg, off, 0);
                f.anyColour |= anyColour;
                f.anyOut |= anyOut;
                f.tUpper = Math.min(f.tUpper, upper);
                f.tLower = Math.max(f.tLower, lower);
            }
        } else {
            f.estimate(Regime.FGK_DWARF, logg, sLogg, off, 0);
        }
        // the M-dwarf (Mann) and hot (Flower) relations take no log g: once per star (or draw) is enough
        if (!regimeEstimatesFresh) {
            estM.estimate(Regime.M_DWARF, logg, sLogg, off, Regime.M_BLEND_HI_K);
            estHot.estimate(Regime.HOT, logg, sLogg, off, 0);
            regimeEstimatesFresh = true;
        }
        Regime fRegime = cls == LuminosityClass.EVOLVED && (f.mask & giantMask()) != 0 ? Regime.GIANT : Regime.FGK_DWARF;
        blend(f, fRegime, cls != LuminosityClass.EVOLVED);
    }

    private long giantMaskCache = -1;

    private long giantMask() {
        if (giantMaskCache < 0) {
            long m = 0;
            List<TeffRelation> all = TeffRelations.all();
            for (int i = 0; i < all.size(); i++) {
                if (all.get(i).regime() == Regime.GIANT) {
                    m |= 1L << i;
                }
            }
            giantMaskCache = m;
        }
        return giantMaskCache;
    }

    /** Blends the main (FGK or giant), M-dwarf and hot estimates with the regime weights. */
    private void blend(TeffEstimator f, Regime fRegime, boolean withM) {
        TeffEstimator m = estM;
        TeffEstimator h = estHot;
        double wm = withM && m.n > 0 ? Regime.mDwarfWeight(m.mean) : 0;
        double wh = h.n > 0 ? Regime.hotWeight(h.mean) : 0;
        double wf = f.n > 0 ? 1 - wm - wh : 0;
        if (wf < 0) {
            wf = 0;
        }
        double sum = wf + wm + wh;
        tAnyColour = f.anyColour || (withM && m.anyColour) || h.anyColour;
        tUsesLogg = f.usesLogg && wf > 0;
        // bounds from colours beyond an edge: the M relations bound only from the red side, the hot one only from the
        // blue side (their other edges are where another regime takes over, not where the star's colour says stop)
        double upper = withM ? Math.min(f.tUpper, m.tUpper) : f.tUpper;
        double lower = Math.max(f.tLower, h.tLower);
        if (!(sum > 0)) {
            tMean = tErr = tChi2 = Double.NaN;
            tMask = 0;
            tCount = 0;
            tExtrapolated = false;
            tBoundBroken = false;
            wM = wHot = 0;
            tRegime = null;
            return;
        }
        wf /= sum;
        wm /= sum;
        wh /= sum;
        wM = wm;
        wHot = wh;
        tMean = (wf > 0 ? wf * f.mean : 0) + (wm > 0 ? wm * m.mean : 0) + (wh > 0 ? wh * h.mean : 0);
        // two regimes blended: their disagreement is an error source (the spread of the two-component mixture)
        double spreadT = wm > 0 && wf > 0 ? Math.sqrt(wf * wm) * (m.mean - f.mean)
                : wh > 0 && wf > 0 ? Math.sqrt(wf * wh) * (h.mean - f.mean)
                : wm > 0 && wh > 0 ? Math.sqrt(wm * wh) * (h.mean - m.mean) : 0;
        spreadT = blendSpread(0, spreadT);
        tMean += dz(ErrorSource.BLEND, spreadT);
        tMask = (wf > 0 ? f.mask : 0) | (wm > 0 ? m.mask : 0) | (wh > 0 ? h.mask : 0);
        tExtrapolated = (wf > 0 && f.extrapolated) || (wm > 0 && m.extrapolated) || (wh > 0 && h.extrapolated);
        TeffEstimator dom = wm >= wf && wm >= wh ? m : wh >= wf ? h : f;
        tRegime = dom == m ? Regime.M_DWARF : dom == h ? Regime.HOT : fRegime;
        tCount = dom.n;
        tChi2 = dom.chi2;
        if (s.valuesOnly) {
            tErr = Double.NaN;
            tBoundBroken = false;
            return;
        }
        // the weights move with the estimates they are judged by: d(blend) = Σ w dT + (T_other − T_fgk) dw
        double dWm = wf > 0 && wm > 0 ? Regime.dMDwarfWeight(m.mean) : 0;
        double dWh = wf > 0 && wh > 0 ? Regime.dHotWeight(h.mean) : 0;
        for (int j = 0; j < NSRC; j++) {
            dwM[j] = dWm * m.c[j];
            cT[j] = (wf > 0 ? wf * f.c[j] : 0) + (wm > 0 ? wm * m.c[j] : 0) + (wh > 0 ? wh * h.c[j] : 0)
                    + (dWm != 0 ? dWm * (m.mean - f.mean) * m.c[j] : 0) + (dWh != 0 ? dWh * (h.mean - f.mean) * h.c[j] : 0);
        }
        cT[ErrorSource.BLEND] = s.on(ErrorSource.BLEND) ? spreadT : 0;
        tErr = norm(cT);
        tBoundBroken = tMean > upper + 2 * tErr || tMean < lower - 2 * tErr;
    }

    /** BC, bolometric magnitudes, L, R and angular diameter from the current Teff estimate. */
    private void chain(StarResult out, boolean haveDist) {
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
        double t = tMean;
        boolean vo = s.valuesOnly;
        double tRatio2 = sq(Iau2015.TEFF_SUN_K / t);
        // the BC_V route (FGK, giants, hot stars; M dwarfs without a usable M_Ks)
        double mbolAbsBc = Double.NaN;
        double lnThetaBc = Double.NaN;
        double beta = BolometricCorrectionFlower1996.dBcVdTeff(t);
        if (wM < 1 || !mRadiusRoute(haveDist)) {
            out.bcV = BolometricCorrectionFlower1996.bcV(t);
            out.bcVErr = Math.abs(beta) * tErr;
        }
        if (!Double.isNaN(v0)) {
            double bc = BolometricCorrectionFlower1996.bcV(t);
            double mbolApp = v0 + bc;
            if (!vo) {
                // V₀ and Teff share sources (V is in the colours): contributions are added source by source
                for (int j = 0; j < NSRC; j++) {
                    cMbol[j] = cV[j] + beta * cT[j];
                    work[j] = -0.2 * LN10 * cMbol[j] - 2 * cT[j] / t;
                }
            }
            double lumAt10pc = Math.pow(10, -0.4 * (mbolApp - BolometricCorrectionFlower1996.MBOL_SUN));
            lnThetaBc = Math.log(THETA_SUN_AT_10PC_MAS * Math.sqrt(lumAt10pc) * tRatio2);
            if (haveDist) {
                mbolAbsBc = mbolApp - mu;
                if (!vo) {
                    cMbol[ErrorSource.MU] = s.on(ErrorSource.MU) ? -sMu : 0;
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
            lnRM = Math.log(RadiusMann2015.radiusRsun(mKs, fehForm)) + dz(ErrorSource.RADIUS_REL, frac);
            double lnLM = 2 * lnRM + 4 * Math.log(t / Iau2015.TEFF_SUN_K);
            mbolAbsM = BolometricCorrectionFlower1996.MBOL_SUN - 2.5 / LN10 * lnLM;
            if (!vo) {
                double dR = RadiusMann2015.dLnRdMks(mKs, fehForm);
                for (int j = 0; j < NSRC; j++) {
                    cLnRM[j] = dR * cKs[j];
                }
                cLnRM[ErrorSource.FEH] += RadiusMann2015.dLnRdFeh(fehForm) * s.sFeh;
                cLnRM[ErrorSource.RADIUS_REL] = frac;
                s.mask(cLnRM);
                for (int j = 0; j < NSRC; j++) {
                    cMbolM[j] = -2.5 / LN10 * (2 * cLnRM[j] + 4 * cT[j] / t);
                    // ln θ = ln R − ln d, and ln d grows with μ as ln10/5
                    workM[j] = cLnRM[j] - (j == ErrorSource.MU && s.on(j) ? LN10 / 5 * sMu : 0);
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
            double v2 = 0;
            for (int j = 0; j < NSRC; j++) {
                v2 += sq((w > 0 ? w * workM[j] : 0) + (w < 1 ? (1 - w) * work[j] : 0));
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
        spreadMbol = blendSpread(1, spreadMbol);
        mbolAbs += dz(ErrorSource.BLEND, spreadMbol);
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
                for (int j = 0; j < NSRC; j++) {
                    work[j] += dwM[j] * (mbolAbsM - mbolAbsBc);
                }
            }
            sMbol = norm(work);
            for (int j = 0; j < NSRC; j++) {
                // ln R = ½ ln L − 2 ln(Teff/Teff⊙) with ln L = −0.4 ln10 M_bol: holds for both routes and their blend
                cLnR[j] = -0.2 * LN10 * work[j] - 2 * cT[j] / t;
                cMbol[j] = work[j];
            }
        }
        out.mbolMag = mbolAbs - BolometricCorrectionFlower1996.MBOL_SUN + DerivedConstants.MBOL_SUN_IAU;
        out.mbolErrMag = sMbol;
        out.lumLsun = Math.pow(10, -0.4 * (mbolAbs - BolometricCorrectionFlower1996.MBOL_SUN));
        out.lumErrLsun = out.lumLsun * 0.4 * LN10 * sMbol;
        out.lumW = out.lumLsun * Iau2015.L_SUN_W;
        out.radiusRsun = Math.sqrt(out.lumLsun) * tRatio2;
        out.radiusErrRsun = vo ? Double.NaN : out.radiusRsun * norm(cLnR);
        out.radiusMksWeight = w;
    }

    /** Whether the M-dwarf radius relation can be used: a distance and an absolute Ks inside its range. */
    private boolean mRadiusRoute(boolean haveDist) {
        return haveDist && RadiusMann2015.inRange(s.m0[KS.ordinal()] - mu);
    }

    /** Mass (Eker et al. 2018 from L; Mann et al. 2019 from M_Ks for M dwarfs, blended), density, log g. */
    private void massChain(StarResult out) {
        if (!(out.lumLsun > 0 && out.radiusRsun > 0)) {
            return;
        }
        boolean vo = s.valuesOnly;
        double logL = Math.log10(out.lumLsun);
        double logME = MassLuminosityEker2018.logMass(logL);
        double mKs = out.absMag[KS.ordinal()];
        double fehForm = s.fehMeasured ? s.feh : Double.NaN;
        double logMM = wM > 0 ? MassMann2019.logMass(mKs, fehForm) : Double.NaN;
        double w = Double.isNaN(logMM) ? 0 : Double.isNaN(logME) ? 1 : wM;
        if (w == 0 && Double.isNaN(logME)) {
            return;
        }
        double ekerLnScatter = MassLuminosityEker2018.lnMassScatter(logL);
        double mannFrac = MassMann2019.scatterFrac(fehForm);
        double lnM = (w < 1 ? (1 - w) * (logME * LN10 + dz(ErrorSource.MASS_REL, ekerLnScatter)) : 0)
                + (w > 0 ? w * (logMM * LN10 + dz(ErrorSource.MASS_REL, mannFrac)) : 0);
        // both mass relations blended: their disagreement enters as the blend source
        double spreadLnM = w > 0 && w < 1 ? Math.sqrt(w * (1 - w)) * LN10 * (logMM - logME) : 0;
        spreadLnM = blendSpread(2, spreadLnM);
        lnM += dz(ErrorSource.BLEND, spreadLnM);
        double logM = lnM / LN10;
        double m = Math.exp(lnM);
        double r = out.radiusRsun;
        double varLnM = vo ? Double.NaN : 0;
        double varLnRho = varLnM;
        double varLnG = varLnM;
        if (!vo) {
            double slope = w < 1 ? MassLuminosityEker2018.dLogMassDLogL(logL) : 0;
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

    private void crossCheckDiameter(StarResult out) {
        int k = KS.ordinal();
        if (!vObserved || Double.isNaN(s.m0[k])) {
            return;
        }
        out.angDiamSbrMas = SurfaceBrightnessKervella2004.angularDiameterMas(v0, s.m0[k]);
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
