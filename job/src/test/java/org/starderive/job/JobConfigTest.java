package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;
import org.yaml.snakeyaml.LoaderOptions;
import org.yaml.snakeyaml.Yaml;
import org.yaml.snakeyaml.constructor.Constructor;

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
                "  compression: zstd",
                "  lease_stale_after_s: 600"), "test.yaml");
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
        assertEquals(600.0, c.leaseStaleAfterS());
    }

    @Test
    void emptyFileMeansDefaults() {
        JobConfig c = JobConfig.parse("", "empty.yaml");
        assertEquals("star_id", c.idColumn());
        assertEquals(DeriveSettings.RV_DEFAULT, c.settings().rv());
        assertEquals(OutputLease.STALE_AFTER_S_DEFAULT, c.leaseStaleAfterS());
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
        assertTrue(rejected("physics: {prior_length_kpc: 0}").contains("must be > 0 and <= 100.0"));
        assertTrue(rejected("output: {compression: lz77}").contains("compression"));
        assertTrue(rejected("output: {lease_stale_after_s: 5}").contains("output.lease_stale_after_s"));
        assertTrue(rejected("[1, 2]").contains("top level"));
        assertTrue(rejected("physics: {r_v: 3.1").contains("not valid YAML"));
    }

    @Test
    void yamlTagsAreRefusedNotEvaluated(@TempDir Path tmp) throws Exception {
        // A tag naming a Java class asks a YAML reader to construct it; java.io.FileOutputStream(String) creates the
        // named file, so evaluation shows as that file appearing (construction of arbitrary types from global tags is
        // CVE-2022-1471, the reason SnakeYAML 2.0 refuses global tags unless a TagInspector allows them). Without the
        // tag the value is a plain column name and the config valid, so only the tag itself can make the job refuse.
        Path marker = tmp.resolve("constructed-by-a-yaml-tag");
        String tag = "!!java.io.FileOutputStream";
        String yaml = "columns:\n  star_id: " + tag + " \"" + marker + "\"\n";
        assertEquals(marker.toString(), JobConfig.parse(yaml.replace(tag + " ", ""), "untagged.yaml").idColumn(),
                "control: untagged, the same document is a valid config");
        LoaderOptions evaluating = new LoaderOptions();
        evaluating.setTagInspector(t -> true);
        Object constructed = ((Map<?, ?>) ((Map<?, ?>) new Yaml(new Constructor(evaluating)).load(yaml)).get("columns"))
                .get("star_id");
        ((java.io.Closeable) constructed).close();
        assertTrue(Files.exists(marker), "control: a reader that evaluates tags creates " + marker);
        Files.delete(marker);

        Path file = Files.writeString(tmp.resolve("tagged.yaml"), yaml);
        JobException e = assertThrows(JobException.class, () -> JobConfig.load(file));
        assertEquals(JobException.Kind.CONFIG, e.kind());
        assertTrue(e.getMessage().contains(file.toString()), "names the file: " + e.getMessage());
        assertTrue(e.getMessage().contains(tag + " at line 2"), "names the tag and its line: " + e.getMessage());
        assertTrue(e.getMessage().contains("tags are not allowed"), "names the rule: " + e.getMessage());
        assertFalse(Files.exists(marker), "the tag was evaluated: " + marker + " exists");

        // any tag: a custom global one, a local one, a core one on a key
        assertTrue(rejected("physics: {r_v: !<tag:example.org,2024:rv> 3.1}").contains("!<tag:example.org,2024:rv>"));
        assertTrue(rejected("physics: {r_v: !rv 3.1}").contains("tags are not allowed"));
        assertTrue(rejected("physics: {!!str r_v: 3.1}").contains("!!str"));
    }
}
