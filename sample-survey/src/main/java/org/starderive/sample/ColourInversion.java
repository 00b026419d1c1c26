package org.starderive.sample;

import org.starderive.physics.TeffRelation;

/**
 * The colour a published colour–Teff relation assigns to a temperature (the relation run backwards), for making
 * synthetic photometry. Inside the relation's colour range the root is found by bisection; beyond it the colour is
 * continued linearly with the slope at the nearer edge, so stars outside every calibration get colours outside
 * every calibrated range, as real ones do.
 */
final class ColourInversion {
    private ColourInversion() {}

    static double colour(TeffRelation r, double teffK, double feh, double logg) {
        double lo = r.colourMin();
        double hi = r.colourMax();
        double tLo = r.teff(lo, feh, logg); // hot edge (blue colour)
        double tHi = r.teff(hi, feh, logg); // cool edge
        if (!(tLo > tHi)) {
            return Double.NaN; // not monotone at this log g / [Fe/H]: no colour from this relation
        }
        if (teffK >= tLo) {
            return lo - (teffK - tLo) / Math.abs(r.dTeffDColour(lo, feh, logg));
        }
        if (teffK <= tHi) {
            return hi + (tHi - teffK) / Math.abs(r.dTeffDColour(hi, feh, logg));
        }
        double a = lo;
        double b = hi;
        for (int i = 0; i < 60; i++) {
            double m = 0.5 * (a + b);
            if (r.teff(m, feh, logg) > teffK) {
                a = m;
            } else {
                b = m;
            }
        }
        return 0.5 * (a + b);
    }
}
