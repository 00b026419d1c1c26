package org.starderive.sample;

import java.util.function.DoubleUnaryOperator;

/**
 * The colour a colour–Teff relation assigns to a temperature (the relation run backwards), for making synthetic
 * photometry. Inside the colour range [lo, hi], over which Teff must fall with colour, the root is found by
 * bisection; beyond it the colour is continued linearly with the slope at the nearer edge, so stars outside a
 * calibration get colours outside its range, as real ones do.
 */
final class ColourInversion {
    private ColourInversion() {}

    static double colour(DoubleUnaryOperator teffOfColour, double lo, double hi, double teffK) {
        double tLo = teffOfColour.applyAsDouble(lo); // hot edge (blue colour)
        double tHi = teffOfColour.applyAsDouble(hi); // cool edge
        if (!(tLo > tHi)) {
            return Double.NaN; // not monotone at this log g / [Fe/H]: no colour from this relation
        }
        if (teffK >= tLo) {
            return lo - (teffK - tLo) / Math.abs(slope(teffOfColour, lo, hi - lo));
        }
        if (teffK <= tHi) {
            return hi + (tHi - teffK) / Math.abs(slope(teffOfColour, hi, hi - lo));
        }
        double a = lo;
        double b = hi;
        for (int i = 0; i < 60; i++) {
            double m = 0.5 * (a + b);
            if (teffOfColour.applyAsDouble(m) > teffK) {
                a = m;
            } else {
                b = m;
            }
        }
        return 0.5 * (a + b);
    }

    /** dTeff/dcolour at x by a central difference (one-sided at the red edge, where a polynomial may turn over). */
    private static double slope(DoubleUnaryOperator f, double x, double width) {
        double h = 0.02 * width;
        double s = (f.applyAsDouble(x) - f.applyAsDouble(x - h)) / h;
        return s == 0 ? -1e3 : s;
    }
}
