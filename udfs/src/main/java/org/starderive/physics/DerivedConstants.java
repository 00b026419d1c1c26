package org.starderive.physics;

/**
 * Constants computed from primary ones; none is retyped. Each {@link Constant} names what it came from.
 */
public final class DerivedConstants {
    private DerivedConstants() {}

    /** Parsec in m: (648000/π) au, IAU 2015 Resolution B2. */
    public static final double PARSEC_M = 648_000.0 / Math.PI * Iau2012.AU_M;
    /** Solar mass in kg: (GM)⊙ / G. Its uncertainty is that of G. */
    public static final double M_SUN_KG = Iau2015.GM_SUN_M3_S2 / Codata2018.G_M3_KG_S2;
    /** Mean solar density in kg m⁻³: M⊙ / (4/3 π R⊙³). */
    public static final double RHO_SUN_KG_M3 = M_SUN_KG / (4.0 / 3.0 * Math.PI * Math.pow(Iau2015.R_SUN_M, 3));
    /** Solar surface gravity in m s⁻²: (GM)⊙ / R⊙² (independent of G). */
    public static final double G_SUN_M_S2 = Iau2015.GM_SUN_M3_S2 / (Iau2015.R_SUN_M * Iau2015.R_SUN_M);
    /** log10 of the solar surface gravity in cgs (cm s⁻²). */
    public static final double LOGG_SUN_CGS = Math.log10(G_SUN_M_S2 * 100.0);
    /** Absolute bolometric magnitude of the nominal Sun on the IAU 2015 B2 scale: −2.5 log10(L⊙/L₀). */
    public static final double MBOL_SUN_IAU = -2.5 * Math.log10(Iau2015.L_SUN_W / Iau2015.L0_W);
    /** Distance modulus offset: 5 log10(1 au / 10 pc), the difference between apparent and absolute solar magnitudes. */
    public static final double SUN_DISTANCE_MODULUS = 5.0 * Math.log10(Iau2012.AU_M / (10.0 * PARSEC_M));
    /** One milliarcsecond in radians. */
    public static final double MAS_RAD = Math.PI / (180.0 * 3600.0 * 1000.0);

    public static final Constant PARSEC = Constant.derived("parsec", PARSEC_M, 0, "m", "au (IAU 2012 B2) and IAU 2015 B2");
    public static final Constant M_SUN = Constant.derived("M_sun", M_SUN_KG,
            M_SUN_KG * Codata2018.G_UNCERTAINTY / Codata2018.G_M3_KG_S2, "kg", "(GM)_sun (IAU 2015 B3) / G (CODATA 2018)");
    public static final Constant RHO_SUN = Constant.derived("mean solar density", RHO_SUN_KG_M3,
            RHO_SUN_KG_M3 * Codata2018.G_UNCERTAINTY / Codata2018.G_M3_KG_S2, "kg.m**-3", "M_sun and R_sun (IAU 2015 B3)");
    public static final Constant G_SUN = Constant.derived("solar surface gravity", G_SUN_M_S2, 0, "m.s**-2", "(GM)_sun and R_sun (IAU 2015 B3)");
    public static final Constant MBOL_SUN = Constant.derived("M_bol,sun (IAU scale)", MBOL_SUN_IAU, 0, "mag", "L_sun (IAU 2015 B3) and L_0 (IAU 2015 B2)");
}
