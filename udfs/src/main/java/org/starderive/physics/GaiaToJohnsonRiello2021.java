package org.starderive.physics;

/**
 * Gaia-like G to Johnson V, Riello et al. 2021, A&amp;A 649, A3, Table C.2:
 * <pre>  G − V = −0.02704 + 0.01424 C − 0.2156 C² + 0.01426 C³,   C = BP − RP,  −0.5 &lt; C &lt; 5.0 </pre>
 * Used with dereddened magnitudes when a star has G, BP and RP but no V. The scatter of the relation,
 * 0.03 mag, is from memory.
 */
public final class GaiaToJohnsonRiello2021 {
    private GaiaToJohnsonRiello2021() {}

    public static final String CITATION = "Riello et al. 2021, A&A 649, A3, Table C.2";
    public static final double COLOUR_MIN = -0.5;
    public static final double COLOUR_MAX = 5.0;
    public static final double SCATTER_MAG = 0.03;

    /** G − V at colour C = BP − RP. */
    public static double gMinusV(double c) {
        return -0.02704 + c * (0.01424 + c * (-0.2156 + c * 0.01426));
    }

    /** d(G − V)/dC. */
    public static double dGMinusVdC(double c) {
        return 0.01424 + c * (-0.4312 + c * 0.04278);
    }

    public static boolean inRange(double c) {
        return c > COLOUR_MIN && c < COLOUR_MAX;
    }
}
