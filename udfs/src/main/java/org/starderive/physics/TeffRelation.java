package org.starderive.physics;

/**
 * One published colour → effective temperature relation, with the domain in which it was calibrated.
 * Two functional forms are supported:
 * <ul>
 *   <li>{@link Form#THETA} — Casagrande et al. 2010 and González Hernández &amp; Bonifacio 2009:
 *       θ = 5040 K / Teff = a0 + a1·X + a2·X² + a3·X·[Fe/H] + a4·[Fe/H] + a5·[Fe/H]²;</li>
 *   <li>{@link Form#GAIA2021} — Casagrande et al. 2021:
 *       Teff = c0 + c1X + c2X² + c3X³ + c4X⁵ + c5g + c6gX + c7gX² + c8gX³ + c9gX⁵ + c10f + c11fX + c12fX² + c13fX³ + c14fgX,
 *       g = log g, f = [Fe/H].</li>
 * </ul>
 * X is the dereddened colour {@code blue − red}. A relation is <em>in range</em> when X lies inside its colour range
 * and [Fe/H] inside its metallicity range; the caller decides what to do outside (by default: no value and a flag).
 * [Fe/H] below {@link #fehEvalFloor()} is evaluated at that floor (as the papers prescribe).
 * Immutable; instances live in {@link TeffRelations}.
 */
public final class TeffRelation {

    /** Functional form of the relation. */
    public enum Form { THETA, GAIA2021 }

    private final String id;
    private final Form form;
    private final Band blue;
    private final Band red;
    private final LuminosityClass appliesTo;
    private final double colourMin;
    private final double colourMax;
    private final double fehMin;
    private final double fehMax;
    private final double fehEvalFloor;
    private final double[] c;
    private final double scatterK;
    private final double zeroPointK;
    private final String citation;

    TeffRelation(String id, Form form, Band blue, Band red, LuminosityClass appliesTo,
                 double colourMin, double colourMax, double fehMin, double fehMax, double fehEvalFloor,
                 double[] coefficients, double scatterK, double zeroPointK, String citation) {
        int expected = form == Form.THETA ? 6 : 15;
        if (coefficients.length != expected) {
            throw new IllegalArgumentException("Invalid relation " + id + ": " + coefficients.length
                    + " coefficients (must be " + expected + " for form " + form + ")");
        }
        this.id = id;
        this.form = form;
        this.blue = blue;
        this.red = red;
        this.appliesTo = appliesTo;
        this.colourMin = colourMin;
        this.colourMax = colourMax;
        this.fehMin = fehMin;
        this.fehMax = fehMax;
        this.fehEvalFloor = fehEvalFloor;
        this.c = coefficients.clone();
        this.scatterK = scatterK;
        this.zeroPointK = zeroPointK;
        this.citation = citation;
    }

    public String id() { return id; }
    public Form form() { return form; }
    public Band blue() { return blue; }
    public Band red() { return red; }
    public LuminosityClass appliesTo() { return appliesTo; }
    public double colourMin() { return colourMin; }
    public double colourMax() { return colourMax; }
    public double fehMin() { return fehMin; }
    public double fehMax() { return fehMax; }
    public double fehEvalFloor() { return fehEvalFloor; }
    /** Published 1σ scatter of the relation about its calibrators, K. */
    public double scatterK() { return scatterK; }
    /** Uncertainty of the temperature scale's zero point, K; common to all stars (not averaged down). */
    public double zeroPointK() { return zeroPointK; }
    public String citation() { return citation; }
    /** Colour name, e.g. "V-Ks". */
    public String colourName() { return blue.label() + "-" + red.label(); }

    /** Whether colour and metallicity lie inside the calibrated domain (NaN is never in range). */
    public boolean inRange(double colour, double feh) {
        return colour >= colourMin && colour <= colourMax && feh >= fehMin && feh <= fehMax;
    }

    /** Teff in K at dereddened colour x, metallicity feh and log g (log g is ignored by the θ form). */
    public double teff(double x, double feh, double logg) {
        double f = Math.max(feh, fehEvalFloor);
        if (form == Form.THETA) {
            double theta = c[0] + x * (c[1] + c[2] * x) + c[3] * x * f + f * (c[4] + c[5] * f);
            return theta > 0 ? 5040.0 / theta : Double.NaN;
        }
        double x2 = x * x;
        double x3 = x2 * x;
        double x5 = x3 * x2;
        return c[0] + c[1] * x + c[2] * x2 + c[3] * x3 + c[4] * x5
                + logg * (c[5] + c[6] * x + c[7] * x2 + c[8] * x3 + c[9] * x5)
                + f * (c[10] + c[11] * x + c[12] * x2 + c[13] * x3)
                + c[14] * f * logg * x;
    }

    /** ∂Teff/∂X in K per mag. */
    public double dTeffDColour(double x, double feh, double logg) {
        double f = Math.max(feh, fehEvalFloor);
        if (form == Form.THETA) {
            double theta = c[0] + x * (c[1] + c[2] * x) + c[3] * x * f + f * (c[4] + c[5] * f);
            return -5040.0 / (theta * theta) * (c[1] + 2 * c[2] * x + c[3] * f);
        }
        double x2 = x * x;
        double x4 = x2 * x2;
        return c[1] + 2 * c[2] * x + 3 * c[3] * x2 + 5 * c[4] * x4
                + logg * (c[6] + 2 * c[7] * x + 3 * c[8] * x2 + 5 * c[9] * x4)
                + f * (c[11] + 2 * c[12] * x + 3 * c[13] * x2)
                + c[14] * f * logg;
    }

    /** ∂Teff/∂[Fe/H] in K per dex (0 below the evaluation floor, where the relation is held constant). */
    public double dTeffDFeh(double x, double feh, double logg) {
        if (feh < fehEvalFloor) {
            return 0.0;
        }
        if (form == Form.THETA) {
            double theta = c[0] + x * (c[1] + c[2] * x) + c[3] * x * feh + feh * (c[4] + c[5] * feh);
            return -5040.0 / (theta * theta) * (c[3] * x + c[4] + 2 * c[5] * feh);
        }
        return c[10] + x * (c[11] + x * (c[12] + x * c[13])) + c[14] * logg * x;
    }

    /** ∂Teff/∂log g in K per dex (0 for the θ form). */
    public double dTeffDLogg(double x, double feh) {
        if (form == Form.THETA) {
            return 0.0;
        }
        double f = Math.max(feh, fehEvalFloor);
        double x2 = x * x;
        return c[5] + c[6] * x + c[7] * x2 + c[8] * x2 * x + c[9] * x2 * x2 * x + c[14] * f * x;
    }

    @Override
    public String toString() { return id + " (" + citation + ")"; }
}
