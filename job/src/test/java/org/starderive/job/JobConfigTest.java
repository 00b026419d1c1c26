package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;

class JobConfigTest {

    @Test
    void fullConfigIsReadWithUnitsAndSources() {
        JobConfig c = JobConfig.parse(String.join("\n",
                "columns:",
                "  star_id: source_id",
                "  parallax: plx",
                "  parallax_err: e_plx",
                "  parallax_unit: arcsec",
                "  bands:",
                "    v: {mag: Vmag, err: e_Vmag}",
                "    ks: {mag: Kmag, err_value: 0.03}",
                "  av: {column: A_V}",
                "  feh: {value: -0.2}",
                "physics:",
                "  parallax_zero_point_mas: -0.017",
                "  distance_method: edsd",
                "  relations: [C10/V-Ks]",
                "output:",
                "  compression: zstd"), "test.yaml");
        assertEquals("source_id", c.idColumn());
        assertEquals(1000.0, c.parallaxUnit().toMas);
        assertEquals("Vmag", c.explicitBands().get(Band.V).magColumn);
        assertEquals(0.03, c.explicitBands().get(Band.KS).err.value());
        assertEquals("A_V", c.av().column());
        assertEquals(-0.2, c.feh().value());
        assertEquals(-0.017, c.settings().parallaxZeroPointMas());
        assertEquals(DeriveSettings.DistanceMethod.EDSD, c.settings().distanceMethod());
        assertEquals(1, Long.bitCount(c.settings().relationMask()));
        assertEquals("zstd", c.compression());
    }

    @Test
    void emptyFileMeansDefaults() {
        JobConfig c = JobConfig.parse("", "empty.yaml");
        assertEquals("star_id", c.idColumn());
        assertEquals(DeriveSettings.RV_DEFAULT, c.settings().rv());
    }

    private static String rejected(String yaml) {
        JobException e = assertThrows(JobException.class, () -> JobConfig.parse(yaml, "bad.yaml"));
        assertEquals(JobException.Kind.CONFIG, e.kind());
        assertTrue(e.getMessage().contains("bad.yaml"), e.getMessage());
        return e.getMessage();
    }

    @Test
    void everyBadValueIsRejectedWithKeyAndRule() {
        assertTrue(rejected("colums: {}").contains("unknown key 'colums'"));
        assertTrue(rejected("columns: {bands: {v: {mag: V, error: e}}}").contains("columns.bands.v.error"));
        assertTrue(rejected("columns: {bands: {u: {mag: U}}}").contains("band must be one of"));
        assertTrue(rejected("columns: {parallax_unit: pc}").contains("mas, arcsec, uas"));
        assertTrue(rejected("columns: {ebv: {column: E, value: 0.1}}").contains("exactly one"));
        assertTrue(rejected("columns: {ebv: {value: 0.1}, av: {value: 0.3}}").contains("either ebv or av"));
        assertTrue(rejected("physics: {r_v: abc}").contains("must be a number"));
        assertTrue(rejected("physics: {distance_method: guess}").contains("auto, inverse, edsd"));
        assertTrue(rejected("physics: {relations: [C99/X-Y]}").contains("Unknown colour-Teff relation"));
        assertTrue(rejected("physics: {prior_length_kpc: 0}").contains("must be finite and > 0"));
        assertTrue(rejected("output: {compression: lz77}").contains("compression"));
        assertTrue(rejected("[1, 2]").contains("top level"));
        assertTrue(rejected("physics: {r_v: 3.1").contains("not valid YAML"));
    }

    @Test
    void yamlTagsAreNotEvaluated() {
        // data only: a tag naming a Java class is not instantiated; the value is rejected as a value of the wrong kind
        String msg = rejected("physics:\n  r_v: !!java.net.URL [\"http://127.0.0.1/\"]\n");
        assertTrue(msg.contains("r_v"), msg);
    }
}
