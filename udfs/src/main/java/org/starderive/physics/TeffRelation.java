package org.starderive.physics;

/**
 * One published colour → effective temperature relation, with the domain in which it was calibrated.
 * Four functional forms are supported:
 * <ul>
 *   <li>{@link Form#THETA} — Casagrande et al. 2010 and González Hernández &amp; Bonifacio 2009:
 *       θ = 5040 K / Teff = a0 + a1·X + a2·X² + a3·X·[Fe/H] + a4·[Fe/H] + a5·[Fe/H]²;</li>
 *   <li>{@link Form#GAIA2021} — Casagrande et al. 2021:
 *       Teff = c0 + c1X + c2X² + c3X³ + c4X⁵ + c5g + c6gX + c7gX² + c8gX³ + c9gX⁵ + c10f + c11fX + c12fX² + c13fX³ + c14fgX,
 *       g = log g, f = [Fe/H];</li>
 *   <li>{@link Form#MANN2015} — Mann et al. 2015 (erratum 2016), Table 2: Teff / 3500 K = a + bX + cX² + dX³ + eX⁴,
 *       plus f·[Fe/H] ({@link Aux#FEH}) or f·(J−H) + g·(J−H)² ({@link Aux#JH}); valid only in a temperature
 *       window and never beyond the polynomial's red turnover;</li>
 *   <li>{@link Form#FLOWER1996} — Flower 1996, coefficients of Torres 2010: log10 Teff = Σ cᵢ (B−V)^i.</li>
 * </ul>
 * X is the dereddened colour {@code blue − red}. A relation is <em>in range</em> when X lies inside its colour range
 * and [Fe/H] inside its metallicity range (and, for relations with a temperature window, when the temperature lies
 * inside it: {@link #inTeffWindow}); the caller decides what to do outside (by default: no value and a flag).
 * [Fe/H] below {@link #fehEvalFloor()} is evaluated at that floor (as the papers prescribe).
 * Relations of one {@link #group()} (the same colour in several forms) are alternatives: the caller uses the first
 * usable one. Immutable; instances live in {@link TeffRelations}.
 */
public final class TeffRelation {

    /** Functional form of the relation. */
    public enum Form { THETA, GAIA2021, MANN2015, FLOWER1996 }

    /** Second variable of a Mann et al. 2015 form: none, a measured [Fe/H], or the J−H colour. */
    public enum Aux { NONE, FEH, JH }

    private final String id;
    private final Form form;
    private final Aux aux;
    private final Band blue;
    private final Band red;
    private final Regime regime;
    private final double colourMin;
    private final double colourMax;
    private final double fehMin;
    private final double fehMax;
    private final double fehEvalFloor;
    private final double teffMinK;
    private final double teffMaxK;
    private final double[] c;
    private final double scatterK;
    private final double scatterFrac;
    private final double zeroPointK;
    private final String citation;
    private final String group;

    TeffRelation(String id, Form form, Band blue, Band red, Regime regime,
                 double colourMin, double colourMax, double fehMin, double fehMax, double fehEvalFloor,
                 double[] coefficients, double scatterK, double zeroPointK, String citation) {
        this(id, form, Aux.NONE, blue, red, regime, colourMin, colourMax, fehMin, fehMax, fehEvalFloor, 0, Double.POSITIVE_INFINITY,
                coefficients, scatterK, 0, zeroPointK, citation);
    }

    TeffRelation(String id, Form form, Aux aux, Band blue, Band red, Regime regime,
                 double colourMin, double colourMax, double fehMin, double fehMax, double fehEvalFloor,
                 double teffMinK, double teffMaxK, double[] coefficients, double scatterK, double scatterFrac,
                 double zeroPointK, String citation) {
        int expected;
        switch (form) {
            case THETA: expected = 6; break;
            case GAIA2021: expected = 15; break;
            case MANN2015: expected = 7; break;
            default: expected = 8; break;
        }
        if (coefficients.length != expected) {
            throw new IllegalArgumentException("Invalid relation " + id + ": " + coefficients.length
                    + " coefficients (must be " + expected + " for form " + form + ")");
        }
        this.id = id;
        this.form = form;
        this.aux = aux;
        this.blue = blue;
        this.red = red;
        this.regime = regime;
        this.colourMin = colourMin;
        this.colourMax = colourMax;
        this.fehMin = fehMin;
        this.fehMax = fehMax;
        this.fehEvalFloor = fehEvalFloor;
        this.teffMinK = teffMinK;
        this.teffMaxK = teffMaxK;
        this.c = coefficients.clone();
        this.scatterK = scatterK;
        this.scatterFrac = scatterFrac;
        this.zeroPointK = zeroPointK;
        this.citation = citation;
        this.group = regime.label() + ":" + blue.label() + "-" + red.label();
    }

