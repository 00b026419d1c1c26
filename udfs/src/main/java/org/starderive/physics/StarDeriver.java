package org.starderive.physics;

import java.util.List;

import static org.starderive.physics.Band.KS;
import static org.starderive.physics.Band.V;
import static org.starderive.physics.QualityFlag.*;

/**
 * The single entry point of the physics core: one star's measurements in, every derived parameter with its
 * first-order (analytic) uncertainty and its quality flags out. Allocation-free per star: the caller reuses a
 * {@link StarInput} and a {@link StarResult}. Not thread-safe (it holds work arrays): one instance per thread.
 * Bad values in a star never throw: they give NaN plus a flag.
 *
 * <p>The chain, each step in its own class, each relation implemented and cited in its own class; this class runs
 * the steps, iterates the class/Teff loop and sets the flags that describe the final estimate:
 * <ol>
 *   <li>inputs checked: sentinel magnitudes, NaN/∞, non-positive errors → flags, value ignored
 *       ({@link InputStep});</li>
 *   <li>extinction: A_V = R_V·E(B−V); A_band/A_V from the Cardelli–Clayton–Mathis 1989 law
 *       ({@link CardelliClaytonMathis1989}); colour-dependent coefficients for G/BP/RP ({@link GaiaBandExtinction});</li>
 *   <li>distance from the zero-point-corrected parallax ({@link DistanceStep}: {@link ParallaxDistance},
 *       {@link EdsdPosterior});</li>
 *   <li>distance modulus μ = 5 log10(d / 10 pc), absolute magnitudes M = m − μ − A;</li>
 *   <li>Teff by calibration {@link Regime}: each regime's in-range colour relations ({@link TeffRelations}) give an
 *       inverse-variance mean ({@link TeffEstimator}); M-dwarf, FGK and hot estimates are blended across the
 *       K7–M0 and late-A–early-F zones; a chi-square test flags disagreement ({@link TeffBlend}); an M dwarf without
 *       a Mann colour (no V, no BP) gets its Teff from its M_Ks radius ({@link TeffRadiusMann2015});</li>
 *   <li>L and R: BC_V (Flower 1996 / Torres 2010) on its own solar scale, L/L⊙ = 10^(−0.4 (M_bol − M_bol,⊙)) and
 *       the Stefan–Boltzmann law R/R⊙ = (L/L⊙)^½ (Teff⊙/Teff)² with the nominal Teff⊙ (IAU 2015 B3); for M dwarfs R
 *       from M_Ks ({@link RadiusMann2015}) and L = R² (Teff/Teff⊙)⁴; V from G when V is missing (Riello et al. 2021);
 *       M_bol reported on the IAU 2015 B2 scale; angular diameter θ = 2R/d, or from the bolometric flux alone
 *       ({@link LuminosityRadiusStep});</li>
 *   <li>class ({@link LuminosityClass}): a red star by its M_Ks, others by the log g boundary; for main-sequence stars
 *       the mass from {@link MassLuminosityEker2018} or, for M dwarfs, {@link MassMann2019}, mean density
 *       ρ = M / (4/3 π R³) and log g = log10(G M / R²) in cgs ({@link MassStep});</li>
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
    private static final double DWARF_LOGG_START_ERR = 0.3;
    private static final int CLASS_ITERATIONS_MAX = 8;

    private final DeriveSettings settings;
    private final TeffRelation[] relations;
    // per-star state and the steps that share it
    private final StarState s = new StarState();
    private final InputStep inputs;
    private final DistanceStep distance;
    private final TeffBlend teff;
    private final LuminosityRadiusStep lumRadius;
    private final MassStep mass;
    // Monte Carlo draw overrides (NaN / null: off)
    private double drawDistPc = Double.NaN;
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
        this.inputs = new InputStep(settings, s);
        this.distance = new DistanceStep(settings, s);
        this.teff = new TeffBlend(settings, s, relations, relationIndex);
        this.lumRadius = new LuminosityRadiusStep(s, teff);
        this.mass = new MassStep(s, teff, lumRadius);
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
    EdsdPosterior posterior() { return distance.posterior(); }

    /**
     * One Monte Carlo draw: the chain with the distance fixed to {@code distPc} (NaN: computed as usual), each
     * enabled relation's Teff shifted by {@code teffOffsetK[k]} (its scatter and zero point drawn by the caller), every
     * other error source j perturbed by {@code z[j]} times its σ ({@link ErrorSource}), keeping the star's class
     * {@code cls} (null: classified as usual) and, for a main-sequence {@code cls}, starting the log g iteration of
     * the Gaia-band relations at {@code logg} (NaN, or no class: the solar value, drawn by its start error). Values
     * only, no errors.
     */
    StarResult deriveDraw(StarInput in, StarResult out, double distPc, double[] teffOffsetK, double[] z,
                          LuminosityClass cls, double logg) {
        return deriveDraw(in, out, distPc, teffOffsetK, z, cls, logg, -1);
    }

    /**
     * {@link #deriveDraw(StarInput, StarResult, double, double[], double[], LuminosityClass, double)} keeping the
     * nominal star's Teff route {@code teffRoute} ({@link StarResult#teffRoute}; −1: decided by the draw's colours).
     */
    StarResult deriveDraw(StarInput in, StarResult out, double distPc, double[] teffOffsetK, double[] z,
                          LuminosityClass cls, double logg, int teffRoute) {
        s.drawRoute = teffRoute;
        drawDistPc = distPc;
        teff.drawTeffOffsetK = teffOffsetK;
        s.drawZ = z;
        s.valuesOnly = true;
        drawClass = cls;
        drawLogg = logg;
        try {
            return derive(in, out);
        } finally {
            s.drawRoute = -1;
            drawDistPc = Double.NaN;
            teff.drawTeffOffsetK = null;
            s.drawZ = null;
            s.valuesOnly = false;
            drawClass = null;
            drawLogg = Double.NaN;
        }
    }

    /** Derives everything for {@code in} into {@code out} (cleared first) and returns {@code out}. */
    public StarResult derive(StarInput in, StarResult out) {
        out.clear();
        teff.newStar();
        long flags = inputs.read(in, out);
        if (Double.isNaN(drawDistPc)) {
            flags |= distance.distance(in, out);
        } else {
            DistanceStep.drawn(out, drawDistPc);
        }
        boolean haveDist = distance.modulus(out);
        flags |= inputs.visualMagnitude();
        inputs.absoluteKs();

        // Teff, luminosity and class, iterated: the class picks the relations; the Gaia relations need log g
        LuminosityClass cls = LuminosityClass.MAIN_SEQUENCE;
        double logg = DerivedConstants.LOGG_SUN_CGS;
        double sLogg = DWARF_LOGG_START_ERR;
        boolean fixedClass = drawClass != null;
        if (fixedClass && drawClass == LuminosityClass.EVOLVED) {
            cls = LuminosityClass.EVOLVED;
            teff.estimateEvolved();
        } else {
            if (fixedClass && !Double.isNaN(drawLogg)) {
                logg = drawLogg;
                sLogg = 0; // derived from the chain, not an independent source
            } else {
                logg += s.dz(ErrorSource.LOGG, sLogg); // assumed until a distance gives L and R
            }
            teff.estimate(LuminosityClass.MAIN_SEQUENCE, logg, sLogg);
        }
        boolean classKnown = false;
        boolean stale = true; // the chain does not yet describe the current estimate
        for (int iter = 0; iter < CLASS_ITERATIONS_MAX; iter++) {
            lumRadius.chain(out, haveDist);
            stale = false;
            if (!haveDist || !(out.lumLsun > 0)) {
                break;
            }
            classKnown = true;
            if (cls == LuminosityClass.EVOLVED) {
                break;
            }
            double mKs = out.absMag[KS.ordinal()];
            if (teff.wM >= 0.5 && !Double.isNaN(mKs)) {
                // a red star: an M dwarf, or a giant if brighter than any M dwarf in Ks
                if (!fixedClass && mKs < Regime.M_DWARF_MKS_MIN) {
                    cls = LuminosityClass.EVOLVED;
                    teff.estimateEvolved();
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
                teff.estimateEvolved();
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
                teff.estimateEvolved();
                stale = true;
                continue;
            }
            if (teff.usesLogg && Math.abs(g - logg) > 0.005) {
                // a dwarf's log g now comes from the chain itself: not an independent error source (its feedback on
                // Teff through the Gaia-band relations is left out of the first-order errors; draws iterate it)
                logg = g;
                sLogg = 0;
                teff.estimate(LuminosityClass.MAIN_SEQUENCE, logg, sLogg);
                stale = true;
                continue;
            }
            break;
        }
        if (stale) {
            // the iteration cap was reached right after a re-estimate: every field must describe the final estimate
            lumRadius.chain(out, haveDist);
        }
        out.lumClass = classKnown ? cls : null;
        out.regime = Double.isNaN(out.teffK) ? null : teff.regime;
        flags |= teffFlags(out, cls, classKnown, haveDist);

        if (classKnown && cls == LuminosityClass.MAIN_SEQUENCE) {
            mass.mass(out);
        }
        if (classKnown && cls == LuminosityClass.MAIN_SEQUENCE && !s.valuesOnly) {
            // the surface-brightness cross-check only flags the nominal star: a draw has no use for it
            flags |= crossCheckDiameter(out);
        }
        if (Double.isNaN(out.massMsun)) {
            flags |= QualityFlag.MASS_NOT_APPLICABLE.mask();
        }
        out.teffRelations = Double.isNaN(out.teffK) ? 0 : teff.relationMask;
        out.teffChi2 = teff.count >= 2 ? teff.chi2() : Double.NaN;
        out.flags = flags;
        out.teffRoute = Double.isNaN(out.teffK) ? -1 : teff.route;
        sanitize(out);
        return out;
    }

    /** The flags that describe the final Teff and what was derived from it. */
    private long teffFlags(StarResult out, LuminosityClass cls, boolean classKnown, boolean haveDist) {
        if (Double.isNaN(out.teffK)) {
            return teff.anyColour ? COLOUR_OUT_OF_RANGE.mask() : PHOTOMETRY_MISSING.mask();
        }
        long flags = 0;
        if (teff.extrapolated) {
            flags |= TEFF_EXTRAPOLATED.mask();
        }
        if (teff.fromRadius) {
            flags |= TEFF_FROM_RADIUS.mask();
        }
        if ((teff.count >= 2 && teff.chi2() > settings.teffDisagreeChi2(teff.count - 1)) || teff.boundBroken) {
            flags |= TEFF_COLOURS_DISAGREE.mask();
        }
        if (!classKnown) {
            flags |= LUM_CLASS_ASSUMED.mask();
        }
        if (Double.isNaN(out.lumLsun) && haveDist) {
            flags |= PHOTOMETRY_MISSING.mask();
        }
        boolean bcUsed = lumRadius.wRadiusM < 1 && !Double.isNaN(out.bcV);
        boolean coolDwarf = cls == LuminosityClass.MAIN_SEQUENCE
                && out.teffK < BolometricCorrectionFlower1996.COOL_DWARF_LIMIT_K;
        if (bcUsed && (!BolometricCorrectionFlower1996.inRange(out.teffK) || coolDwarf)) {
            flags |= BC_UNRELIABLE.mask();
        }
        if (teff.regime == Regime.HOT && out.teffErrK > settings.hotTeffErrFracMax() * out.teffK) {
            flags |= HOT_TEFF_UNCERTAIN.mask();
        }
        return flags;
    }

    /**
     * The surface-brightness diameter ({@link SurfaceBrightnessKervella2004}) from V₀ and Ks₀ where V was measured,
     * against the Stefan–Boltzmann one: DIAMETER_DISAGREE beyond the configured number of combined σ.
     */
    private long crossCheckDiameter(StarResult out) {
        int k = KS.ordinal();
        if (!s.vObserved || Double.isNaN(s.m0[k])) {
            return 0;
        }
        out.angDiamSbrMas = SurfaceBrightnessKervella2004.angularDiameterMas(s.v0, s.m0[k]);
        if (out.angDiamSbrMas > 0 && out.angDiamMas > 0) {
            double rel = Math.hypot(out.angDiamErrMas / out.angDiamMas,
                    SurfaceBrightnessKervella2004.relativeError(s.sm[V.ordinal()], s.sm[k]));
            if (Math.abs(Math.log(out.angDiamMas / out.angDiamSbrMas)) > settings.diameterDisagreeSigma() * rel) {
                return DIAMETER_DISAGREE.mask();
            }
        }
        return 0;
    }

    static double norm(double[] c) {
        double s2 = 0;
        for (double v : c) {
            s2 += v * v;
        }
        return Math.sqrt(s2);
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
