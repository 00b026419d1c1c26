package org.starderive.sample;

/**
 * The published relations the synthetic survey is made with, typed a second time, independently of the
 * physics core (no code and no coefficient array shared with {@code org.starderive.physics}): a mistyped coefficient
 * or constant in the core then shows up as a recovery bias instead of cancelling out. Each block names its source.
 * What stays shared with the core: the choice of relations themselves (the survey is made with the relations the job
 * inverts, so recovery tests the inference, not the calibrations), and {@code Band} (only the list of bands).
 *
 * <p>All functions here go one way, from the physical star to its colours; {@link ForwardModel} runs the colour–Teff
 * relations backwards by bisection.
 */
final class IndependentRelations {
    private IndependentRelations() {}

    // ---- constants: IAU 2015 Resolution B3 (nominal solar values), B2 (parsec); Torres 2010, AJ 140, 1158 (V_sun)
    static final double TEFF_SUN_K = 5772.0;
    static final double GM_SUN_M3_S2 = 1.3271244e20;
    static final double R_SUN_M = 6.957e8;
    /** log10 of the solar surface gravity in cgs, from (GM)⊙ / R⊙² (IAU 2015 B3), 100 cm/s² per m/s². */
    static final double LOGG_SUN_CGS = Math.log10(100 * GM_SUN_M3_S2 / (R_SUN_M * R_SUN_M));
    /** Apparent V of the Sun, Torres 2010. */
    static final double V_SUN_MAG = -26.76;
    /** One astronomical unit in parsecs, from the IAU 2015 B2 definition of the parsec (648000/π au). */
    static final double AU_PC = Math.PI / 648000;
    /** M_V of the Sun: V⊙ moved from 1 au to 10 pc. */
    static final double MV_SUN_MAG = V_SUN_MAG - 5 * Math.log10(AU_PC / 10);

    // ---- Casagrande et al. 2010, A&A 512, A54, Table 4: theta = a0 + a1 X + a2 X² + a3 X [Fe/H] + a4 [Fe/H] + a5 [Fe/H]²
    static final double[] C10_BV = {0.5665, 0.4809, -0.0060, -0.0613, -0.0042, -0.0055};
    static final double[] C10_VR = {0.4386, 1.4614, -0.7014, -0.0807, 0.0142, -0.0015};
    static final double[] C10_VI = {0.4033, 0.8171, -0.1987, -0.0409, 0.0319, 0.0012};
    static final double[] C10_VJ = {0.4669, 0.3849, -0.0350, -0.0140, 0.0225, 0.0011};
    static final double[] C10_VH = {0.5251, 0.2553, -0.0119, -0.0187, 0.0410, 0.0025};
    static final double[] C10_VK = {0.5057, 0.2600, -0.0146, -0.0131, 0.0288, 0.0016};
    /** Scatter (K) of each C10 row above, same table. */
    static final double C10_BV_SIG = 73, C10_VR_SIG = 62, C10_VI_SIG = 59, C10_VJ_SIG = 42, C10_VH_SIG = 33, C10_VK_SIG = 25;

    // ---- González Hernández & Bonifacio 2009, A&A 497, 497, Table 5, giants; same form
    static final double[] GHB_BV = {0.4967, 0.7260, -0.1563, 0.0255, -0.0585, -0.0061};
    static final double[] GHB_VJ = {0.4629, 0.4124, -0.0417, -0.0012, 0.0094, 0.0013};
    static final double[] GHB_VH = {0.5321, 0.2649, -0.0146, -0.0069, 0.0211, 0.0009};
    static final double[] GHB_VK = {0.5293, 0.2489, -0.0119, -0.0042, 0.0135, 0.0010};
    static final double GHB_BV_SIG = 57, GHB_VJ_SIG = 18, GHB_VH_SIG = 23, GHB_VK_SIG = 23;

    /** Teff of the theta form, [Fe/H] evaluated at −3.5 at most (C10's rule). */
    static double thetaTeff(double[] a, double x, double feh) {
        double f = Math.max(feh, -3.5);
        double theta = a[0] + a[1] * x + a[2] * x * x + a[3] * x * f + a[4] * f + a[5] * f * f;
        return 5040.0 / theta;
    }

    // ---- Casagrande et al. 2021, MNRAS 507, 2684 (authors' code release), BP−RP
    private static final double[] C21_BPRP = {7980.8845, -4138.3457, 1264.9366, -130.4388, 0, 285.8393, -324.2196,
            106.8511, -4.9825, 0, 4.5138, -203.7774, 126.6981, -14.7442, 40.7376};
    /** Scatter the job states for this relation (80 K, the paper's quoted uncertainty with its 20 K zero point). */
    static final double C21_BPRP_SIG = 80;

