package org.starderive.sample;

import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.sampling.distribution.ZigguratSampler;
import org.apache.commons.rng.simple.RandomSource;
import static org.starderive.sample.IndependentRelations.*;

import org.starderive.physics.Band;

/**
 * One synthetic star of the fictional "Kestrel" survey, drawn from a random stream that depends only on
 * (seed, star id): the same star comes out whatever the partitioning. Scenario and its stated choices:
 * <ul>
 *   <li><b>Population.</b> 86 % main sequence, 4 % subgiants, 5 % red clump, 5 % red-giant branch (our choice).
 *       Main-sequence masses from the Kroupa 2001 (MNRAS 322, 231) initial mass function, dN/dM ∝ M^−1.3 for
 *       0.10–0.5 M⊙ and M^−2.3 for 0.5–20 M⊙; L from the Eker et al. 2018 mass–luminosity relation with 0.05 dex
 *       of age spread (its lowest segment extrapolated below 0.179 M⊙: our choice); R from Eker et al. 2018 Table 5
 *       (R = 0.438M² + 0.479M + 0.075 for M ≤ 1.5) or Teff from their log Teff(M) for M &gt; 1.5.
 *       Below 0.68 M⊙ (about 4250 K, so everywhere the job may use it) the radius is Mann et al. 2015's R(M_Ks)
 *       (off by its 2.89 % scatter) at the absolute Ks of the Mann et al. 2019 mass relation run backwards (mass
 *       drawn off by its 2 % scatter); from 0.68 to 0.82 M⊙ ln R goes linearly from that radius to Eker's (the two
 *       are 7–15 % apart at 0.6–0.75 M⊙: our choice, so the sequence has no gap); Teff from L and R, except that
 *       M dwarfs follow the Mann et al. 2015 Teff–radius relation: Teff where it gives the star's radius (off by its
 *       13.4 % scatter in R), L = R² (Teff/Teff⊙)⁴, ln Teff blended towards the Eker one from 0.68 to 0.82 M⊙ as ln R
 *       is (the Eker luminosities alone put M dwarfs ~6 % cooler than that relation). Main-sequence stars cooler than 4200 K are M dwarfs,
 *       their photometry built from absolute Ks up. Evolved stars from simple loci of our own (below).</li>
 *   <li><b>Positions.</b> Exponential disc: scale height 300 pc, scale length 2.6 kpc (Jurić et al. 2008, ApJ 673,
 *       864, thin disc, from memory), Sun at R = 8.2 kpc (Bland-Hawthorn &amp; Gerhard 2016, from memory), z = 0;
 *       directions uniform on the sky; distances drawn ∝ d² ρ out to where the star reaches G = 20.5 (or 10 kpc).</li>
 *   <li><b>Extinction.</b> A_V grows by 1 mag/kpc in the plane through a dust layer of scale height 125 pc
 *       (common practice); E(B−V) = A_V / 3.1; bands reddened with the same laws the job removes.</li>
 *   <li><b>Photometry.</b> V from the bolometric magnitude and BC_V on the Flower/Torres scale (M_bol⊙ computed
 *       from V⊙ = −26.76 and BC_V(5772 K), not typed); colours from the published colour–Teff relations run
 *       backwards, each at Teff offset by that relation's own scatter (so real stars scatter about the relation):
 *       dwarfs and subgiants with Casagrande et al. 2010 (B−V from Flower 1996/Torres 2010 above 7500 K, mixed
 *       between 7000 and 7500 K), giants with González Hernández &amp; Bonifacio 2009 where it has the colour; BP−RP
 *       with Casagrande et al. 2021 at the true log g; M dwarfs from absolute Ks up with the Mann et al. 2015
 *       relations ({@link #mDwarfMagnitudes}); G from V (Riello et al. 2021); BP − G = 0.4 (BP−RP) (our
 *       approximation). Beyond a relation's colour range its colour is continued linearly.</li>
 *   <li><b>Truth regime.</b> Each star's calibration regime by its truth (hot above 7250 K, M dwarf below 4200 K on
 *       the main sequence, the centres of the job's blends), {@code none} where no relation covers it (M dwarfs
 *       below 2700 K or fainter than M_Ks 9.8).</li>
 *   <li><b>Errors.</b> Optical σ = 0.005 + 0.02·10^(0.4(m−19)); near-infrared σ = 0.02 + 0.05·10^(0.4(m−15));
 *       Gaia-like σ = 0.001 + 0.01·10^(0.4(m−19)); parallax σ = √(0.02² + (0.5·10^(0.4(G−20)))²) mas and a
 *       zero point of −0.02 mas. Bands fainter than their limit (optical 22, near-infrared 16.5, G 21, BP/RP 20.8)
 *       are missing. Measured E(B−V) = truth ± (0.01 + 0.05 E). [Fe/H] measured (± 0.1) for 20 % of stars.</li>
 *   <li><b>Defects</b> (independent, per star): each band missing 3 %; one magnitude set to the sentinel 99.99 in
 *       0.5 %; one value NaN in 0.2 %; 0.3 % blends whose magnitudes are random (colours outside every calibration);
 *       stars brighter than V = 7 saturated (optical magnitudes 0.4 mag too faint, error 0.2).</li>
 * </ul>
 * Because the photometry is made with the same published relations the job uses, recovery checks the inference,
 * flags and uncertainties, not the calibrations themselves (those are checked against published tables). The
 * relations and constants are typed a second time in {@link IndependentRelations} and no physics code is called,
 * so a mistyped coefficient or constant in the job shows up as a recovery bias. What stays circular: the choice of
 * relations, the list of bands, and the scatters the job states (which the survey draws with).
 */
