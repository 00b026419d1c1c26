package org.starderive.physics;

/**
 * Nominal solar values (IAU 2015 Resolution B3) and the zero points of the bolometric magnitude scale
 * (IAU 2015 Resolution B2), as adopted by the XXIXth IAU General Assembly, Honolulu 2015.
 * Nominal values are exact by definition: their uncertainty is 0.
 */
public final class Iau2015 {
    private Iau2015() {}

    public static final String B3 = "IAU 2015 Resolution B3 (nominal solar and planetary quantities)";
    public static final String B2 = "IAU 2015 Resolution B2 (absolute and apparent bolometric magnitude scales)";

    /** Nominal solar radius R⊙ in m. */
    public static final double R_SUN_M = 6.957e8;
    /** Nominal solar luminosity L⊙ in W. */
    public static final double L_SUN_W = 3.828e26;
    /** Nominal solar effective temperature in K. */
    public static final double TEFF_SUN_K = 5772.0;
    /** Nominal total solar irradiance in W m⁻². */
    public static final double S_SUN_W_M2 = 1361.0;
    /** Nominal solar mass parameter (GM)⊙ in m³ s⁻². */
    public static final double GM_SUN_M3_S2 = 1.3271244e20;
    /** Zero point of the absolute bolometric magnitude scale: L₀ for M_bol = 0, in W. */
    public static final double L0_W = 3.0128e28;
    /** Zero point of the apparent bolometric magnitude scale: f₀ for m_bol = 0, in W m⁻². */
    public static final double F0_W_M2 = 2.518021002e-8;

    public static final Constant R_SUN = Constant.of("R_sun nominal", R_SUN_M, 0, "m", B3);
    public static final Constant L_SUN = Constant.of("L_sun nominal", L_SUN_W, 0, "W", B3);
    public static final Constant TEFF_SUN = Constant.of("Teff_sun nominal", TEFF_SUN_K, 0, "K", B3);
    public static final Constant S_SUN = Constant.of("S_sun nominal", S_SUN_W_M2, 0, "W.m**-2", B3);
    public static final Constant GM_SUN = Constant.of("(GM)_sun nominal", GM_SUN_M3_S2, 0, "m**3.s**-2", B3);
    public static final Constant L0 = Constant.of("L_0 (M_bol = 0)", L0_W, 0, "W", B2);
    public static final Constant F0 = Constant.of("f_0 (m_bol = 0)", F0_W_M2, 0, "W.m**-2", B2);
}