    public String id() { return id; }
    public Form form() { return form; }
    public Aux aux() { return aux; }
    public Band blue() { return blue; }
    public Band red() { return red; }
    /** The calibration regime whose stars this relation serves. */
    public Regime regime() { return regime; }
    /** Relations of one group are alternative forms for the same colour; only one of them is used per star. */
    public String group() { return group; }
    public double colourMin() { return colourMin; }
    public double colourMax() { return colourMax; }
    public double fehMin() { return fehMin; }
    public double fehMax() { return fehMax; }
    public double fehEvalFloor() { return fehEvalFloor; }
    /** Calibrated temperature window, K (0 … ∞ for relations bounded by colour alone). */
    public double teffMinK() { return teffMinK; }
    public double teffMaxK() { return teffMaxK; }
    /** Published 1σ scatter of the relation about its calibrators, K (at the given Teff, for a relative scatter). */
    public double scatterK(double teffK) { return scatterFrac > 0 ? scatterFrac * teffK : scatterK; }
    /** Published 1σ scatter, K; for a relative scatter, at 10,000 K. */
    public double scatterK() { return scatterK(1e4); }
    /** Uncertainty of the temperature scale's zero point, K; common to all stars (not averaged down). */
    public double zeroPointK() { return zeroPointK; }
    public String citation() { return citation; }
    /** Colour name, e.g. "V-Ks". */
    public String colourName() { return blue.label() + "-" + red.label(); }

    /** Whether colour and metallicity lie inside the calibrated domain (NaN is never in range). */
    public boolean inRange(double colour, double feh) {
        return colour >= colourMin && colour <= colourMax && feh >= fehMin && feh <= fehMax;
    }

    /** Whether a temperature given by this relation lies inside its calibrated window. */
    public boolean inTeffWindow(double teffK) {
        return teffK >= teffMinK && teffK <= teffMaxK;
    }

    /** Teff in K at dereddened colour x, metallicity feh and log g (log g is ignored by all but the Gaia form). */
    public double teff(double x, double feh, double logg) {
        return teff(x, feh, logg, Double.NaN);
    }

    /** Teff in K; {@code aux} is the dereddened J−H colour for a {@link Aux#JH} form (ignored otherwise). */
    public double teff(double x, double feh, double logg, double aux) {
        // one small method per form, so that the JIT inlines the one a hot loop uses
        double f = Math.max(feh, fehEvalFloor);
        switch (form) {
            case THETA: return thetaTeff(x, f);
            case MANN2015: return mannTeff(x, f, aux);
            case FLOWER1996: return Math.pow(10, poly(c, x));
            default: return gaiaTeff(x, f, logg);
        }
    }

    private double thetaTeff(double x, double f) {
        double theta = c[0] + x * (c[1] + c[2] * x) + c[3] * x * f + f * (c[4] + c[5] * f);
        return theta > 0 ? 5040.0 / theta : Double.NaN;
    }

    private double mannTeff(double x, double f, double auxValue) {
        double p = c[0] + x * (c[1] + x * (c[2] + x * (c[3] + x * c[4])));
        if (aux == Aux.FEH) {
            p += c[5] * f;
        } else if (aux == Aux.JH) {
            p += auxValue * (c[5] + c[6] * auxValue);
        }
        return 3500.0 * p;
    }

    private double gaiaTeff(double x, double f, double logg) {
        double x2 = x * x;
        double x3 = x2 * x;
        double x5 = x3 * x2;
        return c[0] + c[1] * x + c[2] * x2 + c[3] * x3 + c[4] * x5
                + logg * (c[5] + c[6] * x + c[7] * x2 + c[8] * x3 + c[9] * x5)
                + f * (c[10] + c[11] * x + c[12] * x2 + c[13] * x3)
                + c[14] * f * logg * x;
    }

