package org.starderive.physics;

import java.util.List;

/**
 * The Teff step of {@link StarDeriver}: each calibration {@link Regime}'s estimate ({@link TeffEstimator}, an
 * inverse-variance mean of the regime's in-range colour relations) and their blend with the regime weights — M dwarf
 * (Mann et al. 2015), FGK dwarf (Casagrande et al. 2010, 2021) or giant (González Hernández &amp; Bonifacio 2009,
 * Casagrande et al. 2021) and hot (Flower 1996 as corrected by Torres 2010) — across the K7–M0 and late-A–early-F
 * zones described in {@link Regime}. Where two regimes are blended, the spread of the two-component mixture
 * √(w₁w₂)·(T₂ − T₁) is an error source ({@link ErrorSource#BLEND}), and the weights' own derivatives enter the
 * first-order errors. Holds the blended estimate the later steps read ({@link #mean}, {@link #err}, {@link #c},
 * {@link #wM}, {@link #dwM}).
 */
final class TeffBlend {
    private static final int NSRC = ErrorSource.COUNT;

    private final DeriveSettings settings;
    private final StarState s;
    private final TeffEstimator estMain;
    private final TeffEstimator estM;
    private final TeffEstimator estHot;
    private final long giantMask;
    /** Whether estM and estHot hold this star's (or draw's) estimates. */
    private boolean regimeEstimatesFresh;
    /** Per-relation Teff offsets of a Monte Carlo draw (null: none). */
    double[] drawTeffOffsetK;
    /** Route bits ({@link #route}): redder than every FGK (or giant) relation by more than 2σ of a colour. */
    static final int ROUTE_REDDER = 1;
    /** Route bit: bluer than every FGK (or giant) relation by more than 2σ of a colour. */
    static final int ROUTE_BLUER = 2;
    /** Route bit: the Teff came from the M_Ks radius ({@link #fromRadius}). */
    static final int ROUTE_RADIUS = 4;
    /**
     * The route of the last blend: which regimes the colours' edges left in play and whether the Teff came from the
     * radius (ROUTE_ bits). A Monte Carlo draw keeps the nominal star's route ({@link StarState#drawRoute}), as it
     * keeps its class: a colour drawn across an edge's 2σ margin would otherwise switch a draw between an FGK
     * colour's Teff and the radius route (a K dwarf's 4300–5300 K against an M dwarf's 3000 K), and a Mann colour
     * drawn out of its range would take the radius route without that relation's scatter. A draw that cannot follow
     * the route has no Teff.
     */
    int route;

    // the blended estimate
    double mean;
    double err;
    long relationMask;
    /** The estimate that dominates the blend (its relations, count and χ² are the star's); null without one. */
    private TeffEstimator dom;
    int count;
    boolean anyColour;
    boolean extrapolated;
    boolean usesLogg;
    boolean boundBroken;
    /** Weight of the M-dwarf estimate. */
    double wM;
    /** Contributions of each source to the M-dwarf weight (its derivative times the M estimate's contribution). */
    final double[] dwM = new double[NSRC];
    Regime regime;
    /**
     * Whether the Teff is an M dwarf's from its radius ({@link TeffRadiusMann2015} run backwards at the M_Ks radius
     * of {@link RadiusMann2015}): no colour of a Mann et al. 2015 relation, but a colour redder than every FGK relation.
     */
    boolean fromRadius;
    /** First-order contributions of each error source to Teff. */
    final double[] c = new double[NSRC];

    TeffBlend(DeriveSettings settings, StarState s, TeffRelation[] relations, int[] relationIndex) {
        this.settings = settings;
        this.s = s;
        boolean extrapolate = settings.allowExtrapolation();
        this.estMain = new TeffEstimator(s, relations, relationIndex, extrapolate);
        this.estM = new TeffEstimator(s, relations, relationIndex, extrapolate);
        this.estHot = new TeffEstimator(s, relations, relationIndex, extrapolate);
        long m = 0;
        List<TeffRelation> all = TeffRelations.all();
        for (int i = 0; i < all.size(); i++) {
            if (all.get(i).regime() == Regime.GIANT) {
                m |= 1L << i;
            }
        }
        this.giantMask = m;
    }

