package org.starderive.physics;

import java.util.Arrays;

import static org.starderive.physics.Band.BP;
import static org.starderive.physics.Band.G;
import static org.starderive.physics.Band.KS;
import static org.starderive.physics.Band.RP;
import static org.starderive.physics.Band.V;
import static org.starderive.physics.QualityFlag.*;

/**
 * The first step of {@link StarDeriver}: one star's magnitudes, E(B−V) and [Fe/H] checked (a sentinel, NaN/∞ or
 * non-positive error → flag, value ignored; a missing E(B−V) or [Fe/H] → the configured default, flagged),
 * dereddened, and V₀ found. Extinction A_band = R_band · E(B−V): R_band = R_V · A_band/A_V of the
 * Cardelli–Clayton–Mathis 1989 law ({@link CardelliClaytonMathis1989}) for the ground-based bands, the
 * colour-dependent coefficients of {@link GaiaBandExtinction} for G, BP and RP. V₀ is the measured V or, when V is
 * missing, G converted with BP−RP by the relation of Riello et al. 2021 ({@link GaiaToJohnsonRiello2021}).
 * Writes {@link StarState}; in a Monte Carlo draw each value is perturbed by z × σ of its {@link ErrorSource}.
 */
final class InputStep {
    private static final double MAG_ERR_MAX = 10.0;
    private static final double EBV_MAX = 20.0;

    private final DeriveSettings settings;
    private final StarState s;
    private final double[] ccmOverAv = new double[Band.COUNT];

    InputStep(DeriveSettings settings, StarState s) {
        this.settings = settings;
        this.s = s;
        for (Band b : Band.values()) {
            ccmOverAv[b.ordinal()] = CardelliClaytonMathis1989.bandOverAv(b, settings.rv());
        }
    }

    /** Checks and dereddens the inputs; returns the flags raised. */
    long read(StarInput in, StarResult out) {
        long flags = readPhotometry(in);
        flags |= readExtinction(in, out);
        flags |= readMetallicity(in);
        deredden();
        return flags;
    }

    private long readPhotometry(StarInput in) {
        long flags = 0;
        for (int b = 0; b < Band.COUNT; b++) {
            s.mObs[b] = Double.NaN;
            s.sm[b] = Double.NaN;
            if (!in.hasMag[b]) {
                continue;
            }
            double v = in.mag[b];
            if (!Double.isFinite(v)) {
                flags |= INPUT_INVALID.mask();
                continue;
            }
            if (!(v >= settings.magMin() && v <= settings.magMax())) {
                flags |= MAGNITUDE_SENTINEL.mask();
                continue;
            }
            double e = in.hasMagErr[b] ? in.magErr[b] : Double.NaN;
            if (!(e > 0 && e <= MAG_ERR_MAX)) {
                flags |= INPUT_INVALID.mask();
                continue;
            }
            s.mObs[b] = v + s.dz(b, e);
            s.sm[b] = e;
        }
        return flags;
    }

    private long readExtinction(StarInput in, StarResult out) {
        long flags = 0;
        boolean valid = in.hasEbv && in.ebv >= 0 && in.ebv <= EBV_MAX;
        if (valid) {
            s.ebv = in.ebv;
            if (!in.hasEbvErr) {
                s.sEbv = settings.ebvErrDefault();
            } else if (in.ebvErr >= 0 && in.ebvErr <= EBV_MAX) {
                s.sEbv = in.ebvErr;
            } else {
                s.sEbv = settings.ebvErrDefault();
                flags |= INPUT_INVALID.mask();
            }
        } else {
            if (in.hasEbv) {
                flags |= INPUT_INVALID.mask();
            }
            flags |= EXTINCTION_ASSUMED.mask();
            s.ebv = settings.ebvDefault();
            s.sEbv = settings.ebvErrDefault();
        }
        s.ebv = Math.max(0, s.ebv + s.dz(ErrorSource.EBV, s.sEbv));
        out.ebvUsed = s.ebv;
        out.avMag = settings.rv() * s.ebv;
        return flags;
    }

