package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.junit.jupiter.api.Test;

class QualityFlagTest {

    @Test
    void masksAreTheValuesOfTheReadmeFlagTable() {
        // README, "Quality flags": the value column of each flag (part of the output format); bit 19 unused
        long[] values = {1, 2, 4, 8, 16, 32, 64, 128, 256, 512, 1024, 2048, 4096, 8192, 16384, 32768, 65536, 131072,
            262144, 1048576, 2097152, 4194304};
        QualityFlag[] flags = QualityFlag.values();
        assertEquals(values.length, flags.length);
        for (int i = 0; i < flags.length; i++) {
            assertEquals(values[i], flags[i].mask(), flags[i].name());
        }
    }

    @Test
    void namesListTheSetFlagsInBitOrder() {
        long f = QualityFlag.ID_MISSING.mask() | QualityFlag.PARALLAX_LOW_SNR.mask() | QualityFlag.V_FROM_G.mask();
        assertEquals(List.of("PARALLAX_LOW_SNR", "V_FROM_G", "ID_MISSING"), QualityFlag.names(f));
        assertArrayEquals(new String[] {"PARALLAX_LOW_SNR", "V_FROM_G", "ID_MISSING"}, QualityFlag.nameArray(f));
        assertEquals(List.of(), QualityFlag.names(0L));
        assertEquals(0, QualityFlag.nameArray(0L).length, "no flag, no name (the flag_names column is an empty array)");
        // bit 19 is unused: setting it names nothing
        assertEquals(List.of(), QualityFlag.names(1L << 19));
        assertTrue(QualityFlag.V_FROM_G.isSet(f));
        assertFalse(QualityFlag.DUPLICATE_ID.isSet(f));
        assertFalse(QualityFlag.PARALLAX_NONPOSITIVE.description().isBlank());
    }
}
