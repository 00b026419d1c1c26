package org.starderive.physics;

import java.util.Arrays;

/**
 * Everything derived for one star, reused from row to row. A quantity that could not be derived is NaN (NULL in
 * the catalogue) and {@link #flags} says why. Units are in every name.
 */
public final class StarResult {
    /** How the distance was obtained. */
    public enum DistanceMethod {
        NONE(null), INVERSE_PARALLAX("inverse_parallax"), EDSD_MEDIAN("edsd_median"), EDSD_MODE("edsd_mode");

        private final String label;

        DistanceMethod(String label) { this.label = label; }

        /** Value of the {@code dist_method} column (null for NONE). */
        public String label() { return label; }
    }

    public long flags;
    /** The Teff route of the derivation (TeffBlend ROUTE_ bits), for Monte Carlo draws to keep; not an output. */
    int teffRoute;
    public DistanceMethod distMethod;
    public double parallaxCorrMas;
    public double distPc;
    public double distLoPc;
    public double distHiPc;
    public double distModulusMag;
    public double distModulusErrMag;
    public double ebvUsed;
    public double avMag;
    public final double[] absMag = new double[Band.COUNT];
    public final double[] absMagErr = new double[Band.COUNT];
    public LuminosityClass lumClass;
    /** The calibration regime that gave {@link #teffK} (the dominant one in a blend); null without Teff. */
    public Regime regime;
    public double teffK;
    public double teffErrK;
    /** Bit i set: relation i of {@link TeffRelations#all()} contributed to {@link #teffK}. */
    public long teffRelations;
    public double teffChi2;
    public double bcV;
    public double bcVErr;
    public double mbolMag;
    public double mbolErrMag;
    public double lumLsun;
    public double lumErrLsun;
    public double lumW;
    public double radiusRsun;
    public double radiusErrRsun;
    public double massMsun;
    public double massErrMsun;
    public double densityKgM3;
    public double densityErrKgM3;
    public double densitySun;
    public double loggCgs;
    public double loggErrCgs;
    public double angDiamMas;
    public double angDiamErrMas;
    public double angDiamSbrMas;
    /**
     * Share of the M-dwarf route in {@link #radiusRsun}: 1 when R comes from M_Ks alone ({@link RadiusMann2015}), 0
     * when from L (bolometric correction) and Stefan–Boltzmann alone, in between a blend of both; NaN without a radius.
     * Not an output column: it tells which relation a star used (the {@code check} sub-command counts it).
     */
    public double radiusMksWeight;
    /**
     * Share of {@link MassMann2019} (from M_Ks) in {@link #massMsun}: 1 Mann et al. 2019 alone, 0
     * {@link MassLuminosityEker2018} alone, in between a blend; NaN without a mass. Not an output column.
     */
    public double massMksWeight;

    public StarResult() { clear(); }

    public StarResult clear() {
        flags = 0;
        distMethod = DistanceMethod.NONE;
        lumClass = null;
        regime = null;
        teffRelations = 0;
        parallaxCorrMas = distPc = distLoPc = distHiPc = distModulusMag = distModulusErrMag = Double.NaN;
        ebvUsed = avMag = Double.NaN;
        Arrays.fill(absMag, Double.NaN);
        Arrays.fill(absMagErr, Double.NaN);
        teffK = teffErrK = teffChi2 = bcV = bcVErr = mbolMag = mbolErrMag = Double.NaN;
        lumLsun = lumErrLsun = lumW = radiusRsun = radiusErrRsun = Double.NaN;
        massMsun = massErrMsun = densityKgM3 = densityErrKgM3 = densitySun = loggCgs = loggErrCgs = Double.NaN;
        angDiamMas = angDiamErrMas = angDiamSbrMas = Double.NaN;
        radiusMksWeight = massMksWeight = Double.NaN;
        return this;
    }

    public boolean has(QualityFlag f) { return f.isSet(flags); }

    /** Comma-separated ids of the relations behind {@link #teffK}; null when none. */
    public String teffFrom() {
        if (teffRelations == 0 && QualityFlag.TEFF_FROM_RADIUS.isSet(flags)) {
            return TeffRadiusMann2015.ID;
        }
        return TeffRelations.describe(teffRelations);
    }
}