public final class ForwardModel {
    public static final double FRAC_MS = 0.86;
    public static final double FRAC_SUBGIANT = 0.04;
    public static final double FRAC_CLUMP = 0.05;
    public static final double KROUPA_M_MIN = 0.10;
    public static final double KROUPA_M_BREAK = 0.5;
    public static final double KROUPA_M_MAX = 20.0;
    public static final double KROUPA_ALPHA_LOW = 1.3;
    public static final double KROUPA_ALPHA_HIGH = 2.3;
    public static final double DISC_SCALE_HEIGHT_PC = 300;
    public static final double DISC_SCALE_LENGTH_PC = 2600;
    public static final double SUN_R_PC = 8200;
    public static final double DUST_AV_PER_KPC = 1.0;
    public static final double DUST_SCALE_HEIGHT_PC = 125;
    public static final double G_LIMIT = 20.5;
    public static final double PARALLAX_ZERO_POINT_MAS = -0.02;
    public static final double P_BAND_MISSING = 0.03;
    public static final double P_SENTINEL = 0.005;
    public static final double P_NAN = 0.002;
    public static final double P_BLEND = 0.003;
    public static final double P_FEH_MEASURED = 0.2;
    public static final double SATURATION_V = 7.0;
    public static final int TILES = 12;

    /** Below this mass a main-sequence star's radius is Mann et al. 2015's; above {@link #M_BLEND_HI_MSUN} Eker et al. 2018's. */
    public static final double M_BLEND_LO_MSUN = 0.68;
    public static final double M_BLEND_HI_MSUN = 0.82;
    /** Main-sequence stars cooler than this get their photometry from absolute Ks up (Mann relations): the centre of the job's K7–M0 blend. */
    public static final double M_ROUTE_MAX_K = 4200;
    /** Main-sequence stars hotter than this are hot stars in the truth table: the centre of the job's late A–early F blend. */
    public static final double HOT_ROUTE_MIN_K = 7250;
    /** Mann et al. 2015 colour relations hold from 2700 K (their Table 2 range). */
    public static final double MANN_TEFF_MIN_K = 2700;
    /** Mann et al. 2015 radius relation holds to M_Ks 9.8 (their Table 1). */
    public static final double MANN_RADIUS_MKS_MAX = 9.8;
    /** Spread of main-sequence log L about the Eker et al. 2018 relation (age and composition; our choice, the job's). */
    public static final double LOGL_SPREAD_DEX = 0.05;

    private static final double RV = 3.1;

    /** Evolutionary class of a synthetic star. */
    public enum Kind { MS, SUBGIANT, RED_CLUMP, RGB }

