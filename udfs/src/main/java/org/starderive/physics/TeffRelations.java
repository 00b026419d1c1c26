package org.starderive.physics;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

import static org.starderive.physics.Band.*;
import static org.starderive.physics.Regime.FGK_DWARF;
import static org.starderive.physics.Regime.GIANT;

/**
 * The catalogue of colour–Teff relations the core can use. Every coefficient is the published one:
 * <ul>
 *   <li>Casagrande, Ramírez, Meléndez, Bessell &amp; Asplund 2010, A&amp;A 512, A54, Table 4 — dwarfs and subgiants,
 *       IRFM scale; zero-point uncertainty about 15 K; [Fe/H] &lt; −3.5 evaluated at −3.5.</li>
 *   <li>González Hernández &amp; Bonifacio 2009, A&amp;A 497, 497, Table 5 — giants.</li>
 *   <li>Casagrande et al. 2021, MNRAS 507, 2684 — Gaia-like BP−RP and G−Ks with log g (coefficients as released by
 *       the authors); colour limits per class; [Fe/H] clipped at −4; add 20 K for the zero point. The papers'
 *       quoted scatter for these two colours is not on our reference sheet: 80 K (BP−RP) and 60 K (G−Ks) are
 *       conservative values from memory.</li>
 *   <li>Mann, Feiden, Gaidos, Boyajian &amp; von Braun 2015, ApJ 804, 64, Table 2, with the coefficients as reprinted
 *       in the erratum Mann et al. 2016, ApJ 819, 87 — M dwarfs, 2700–4100 K, −0.6 &lt; [Fe/H] &lt; +0.5; V−J, V−I_C
 *       and BP−RP, each plain, with [Fe/H] (used only for a measured [Fe/H]) and, for V−J and V−I_C, with J−H. The
 *       table note's 60 K is added in quadrature to each scatter. The BP−RP relations were calibrated on synthetic
 *       photometry with pre-launch passbands and are reported to run 90–170 K hot on real space-mission BP−RP
 *       (one source): we add a further 100 K in quadrature (our choice). Each polynomial turns back up near
 *       2800 K: colours redder than the turnover are out of range, never evaluated.</li>
 *   <li>Flower 1996, ApJ 469, 355, log Teff(B−V) for main-sequence stars, subgiants and giants, with the coefficients
 *       as corrected by Torres 2010, AJ 140, 1158 — the hot regime (used above 7000 K, blended to 7500 K);
 *       B−V −0.40 … 0.50 here. No scatter is tabulated: 2 % of Teff (our choice).</li>
 * </ul>
 * The list order is fixed; {@link #index(TeffRelation)} is a stable small integer used for the bit set that
 * records which relations a star's Teff came from.
 */
public final class TeffRelations {
    private TeffRelations() {}

    public static final String C10 = "Casagrande et al. 2010, A&A 512, A54, Table 4";
    public static final String GHB09 = "Gonzalez Hernandez & Bonifacio 2009, A&A 497, 497, Table 5";
    public static final String C21 = "Casagrande et al. 2021, MNRAS 507, 2684";
    public static final String M15 = "Mann et al. 2015, ApJ 804, 64, Table 2 (erratum: Mann et al. 2016, ApJ 819, 87)";
    public static final String F96 = "Flower 1996, ApJ 469, 355; coefficients as corrected by Torres 2010, AJ 140, 1158";
    /** Added in quadrature to every Mann et al. 2015 scatter (note to their Table 2). */
    public static final double M15_SCALE_K = 60.0;
    /** Added in quadrature to the Mann et al. 2015 BP−RP scatter: real versus pre-launch passbands (our choice). */
    public static final double M15_BPRP_EXTRA_K = 100.0;
    /** Relative scatter given to the Flower 1996 relation, which tabulates none (our choice). */
    public static final double F96_SCATTER_FRAC = 0.02;

    private static final List<TeffRelation> ALL;

