package org.starderive.physics;

/** The astronomical unit as defined by IAU 2012 Resolution B2 (exact). */
public final class Iau2012 {
    private Iau2012() {}

    public static final String B2 = "IAU 2012 Resolution B2 (re-definition of the astronomical unit)";

    /** Astronomical unit in m, exact by definition. */
    public static final double AU_M = 149_597_870_700.0;

    public static final Constant AU = Constant.of("au", AU_M, 0, "m", B2);
}
