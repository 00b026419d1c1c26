package org.starderive.physics;

/**
 * The interstellar extinction law of Cardelli, Clayton &amp; Mathis 1989, ApJ 345, 245 (eqs. 2–3):
 * <pre>
 *   A(λ)/A(V) = a(x) + b(x)/R_V,   x = 1/λ [µm⁻¹]
 *   infrared 0.3 ≤ x &lt; 1.1:  a = 0.574 x^1.61,  b = −0.527 x^1.61
 *   optical  1.1 ≤ x ≤ 3.3, y = x − 1.82:
 *     a = 1 + 0.17699y − 0.50447y² − 0.02427y³ + 0.72085y⁴ + 0.01979y⁵ − 0.77530y⁶ + 0.32999y⁷
 *     b = 1.41338y + 2.28305y² + 1.07233y³ − 5.38434y⁴ − 0.62251y⁵ + 5.30260y⁶ − 2.09002y⁷
 * </pre>
 * Domain: 0.3 ≤ x ≤ 3.3 µm⁻¹ (0.30–3.3 µm); NaN outside. R_V = 3.1 is the diffuse-ISM value.
 * The ratio for a band is taken relative to our V band's effective wavelength, so that A_V/A_V = 1 exactly.
 */
public final class CardelliClaytonMathis1989 {
    private CardelliClaytonMathis1989() {}

    public static final String CITATION = "Cardelli, Clayton & Mathis 1989, ApJ 345, 245";

    /** A(λ)/A(V) at wavelength λ in µm, for total-to-selective ratio R_V. NaN outside 0.30–3.33 µm. */
    public static double aLambdaOverAv(double lambdaUm, double rv) {
        double x = 1.0 / lambdaUm;
        double a;
        double b;
        if (x >= 0.3 && x < 1.1) {
            double p = Math.pow(x, 1.61);
            a = 0.574 * p;
            b = -0.527 * p;
        } else if (x >= 1.1 && x <= 3.3) {
            double y = x - 1.82;
            a = 1 + y * (0.17699 + y * (-0.50447 + y * (-0.02427 + y * (0.72085 + y * (0.01979 + y * (-0.77530 + y * 0.32999))))));
            b = y * (1.41338 + y * (2.28305 + y * (1.07233 + y * (-5.38434 + y * (-0.62251 + y * (5.30260 + y * -2.09002))))));
        } else {
            return Double.NaN;
        }
        return a + b / rv;
    }

    /** A_band / A_V for a band with a wavelength, normalised to our V band. NaN for Gaia-like bands. */
    public static double bandOverAv(Band band, double rv) {
        if (band.isGaiaLike()) {
            return Double.NaN;
        }
        return aLambdaOverAv(band.wavelengthUm(), rv) / aLambdaOverAv(Band.V.wavelengthUm(), rv);
    }
}
