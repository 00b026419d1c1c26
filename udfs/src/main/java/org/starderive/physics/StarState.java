package org.starderive.physics;

/**
 * One star's checked and dereddened inputs and their 1σ errors, shared by the steps of {@link StarDeriver} (package
 * private, reused per star). NaN marks a band that is missing or was rejected.
 */
final class StarState {
    final double[] mObs = new double[Band.COUNT];
    final double[] m0 = new double[Band.COUNT];
    final double[] sm = new double[Band.COUNT];
    /** A_band / E(B−V) for this star. */
    final double[] rBand = new double[Band.COUNT];
    double ebv;
    double sEbv;
    double feh;
    double sFeh;
    /** Whether [Fe/H] was measured (then the relations' [Fe/H] forms are used). */
    boolean fehMeasured;
    /** Bit j set: error source j ({@link ErrorSource}) is on, in both uncertainty paths (tests switch sources off). */
    long sourceMask = -1L;
    /** Monte Carlo draw: skip first-order errors. */
    boolean valuesOnly;

    boolean on(int source) {
        return (sourceMask & (1L << source)) != 0;
    }

    /** Zeroes the entries of the sources that are off. */
    void mask(double[] contributions) {
        if (sourceMask != -1L) {
            for (int j = 0; j < contributions.length; j++) {
                if (!on(j)) {
                    contributions[j] = 0;
                }
            }
        }
    }
}
