package org.starderive.physics;

/**
 * The one table of independent error sources, read by both uncertainty paths. Each source has a 1σ size per star;
 * the first-order path ({@link StarDeriver#derive}) carries derivative × σ of every source through the chain and adds
 * the contributions in quadrature at the end (so a source shared by two steps — V in a colour and in the magnitude —
 * is correlated correctly); the Monte Carlo path ({@link MonteCarloDeriver}) draws one standard normal z per source
 * and draw, and the chain applies z × σ of every source to the values. The σ are the same in both paths, by
 * construction: both read them from the star's state set up in one place.
 *
 * <pre>
 * source        σ (per star)                                        applied to
 * ------------  --------------------------------------------------  ------------------------------------------------
 * band b        the magnitude's error (no error: the band is unused) the band's magnitude
 * EBV           E(B−V) error; without one, physics.ebv_err_default   E(B−V) (clipped at 0 in a draw)
 * FEH           [Fe/H] error; without one or with no [Fe/H],         [Fe/H] (the assumed value carries its spread)
 *               physics.feh_err_default
 * LOGG          log g prior error of evolved stars; for a star not   the log g of the Gaia-band relations (evolved,
 *               yet classed, the 0.3 dex of its solar start (our      or the solar start of an unclassed star)
 *               choice)
 * SCATTER       each FGK-dwarf or giant colour relation's own        that relation's Teff
 *               scatter, independent between relations (one z per
 *               relation in a draw)
 * SCATTER_M     the same for the M-dwarf relations (Mann et al.      that relation's Teff
 *               2015): a source of its own, so that a K7–M0 blend
 *               adds the two regimes' scatters as independent
 * SCATTER_HOT   the same for the hot-star relation (Flower 1996)     that relation's Teff
 * ZP            temperature-scale zero points, one shared z          every relation's Teff, times its zero point
 * GV            G→V conversion scatter (Riello et al. 2021)          V computed from G
 * MU            the distance (inverse parallax or posterior)         the distance modulus (a draw samples a distance)
 * RADIUS_REL    the M-dwarf radius relation's scatter                ln R from M_Ks (Mann et al. 2015)
 * MASS_REL      the mass relation's scatter                          ln M (Mann et al. 2019; Eker et al. 2018)
 * BLEND         where two regimes' relations are blended (K7–M0,      the blended Teff, M_bol and ln M: the spread of the
 *               late A–early F): their disagreement, one z             mixture, √(w₁w₂) × (second − first estimate)
 * TEFF_RADIUS_  the Teff–radius relation's scatter (Mann et al. 2015,  ln R at the Teff of an M dwarf whose Teff comes
 *   REL         13.4 %, 9.3 % with [Fe/H])                           from its radius ({@link TeffRadiusMann2015})
 * </pre>
 */
public final class ErrorSource {
    private ErrorSource() {}

    /** Sources 0 … Band.COUNT − 1 are the bands, by ordinal. */
    public static final int EBV = Band.COUNT;
    public static final int FEH = Band.COUNT + 1;
    public static final int LOGG = Band.COUNT + 2;
    public static final int SCATTER = Band.COUNT + 3;
    public static final int ZP = Band.COUNT + 4;
    public static final int GV = Band.COUNT + 5;
    public static final int MU = Band.COUNT + 6;
    public static final int RADIUS_REL = Band.COUNT + 7;
    public static final int MASS_REL = Band.COUNT + 8;
    public static final int BLEND = Band.COUNT + 9;
    public static final int SCATTER_M = Band.COUNT + 10;
    public static final int SCATTER_HOT = Band.COUNT + 11;
    public static final int TEFF_RADIUS_REL = Band.COUNT + 12;
    /** Number of sources. */
    public static final int COUNT = Band.COUNT + 13;

    /** The scatter source of the colour relations of {@code regime}. */
    public static int scatterOf(Regime regime) {
        return regime == Regime.M_DWARF ? SCATTER_M : regime == Regime.HOT ? SCATTER_HOT : SCATTER;
    }

    /** A short name of source {@code j}, for messages and tests. */
    public static String name(int j) {
        if (j < Band.COUNT) {
            return "mag_" + Band.values()[j].suffix();
        }
        String[] n = {"ebv", "feh", "logg", "scatter", "zero_point", "g_to_v", "distance", "radius_relation", "mass_relation", "blend",
            "scatter_m_dwarf", "scatter_hot", "teff_radius_relation"};
        return n[j - Band.COUNT];
    }
}
