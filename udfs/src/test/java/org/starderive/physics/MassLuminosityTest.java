package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class MassLuminosityTest {

    @Test
    void inverseUndoesTheForwardRelationInsideEachSegment() {
        // Eker et al. 2018 Table 4, away from the 0.72 Msun overlap where the inverse blends two segments
        for (double m : new double[] {0.2, 0.3, 0.5, 0.6, 0.9, 1.0, 1.5, 2.0, 3.0, 5.0, 10.0, 20.0, 30.0}) {
            double logL = MassLuminosityEker2018.logLuminosity(m);
            assertEquals(m, MassLuminosityEker2018.massMsun(logL), 1e-9 * m, "M=" + m);
        }
    }

    @Test
    void theSunIsOneSolarMassWithinOnePercent() {
        // Eker et al. 2018: log L = 5.743 log M - 0.007 for 0.72-1.05 Msun; L = 1 gives M = 1.0028
        assertEquals(1.0, MassLuminosityEker2018.massMsun(0.0), 0.01);
    }

    @Test
    void inverseIsContinuousAndMonotoneAcrossTheSegmentBreaks() {
        double prev = MassLuminosityEker2018.logMass(MassLuminosityEker2018.LOGL_MIN);
        double step = 1e-4;
        double maxJump = 0;
        for (double logL = MassLuminosityEker2018.LOGL_MIN + step; logL <= MassLuminosityEker2018.LOGL_MAX; logL += step) {
            double lm = MassLuminosityEker2018.logMass(logL);
            assertTrue(lm >= prev - 1e-12, "monotone at log L " + logL);
            maxJump = Math.max(maxJump, lm - prev);
            prev = lm;
        }
        // the steepest segment has d log M / d log L = 1/2.028; with the overlap blend a little more
        assertTrue(maxJump < 2 * step, "largest step in log M " + maxJump);
    }

    @Test
    void outsideTheRelationThereIsNoMass() {
        assertTrue(Double.isNaN(MassLuminosityEker2018.massMsun(MassLuminosityEker2018.LOGL_MIN - 0.01)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.massMsun(MassLuminosityEker2018.LOGL_MAX + 0.01)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.massMsun(Double.NaN)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.logLuminosity(0.1)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.logLuminosity(40)));
    }
}
