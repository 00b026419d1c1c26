package org.starderive.sample;

import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.sampling.distribution.ZigguratSampler;
import org.apache.commons.rng.simple.RandomSource;
import org.starderive.physics.Band;
import org.starderive.physics.BolometricCorrectionFlower1996;
import org.starderive.physics.CardelliClaytonMathis1989;
import org.starderive.physics.DerivedConstants;
import org.starderive.physics.GaiaBandExtinction;
import org.starderive.physics.GaiaToJohnsonRiello2021;
import org.starderive.physics.Iau2015;
import org.starderive.physics.MassLuminosityEker2018;
import org.starderive.physics.TeffRelation;
import org.starderive.physics.TeffRelations;

/**
 * One synthetic star of the fictional "Kestrel" survey, drawn from a random stream that depends only on
 * (seed, star id): the same star comes out whatever the partitioning. Scenario and its stated choices:
 * <ul>
 *   <li><b>Population.</b> 86 % main sequence, 4 % subgiants, 5 % red clump, 5 % red-giant branch (our choice).
 *       Main-sequence masses from the Kroupa 2001 (MNRAS 322, 231) initial mass function, dN/dM ∝ M^−1.3 for
 *       0.18–0.5 M⊙ and M^−2.3 for 0.5–8 M⊙; L from the Eker et al. 2018 mass–luminosity relation with 0.05 dex
 *       of age spread; R from Eker et al. 2018 Table 5 (R = 0.438M² + 0.479M + 0.075 for M ≤ 1.5) or Teff from
 *       their log Teff(M) for M &gt; 1.5. Evolved stars from simple loci of our own (below).</li>
 *   <li><b>Positions.</b> Exponential disc: scale height 300 pc, scale length 2.6 kpc (Jurić et al. 2008, ApJ 673,
 *       864, thin disc, from memory), Sun at R = 8.2 kpc (Bland-Hawthorn &amp; Gerhard 2016, from memory), z = 0;
 *       directions uniform on the sky; distances drawn ∝ d² ρ out to where the star reaches G = 20.5 (or 10 kpc).</li>
 *   <li><b>Extinction.</b> A_V grows by 1 mag/kpc in the plane through a dust layer of scale height 125 pc
 *       (common practice); E(B−V) = A_V / 3.1; bands reddened with the same laws the job removes.</li>
 *   <li><b>Photometry.</b> V from the bolometric magnitude and BC_V on the Flower/Torres scale; colours from the
 *       published colour–Teff relations run backwards, each perturbed by that relation's own scatter (so real
 *       stars scatter about the relation); dwarfs and subgiants with Casagrande et al. 2010, giants with
 *       González Hernández &amp; Bonifacio 2009 where it has the colour; BP−RP with Casagrande et al. 2021 at the
 *       true log g; G from V (Riello et al. 2021); BP − G = 0.4 (BP−RP) (our approximation).</li>
 *   <li><b>Errors.</b> Optical σ = 0.005 + 0.02·10^(0.4(m−19)); near-infrared σ = 0.02 + 0.05·10^(0.4(m−15));
 *       Gaia-like σ = 0.001 + 0.01·10^(0.4(m−19)); parallax σ = √(0.02² + (0.5·10^(0.4(G−20)))²) mas and a
 *       zero point of −0.02 mas. Bands fainter than their limit (optical 22, near-infrared 16.5, G 21, BP/RP 20.8)
 *       are missing. Measured E(B−V) = truth ± (0.01 + 0.05 E). [Fe/H] measured (± 0.1) for 20 % of stars.</li>
 *   <li><b>Defects</b> (independent, per star): each band missing 3 %; one magnitude set to the sentinel 99.99 in
 *       0.5 %; one value NaN in 0.2 %; 0.3 % blends whose magnitudes are random (colours outside every calibration);
 *       stars brighter than V = 7 saturated (optical magnitudes 0.4 mag too faint, error 0.2).</li>
 * </ul>
 * Because the photometry is made with the same published relations the job uses, recovery checks the inference,
 * flags and uncertainties, not the calibrations themselves (those are checked against published tables).
 */
public final class ForwardModel {
    public static final double FRAC_MS = 0.86;
    public static final double FRAC_SUBGIANT = 0.04;
    public static final double FRAC_CLUMP = 0.05;
    public static final double KROUPA_M_MIN = 0.18;
    public static final double KROUPA_M_BREAK = 0.5;
    public static final double KROUPA_M_MAX = 8.0;
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

    private static final double RV = 3.1;
    private static final TeffRelation C10_BV = TeffRelations.byId("C10/B-V");
    private static final TeffRelation C10_VR = TeffRelations.byId("C10/V-Rc");
    private static final TeffRelation C10_VI = TeffRelations.byId("C10/V-Ic");
    private static final TeffRelation C10_VJ = TeffRelations.byId("C10/V-J");
    private static final TeffRelation C10_VH = TeffRelations.byId("C10/V-H");
    private static final TeffRelation C10_VK = TeffRelations.byId("C10/V-Ks");
    private static final TeffRelation G09_BV = TeffRelations.byId("GHB09/B-V");
    private static final TeffRelation G09_VJ = TeffRelations.byId("GHB09/V-J");
    private static final TeffRelation G09_VH = TeffRelations.byId("GHB09/V-H");
    private static final TeffRelation G09_VK = TeffRelations.byId("GHB09/V-Ks");
    private static final TeffRelation C21_BPRP_DWARF = TeffRelations.byId("C21/BP-RP/dwarf");
    private static final TeffRelation C21_BPRP_GIANT = TeffRelations.byId("C21/BP-RP/giant");

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