    private long readMetallicity(StarInput in) {
        long flags = 0;
        boolean valid = in.hasFeh && in.feh >= -5 && in.feh <= 1;
        s.fehMeasured = valid;
        if (valid) {
            s.feh = in.feh;
            if (!in.hasFehErr) {
                s.sFeh = settings.fehErrDefault();
            } else if (in.fehErr >= 0 && in.fehErr <= 5) {
                s.sFeh = in.fehErr;
            } else {
                s.sFeh = settings.fehErrDefault();
                flags |= INPUT_INVALID.mask();
            }
        } else {
            if (in.hasFeh) {
                flags |= INPUT_INVALID.mask();
            }
            flags |= METALLICITY_ASSUMED.mask();
            s.feh = settings.fehDefault();
            s.sFeh = settings.fehErrDefault();
        }
        s.feh += s.dz(ErrorSource.FEH, s.sFeh);
        return flags;
    }

    private void deredden() {
        double rv = settings.rv();
        for (int b = 0; b < Band.COUNT; b++) {
            s.rBand[b] = rv * ccmOverAv[b];
        }
        double bp = s.mObs[BP.ordinal()];
        double rp = s.mObs[RP.ordinal()];
        double c0 = !Double.isNaN(bp) && !Double.isNaN(rp) ? GaiaBandExtinction.dereddenedBpRp(bp - rp, s.ebv) : 1.0;
        c0 = Math.max(-0.5, Math.min(5.0, c0));
        s.rBand[G.ordinal()] = GaiaBandExtinction.rG(c0);
        s.rBand[BP.ordinal()] = GaiaBandExtinction.rBp(c0);
        s.rBand[RP.ordinal()] = GaiaBandExtinction.rRp(c0);
        for (int b = 0; b < Band.COUNT; b++) {
            s.m0[b] = s.mObs[b] - s.rBand[b] * s.ebv;
        }
    }

    /** V₀ and its contributions: measured V, or G converted with BP−RP (Riello et al. 2021); V_FROM_G when converted. */
    long visualMagnitude() {
        int vi = V.ordinal();
        double[] m0 = s.m0;
        double[] cV = s.cV;
        s.vObserved = !Double.isNaN(m0[vi]);
        if (!s.valuesOnly) {
            Arrays.fill(cV, 0);
        }
        if (s.vObserved) {
            s.v0 = m0[vi];
            cV[vi] = s.sm[vi];
            cV[ErrorSource.EBV] = -s.rBand[vi] * s.sEbv;
            s.mask(cV);
            return 0;
        }
        s.v0 = Double.NaN;
        int g = G.ordinal();
        int bp = BP.ordinal();
        int rp = RP.ordinal();
        if (Double.isNaN(m0[g]) || Double.isNaN(m0[bp]) || Double.isNaN(m0[rp])) {
            return 0;
        }
        double c0 = m0[bp] - m0[rp];
        if (!GaiaToJohnsonRiello2021.inRange(c0)) {
            return 0;
        }
        s.v0 = m0[g] - GaiaToJohnsonRiello2021.gMinusV(c0) + s.dz(ErrorSource.GV, GaiaToJohnsonRiello2021.SCATTER_MAG);
        double dc = GaiaToJohnsonRiello2021.dGMinusVdC(c0);
        cV[g] = s.sm[g];
        cV[bp] = -dc * s.sm[bp];
        cV[rp] = dc * s.sm[rp];
        cV[ErrorSource.EBV] = (-s.rBand[g] + dc * (s.rBand[bp] - s.rBand[rp])) * s.sEbv;
        cV[ErrorSource.GV] = GaiaToJohnsonRiello2021.SCATTER_MAG;
        s.mask(cV);
        return V_FROM_G.mask();
    }

    /** Contributions to the absolute Ks magnitude (the M-dwarf radius and mass relations' variable). */
    void absoluteKs() {
        if (s.valuesOnly) {
            return;
        }
        double[] cKs = s.cKs;
        Arrays.fill(cKs, 0);
        int k = KS.ordinal();
        cKs[k] = s.sm[k];
        cKs[ErrorSource.EBV] = -s.rBand[k] * s.sEbv;
        cKs[ErrorSource.MU] = Double.isNaN(s.sMu) ? 0 : -s.sMu;
        s.mask(cKs);
    }
}