    /** Everything about one star: truth and observation. Reused per call. */
    public static final class Star {
        public long id;
        public int tile;
        public double lDeg;
        public double bDeg;
        public Kind kind;
        public double massMsun;
        public double teffK;
        public double lumLsun;
        public double radiusRsun;
        public double loggCgs;
        public double feh;
        public double distPc;
        public double parallaxTrueMas;
        public double ebvTrue;
        /** The calibration regime the truth falls in (hot, fgk_dwarf, giant, m_dwarf), or none where no relation covers it. */
        public String regime;
        public String defect;
        // observation (NaN = missing; sentinel and NaN defects are in the values themselves)
        public double parallaxMas;
        public double parallaxErrMas;
        public double ebvObs;
        public double ebvErr;
        public double fehObs;
        public double fehErr;
        public final double[] mag = new double[Band.COUNT];
        public final double[] magErr = new double[Band.COUNT];
        public final boolean[] missing = new boolean[Band.COUNT];
    }

    private final long seed;
    private final double[] absMag = new double[Band.COUNT];

    public ForwardModel(long seed) {
        this.seed = seed;
    }

    private static double gauss(UniformRandomProvider rng, ZigguratSampler.NormalizedGaussian g, double mu, double s) {
        return mu + s * g.sample();
    }

    /** Kroupa 2001 broken power law between KROUPA_M_MIN and KROUPA_M_MAX, by inverse transform. */
    static double kroupaMass(double u1, double u2) {
        double a1 = 1 - KROUPA_ALPHA_LOW;
        double a2 = 1 - KROUPA_ALPHA_HIGH;
        // continuity at the break: k2 = k1 * M_break^(alpha_high - alpha_low)
        double k2 = Math.pow(KROUPA_M_BREAK, KROUPA_ALPHA_HIGH - KROUPA_ALPHA_LOW);
        double w1 = (Math.pow(KROUPA_M_BREAK, a1) - Math.pow(KROUPA_M_MIN, a1)) / a1;
        double w2 = k2 * (Math.pow(KROUPA_M_MAX, a2) - Math.pow(KROUPA_M_BREAK, a2)) / a2;
        if (u1 < w1 / (w1 + w2)) {
            double lo = Math.pow(KROUPA_M_MIN, a1);
            double hi = Math.pow(KROUPA_M_BREAK, a1);
            return Math.pow(lo + u2 * (hi - lo), 1 / a1);
        }
        double lo = Math.pow(KROUPA_M_BREAK, a2);
        double hi = Math.pow(KROUPA_M_MAX, a2);
        return Math.pow(lo + u2 * (hi - lo), 1 / a2);
    }

    /** A_band / A_V, A_V being the extinction in our V band (0.545 µm): the law normalised there. */
    private static final double[] OPT_AV = {ccmOverV(LAMBDA_B), 1.0, ccmOverV(LAMBDA_RC),
            ccmOverV(LAMBDA_IC), ccmOverV(LAMBDA_J), ccmOverV(LAMBDA_H), ccmOverV(LAMBDA_KS)};

    private static double ccmOverV(double lambdaUm) {
        return ccm(lambdaUm, RV) / ccm(LAMBDA_V, RV);
    }

