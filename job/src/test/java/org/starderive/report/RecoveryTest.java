package org.starderive.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.image.BufferedImage;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import javax.imageio.ImageIO;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.job.Main;
import org.starderive.sample.SampleSurvey;
import org.starderive.testing.SharedSpark;

/**
 * Injection-recovery on a small run (2·10^4 synthetic stars): the real job derives the Kestrel survey, the recovery
 * report compares with the truth. The synthetic photometry comes from the same published relations, so this tests
 * the inference, flags and uncertainties (the calibrations are checked against published tables elsewhere).
 */
class RecoveryTest {
    @TempDir
    Path tmp;

    @Test
    void highSignificanceInRangeStarsAreRecoveredWithHonestIntervals() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path survey = tmp.resolve("survey");
        SampleSurvey.write(spark, 20_000, 3, survey.toString(), 2, SaveMode.ErrorIfExists);
        Path derived = tmp.resolve("derived");
        int code = Main.execute("derive", "--input", survey.resolve("astrometry").toString(),
                "--photometry", survey.resolve("photometry").toString(), "--join-on", "star_id",
                "--config", Path.of("..", "sample-survey", "config", "kestrel.yaml").toString(),
                "--output", derived.toString());
        assertEquals(0, code);
        Path out = tmp.resolve("recovery");
        RecoveryReport.Result r = RecoveryReport.run(spark, derived.toString(), survey.resolve("truth").toString(), out.toString());
        assertEquals(20_000, r.stars);

        RecoveryReport.Stat teff = r.clean.get("teff");
        RecoveryReport.Stat radius = r.clean.get("radius");
        assertTrue(teff.n > 300, "enough clean stars: " + teff.n);
        System.out.println("recovery headline: " + new com.fasterxml.jackson.databind.ObjectMapper().writeValueAsString(r.clean));
        assertEquals(0, teff.bias, 0.01, "median Teff bias");
        assertEquals(0, radius.bias, 0.01, "median radius bias");
        for (String q : List.of("dist", "teff", "lum", "radius")) {
            double c = r.clean.get(q).coverage;
            assertTrue(c >= 0.60 && c <= 0.76, q + " 68 % coverage " + c);
        }
        for (String f : List.of("index.md", "index.html", "recovery.json")) {
            assertTrue(Files.size(out.resolve(f)) > 0, f);
        }
        for (String png : List.of("bias_vs_snr.png", "coverage_vs_snr.png")) {
            BufferedImage img = ImageIO.read(out.resolve(png).toFile());
            assertEquals(Charts.PLOT_WIDTH, img.getWidth(), png);
            assertEquals(Charts.PLOT_HEIGHT, img.getHeight(), png);
        }
        // flagged stars are the badly recovered ones: disagreeing colours give worse Teff than the rest; below the
        // distance minimum there is no distance at all (no median error), and such stars are a large share
        double[] disagree = r.flags.get("TEFF_COLOURS_DISAGREE");
        assertTrue(disagree[1] > disagree[2], "median |Teff error| flagged " + disagree[1] + " vs not " + disagree[2]);
        double[] withheld = r.flags.get("DISTANCE_WITHHELD");
        assertTrue(Double.isNaN(withheld[3]) && withheld[0] > 0.2, "withheld: share " + withheld[0] + ", |d error| " + withheld[3]);
    }
}