    private static double poly(double[] k, double x) {
        double s = 0;
        for (int i = k.length - 1; i >= 0; i--) {
            s = s * x + k[i];
        }
        return s;
    }

    /** ∂Teff/∂X in K per mag. */
    public double dTeffDColour(double x, double feh, double logg) {
        return dTeffDColour(x, feh, logg, Double.NaN);
    }

    /** ∂Teff/∂X in K per mag ({@code aux}: J−H for a {@link Aux#JH} form). */
    public double dTeffDColour(double x, double feh, double logg, double aux) {
        double f = Math.max(feh, fehEvalFloor);
        switch (form) {
            case THETA: {
                double theta = c[0] + x * (c[1] + c[2] * x) + c[3] * x * f + f * (c[4] + c[5] * f);
                return -5040.0 / (theta * theta) * (c[1] + 2 * c[2] * x + c[3] * f);
            }
            case MANN2015:
                return 3500.0 * (c[1] + x * (2 * c[2] + x * (3 * c[3] + x * 4 * c[4])));
            case FLOWER1996:
                return flowerSlope(x, f, logg, aux);
            default:
                return gaiaSlope(x, f, logg);
        }
    }

    /**
     * ∂Teff/∂X in K per mag where Teff at X is already known ({@code teffK = teff(x, feh, logg, aux)}): the same value
     * as {@link #dTeffDColour(double, double, double, double)}, without evaluating the Flower relation a second time
     * (d Teff/dX = Teff · ln 10 · d log Teff/dX).
     */
    public double dTeffDColourAt(double x, double feh, double logg, double aux, double teffK) {
        return form == Form.FLOWER1996 ? flowerSlopeAt(x, teffK) : dTeffDColour(x, feh, logg, aux);
    }

    private double flowerSlope(double x, double f, double logg, double aux) {
        return flowerSlopeAt(x, teff(x, f, logg, aux));
    }

    private double flowerSlopeAt(double x, double teffK) {
        double d = 0;
        for (int i = c.length - 1; i >= 1; i--) {
            d = d * x + i * c[i];
        }
        return teffK * Math.log(10) * d;
    }

    private double gaiaSlope(double x, double f, double logg) {
        double x2 = x * x;
        double x4 = x2 * x2;
        return c[1] + 2 * c[2] * x + 3 * c[3] * x2 + 5 * c[4] * x4
                + logg * (c[6] + 2 * c[7] * x + 3 * c[8] * x2 + 5 * c[9] * x4)
                + f * (c[11] + 2 * c[12] * x + 3 * c[13] * x2)
                + c[14] * f * logg;
    }

    /** ∂Teff/∂(J−H) in K per mag for a {@link Aux#JH} form, 0 otherwise. */
    public double dTeffDAux(double aux) {
        return form == Form.MANN2015 && this.aux == Aux.JH ? 3500.0 * (c[5] + 2 * c[6] * aux) : 0.0;
    }

    /** ∂Teff/∂[Fe/H] in K per dex (0 below the evaluation floor, where the relation is held constant). */
    public double dTeffDFeh(double x, double feh, double logg) {
        if (feh < fehEvalFloor) {
            return 0.0;
        }
        switch (form) {
            case THETA: {
                double theta = c[0] + x * (c[1] + c[2] * x) + c[3] * x * feh + feh * (c[4] + c[5] * feh);
                return -5040.0 / (theta * theta) * (c[3] * x + c[4] + 2 * c[5] * feh);
            }
            case MANN2015:
                return aux == Aux.FEH ? 3500.0 * c[5] : 0.0;
            case FLOWER1996:
                return 0.0;
            default:
                return c[10] + x * (c[11] + x * (c[12] + x * c[13])) + c[14] * logg * x;
        }
    }

    /** ∂Teff/∂log g in K per dex (0 for all but the Gaia form). */
    public double dTeffDLogg(double x, double feh) {
        if (form != Form.GAIA2021) {
            return 0.0;
        }
        double f = Math.max(feh, fehEvalFloor);
        double x2 = x * x;
        return c[5] + c[6] * x + c[7] * x2 + c[8] * x2 * x + c[9] * x2 * x2 * x + c[14] * f * x;
    }

    @Override
    public String toString() { return id + " (" + citation + ")"; }
}
