package org.starderive.physics;

/**
 * Limb-darkened angular diameter from the (V−K) surface-brightness relation of Kervella, Thévenin, Di Folco &amp;
 * Ségransan 2004, A&amp;A 426, 297 (dwarfs and subgiants):
 * <pre>  log10 θ_LD[mas] = 0.0755 (V−K)₀ + 0.5170 − 0.2 K₀ </pre>
 * Scatter ≤ 1 % (taken as 1 %). Valid for dwarfs A0–M2 and subgiants A0–K0; we take (V−K)₀ from −0.1 to 4.1
 * (the colours of A0 and M2 dwarfs, from memory). 2MASS Ks is used in place of Johnson K, so the result serves as
 * an independent cross-check of the Stefan–Boltzmann diameter, never as the diameter of record.
 */
public final class SurfaceBrightnessKervella2004 {
    private SurfaceBrightnessKervella2004() {}

    public static final String CITATION = "Kervella et al. 2004, A&A 426, 297";
    public static final double SCATTER_FRACTION = 0.01;
    public static final double VK_MIN = -0.1;
    public static final double VK_MAX = 4.1;

    /** θ_LD in mas from dereddened V and K; NaN outside the colour range. */
    public static double angularDiameterMas(double v0, double k0) {
        double vk = v0 - k0;
        if (!(vk >= VK_MIN && vk <= VK_MAX)) {
            return Double.NaN;
        }
        return Math.pow(10, 0.0755 * vk + 0.5170 - 0.2 * k0);
    }

    /** Relative 1σ error of θ from the V and K errors and the relation's scatter. */
    public static double relativeError(double sigmaV, double sigmaK) {
        double sLog = Math.hypot(0.0755 * sigmaV, 0.2755 * sigmaK);
        return Math.hypot(Math.log(10) * sLog, SCATTER_FRACTION);
    }
}
