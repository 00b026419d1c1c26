package org.starderive.physics;

import java.util.Arrays;

/**
 * One star's measurements, reused from row to row (no allocation per star). A quantity is <em>absent</em> when its
 * {@code has*} flag is false (SQL NULL); it is present but <em>invalid</em> when the flag is true and the value is
 * NaN, infinite or outside its domain. Call {@link #clear()} before filling a new star.
 *
 * <p>Units: parallax and its error in mas; magnitudes and their errors in mag; E(B−V) in mag; [Fe/H] in dex.
 */
public final class StarInput {
    public boolean hasParallax;
    public double parallaxMas;
    public boolean hasParallaxErr;
    public double parallaxErrMas;
    public final boolean[] hasMag = new boolean[Band.COUNT];
    public final double[] mag = new double[Band.COUNT];
    public final boolean[] hasMagErr = new boolean[Band.COUNT];
    public final double[] magErr = new double[Band.COUNT];
    public boolean hasEbv;
    public double ebv;
    public boolean hasEbvErr;
    public double ebvErr;
    public boolean hasFeh;
    public double feh;
    public boolean hasFehErr;
    public double fehErr;

    public StarInput() { clear(); }

    /** Every quantity absent. */
    public StarInput clear() {
        hasParallax = hasParallaxErr = hasEbv = hasEbvErr = hasFeh = hasFehErr = false;
        parallaxMas = parallaxErrMas = ebv = ebvErr = feh = fehErr = Double.NaN;
        Arrays.fill(hasMag, false);
        Arrays.fill(hasMagErr, false);
        Arrays.fill(mag, Double.NaN);
        Arrays.fill(magErr, Double.NaN);
        return this;
    }

    public StarInput parallax(double valueMas, double errMas) {
        hasParallax = true;
        parallaxMas = valueMas;
        hasParallaxErr = true;
        parallaxErrMas = errMas;
        return this;
    }

    public StarInput magnitude(Band band, double value, double err) {
        hasMag[band.ordinal()] = true;
        mag[band.ordinal()] = value;
        hasMagErr[band.ordinal()] = true;
        magErr[band.ordinal()] = err;
        return this;
    }

    public StarInput ebv(double value, double err) {
        hasEbv = true;
        ebv = value;
        hasEbvErr = true;
        ebvErr = err;
        return this;
    }

    public StarInput feh(double value, double err) {
        hasFeh = true;
        feh = value;
        hasFehErr = true;
        fehErr = err;
        return this;
    }
}
