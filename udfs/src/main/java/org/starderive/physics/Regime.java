package org.starderive.physics;

/**
 * Calibration regimes: which published relation gives each parameter for which kind of star. A star is assigned
 * to a regime by its colours (through the temperature the regime's own relations give) and, where it has a
 * distance, by its absolute magnitude (a red star brighter than {@link #M_DWARF_MKS_MIN} in Ks is a giant).
 *
 * <pre>
 * regime     Teff from                                    L and R                                      mass
 * ---------  -------------------------------------------  -------------------------------------------  -------------------------------
 * m_dwarf    Mann et al. 2015 (+ 2016 erratum), Table 2:  R from M_Ks (Mann et al. 2015, Table 1);      M_Ks (Mann et al. 2019, Table 6,
 *            V−J, V−I_C, BP−RP; [Fe/H] or J−H forms        L = R² (Teff/Teff⊙)⁴ (Stefan–Boltzmann)       n = 5)
 *            — none of these colours, but one redder than
 *            every FGK relation and a distance: the Teff–
 *            radius relation (Mann et al. 2015, Table 1)
 *            run backwards at the M_Ks radius
 *            ({@link TeffRadiusMann2015}, TEFF_FROM_RADIUS)
 * fgk_dwarf  Casagrande et al. 2010 (8 colours, [Fe/H]);  BC_V (Flower 1996 / Torres 2010) → L;         L (Eker et al. 2018)
 *            Casagrande et al. 2021 dwarf BP−RP, G−Ks      R from Stefan–Boltzmann
 * giant      González Hernández &amp; Bonifacio 2009;        as fgk_dwarf                                   none (not main sequence)
 *            Casagrande et al. 2021 giant BP−RP, G−Ks
 * hot        Flower 1996 log Teff(B−V), Torres 2010        as fgk_dwarf (hot segment of BC_V)             L (Eker et al. 2018, ≤ 31 M⊙)
 *            coefficients
 * </pre>
 *
 * <p>Blends (our choice, so that Teff, L, R and mass are continuous along the main sequence):
 * <ul>
 *   <li><b>K7–M0</b>: the C10 dwarf relations end near 4200–4290 K (their red colour edges) and Mann et al. 2015 is
 *       calibrated below 4100 K; there is no overlap. Between {@link #M_BLEND_LO_K} and {@link #M_BLEND_HI_K} (judged
 *       by the Mann temperature) the Mann relations are evaluated up to 200 K beyond their published edge, and the
 *       M-dwarf weight falls linearly from 1 to 0; Teff, log R, log L and log M are blended with that weight.</li>
 *   <li><b>late A – early F</b>: the C10 relations end between 7200 and 7700 K; the Flower relation holds for all
 *       types. Between {@link #HOT_BLEND_LO_K} and {@link #HOT_BLEND_HI_K} (judged by the Flower temperature) the
 *       hot weight rises linearly from 0 to 1.</li>
 * </ul>
 * Where only one regime's relations give a value inside a blend zone, that value is used alone.
 */
public enum Regime {
    HOT("hot"),
    FGK_DWARF("fgk_dwarf"),
    GIANT("giant"),
    M_DWARF("m_dwarf");

    /** Below this Mann temperature a star is wholly in the M-dwarf regime (the relations' published edge). */
    public static final double M_BLEND_LO_K = 4100.0;
    /** Above this Mann temperature the M-dwarf relations are not used (our blend zone, 200 K beyond the edge). */
    public static final double M_BLEND_HI_K = 4300.0;
    /** Below this Flower temperature the hot relation is not used. */
    public static final double HOT_BLEND_LO_K = 7000.0;
    /** Above this Flower temperature a star is wholly in the hot regime. */
    public static final double HOT_BLEND_HI_K = 7500.0;
    /**
     * A red star with an absolute Ks magnitude brighter than this is not an M dwarf (the bright end of the Mann et al.
     * 2019 mass relation, 4.0 < M_Ks < 11.0): it is classed evolved and gets the giant relations.
     */
    public static final double M_DWARF_MKS_MIN = 4.0;

    private final String label;

    Regime(String label) { this.label = label; }

    /** Value written to the {@code regime} column. */
    public String label() { return label; }

    /** M-dwarf weight at Mann temperature {@code tMannK} (0 when NaN). */
    public static double mDwarfWeight(double tMannK) {
        if (!(tMannK < M_BLEND_HI_K)) {
            return 0.0;
        }
        return tMannK <= M_BLEND_LO_K ? 1.0 : (M_BLEND_HI_K - tMannK) / (M_BLEND_HI_K - M_BLEND_LO_K);
    }

    /** Hot weight at Flower temperature {@code tFlowerK} (0 when NaN). */
    public static double hotWeight(double tFlowerK) {
        if (!(tFlowerK > HOT_BLEND_LO_K)) {
            return 0.0;
        }
        return tFlowerK >= HOT_BLEND_HI_K ? 1.0 : (tFlowerK - HOT_BLEND_LO_K) / (HOT_BLEND_HI_K - HOT_BLEND_LO_K);
    }

    /** d(M-dwarf weight)/dTeff per K: non-zero only inside the blend (first-order errors carry the moving weight). */
    public static double dMDwarfWeight(double tMannK) {
        return tMannK > M_BLEND_LO_K && tMannK < M_BLEND_HI_K ? -1.0 / (M_BLEND_HI_K - M_BLEND_LO_K) : 0.0;
    }

    /** d(hot weight)/dTeff per K: non-zero only inside the blend. */
    public static double dHotWeight(double tFlowerK) {
        return tFlowerK > HOT_BLEND_LO_K && tFlowerK < HOT_BLEND_HI_K ? 1.0 / (HOT_BLEND_HI_K - HOT_BLEND_LO_K) : 0.0;
    }
}
