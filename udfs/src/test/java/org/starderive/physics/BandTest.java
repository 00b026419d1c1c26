package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class BandTest {

    @Test
    void suffixesLabelsAndWavelengths() {
        // column names mag_<suffix> (README input schema); wavelengths: 2MASS Ks 2.159 um (Cohen, Wheaton & Megeath
        // 2003), Johnson V 0.545 um (Bessell, Castelli & Plez 1998, from memory)
        String[] suffixes = {"b", "v", "rc", "ic", "j", "h", "ks", "g", "bp", "rp"};
        String[] labels = {"B", "V", "Rc", "Ic", "J", "H", "Ks", "G", "BP", "RP"};
        Band[] bands = Band.values();
        assertEquals(suffixes.length, Band.COUNT);
        for (int i = 0; i < bands.length; i++) {
            assertEquals(suffixes[i], bands[i].suffix());
            assertEquals(labels[i], bands[i].label());
            assertEquals(bands[i], Band.bySuffix(suffixes[i]));
        }
        assertEquals(2.159, Band.KS.wavelengthUm(), 0.0);
        assertEquals(0.545, Band.V.wavelengthUm(), 0.0);
        assertTrue(Band.G.isGaiaLike() && Band.BP.isGaiaLike() && Band.RP.isGaiaLike());
        assertFalse(Band.V.isGaiaLike() || Band.KS.isGaiaLike());
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> Band.bySuffix("k"));
        assertTrue(e.getMessage().contains("Unknown band: 'k'"), e.getMessage());
    }
}