    /** Fills {@code s} with star {@code id}. */
    public Star generate(long id, Star s) {
        // one Long seed per star: Commons RNG expands it with SplitMix64 into a well-mixed generator state
        // (a raw {seed, id} state would give nearly identical first draws for neighbouring ids)
        UniformRandomProvider rng = RandomSource.XO_RO_SHI_RO_128_PP.create(seed * 0x9E3779B97F4A7C15L + id);
        ZigguratSampler.NormalizedGaussian g = ZigguratSampler.NormalizedGaussian.of(rng);
        s.id = id;
        s.defect = null;
        // --- physical star
        double u = rng.nextDouble();
        double teff;
        double lum;
        double mass;
        double radius;
        double mKs = Double.NaN; // absolute Ks of an M dwarf, from its mass (Mann et al. 2019 run backwards)
        if (u < FRAC_MS) {
            s.kind = Kind.MS;
            mass = kroupaMass(rng.nextDouble(), rng.nextDouble());
            lum = Math.pow(10, ekerLogL(mass) + LOGL_SPREAD_DEX * g.sample());
            if (mass <= 1.5) {
                radius = ekerRadius(mass);
            } else {
                radius = Double.NaN;
            }
            // low masses: absolute Ks from the Mann et al. 2019 mass relation run backwards (mass drawn off by the
            // relation's scatter) and Mann et al. 2015's R(M_Ks) (off by its scatter); between M_BLEND_LO_MSUN and
            // M_BLEND_HI_MSUN ln R goes linearly in mass from Mann's radius to Eker's, which are 7-15 % apart there
            double uR = Math.max(0, Math.min(1, (M_BLEND_HI_MSUN - mass) / (M_BLEND_HI_MSUN - M_BLEND_LO_MSUN)));
            double zMass = g.sample();
            double zRadius = g.sample();
            double rStar = Double.NaN;
            if (uR > 0) {
                double mKsStar = mannMksOfMass(mass * (1 + M19_MASS_SCATTER * zMass));
                rStar = mannRadius(mKsStar) * (1 + M15_RADIUS_SCATTER * zRadius);
                if (!Double.isNaN(mKsStar) && rStar > 0) {
                    mKs = mKsStar;
                    radius = uR == 1 ? rStar : Math.exp(uR * Math.log(rStar) + (1 - uR) * Math.log(radius));
                }
            }
            if (mass <= 1.5) {
                teff = TEFF_SUN_K * Math.pow(lum / (radius * radius), 0.25);
                if (!Double.isNaN(mKs)) {
                    // M dwarfs lie on Mann et al. 2015's Teff-radius relation, off by its 13.4 % scatter in R at fixed
                    // Teff: Teff where the relation gives the star's Mann radius, and L from Stefan-Boltzmann (the
                    // Eker luminosity would put a 0.3 M_sun dwarf near 3160 K, ~6 % cooler than the relation says).
                    // Across the mass blend ln Teff goes linearly from this Teff to the Eker one, as ln R does; where
                    // the radius lies off the relation's rising branch (2800-4100 K) the Eker Teff stays
                    double tMann = mannTeffOfRadius(rStar / (1 + M15_TEFF_RADIUS_SCATTER * g.sample()));
                    if (!Double.isNaN(tMann)) {
                        teff = Math.exp(uR * Math.log(tMann) + (1 - uR) * Math.log(teff));
                        lum = radius * radius * Math.pow(teff / TEFF_SUN_K, 4);
                    }
                }
            } else {
                teff = ekerTeff(mass);
                radius = Math.sqrt(lum) * Math.pow(TEFF_SUN_K / teff, 2);
            }
            if (!(teff < M_ROUTE_MAX_K)) {
                mKs = Double.NaN; // photometry from V down (FGK relations)
            }
        } else if (u < FRAC_MS + FRAC_SUBGIANT) {
            s.kind = Kind.SUBGIANT;
            mass = 1.0 + 0.6 * rng.nextDouble();
            teff = 5000 + 1200 * rng.nextDouble();
            radius = 1.7 + 1.8 * rng.nextDouble();
            lum = radius * radius * Math.pow(teff / TEFF_SUN_K, 4);
        } else if (u < FRAC_MS + FRAC_SUBGIANT + FRAC_CLUMP) {
            s.kind = Kind.RED_CLUMP;
            mass = 1.0 + rng.nextDouble();
            teff = gauss(rng, g, 4750, 100);
            lum = Math.pow(10, gauss(rng, g, 1.7, 0.08));
            radius = Math.sqrt(lum) * Math.pow(TEFF_SUN_K / teff, 2);
        } else {
            s.kind = Kind.RGB;
            mass = 0.9 + 0.9 * rng.nextDouble();
            double logL = 0.8 + 1.8 * rng.nextDouble();
            lum = Math.pow(10, logL);
            teff = 4900 - 350 * (logL - 0.8) + gauss(rng, g, 0, 60);
            radius = Math.sqrt(lum) * Math.pow(TEFF_SUN_K / teff, 2);
        }
        s.massMsun = mass;
        s.teffK = teff;
        s.lumLsun = lum;
        s.radiusRsun = radius;
        s.loggCgs = LOGG_SUN_CGS + Math.log10(mass) - 2 * Math.log10(radius);
        s.feh = Math.max(-2.0, Math.min(0.5, gauss(rng, g, -0.1, 0.25)));

        // --- intrinsic colours, each relation's scatter drawn independently
        double feh = s.feh;
        double logg = s.loggCgs;
        boolean giant = s.kind == Kind.RED_CLUMP || s.kind == Kind.RGB;
        double bprp;
        if (!Double.isNaN(mKs)) {
            s.regime = teff >= MANN_TEFF_MIN_K && mKs <= MANN_RADIUS_MKS_MAX ? "m_dwarf" : "none";
            bprp = mDwarfMagnitudes(teff, feh, mKs, rng, g);
        } else {
            if (giant) {
                s.regime = "giant";
            } else if (teff > HOT_ROUTE_MIN_K) {
                s.regime = teff <= flowerTeff(-0.40) ? "hot" : "none";
            } else {
                s.regime = "fgk_dwarf";
            }
            double mbol = MBOL_SUN_MAG - 2.5 * Math.log10(lum);
            double mv = mbol - bcV(teff);
            double bv = giant ? theta(GHB_BV, GHB_BV_SIG, 0.3, 1.4, teff, feh, rng, g) : dwarfBv(teff, feh, rng, g);
            double vr = theta(C10_VR, C10_VR_SIG, 0.24, 0.80, teff, feh, rng, g);
            double vi = theta(C10_VI, C10_VI_SIG, 0.46, 1.47, teff, feh, rng, g);
            double vj = giant ? theta(GHB_VJ, GHB_VJ_SIG, 1.0, 2.4, teff, feh, rng, g)
                    : theta(C10_VJ, C10_VJ_SIG, 0.61, 2.44, teff, feh, rng, g);
            double vh = giant ? theta(GHB_VH, GHB_VH_SIG, 0.8, 3.1, teff, feh, rng, g)
                    : theta(C10_VH, C10_VH_SIG, 0.67, 3.01, teff, feh, rng, g);
            double vk = giant ? theta(GHB_VK, GHB_VK_SIG, 1.1, 3.4, teff, feh, rng, g)
                    : theta(C10_VK, C10_VK_SIG, 0.78, 3.15, teff, feh, rng, g);
            double tb = teff + C21_BPRP_SIG * g.sample();
            bprp = ColourInversion.colour(x -> c21BpRpTeff(x, feh, logg), 0.20, giant ? 2.55 : 2.00, tb);
            absMag[Band.V.ordinal()] = mv;
            absMag[Band.B.ordinal()] = mv + bv;
            absMag[Band.RC.ordinal()] = mv - vr;
            absMag[Band.IC.ordinal()] = mv - vi;
            absMag[Band.J.ordinal()] = mv - vj;
            absMag[Band.H.ordinal()] = mv - vh;
            absMag[Band.KS.ordinal()] = mv - vk;
        }
        double mg = absMag[Band.V.ordinal()] + gMinusV(bprp);
        absMag[Band.G.ordinal()] = mg;
        absMag[Band.BP.ordinal()] = mg + 0.4 * bprp;
        absMag[Band.RP.ordinal()] = mg - 0.6 * bprp;

        // --- position: direction uniform on the sky, distance ∝ d² ρ(disc) up to the survey's depth for this star
        double l = 360 * rng.nextDouble();
        double sinb = 2 * rng.nextDouble() - 1;
        double b = Math.toDegrees(Math.asin(sinb));
        s.lDeg = l;
        s.bDeg = b;
        s.tile = (int) Math.min(TILES - 1, Math.floor(l / (360.0 / TILES)));
        double dMax = Math.min(10_000, Math.pow(10, (G_LIMIT - mg) / 5 + 1));
        double dMin = 3;
        double d = dMin;
        double cosb = Math.cos(Math.toRadians(b));
        double cosl = Math.cos(Math.toRadians(l));
        for (int tries = 0; tries < 200; tries++) {
            double cand = dMin + (dMax - dMin) * Math.cbrt(rng.nextDouble()); // ∝ d² envelope
            double z = Math.abs(cand * sinb);
            double x = SUN_R_PC - cand * cosb * cosl;
            double y = cand * cosb * Math.sin(Math.toRadians(l));
            double rGal = Math.hypot(x, y);
            double rho = Math.exp(-z / DISC_SCALE_HEIGHT_PC - (rGal - SUN_R_PC) / DISC_SCALE_LENGTH_PC);
            // envelope: ρ ≤ exp(dMax / L) since R ≥ R_sun − d
            if (rng.nextDouble() * Math.exp(dMax / DISC_SCALE_LENGTH_PC) < rho) {
                d = cand;
                break;
            }
            d = cand;
        }
        s.distPc = d;
        s.parallaxTrueMas = 1000 / d;
        double absSinB = Math.abs(sinb);
        double pathKpc = absSinB < 1e-3 ? d / 1000
                : DUST_SCALE_HEIGHT_PC / 1000 / absSinB * (1 - Math.exp(-d * absSinB / DUST_SCALE_HEIGHT_PC));
        double av = DUST_AV_PER_KPC * pathKpc;
        double ebv = av / RV;
        s.ebvTrue = ebv;

        // --- apparent magnitudes with extinction
        double mu = 5 * Math.log10(d / 10);
        Band[] opt = {Band.B, Band.V, Band.RC, Band.IC, Band.J, Band.H, Band.KS};
        for (int k = 0; k < opt.length; k++) {
            s.mag[opt[k].ordinal()] = absMag[opt[k].ordinal()] + mu + av * OPT_AV[k];
        }
        double c0 = Double.isNaN(bprp) ? 1.0 : bprp;
        s.mag[Band.G.ordinal()] = absMag[Band.G.ordinal()] + mu + rG(c0) * ebv;
        s.mag[Band.BP.ordinal()] = absMag[Band.BP.ordinal()] + mu + rBp(c0) * ebv;
        s.mag[Band.RP.ordinal()] = absMag[Band.RP.ordinal()] + mu + rRp(c0) * ebv;

        // --- measurement
        for (Band bd : Band.values()) {
            int i = bd.ordinal();
            double m = s.mag[i];
            double sigma;
            double limit;
            switch (bd) {
                case J: case H: case KS:
                    sigma = 0.02 + 0.05 * Math.pow(10, 0.4 * (m - 15));
                    limit = 16.5;
                    break;
                case G:
                    sigma = 0.001 + 0.01 * Math.pow(10, 0.4 * (m - 19));
                    limit = 21;
                    break;
                case BP: case RP:
                    sigma = 0.002 + 0.02 * Math.pow(10, 0.4 * (m - 19));
                    limit = 20.8;
                    break;
                default:
                    sigma = 0.005 + 0.02 * Math.pow(10, 0.4 * (m - 19));
                    limit = 22;
                    break;
            }
            sigma = Math.min(sigma, 1.0);
            s.missing[i] = Double.isNaN(m) || m > limit || rng.nextDouble() < P_BAND_MISSING;
            s.mag[i] = m + sigma * g.sample();
            s.magErr[i] = sigma;
        }
        double gmag = s.mag[Band.G.ordinal()];
        double sp = Math.hypot(0.02, 0.5 * Math.pow(10, 0.4 * (gmag - 20)));
        s.parallaxErrMas = sp;
        s.parallaxMas = s.parallaxTrueMas + PARALLAX_ZERO_POINT_MAS + sp * g.sample();
        s.ebvErr = 0.01 + 0.05 * ebv;
        s.ebvObs = Math.max(0, ebv + s.ebvErr * g.sample());
        if (rng.nextDouble() < P_FEH_MEASURED) {
            s.fehErr = 0.1;
            s.fehObs = s.feh + 0.1 * g.sample();
        } else {
            s.fehErr = Double.NaN;
            s.fehObs = Double.NaN;
        }

        // --- defects
        if (s.mag[Band.V.ordinal()] < SATURATION_V) {
            for (Band bd : new Band[] {Band.B, Band.V, Band.RC, Band.IC}) {
                s.mag[bd.ordinal()] += 0.4;
                s.magErr[bd.ordinal()] = 0.2;
            }
            s.defect = "saturated";
        }
        if (rng.nextDouble() < P_BLEND) {
            for (int i = 0; i < Band.COUNT; i++) {
                s.mag[i] = 10 + 10 * rng.nextDouble();
            }
            s.defect = "blend";
        }
        if (rng.nextDouble() < P_SENTINEL) {
            int i = rng.nextInt(Band.COUNT);
            s.missing[i] = false;
            s.mag[i] = 99.99;
            s.defect = "sentinel";
        }
        if (rng.nextDouble() < P_NAN) {
            int k = rng.nextInt(Band.COUNT + 1);
            if (k == Band.COUNT) {
                s.parallaxMas = Double.NaN;
            } else {
                s.missing[k] = false;
                s.mag[k] = Double.NaN;
            }
            s.defect = "nan";
        }
        return s;
    }

