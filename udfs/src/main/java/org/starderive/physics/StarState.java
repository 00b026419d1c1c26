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
    /** Monte Carlo draw: skip first-order errors. */
    boolean valuesOnly;
}
