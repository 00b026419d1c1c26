package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/**
 * The blend weights of {@link Regime} against the rule its Javadoc states (our choice, no published source): the
 * M-dwarf weight falls linearly from 1 at 4100 K (the published edge of Mann et al. 2015, ApJ 804, 64: 2700-4100 K) to
 * 0 at 4300 K; the hot weight rises linearly from 0 at 7000 K to 1 at 7500 K.
 */
class RegimeWeightTest {

    @Test
    void mDwarfWeightIsOneBelowTheMannEdgeAndFallsLinearlyTo4300K() {
        assertEquals(1.0, Regime.mDwarfWeight(3500.0), 0.0);
        assertEquals(1.0, Regime.mDwarfWeight(4100.0), 0.0);
        assertEquals(0.75, Regime.mDwarfWeight(4150.0), 1e-12);
        assertEquals(0.5, Regime.mDwarfWeight(4200.0), 1e-12);
        assertEquals(0.0, Regime.mDwarfWeight(4300.0), 0.0);
        assertEquals(0.0, Regime.mDwarfWeight(5000.0), 0.0);
        assertEquals(0.0, Regime.mDwarfWeight(Double.NaN), 0.0);
    }

    @Test
    void hotWeightIsZeroBelow7000KAndRisesLinearlyTo7500K() {
        assertEquals(0.0, Regime.hotWeight(6500.0), 0.0);
        assertEquals(0.0, Regime.hotWeight(7000.0), 0.0);
        assertEquals(0.2, Regime.hotWeight(7100.0), 1e-12);
        assertEquals(0.5, Regime.hotWeight(7250.0), 1e-12);
        assertEquals(1.0, Regime.hotWeight(7500.0), 0.0);
        assertEquals(1.0, Regime.hotWeight(12000.0), 0.0);
        assertEquals(0.0, Regime.hotWeight(Double.NaN), 0.0);
    }

    @Test
    void weightSlopesAreThoseOfTheLinearRampsAndZeroOutsideAndAtTheEdges() {
        assertEquals(-1.0 / 200, Regime.dMDwarfWeight(4200.0), 1e-15);
        assertEquals(-1.0 / 200, Regime.dMDwarfWeight(4101.0), 1e-15);
        assertEquals(-1.0 / 200, Regime.dMDwarfWeight(4299.0), 1e-15);
        for (double t : new double[] {4000.0, 4100.0, 4300.0, 4400.0, Double.NaN}) {
            assertEquals(0.0, Regime.dMDwarfWeight(t), 0.0, "Teff " + t);
        }
        assertEquals(1.0 / 500, Regime.dHotWeight(7250.0), 1e-15);
        assertEquals(1.0 / 500, Regime.dHotWeight(7001.0), 1e-15);
        assertEquals(1.0 / 500, Regime.dHotWeight(7499.0), 1e-15);
        for (double t : new double[] {6900.0, 7000.0, 7500.0, 8000.0, Double.NaN}) {
            assertEquals(0.0, Regime.dHotWeight(t), 0.0, "Teff " + t);
        }
    }

    @Test
    void labelsAreTheRegimeColumnValues() {
        // the values of the regime column (README, "Calibration regimes")
        assertEquals("hot", Regime.HOT.label());
        assertEquals("fgk_dwarf", Regime.FGK_DWARF.label());
        assertEquals("giant", Regime.GIANT.label());
        assertEquals("m_dwarf", Regime.M_DWARF.label());
    }
}