    /** Colour of a theta-form relation (C10 or GHB09) at the star's Teff offset by the relation's scatter. */
    private static double theta(double[] coef, double sigmaK, double lo, double hi, double teff, double feh,
                                UniformRandomProvider rng, ZigguratSampler.NormalizedGaussian g) {
        double t = teff + sigmaK * g.sample();
        return ColourInversion.colour(x -> thetaTeff(coef, x, feh), lo, hi, t);
    }

    /**
     * B−V of a dwarf or subgiant: Casagrande et al. 2010 up to 7000 K, Flower 1996/Torres 2010 above 7500 K, and
     * between them the two colours mixed linearly in Teff (the job blends its two estimates over the same range).
     */
    private static double dwarfBv(double teff, double feh, UniformRandomProvider rng, ZigguratSampler.NormalizedGaussian g) {
        double zc = g.sample();
        double zf = g.sample();
        double c10 = ColourInversion.colour(x -> thetaTeff(C10_BV, x, feh), 0.18, 1.29, teff + C10_BV_SIG * zc);
        if (teff <= 7000) {
            return c10;
        }
        double f96 = ColourInversion.colour(IndependentRelations::flowerTeff, -0.40, 0.50, teff * (1 + F96_SCATTER_FRAC * zf));
        if (teff >= 7500) {
            return f96;
        }
        double w = (teff - 7000) / 500;
        return (1 - w) * c10 + w * f96;
    }