    /** A new star (or draw): the M-dwarf and hot estimates are made again at the next {@link #estimate}. */
    void newStar() {
        regimeEstimatesFresh = false;
    }

    /** Evolved stars: giant relations with the log g prior; main-sequence (FGK) ones if none apply; hot blend. */
    void estimateEvolved() {
        double sLogg = settings.giantLoggPriorErr();
        double logg = settings.giantLoggPrior() + s.dz(ErrorSource.LOGG, sLogg);
        estimate(LuminosityClass.EVOLVED, logg, sLogg);
    }

    /**
     * Teff of class {@code cls}: the regimes' estimates blended (see {@link Regime}). Main sequence: M dwarf, FGK and
     * hot; evolved: giant (FGK dwarf relations if no giant relation applies) and hot.
     */
    void estimate(LuminosityClass cls, double logg, double sLogg) {
        double[] off = drawTeffOffsetK;
        int drawRoute = s.drawRoute;
        TeffEstimator f = estMain;
        if (drawRoute >= 0 && (drawRoute & (ROUTE_REDDER | ROUTE_BLUER)) != 0) {
            // a draw of a star whose route puts it beyond the edge of every FGK (or giant) relation gives those
            // relations no weight whatever its colours (blend), and a draw reads nothing else of them: not evaluated
            f.clear();
        } else if (cls == LuminosityClass.EVOLVED) {
            f.estimate(Regime.GIANT, logg, sLogg, off, 0);
            if (f.n == 0) {
                boolean anyColourGiant = f.anyColour;
                boolean anyOut = f.anyOut;
                double upper = f.tUpper;
                double lower = f.tLower;
                f.estimate(Regime.FGK_DWARF, logg, sLogg, off, 0);
                f.anyColour |= anyColourGiant;
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
        Regime fRegime = cls == LuminosityClass.EVOLVED && (f.mask & giantMask) != 0 ? Regime.GIANT : Regime.FGK_DWARF;
        blend(f, fRegime, cls != LuminosityClass.EVOLVED);
    }

    /**
     * Teff of a main-sequence star that a colour puts redder than every FGK relation (cooler than 4100 K) but that has
     * no colour of a Mann et al. 2015 relation (a faint late M dwarf without V and BP): its radius from M_Ks
     * ({@link RadiusMann2015}, as the luminosity step takes it, the same draw of that relation's scatter) and the
     * temperature at which the Teff–radius relation ({@link TeffRadiusMann2015}) gives that radius. Needs a distance
     * and M_Ks inside the radius relation's range; false (no Teff) otherwise, or where the radius lies outside the
     * inverse's branch. The colour's bound still applies: a Teff above it by more than 2σ is flagged as disagreeing.
     */
    private boolean fromRadius(double upper, double lower) {
        int ks = Band.KS.ordinal();
        double mKs = s.m0[ks] - s.mu;
        if (!RadiusMann2015.inRange(mKs)) {
            return false;
        }
        // the radius as the luminosity step takes it (its [Fe/H] form for any measured [Fe/H]); the Teff-radius
        // relation depends on [Fe/H] five times as steeply, so its [Fe/H] form only inside its calibrated range
        double fehForm = s.fehMeasured ? s.feh : Double.NaN;
        double fehT = TeffRadiusMann2015.fehInRange(fehForm) ? fehForm : Double.NaN;
        double fracR = RadiusMann2015.scatterFrac(fehForm);
        double fracT = TeffRadiusMann2015.scatterFrac(fehT);
        double lnR = Math.log(RadiusMann2015.radiusRsun(mKs, fehForm)) + s.dz(ErrorSource.RADIUS_REL, fracR);
        double t = TeffRadiusMann2015.teffK(Math.exp(lnR - s.dz(ErrorSource.TEFF_RADIUS_REL, fracT)), fehT);
        if (Double.isNaN(t)) {
            return false;
        }
        fromRadius = true;
        mean = t;
        dom = null;
        relationMask = 0;
        count = 0;
        extrapolated = false;
        usesLogg = false;
        wM = 1;
        regime = Regime.M_DWARF;
        if (s.valuesOnly) {
            err = Double.NaN;
            boundBroken = false;
            return true;
        }
        // d ln T = (d ln R_obs − d ln(1 + f [Fe/H]) − ε) / (d ln R / d ln T)
        double tPerLnR = t / TeffRadiusMann2015.dLnRdLnTeff(t, fehT);
        double dR = RadiusMann2015.dLnRdMks(mKs, fehForm);
        double[] cKs = s.cKs;
        for (int j = 0; j < NSRC; j++) {
            c[j] = tPerLnR * dR * cKs[j];
            dwM[j] = 0;
        }
        c[ErrorSource.FEH] += tPerLnR * (RadiusMann2015.dLnRdFeh(fehForm) - TeffRadiusMann2015.dLnRdFeh(fehT)) * s.sFeh;
        c[ErrorSource.RADIUS_REL] = tPerLnR * fracR;
        c[ErrorSource.TEFF_RADIUS_REL] = -tPerLnR * fracT;
        c[ErrorSource.BLEND] = 0;
        s.mask(c);
        err = StarDeriver.norm(c);
        boundBroken = mean > upper + 2 * err || mean < lower - 2 * err;
        return true;
    }

    /**
     * χ² of the dominant regime's colours ({@link TeffEstimator#chi2()}), computed only when asked for: the class
     * iteration blends several times per star, but only the last blend is reported. NaN without an estimate.
     */
    double chi2() {
        return dom == null ? Double.NaN : dom.chi2();
    }

    /** Blends the main (FGK or giant), M-dwarf and hot estimates with the regime weights. */
    private void blend(TeffEstimator f, Regime fRegime, boolean withM) {
        TeffEstimator m = estM;
        TeffEstimator h = estHot;
        double wm = withM && m.n > 0 ? Regime.mDwarfWeight(m.mean) : 0;
        double wh = h.n > 0 ? Regime.hotWeight(h.mean) : 0;
        // a colour beyond the red edge of the FGK (or giant) relations by more than twice its error, at an edge cooler
        // than M_BLEND_LO_K, puts the star where only the M-dwarf regime holds: the other colours' FGK or giant
        // estimate would be a relation used outside its regime (a late M dwarf without V or BP otherwise gets
        // 4300-5300 K from J-Ks); with no M-dwarf estimate the star gets no Teff (COLOUR_OUT_OF_RANGE)
        int drawRoute = s.drawRoute;
        boolean redderThanMain = drawRoute >= 0 ? (drawRoute & ROUTE_REDDER) != 0 : f.tUpper <= Regime.M_BLEND_LO_K;
        // the same on the blue side: a colour beyond the blue edge of the FGK (or giant) relations by more than twice
        // its error, at an edge hotter than HOT_BLEND_HI_K, puts the star where only the hot regime holds. Without
        // this, allow_extrapolation let a B star whose Flower Teff fails the sanity cap (B-V < -0.34 gives > 50 kK)
        // take the C10 B-V relation extrapolated from its edge at 0.18 (12-16 kK at B-V -0.35...-0.5)
        boolean bluerThanMain = drawRoute >= 0 ? (drawRoute & ROUTE_BLUER) != 0 : f.tLower >= Regime.HOT_BLEND_HI_K;
        route = (redderThanMain ? ROUTE_REDDER : 0) | (bluerThanMain ? ROUTE_BLUER : 0);
        double wf = f.n > 0 && !redderThanMain && !bluerThanMain ? 1 - wm - wh : 0;
        if (wf < 0) {
            wf = 0;
        }
        double sum = wf + wm + wh;
        anyColour = f.anyColour || (withM && m.anyColour) || h.anyColour;
        usesLogg = f.usesLogg && wf > 0;
        // bounds from colours beyond an edge: the M relations bound only from the red side, the hot one only from the
        // blue side (their other edges are where another regime takes over, not where the star's colour says stop)
        double upper = withM ? Math.min(f.tUpper, m.tUpper) : f.tUpper;
        double lower = Math.max(f.tLower, h.tLower);
        fromRadius = false;
        if (!(sum > 0)) {
            boolean radiusAllowed = drawRoute < 0 || (drawRoute & ROUTE_RADIUS) != 0;
            if (withM && redderThanMain && radiusAllowed && fromRadius(upper, lower)) {
                route |= ROUTE_RADIUS;
                return;
            }
            mean = err = Double.NaN;
            dom = null;
            relationMask = 0;
            count = 0;
            extrapolated = false;
            boundBroken = false;
            wM = 0;
            regime = null;
            return;
        }
        wf /= sum;
        wm /= sum;
        wh /= sum;
        wM = wm;
        mean = (wf > 0 ? wf * f.mean : 0) + (wm > 0 ? wm * m.mean : 0) + (wh > 0 ? wh * h.mean : 0);
        // two regimes blended: their disagreement is an error source (the spread of the two-component mixture)
        double spreadT = wm > 0 && wf > 0 ? Math.sqrt(wf * wm) * (m.mean - f.mean)
                : wh > 0 && wf > 0 ? Math.sqrt(wf * wh) * (h.mean - f.mean)
                : wm > 0 && wh > 0 ? Math.sqrt(wm * wh) * (h.mean - m.mean) : 0;
        spreadT = s.blendSpread(0, spreadT);
        mean += s.dz(ErrorSource.BLEND, spreadT);
        relationMask = (wf > 0 ? f.mask : 0) | (wm > 0 ? m.mask : 0) | (wh > 0 ? h.mask : 0);
        extrapolated = (wf > 0 && f.extrapolated) || (wm > 0 && m.extrapolated) || (wh > 0 && h.extrapolated);
        dom = wm >= wf && wm >= wh ? m : wh >= wf ? h : f;
        regime = dom == m ? Regime.M_DWARF : dom == h ? Regime.HOT : fRegime;
        count = dom.n;
        if (s.valuesOnly) {
            err = Double.NaN;
            boundBroken = false;
            return;
        }
        // the weights move with the estimates they are judged by: d(blend) = Σ w dT + (T_other − T_fgk) dw
        double dWm = wf > 0 && wm > 0 ? Regime.dMDwarfWeight(m.mean) : 0;
        double dWh = wf > 0 && wh > 0 ? Regime.dHotWeight(h.mean) : 0;
        // M-dwarf and hot estimates without an FGK share (clipped to 0): the weights a, b normalised by their sum S, so
        // d(b/S) = (a db − b da)/S² = (wm db − wh da)/S, with da, db the ramps' slopes times each estimate's own change
        boolean mixMH = wf == 0 && wm > 0 && wh > 0;
        double dA = mixMH ? Regime.dMDwarfWeight(m.mean) : 0;
        double dB = mixMH ? Regime.dHotWeight(h.mean) : 0;
        for (int j = 0; j < NSRC; j++) {
            double dwHot = mixMH ? (wm * dB * h.c[j] - wh * dA * m.c[j]) / sum : 0;
            dwM[j] = mixMH ? -dwHot : dWm * m.c[j];
            c[j] = (wf > 0 ? wf * f.c[j] : 0) + (wm > 0 ? wm * m.c[j] : 0) + (wh > 0 ? wh * h.c[j] : 0)
                    + (dWm != 0 ? dWm * (m.mean - f.mean) * m.c[j] : 0) + (dWh != 0 ? dWh * (h.mean - f.mean) * h.c[j] : 0)
                    + (mixMH ? (h.mean - m.mean) * dwHot : 0);
        }
        c[ErrorSource.BLEND] = s.on(ErrorSource.BLEND) ? spreadT : 0;
        err = StarDeriver.norm(c);
        boundBroken = mean > upper + 2 * err || mean < lower - 2 * err;
    }
}
