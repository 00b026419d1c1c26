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

    // Eker et al. 2018, MNRAS 479, 5491, Table 4, typed a second time here: mass edges, alpha, beta per segment
    private static final double[] EDGE = {0.179, 0.45, 0.72, 1.05, 2.40, 7.0, 31.0};
    private static final double[] A = {2.028, 4.572, 5.743, 4.329, 3.967, 2.865};
    private static final double[] B = {-0.976, -0.102, -0.007, 0.010, 0.093, 1.105};

    private static double segLogL(int i, double m) {
        return A[i] * Math.log10(m) + B[i];
    }

    static double segLogM(int i, double logL) {
        return (logL - B[i]) / A[i];
    }

    @Test
    void forwardRelationIsTable4OnEverySegmentAndABreakMassBelongsToTheLowerSegment() {
        // derived from Eker et al. 2018 Table 4; at a break mass the lower segment is used (our convention: Table 4's
        // ranges share their end points)
        for (int i = 0; i < A.length; i++) {
            double mid = Math.sqrt(EDGE[i] * EDGE[i + 1]);
            assertEquals(segLogL(i, mid), MassLuminosityEker2018.logLuminosity(mid), 1e-12, "segment " + i);
            assertEquals(segLogL(i, EDGE[i + 1]), MassLuminosityEker2018.logLuminosity(EDGE[i + 1]), 1e-12, "top of segment " + i);
        }
        assertEquals(segLogL(0, 0.179), MassLuminosityEker2018.logLuminosity(0.179), 1e-12, "lowest mass of Table 4");
        assertTrue(Double.isNaN(MassLuminosityEker2018.logLuminosity(0.1789)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.logLuminosity(31.0001)));
    }

    @Test
    void inverseIsTable4InsideSegmentsTheBreakMassInAGapAndALinearBlendInAnOverlap() {
        // derived from Eker et al. 2018 Table 4: segment i covers log L from segLogL(i, lower edge) to segLogL(i, upper)
        double[] lo = new double[A.length];
        double[] hi = new double[A.length];
        for (int i = 0; i < A.length; i++) {
            lo[i] = segLogL(i, EDGE[i]);
            hi[i] = segLogL(i, EDGE[i + 1]);
        }
        // the ends of the relation: exactly 0.179 and 31 Msun
        assertEquals(Math.log10(0.179), MassLuminosityEker2018.logMass(lo[0]), 1e-12);
        assertEquals(Math.log10(31.0), MassLuminosityEker2018.logMass(hi[5]), 1e-12);
        assertTrue(Double.isNaN(MassLuminosityEker2018.logMass(lo[0] - 1e-9)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.logMass(hi[5] + 1e-9)));
        int overlaps = 0;
        int gaps = 0;
        for (int i = 0; i + 1 < A.length; i++) {
            if (lo[i + 1] < hi[i]) {
                // overlap (the Javadoc's rule, our choice): weight rises linearly from the next segment's bottom
                overlaps++;
                for (double w : new double[] {0.25, 0.5, 0.75}) {
                    double logL = lo[i + 1] + w * (hi[i] - lo[i + 1]);
                    double expected = (1 - w) * segLogM(i, logL) + w * segLogM(i + 1, logL);
                    assertEquals(expected, MassLuminosityEker2018.logMass(logL), 1e-9, "overlap " + i + "/" + (i + 1));
                }
            } else {
                // gap: the break mass
                gaps++;
                double logL = 0.5 * (hi[i] + lo[i + 1]);
                assertEquals(Math.log10(EDGE[i + 1]), MassLuminosityEker2018.logMass(logL), 1e-12, "gap " + i + "/" + (i + 1));
            }
            // inside segment i, away from both neighbours
            double inside = 0.5 * (Math.max(lo[i], i > 0 ? hi[i - 1] : lo[i]) + Math.min(hi[i], lo[i + 1]));
            assertEquals(segLogM(i, inside), MassLuminosityEker2018.logMass(inside), 1e-12, "inside " + i);
        }
        assertEquals(4, overlaps, "Table 4 as typed: overlaps at 0.45, 0.72, 1.05, 2.40 Msun");
        assertEquals(1, gaps, "and a gap at 7 Msun");
    }

    @Test
    void slopeAndMassScatterFollowTheSegmentAndTheStatedLogLScatter() {
        // d log M / d log L = 1/alpha inside a segment (Eker et al. 2018 Table 4); the ln M scatter is
        // ln 10 x 0.05 dex / alpha (the class's own stated scatter of 0.05 dex in log L)
        double[] inside = {segLogL(0, 0.3), segLogL(1, 0.6), segLogL(2, 0.9), segLogL(3, 1.6), segLogL(4, 4.0), segLogL(5, 15.0)};
        for (int i = 0; i < A.length; i++) {
            assertEquals(1 / A[i], MassLuminosityEker2018.dLogMassDLogL(inside[i]), 1e-6, "segment " + i);
            assertEquals(Math.log(10) * 0.05 / A[i], MassLuminosityEker2018.lnMassScatter(inside[i]), 1e-6, "segment " + i);
        }
        // at the two ends the slope is one-sided: the end segment's 1/alpha
        assertEquals(1 / A[0], MassLuminosityEker2018.dLogMassDLogL(segLogL(0, 0.179)), 1e-12);
        assertEquals(1 / A[5], MassLuminosityEker2018.dLogMassDLogL(segLogL(5, 31.0)), 1e-12);
        // in the gap at 7 Msun the mass does not move with L
        assertEquals(0.0, MassLuminosityEker2018.dLogMassDLogL(0.5 * (segLogL(4, 7.0) + segLogL(5, 7.0))), 1e-12);
        assertTrue(Double.isNaN(MassLuminosityEker2018.dLogMassDLogL(segLogL(5, 31.0) + 0.01)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.dLogMassDLogL(segLogL(0, 0.179) - 0.01)));
        assertTrue(Double.isNaN(MassLuminosityEker2018.lnMassScatter(Double.NaN)));
    }
}
