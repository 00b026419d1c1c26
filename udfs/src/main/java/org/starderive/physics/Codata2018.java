package org.starderive.physics;

/**
 * CODATA 2018 recommended values (Tiesinga et al. 2021, Rev. Mod. Phys. 93, 025010).
 * σ is exact in the 2019 SI; G carries its standard uncertainty.
 */
public final class Codata2018 {
    private Codata2018() {}

    public static final String REF = "CODATA 2018 (Tiesinga et al. 2021, Rev. Mod. Phys. 93, 025010)";

    /** Stefan–Boltzmann constant σ in W m⁻² K⁻⁴ (exact). */
    public static final double SIGMA_SB_W_M2_K4 = 5.670374419e-8;
    /** Newtonian constant of gravitation G in m³ kg⁻¹ s⁻². */
    public static final double G_M3_KG_S2 = 6.67430e-11;
    /** Standard uncertainty of G. */
    public static final double G_UNCERTAINTY = 0.00015e-11;

    public static final Constant SIGMA_SB = Constant.of("Stefan-Boltzmann sigma", SIGMA_SB_W_M2_K4, 0, "W.m**-2.K**-4", REF);
    public static final Constant G = Constant.of("G", G_M3_KG_S2, G_UNCERTAINTY, "m**3.kg**-1.s**-2", REF);
}