    static {
        List<TeffRelation> l = new ArrayList<>();
        // Casagrande et al. 2010, Table 4: colour range, [Fe/H] range, a0..a5, sigma (K)
        l.add(c10(B, V, 0.18, 1.29, 0.4, new double[] {0.5665, 0.4809, -0.0060, -0.0613, -0.0042, -0.0055}, 73));
        l.add(c10(V, RC, 0.24, 0.80, 0.3, new double[] {0.4386, 1.4614, -0.7014, -0.0807, 0.0142, -0.0015}, 62));
        l.add(c10(RC, IC, 0.23, 0.68, 0.3, new double[] {0.3296, 1.9716, -1.0225, -0.0298, 0.0329, 0.0035}, 82));
        l.add(c10(V, IC, 0.46, 1.47, 0.3, new double[] {0.4033, 0.8171, -0.1987, -0.0409, 0.0319, 0.0012}, 59));
        l.add(c10(V, J, 0.61, 2.44, 0.4, new double[] {0.4669, 0.3849, -0.0350, -0.0140, 0.0225, 0.0011}, 42));
        l.add(c10(V, H, 0.67, 3.01, 0.4, new double[] {0.5251, 0.2553, -0.0119, -0.0187, 0.0410, 0.0025}, 33));
        l.add(c10(V, KS, 0.78, 3.15, 0.4, new double[] {0.5057, 0.2600, -0.0146, -0.0131, 0.0288, 0.0016}, 25));
        l.add(c10(J, KS, 0.07, 0.80, 0.4, new double[] {0.6393, 0.6104, 0.0920, -0.0330, 0.0291, 0.0020}, 132));
        // Gonzalez Hernandez & Bonifacio 2009, Table 5, giants: colour range, b0..b5, sigma (K); [Fe/H] -4.0..0.2
        l.add(ghb09(B, V, 0.3, 1.4, new double[] {0.4967, 0.7260, -0.1563, 0.0255, -0.0585, -0.0061}, 57));
        l.add(ghb09(V, J, 1.0, 2.4, new double[] {0.4629, 0.4124, -0.0417, -0.0012, 0.0094, 0.0013}, 18));
        l.add(ghb09(V, H, 0.8, 3.1, new double[] {0.5321, 0.2649, -0.0146, -0.0069, 0.0211, 0.0009}, 23));
        l.add(ghb09(V, KS, 1.1, 3.4, new double[] {0.5293, 0.2489, -0.0119, -0.0042, 0.0135, 0.0010}, 23));
        l.add(ghb09(J, KS, 0.1, 0.9, new double[] {0.6517, 0.6312, 0.0168, -0.0381, 0.0256, 0.0013}, 94));
        // Casagrande et al. 2021: c0..c14
        double[] bpRp = {7980.8845, -4138.3457, 1264.9366, -130.4388, 0, 285.8393, -324.2196, 106.8511, -4.9825, 0,
                4.5138, -203.7774, 126.6981, -14.7442, 40.7376};
        double[] gKs = {8031.7804, -1815.3523, 0, 70.7201, -1.7309, 252.9647, -342.0817, 161.3031, -26.7714, 0,
                -120.1133, 42.6723, 0, 0, 10.0433};
        l.add(c21(BP, RP, FGK_DWARF, 0.20, 2.00, bpRp, 80));
        l.add(c21(BP, RP, GIANT, 0.20, 2.55, bpRp, 80));
        l.add(c21(G, KS, FGK_DWARF, 0.20, 2.80, gKs, 60));
        l.add(c21(G, KS, GIANT, 0.20, 3.90, gKs, 60));
        // Mann et al. 2015 (erratum 2016), Table 2: a, b, c, d, e, f, g and sigma (K); per colour the [Fe/H] form
        // first, then the J-H form, then the plain one (the first usable form of a colour is the one used)
        l.add(m15(V, J, TeffRelation.Aux.FEH, new double[] {2.515, -1.054, 0.2965, -0.04150, 0.002245, 0.05262, 0}, 42));
        l.add(m15(V, J, TeffRelation.Aux.JH, new double[] {2.769, -1.421, 0.4284, -0.06133, 0.003310, 0.1333, 0.05416}, 48));
        l.add(m15(V, J, TeffRelation.Aux.NONE, new double[] {2.840, -1.3453, 0.3906, -0.0546, 0.002913, 0, 0}, 55));
        l.add(m15(V, IC, TeffRelation.Aux.FEH, new double[] {1.901, -0.6564, 0.1471, -0.01274, 0, 0.04697, 0}, 48));
        l.add(m15(V, IC, TeffRelation.Aux.JH, new double[] {1.568, -0.4381, 0.07749, -0.005610, 0, 0.2441, -0.09257}, 52));
        l.add(m15(V, IC, TeffRelation.Aux.NONE, new double[] {2.455, -1.5701, 0.6891, -0.1500, 0.01254, 0, 0}, 53));
        l.add(m15(BP, RP, TeffRelation.Aux.FEH, new double[] {2.835, -1.893, 0.7860, -0.1594, 0.01243, 0.04417, 0}, 45));
        l.add(m15(BP, RP, TeffRelation.Aux.NONE, new double[] {3.245, -2.4309, 1.043, -0.2127, 0.01649, 0, 0}, 52));
        // Flower 1996 / Torres 2010, log Teff(B-V), main sequence, subgiants and giants: c0..c7
        l.add(new TeffRelation("F96/B-V", TeffRelation.Form.FLOWER1996, TeffRelation.Aux.NONE, B, V, Regime.HOT,
                -0.40, 0.50, -5.0, 1.0, -5.0, 0, Double.POSITIVE_INFINITY,
                new double[] {3.979145106714099, -0.654992268598245, 1.740690042385095, -4.608815154057166,
                        6.792599779944473, -5.396909891322525, 2.192970376522490, -0.359495739295671},
                0, F96_SCATTER_FRAC, 0.0, F96));
        ALL = Collections.unmodifiableList(l);
        if (ALL.size() > 63) {
            throw new IllegalStateException("Relation bit set holds at most 63 relations");
        }
    }