    static double c21BpRpTeff(double x, double feh, double logg) {
        double[] c = C21_BPRP;
        double g = Math.max(0, Math.min(5, logg));
        double f = Math.max(-4, feh);
        double x2 = x * x;
        double x3 = x2 * x;
        double x5 = x3 * x2;
        return c[0] + c[1] * x + c[2] * x2 + c[3] * x3 + c[4] * x5
                + g * (c[5] + c[6] * x + c[7] * x2 + c[8] * x3 + c[9] * x5)
                + f * (c[10] + c[11] * x + c[12] * x2 + c[13] * x3) + c[14] * f * g * x;
    }

    // ---- Mann et al. 2015, ApJ 804, 64, Table 2 as reprinted in the erratum (Mann et al. 2016, ApJ 819, 87):
    // Teff / 3500 K = a + bX + cX² + dX³ + eX⁴ + f (J−H) + g (J−H)²
    static final double[] M15_VJ_JH = {2.769, -1.421, 0.4284, -0.06133, 0.003310, 0.1333, 0.05416};
    static final double[] M15_VI_JH = {1.568, -0.4381, 0.07749, -0.005610, 0, 0.2441, -0.09257};
    static final double[] M15_BPRP = {3.245, -2.4309, 1.043, -0.2127, 0.01649, 0, 0};
    /** Table 2 scatters (K) of the rows above; the table note adds 60 K in quadrature. */
    static final double M15_VJ_JH_SIG = 48, M15_VI_JH_SIG = 52, M15_BPRP_SIG = 52, M15_SYSTEMATIC_K = 60;

    static double mannTeff(double[] k, double x, double jh) {
        double p = k[0] + x * (k[1] + x * (k[2] + x * (k[3] + x * k[4])));
        return 3500.0 * (p + k[5] * jh + k[6] * jh * jh);
    }

    /** Mann et al. 2015 Table 1 (erratum): R/R⊙ = 1.9515 − 0.3520 M_Ks + 0.01680 M_Ks², scatter 2.89 %. */
    static double mannRadius(double mKs) {
        return 1.9515 - 0.3520 * mKs + 0.01680 * mKs * mKs;
    }

    static final double M15_RADIUS_SCATTER = 0.0289;

    /**
     * Mann et al. 2015 Table 1, Teff–radius relation without [Fe/H]: R/R⊙ = 10.5440 − 33.7546 X + 35.1909 X² −
     * 11.5928 X³, X = Teff / 3500 K, scatter 13.4 % in R (as in the first author's code release; three independent
     * transcriptions agree).
     */
    static double mannRadiusOfTeff(double teffK) {
        double x = teffK / 3500.0;
        return 10.5440 - 33.7546 * x + 35.1909 * x * x - 11.5928 * x * x * x;
    }

    static final double M15_TEFF_RADIUS_SCATTER = 0.134;

    /**
     * Teff at which {@link #mannRadiusOfTeff} gives {@code radiusRsun}, by bisection on 2800–4100 K (the rising branch
     * the job inverts too; the cubic's minimum is at 2733 K); NaN outside.
     */
    static double mannTeffOfRadius(double radiusRsun) {
        double lo = 2800;
        double hi = 4100;
        if (!(radiusRsun >= mannRadiusOfTeff(lo) && radiusRsun <= mannRadiusOfTeff(hi))) {
            return Double.NaN;
        }
        for (int i = 0; i < 60; i++) {
            double m = 0.5 * (lo + hi);
            if (mannRadiusOfTeff(m) < radiusRsun) {
                lo = m;
            } else {
                hi = m;
            }
        }
        return 0.5 * (lo + hi);
    }

    /** Mann et al. 2019, ApJ 871, 63, Table 6, n = 5 fit: log10 M = Σ a_i (M_Ks − 7.5)^i, scatter 2.0 %. */
    static double mannLogMass(double mKs) {
        double x = mKs - 7.5;
        return -0.642 + x * (-0.208 + x * (-8.43e-4 + x * (7.87e-3 + x * (1.42e-4 + x * -2.13e-4))));
    }

    static final double M19_MASS_SCATTER = 0.020;

    /** M_Ks of a mass by bisection of {@link #mannLogMass} over its range 4.0–11.0 (NaN outside). */
    static double mannMksOfMass(double massMsun) {
        double target = Math.log10(massMsun);
        double lo = 4.0;
        double hi = 11.0;
        if (target > mannLogMass(lo) || target < mannLogMass(hi)) {
            return Double.NaN;
        }
        for (int i = 0; i < 60; i++) {
            double m = 0.5 * (lo + hi);
            if (mannLogMass(m) > target) {
                lo = m;
            } else {
                hi = m;
            }
        }
        return 0.5 * (lo + hi);
    }

    // ---- Flower 1996, ApJ 469, 355, as corrected by Torres 2010, AJ 140, 1158: log Teff(B−V), MS/subgiants/giants
    private static final double[] F96_TEFF = {3.979145106714099, -0.654992268598245, 1.740690042385095,
            -4.608815154057166, 6.792599779944473, -5.396909891322525, 2.192970376522490, -0.359495739295671};
    /** Scatter the job states for it (2 % of Teff: the relation has none tabulated). */
    static final double F96_SCATTER_FRAC = 0.02;

