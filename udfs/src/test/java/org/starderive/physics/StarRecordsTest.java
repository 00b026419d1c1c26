package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import org.junit.jupiter.api.Test;

/** The reuse contract of {@link StarInput} and {@link StarResult}: after {@code clear()} nothing of the last star is left. */
class StarRecordsTest {

    @Test
    void clearedInputHasNothingOfThePreviousStar() {
        StarInput in = new StarInput().parallax(10, 0.1).ebv(0.1, 0.01).feh(-0.2, 0.1);
        for (Band b : Band.values()) {
            in.magnitude(b, 10, 0.01);
        }
        for (Band b : Band.values()) {
            assertTrue(in.hasMag[b.ordinal()] && in.hasMagErr[b.ordinal()], b.name());
        }
        assertSame(in, in.magnitude(Band.V, 9.5, 0.02));
        assertEquals(9.5, in.mag[Band.V.ordinal()], 0.0);
        assertEquals(0.02, in.magErr[Band.V.ordinal()], 0.0);
        assertTrue(in.hasParallax && in.hasParallaxErr && in.hasEbv && in.hasEbvErr && in.hasFeh && in.hasFehErr);
        assertEquals(10, in.parallaxMas, 0.0);
        assertEquals(0.1, in.parallaxErrMas, 0.0);
        assertEquals(0.1, in.ebv, 0.0);
        assertEquals(0.01, in.ebvErr, 0.0);
        assertEquals(-0.2, in.feh, 0.0);
        assertEquals(0.1, in.fehErr, 0.0);
        assertSame(in, in.clear());
        assertFalse(in.hasParallax || in.hasParallaxErr || in.hasEbv || in.hasEbvErr || in.hasFeh || in.hasFehErr);
        for (double v : new double[] {in.parallaxMas, in.parallaxErrMas, in.ebv, in.ebvErr, in.feh, in.fehErr}) {
            assertTrue(Double.isNaN(v));
        }
        for (int i = 0; i < Band.COUNT; i++) {
            assertFalse(in.hasMag[i] || in.hasMagErr[i], Band.values()[i].name());
            assertTrue(Double.isNaN(in.mag[i]) && Double.isNaN(in.magErr[i]), Band.values()[i].name());
        }
    }

    @Test
    void clearedResultHasNothingOfThePreviousStar() {
        StarResult r = new StarResult();
        r.flags = 5;
        r.distMethod = StarResult.DistanceMethod.EDSD_MODE;
        r.lumClass = LuminosityClass.EVOLVED;
        r.regime = Regime.GIANT;
        r.teffRelations = 3;
        r.parallaxCorrMas = r.distPc = r.distLoPc = r.distHiPc = r.distModulusMag = r.distModulusErrMag = 1;
        r.ebvUsed = r.avMag = 1;
        Arrays.fill(r.absMag, 1);
        Arrays.fill(r.absMagErr, 1);
        r.teffK = r.teffErrK = r.teffChi2 = r.bcV = r.bcVErr = r.mbolMag = r.mbolErrMag = 1;
        r.lumLsun = r.lumErrLsun = r.lumW = r.radiusRsun = r.radiusErrRsun = 1;
        r.massMsun = r.massErrMsun = r.densityKgM3 = r.densityErrKgM3 = r.densitySun = r.loggCgs = r.loggErrCgs = 1;
        r.angDiamMas = r.angDiamErrMas = r.angDiamSbrMas = 1;
        assertEquals("C10/B-V,C10/V-Rc", r.teffFrom());
        assertTrue(r.has(QualityFlag.PARALLAX_LOW_SNR) && r.has(QualityFlag.PARALLAX_MISSING));
        assertFalse(r.has(QualityFlag.PARALLAX_NONPOSITIVE));
        assertSame(r, r.clear());
        assertEquals(0L, r.flags);
        assertEquals(StarResult.DistanceMethod.NONE, r.distMethod);
        assertNull(r.lumClass);
        assertNull(r.regime);
        assertEquals(0L, r.teffRelations);
        assertNull(r.teffFrom());
        double[] all = {r.parallaxCorrMas, r.distPc, r.distLoPc, r.distHiPc, r.distModulusMag, r.distModulusErrMag, r.ebvUsed,
            r.avMag, r.teffK, r.teffErrK, r.teffChi2, r.bcV, r.bcVErr, r.mbolMag, r.mbolErrMag, r.lumLsun, r.lumErrLsun,
            r.lumW, r.radiusRsun, r.radiusErrRsun, r.massMsun, r.massErrMsun, r.densityKgM3, r.densityErrKgM3, r.densitySun,
            r.loggCgs, r.loggErrCgs, r.angDiamMas, r.angDiamErrMas, r.angDiamSbrMas};
        for (int i = 0; i < all.length; i++) {
            assertTrue(Double.isNaN(all[i]), "field " + i);
        }
        for (int i = 0; i < Band.COUNT; i++) {
            assertTrue(Double.isNaN(r.absMag[i]) && Double.isNaN(r.absMagErr[i]));
        }
    }

    @Test
    void distanceMethodLabelsAreTheColumnValues() {
        // dist_method column values (README output columns); none gives null
        assertNull(StarResult.DistanceMethod.NONE.label());
        assertEquals("inverse_parallax", StarResult.DistanceMethod.INVERSE_PARALLAX.label());
        assertEquals("edsd_median", StarResult.DistanceMethod.EDSD_MEDIAN.label());
        assertEquals("edsd_mode", StarResult.DistanceMethod.EDSD_MODE.label());
    }
}