    private static double bandOverAv(Band b) {
        return CardelliClaytonMathis1989.bandOverAv(b, RV);
    }

    private static final double[] OPT_AV = {bandOverAv(Band.B), bandOverAv(Band.V), bandOverAv(Band.RC), bandOverAv(Band.IC),
            bandOverAv(Band.J), bandOverAv(Band.H), bandOverAv(Band.KS)};

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
        if (u < FRAC_MS) {
            s.kind = Kind.MS;
            mass = kroupaMass(rng.nextDouble(), rng.nextDouble());
            double logL = MassLuminosityEker2018.logLuminosity(mass) + gauss(rng, g, 0, 0.05);
            lum = Math.pow(10, logL);
            if (mass <= 1.5) {
                double r = 0.438 * mass * mass + 0.479 * mass + 0.075;
                teff = Iau2015.TEFF_SUN_K * Math.pow(lum / (r * r), 0.25);
            } else {
                double lm = Math.log10(mass);
                teff = Math.pow(10, -0.170 * lm * lm + 0.888 * lm + 3.671);
            }
        } else if (u < FRAC_MS + FRAC_SUBGIANT) {
            s.kind = Kind.SUBGIANT;
            mass = 1.0 + 0.6 * rng.nextDouble();
            teff = 5000 + 1200 * rng.nextDouble();
            double r = 1.7 + 1.8 * rng.nextDouble();
            lum = r * r * Math.pow(teff / Iau2015.TEFF_SUN_K, 4);
        } else if (u < FRAC_MS + FRAC_SUBGIANT + FRAC_CLUMP) {
            s.kind = Kind.RED_CLUMP;
            mass = 1.0 + rng.nextDouble();
            teff = gauss(rng, g, 4750, 100);
            lum = Math.pow(10, gauss(rng, g, 1.7, 0.08));
        } else {
            s.kind = Kind.RGB;
            mass = 0.9 + 0.9 * rng.nextDouble();
            double logL = 0.8 + 1.8 * rng.nextDouble();
            lum = Math.pow(10, logL);
            teff = 4900 - 350 * (logL - 0.8) + gauss(rng, g, 0, 60);
        }
        double radius = Math.sqrt(lum) * Math.pow(Iau2015.TEFF_SUN_K / teff, 2);
        s.massMsun = mass;
        s.teffK = teff;
        s.lumLsun = lum;
        s.radiusRsun = radius;
        s.loggCgs = DerivedConstants.LOGG_SUN_CGS + Math.log10(mass) - 2 * Math.log10(radius);
        s.feh = Math.max(-2.0, Math.min(0.5, gauss(rng, g, -0.1, 0.25)));

        // --- intrinsic colours, each relation's scatter drawn independently
        boolean giant = s.kind == Kind.RED_CLUMP || s.kind == Kind.RGB;
        double mbol = BolometricCorrectionFlower1996.MBOL_SUN - 2.5 * Math.log10(lum);
        double mv = mbol - BolometricCorrectionFlower1996.bcV(teff);
        double feh = s.feh;
        double logg = s.loggCgs;
        double bv = colour(giant ? G09_BV : C10_BV, teff, feh, logg, rng, g);
        double vr = colour(C10_VR, teff, feh, logg, rng, g);
        double vi = colour(C10_VI, teff, feh, logg, rng, g);
        double vj = colour(giant ? G09_VJ : C10_VJ, teff, feh, logg, rng, g);
        double vh = colour(giant ? G09_VH : C10_VH, teff, feh, logg, rng, g);
        double vk = colour(giant ? G09_VK : C10_VK, teff, feh, logg, rng, g);
        double bprp = colour(giant ? C21_BPRP_GIANT : C21_BPRP_DWARF, teff, feh, logg, rng, g);
        absMag[Band.V.ordinal()] = mv;
        absMag[Band.B.ordinal()] = mv + bv;
        absMag[Band.RC.ordinal()] = mv - vr;
        absMag[Band.IC.ordinal()] = mv - vi;
        absMag[Band.J.ordinal()] = mv - vj;
        absMag[Band.H.ordinal()] = mv - vh;
        absMag[Band.KS.ordinal()] = mv - vk;
        double mg = mv + GaiaToJohnsonRiello2021.gMinusV(bprp);
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
        s.mag[Band.G.ordinal()] = absMag[Band.G.ordinal()] + mu + GaiaBandExtinction.rG(c0) * ebv;
        s.mag[Band.BP.ordinal()] = absMag[Band.BP.ordinal()] + mu + GaiaBandExtinction.rBp(c0) * ebv;
        s.mag[Band.RP.ordinal()] = absMag[Band.RP.ordinal()] + mu + GaiaBandExtinction.rRp(c0) * ebv;

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

    private static double colour(TeffRelation r, double teff, double feh, double logg,
                                 UniformRandomProvider rng, ZigguratSampler.NormalizedGaussian g) {
        // the star's own offset from the relation, in Teff, of the size of the relation's scatter
        double t = teff + r.scatterK() * g.sample();
        return ColourInversion.colour(r, t, feh, logg);
    }
}