    /**
     * Absolute magnitudes of an M dwarf from its absolute Ks and Teff: J−H and H−Ks from our own approximation
     * (J−H = 0.60 + 1.2·10⁻⁴ (Teff − 3400 K) + 0.1 [Fe/H], H−Ks = 0.22 + 10⁻⁴ (3900 K − Teff), both clipped; near
     * what M dwarfs show, not a calibration), V−J and V−I_C from the Mann et al. 2015 J−H forms, BP−RP from their
     * plain form, each run backwards at Teff offset by the relation's scatter with the table note's 60 K (and the
     * job's extra 100 K for BP−RP) in quadrature; B−V and V−R_C from our approximations (outside every relation).
     * Returns the intrinsic BP−RP (G, BP and RP follow from V with it).
     */
    private double mDwarfMagnitudes(double teff, double feh, double mKs, UniformRandomProvider rng,
                                  ZigguratSampler.NormalizedGaussian g) {
        double jh = Math.max(0.45, Math.min(0.75, 0.60 + 1.2e-4 * (teff - 3400) + 0.1 * feh));
        double hk = Math.max(0.15, Math.min(0.40, 0.22 + 1e-4 * (3900 - teff)));
        double sysK = M15_SYSTEMATIC_K;
        double tj = teff + Math.hypot(M15_VJ_JH_SIG, sysK) * g.sample();
        double ti = teff + Math.hypot(M15_VI_JH_SIG, sysK) * g.sample();
        double tb = teff + Math.sqrt(M15_BPRP_SIG * M15_BPRP_SIG + sysK * sysK + 100 * 100) * g.sample();
        double vj = ColourInversion.colour(x -> mannTeff(M15_VJ_JH, x, jh), 1.8, MANN_VJ_TURN, tj);
        double vi = ColourInversion.colour(x -> mannTeff(M15_VI_JH, x, jh), 1.0, MANN_VI_TURN, ti);
        double bpRp = ColourInversion.colour(x -> mannTeff(M15_BPRP, x, 0), 1.2, MANN_BPRP_TURN, tb);
        double ks = mKs;
        double h = ks + hk;
        double j = h + jh;
        double v = j + vj;
        absMag[Band.KS.ordinal()] = ks;
        absMag[Band.H.ordinal()] = h;
        absMag[Band.J.ordinal()] = j;
        absMag[Band.V.ordinal()] = v;
        absMag[Band.IC.ordinal()] = v - vi;
        absMag[Band.RC.ordinal()] = v - (0.45 * vi + 0.05);
        absMag[Band.B.ordinal()] = v + Math.min(2.0, 1.40 + 2.5e-4 * Math.max(0, 4100 - teff));
        return bpRp;
    }

    /** Where a Mann polynomial stops falling with colour (its red turnover, near 2800 K), found by a scan. */
    static double mannTurnover(double[] k, double from) {
        for (double x = from; x < 15; x += 1e-3) {
            if (!(mannTeff(k, x + 1e-3, 0) < mannTeff(k, x, 0))) {
                return x;
            }
        }
        return 15;
    }

    private static final double MANN_VJ_TURN = mannTurnover(M15_VJ_JH, 1.8);
    private static final double MANN_VI_TURN = mannTurnover(M15_VI_JH, 1.0);
    private static final double MANN_BPRP_TURN = mannTurnover(M15_BPRP, 1.2);
}