    static double flowerTeff(double bv) {
        double s = 0;
        for (int i = F96_TEFF.length - 1; i >= 0; i--) {
            s = s * bv + F96_TEFF[i];
        }
        return Math.pow(10, s);
    }

    // ---- BC_V, same papers: BC_V = Σ k_i (log Teff)^i in three segments
    private static final double[] BC_COOL = {-0.190537291496456e5, 0.155144866764412e5, -0.421278819301717e4,
            0.381476328422343e3};
    private static final double[] BC_MID = {-0.370510203809015e5, 0.385672629965804e5, -0.150651486316025e5,
            0.261724637119416e4, -0.170623810323864e3};
    private static final double[] BC_HOT = {-0.118115450538963e6, 0.137145973583929e6, -0.636233812100225e5,
            0.147412923562646e5, -0.170587278406872e4, 0.788731721804990e2};

    static double bcV(double teffK) {
        double lt = Math.log10(teffK);
        double[] k = lt < 3.70 ? BC_COOL : lt <= 3.90 ? BC_MID : BC_HOT;
        double s = 0;
        for (int i = k.length - 1; i >= 0; i--) {
            s = s * lt + k[i];
        }
        return s;
    }

    // ---- Eker et al. 2018, MNRAS 479, 5491: Table 4 mass–luminosity, Table 5 radius and Teff
    private static final double[] EKER_M_EDGE = {0.45, 0.72, 1.05, 2.40, 7.0};
    private static final double[] EKER_ALPHA = {2.028, 4.572, 5.743, 4.329, 3.967, 2.865};
    private static final double[] EKER_BETA = {-0.976, -0.102, -0.007, 0.010, 0.093, 1.105};

    /** log L/L⊙; below 0.179 M⊙ the lowest segment is extrapolated (the survey's choice, stated in ForwardModel). */
    static double ekerLogL(double massMsun) {
        int i = 0;
        while (i < EKER_M_EDGE.length && massMsun > EKER_M_EDGE[i]) {
            i++;
        }
        return EKER_ALPHA[i] * Math.log10(massMsun) + EKER_BETA[i];
    }

    static double ekerRadius(double massMsun) {
        return 0.438 * massMsun * massMsun + 0.479 * massMsun + 0.075;
    }

    static double ekerTeff(double massMsun) {
        double lm = Math.log10(massMsun);
        return Math.pow(10, -0.170 * lm * lm + 0.888 * lm + 3.671);
    }

    // ---- Riello et al. 2021, A&A 649, A3, Table C.2: G − V as a function of BP−RP (valid −0.5 … 5.0)
    static double gMinusV(double bpRp) {
        return -0.02704 + bpRp * (0.01424 + bpRp * (-0.2156 + bpRp * 0.01426));
    }

    // ---- Cardelli, Clayton & Mathis 1989, ApJ 345, 245: A(λ)/A(V) = a(x) + b(x)/R_V
    static double ccm(double lambdaUm, double rv) {
        double x = 1 / lambdaUm;
        if (x < 1.1) {
            double p = Math.pow(x, 1.61);
            return 0.574 * p - 0.527 * p / rv;
        }
        double y = x - 1.82;
        double a = 1 + y * (0.17699 + y * (-0.50447 + y * (-0.02427 + y * (0.72085 + y * (0.01979 + y * (-0.77530 + y * 0.32999))))));
        double b = y * (1.41338 + y * (2.28305 + y * (1.07233 + y * (-5.38434 + y * (-0.62251 + y * (5.30260 + y * -2.09002))))));
        return a + b / rv;
    }

    /** Effective wavelengths (µm): Johnson–Cousins B V R_C I_C (Bessell, Castelli &amp; Plez 1998, from memory), 2MASS J H Ks (Cohen et al. 2003). */
    static final double LAMBDA_B = 0.438, LAMBDA_V = 0.545, LAMBDA_RC = 0.641, LAMBDA_IC = 0.798;
    static final double LAMBDA_J = 1.235, LAMBDA_H = 1.662, LAMBDA_KS = 2.159;

    // ---- Gaia-band extinction coefficients A/E(B−V) (Casagrande et al. 2021 release), C = intrinsic BP−RP
    static double rG(double c) { return 2.609 - 0.475 * c + 0.053 * c * c; }

    static double rBp(double c) { return 2.998 - 0.140 * c - 0.175 * c * c + 0.062 * c * c * c; }

    static double rRp(double c) { return 1.689 - 0.059 * c; }

    // after the BC_V coefficient arrays: static fields initialise in order
    /**
     * M_bol of the Sun on the scale of the Flower/Torres BC_V: M_V⊙ + BC_V(Teff⊙), computed here rather than typed
     * (Torres 2010 gives the rule that a BC scale carries its own M_bol⊙).
     */
    static final double MBOL_SUN_MAG = MV_SUN_MAG + bcV(TEFF_SUN_K);
}
