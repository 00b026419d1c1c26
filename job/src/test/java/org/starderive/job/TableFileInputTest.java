package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** The unit check and the VOTable cell check of {@link TableFileInput}, without Spark. */
class TableFileInputTest {
    private static final JobConfig DEFAULTS = JobConfig.defaults();

    private static JobException unitRefusal(String column, String unit, JobConfig c) {
        return assertThrows(JobException.class, () -> TableFileInput.checkUnit("table", "f.fits", column, unit, c));
    }

    @Test
    void unitSpellingsOfTheSameUnitAreAccepted() {
        // mas: the VOUnits symbol, and marcsec (the SI prefix m on arcsec), IVOA VOUnits 1.0 sections 2.4 and 2.7;
        // capitals as older FITS files write them (common practice)
        for (String u : new String[] {"mas", "marcsec", "MAS", " mas "}) {
            TableFileInput.checkUnit("table", "f.fits", "parallax_mas", u, DEFAULTS);
        }
        TableFileInput.checkUnit("table", "f.fits", "parallax_err_mas", "mas", DEFAULTS);
        // magnitudes: "mag" (VOUnits 1.0 section 2.7), also on errors and E(B-V)
        for (String c : new String[] {"mag_v", "mag_v_err", "mag_ks", "ebv"}) {
            TableFileInput.checkUnit("table", "f.fits", c, "mag", DEFAULTS);
        }
        // a column without a unit, and a column the config does not map, are not checked
        TableFileInput.checkUnit("table", "f.fits", "parallax_mas", null, DEFAULTS);
        TableFileInput.checkUnit("table", "f.fits", "parallax_mas", "", DEFAULTS);
        TableFileInput.checkUnit("table", "f.fits", "feh", "Jy", DEFAULTS);
        // arcsec and uas when configured so
        JobConfig arcsec = JobConfig.parse("columns:\n  parallax: plx\n  parallax_unit: arcsec\n", "t.yaml");
        TableFileInput.checkUnit("table", "f.fits", "plx", "arcsec", arcsec);
        JobConfig uas = JobConfig.parse("columns:\n  parallax_unit: uas\n", "t.yaml");
        TableFileInput.checkUnit("table", "f.fits", "parallax_mas", "uarcsec", uas);
        TableFileInput.checkUnit("table", "f.fits", "parallax_mas", "\u00b5as", uas);
    }

    @Test
    void anotherUnitIsRefusedNamingFileColumnUnitFoundAndExpected() {
        JobException e = unitRefusal("parallax_mas", "arcsec", DEFAULTS);
        assertEquals(JobException.Kind.INPUT, e.kind());
        assertTrue(e.getMessage().contains("f.fits") && e.getMessage().contains("'parallax_mas'")
                && e.getMessage().contains("'arcsec'") && e.getMessage().contains("expected mas"), e.getMessage());
        // "Mas" would be mega-"as" in VOUnits; compared without case it is read as mas, but "deg" never is
        unitRefusal("parallax_err_mas", "deg", DEFAULTS);
        JobException m = unitRefusal("mag_b", "Jy", DEFAULTS);
        assertTrue(m.getMessage().contains("expected mag"), m.getMessage());
        JobException a = unitRefusal("plx", "mas",
                JobConfig.parse("columns:\n  parallax: plx\n  parallax_unit: arcsec\n", "t.yaml"));
        assertTrue(a.getMessage().contains("expected arcsec"), a.getMessage());
        // explicitly mapped bands are checked under their own names
        unitRefusal("Vmag", "mas", JobConfig.parse("columns:\n  bands:\n    v: {mag: Vmag, err: e_Vmag}\n", "t.yaml"));
    }

    @Test
    void votableCellsThatAreNotNumbers() {
        // IVOA VOTable 1.4 section 6: integers decimal or hexadecimal, floats with NaN, +Inf, -Inf; empty is null
        assertNull(TableFileInput.badNumber("double", false, null, " 1.5e-3 "));
        assertNull(TableFileInput.badNumber("double", false, null, "NaN"));
        assertNull(TableFileInput.badNumber("double", false, null, "-Inf"));
        assertNull(TableFileInput.badNumber("float", false, null, ""));
        assertNull(TableFileInput.badNumber("long", false, null, "0x1F"));
        assertNull(TableFileInput.badNumber("int", false, "-99", "-99"));
        assertNull(TableFileInput.badNumber("double", true, null, "1 2.5 NaN"));
        assertNull(TableFileInput.badNumber("char", false, null, "abc"), "text FIELDs hold text");
        assertEquals("abc", TableFileInput.badNumber("double", false, null, "abc"));
        assertEquals("1.5", TableFileInput.badNumber("int", false, null, "1.5"));
        assertEquals("x", TableFileInput.badNumber("float", true, null, "1 x 3"));
        assertEquals("12.3 mas", TableFileInput.badNumber("double", false, null, "12.3 mas"));
    }
}
