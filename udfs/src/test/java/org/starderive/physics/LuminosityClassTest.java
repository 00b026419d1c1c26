package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

class LuminosityClassTest {

    @Test
    void dwarfBoundaryIsCiardiEtAl2011OnAllThreePieces() {
        // Ciardi et al. 2011, AJ 141, 108 (coefficients from memory, as the class says): log g >= 3.5 for Teff >= 6000 K,
        // >= 4.0 for Teff <= 4250 K, 5.2 - 2.8e-4 Teff between. The ends are checked exactly at 6000 and 4250 K, where
        // the middle line gives 3.52 and 4.01, so a shifted edge changes the value.
        assertEquals(3.5, LuminosityClass.dwarfLoggBoundary(6000.0), 0.0);
        assertEquals(3.5, LuminosityClass.dwarfLoggBoundary(6500.0), 0.0);
        assertEquals(3.5, LuminosityClass.dwarfLoggBoundary(9000.0), 0.0);
        assertEquals(4.0, LuminosityClass.dwarfLoggBoundary(4250.0), 0.0);
        assertEquals(4.0, LuminosityClass.dwarfLoggBoundary(4200.0), 0.0);
        assertEquals(4.0, LuminosityClass.dwarfLoggBoundary(3000.0), 0.0);
        for (double t : new double[] {4251.0, 5000.0, 5772.0, 5999.0}) {
            assertEquals(5.2 - 2.8e-4 * t, LuminosityClass.dwarfLoggBoundary(t), 1e-12, "Teff " + t);
        }
    }

    @Test
    void labelsAreTheLumClassColumnValues() {
        // the values of the lum_class column (README, output format)
        assertEquals("main_sequence", LuminosityClass.MAIN_SEQUENCE.label());
        assertEquals("evolved", LuminosityClass.EVOLVED.label());
    }
}