    private static TeffRelation m15(Band blue, Band red, TeffRelation.Aux aux, double[] k, double sigma) {
        double extra = blue == BP ? M15_BPRP_EXTRA_K : 0;
        double scatter = Math.sqrt(sigma * sigma + M15_SCALE_K * M15_SCALE_K + extra * extra);
        String suffix = aux == TeffRelation.Aux.FEH ? "+FeH" : aux == TeffRelation.Aux.JH ? "+JH" : "";
        return new TeffRelation("M15/" + blue.label() + "-" + red.label() + suffix, TeffRelation.Form.MANN2015, aux,
                blue, red, Regime.M_DWARF, 0.5, mannTurnover(k), -0.6, 0.5, -0.6, 2700, 4100, k, scatter, 0, 0.0, M15);
    }

    /**
     * The colour (above 0.5 mag) at which a Mann et al. 2015 polynomial stops falling with colour and turns back up
     * (about 2800 K); 20 mag when it never does. Colours at or beyond it are outside the relation.
     */
    static double mannTurnover(double[] k) {
        for (double x = 0.5; x < 20; x += 0.001) {
            double d = k[1] + x * (2 * k[2] + x * (3 * k[3] + x * 4 * k[4]));
            if (!(d < 0)) {
                return x;
            }
        }
        return 20;
    }

    private static TeffRelation c10(Band blue, Band red, double xmin, double xmax, double fehMax, double[] a, double sigma) {
        return new TeffRelation("C10/" + blue.label() + "-" + red.label(), TeffRelation.Form.THETA, blue, red,
                FGK_DWARF, xmin, xmax, -5.0, fehMax, -3.5, a, sigma, 15.0, C10);
    }

    private static TeffRelation ghb09(Band blue, Band red, double xmin, double xmax, double[] b, double sigma) {
        return new TeffRelation("GHB09/" + blue.label() + "-" + red.label(), TeffRelation.Form.THETA, blue, red,
                GIANT, xmin, xmax, -4.0, 0.2, -4.0, b, sigma, 0.0, GHB09);
    }

    private static TeffRelation c21(Band blue, Band red, Regime cls, double xmin, double xmax, double[] c, double sigma) {
        String suffix = cls == FGK_DWARF ? "/dwarf" : "/giant";
        return new TeffRelation("C21/" + blue.label() + "-" + red.label() + suffix, TeffRelation.Form.GAIA2021, blue, red,
                cls, xmin, xmax, -4.0, 1.0, -4.0, c, sigma, 20.0, C21);
    }

    /** All relations, in their fixed order. */
    public static List<TeffRelation> all() { return ALL; }

    public static int index(TeffRelation r) { return ALL.indexOf(r); }

    public static TeffRelation byId(String id) {
        for (TeffRelation r : ALL) {
            if (r.id().equals(id)) {
                return r;
            }
        }
        throw new IllegalArgumentException("Unknown colour-Teff relation: '" + id + "' (known: " + ids() + ")");
    }

    public static List<String> ids() {
        List<String> ids = new ArrayList<>();
        for (TeffRelation r : ALL) {
            ids.add(r.id());
        }
        return ids;
    }

    /** Comma-separated ids of the relations whose bits are set in {@code mask}; null when none. */
    public static String describe(long mask) {
        if (mask == 0) {
            return null;
        }
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < ALL.size(); i++) {
            if ((mask & (1L << i)) != 0) {
                if (sb.length() > 0) {
                    sb.append(',');
                }
                sb.append(ALL.get(i).id());
            }
        }
        return sb.toString();
    }
}
