package org.starderive.physics;

/**
 * One star's checked and dereddened inputs and their 1σ errors, shared by the steps of {@link StarDeriver} (package
 * private, reused per star). NaN marks a band that is missing or was rejected. Also carries what the steps hand each
 * other: the distance modulus, V₀ and their first-order contributions per {@link ErrorSource}, and the Monte Carlo
 * draw's deviates.
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
    /** Standard normal deviates per {@link ErrorSource} in a Monte Carlo draw (null: not a draw). */
    double[] drawZ;
    /**
     * In a Monte Carlo draw, the nominal star's Teff route (TeffBlend ROUTE_ bits), which the draw keeps (its edge
     * bounds then decide nothing); −1 outside draws: the route is decided by the colours.
     */
    int drawRoute = -1;

    /** Distance modulus and its error (NaN without a distance). */
    double mu;
    double sMu;
    /** Dereddened V (measured, or from G, BP−RP) and whether V itself was measured. */
    double v0;
    boolean vObserved;
    /** First-order contributions of each error source to V₀ and to the absolute Ks magnitude. */
    final double[] cV = new double[ErrorSource.COUNT];
    final double[] cKs = new double[ErrorSource.COUNT];

    /**
     * The blend spreads (Teff, M_bol, ln M) of the star's nominal derivation: a Monte Carlo draw scales the nominal
     * spread by its z (a spread recomputed inside the draw would make the blend term quadratic in z).
     */
    private final double[] nominalSpread = new double[3];

    /** z × σ of source {@code j} in a draw; 0 outside draws. */
    double dz(int j, double sigma) {
        return drawZ == null ? 0.0 : drawZ[j] * sigma;
    }

    /** Spread {@code k} (0 Teff, 1 M_bol, 2 ln M): the computed one, kept, outside draws; the nominal one in a draw. */
    double blendSpread(int k, double computed) {
        if (drawZ == null) {
            nominalSpread[k] = computed;
            return computed;
        }
        return nominalSpread[k];
    }

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
