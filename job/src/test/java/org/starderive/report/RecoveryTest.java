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
import org.starderive.job.ProjectFiles;
import org.starderive.sample.SampleSurvey;
import org.starderive.testing.SharedSpark;

/**
 * Injection-recovery (6·10^4 synthetic stars): the real job derives the Kestrel survey, the recovery report compares
 * with the truth. The synthetic photometry comes from the same published relations, typed a second time apart from
 * the physics core, so this tests the inference, flags and uncertainties and catches a mistyped coefficient (the
 * calibrations themselves are checked against published tables elsewhere).
 */
class RecoveryTest {
    private static final int STARS = 60_000;
    @TempDir
    Path tmp;

    @Test
    void highSignificanceInRangeStarsAreRecoveredWithHonestIntervals() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path survey = tmp.resolve("survey");
        SampleSurvey.write(spark, STARS, 3, survey.toString(), 2, SaveMode.ErrorIfExists);
        Path derived = tmp.resolve("derived");
        int code = Main.execute("derive", "--layout", "full", "--input", survey.resolve("astrometry").toString(),
                "--photometry", survey.resolve("photometry").toString(), "--join-on", "star_id",
                "--config", ProjectFiles.path("sample-survey", "config", "kestrel.yaml").toString(),
                "--output", derived.toString());
        assertEquals(0, code);
        Path out = tmp.resolve("recovery");
        RecoveryReport.Result r = RecoveryReport.run(spark, derived.toString(), survey.resolve("truth").toString(), out.toString());
        assertEquals(STARS, r.stars);

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
        perRegime(r);
        // who gets parameters: main-sequence stars of 2800-30,000 K with true parallax/error > 10 that get Teff, L,
        // R and mass: issue #11's target, 90 % (the rest lack the bands or the distance a relation needs at the
        // survey's depth, or lie beyond the relations' ranges)
        assertTrue(r.msReachShare >= 0.90, "share of main-sequence stars with all four: " + r.msReachShare);
        System.out.println("recovery reach: main-sequence stars of 2800-30,000 K at true parallax/error > 10 with Teff, L, R "
                + "and mass: " + r.msReachShare);
        for (String f : List.of("index.md", "index.html", "recovery.json")) {
            assertTrue(Files.size(out.resolve(f)) > 0, f);
        }
        for (String png : List.of("bias_vs_snr.png", "coverage_vs_snr.png")) {
            BufferedImage img = ImageIO.read(out.resolve(png).toFile());
            assertEquals(Charts.PLOT_WIDTH, img.getWidth(), png);
            assertEquals(Charts.PLOT_HEIGHT, img.getHeight(), png);
        }
        // flagged stars are the badly recovered ones: relative to their own errors, Teffs from disagreeing colours are
        // worse than the rest (in |error| alone the faint stars' noisy colours, rarely flagged, hide it); a Teff from
        // the radius of an M dwarf without a Mann colour is another estimate, checked apart: at true parallax/error > 10
        // its 68 % interval covers the truth for 0.58-0.78 (a Gaussian's 0.68: common practice) and its median bias stays
        // within 2.5 % (the stars that need it are the ones too faint in V and BP for their radius, i.e. the cooler ones
        // at a given M_Ks: about +1.3 % on the demo survey, a selection effect the README states; the synthetic M dwarfs
        // are built on the same Teff-radius relation, so this checks the error model and the selection, not the relation,
        // which TeffFromRadiusTest checks against well-measured stars); below the distance
        // minimum there is no distance at all (no median error), and such stars are a large share
        String fromRadius = "(flags & " + org.starderive.physics.QualityFlag.TEFF_FROM_RADIUS.mask() + ") <> 0";
        String disagrees = "(flags & " + org.starderive.physics.QualityFlag.TEFF_COLOURS_DISAGREE.mask() + ") <> 0";
        org.apache.spark.sql.Dataset<org.apache.spark.sql.Row> j = spark.read().parquet(derived.toString())
                .join(spark.read().parquet(survey.resolve("truth").toString()), "star_id")
                .where("teff_k IS NOT NULL");
        String z = "abs(teff_k - true_teff_k) / teff_err_k";
        String hi = fromRadius + " AND true_parallax_mas / parallax_err_mas > 10";
        org.apache.spark.sql.Row m = j.agg(
                org.apache.spark.sql.functions.expr("percentile_approx(CASE WHEN NOT " + fromRadius + " AND " + disagrees
                        + " THEN " + z + " END, 0.5, 10000)"),
                org.apache.spark.sql.functions.expr("percentile_approx(CASE WHEN NOT " + fromRadius + " AND NOT " + disagrees
                        + " THEN " + z + " END, 0.5, 10000)"),
                org.apache.spark.sql.functions.expr("avg(CASE WHEN " + hi + " THEN (CASE WHEN " + z + " < 1 THEN 1.0D ELSE 0.0D END) END)"),
                org.apache.spark.sql.functions.expr("percentile_approx(CASE WHEN " + hi + " THEN teff_k / true_teff_k - 1 END, 0.5, 10000)"),
                org.apache.spark.sql.functions.expr("sum(CASE WHEN " + hi + " THEN 1 ELSE 0 END)")).first();
        assertTrue(m.getDouble(0) > m.getDouble(1), "colour Teffs: median |error|/sigma flagged " + m.getDouble(0) + " vs not " + m.getDouble(1));
        assertTrue(m.getLong(4) > 200, "stars with a Teff from the radius at parallax/error > 10: " + m.getLong(4));
        assertTrue(m.getDouble(2) > 0.58 && m.getDouble(2) < 0.78, "Teff from the radius, 68 % coverage " + m.getDouble(2));
        assertEquals(0, m.getDouble(3), 0.025, "Teff from the radius, median bias");
        System.out.println("recovery flags: colour Teff |error|/sigma with TEFF_COLOURS_DISAGREE " + m.getDouble(0) + ", without "
                + m.getDouble(1) + "; Teff from the radius at parallax/error > 10: " + m.getLong(4) + " stars, coverage "
                + m.getDouble(2) + ", median bias " + m.getDouble(3));
        // the report's own flag table says the same, in units of each star's error (all Teffs, radius route included)
        double[] disagree = r.flags.get("TEFF_COLOURS_DISAGREE");
        assertTrue(disagree[5] > disagree[6], "report: median |Teff error|/sigma flagged " + disagree[5] + " vs not " + disagree[6]);
        double[] withheld = r.flags.get("DISTANCE_WITHHELD");
        assertTrue(Double.isNaN(withheld[3]) && withheld[0] > 0.2, "withheld: share " + withheld[0] + ", |d error| " + withheld[3]);
    }

    /**
     * Per calibration regime of the truth, stars with true parallax/error > 10 and trusted inputs: median bias of
     * Teff, L, R and mass within 1 % (2 % for hot stars) and 68 % coverage within 0.63-0.73 (issue #11's targets),
     * each widened by three standard errors of the estimate at this sample size (median: 1.2533 sigma / sqrt(n);
     * coverage: binomial), so that the check tests the method and not one draw of the survey.
     */
    private static void perRegime(RecoveryReport.Result r) {
        StringBuilder seen = new StringBuilder();
        for (String regime : List.of("m_dwarf", "fgk_dwarf", "hot", "giant")) {
            java.util.Map<String, RecoveryReport.Stat> m = r.byRegime.get(regime);
            assertTrue(m != null, "regime " + regime + " in the report: " + r.byRegime.keySet());
            double biasMax = regime.equals("hot") ? 0.02 : 0.01;
            for (String q : List.of("teff", "lum", "radius", "mass")) {
                RecoveryReport.Stat st = m.get(q);
                if (regime.equals("giant") && q.equals("mass")) {
                    assertEquals(0, st.n, "giants get no main-sequence mass");
                    continue;
                }
                String ctx = regime + " " + q + ": n " + st.n + ", bias " + st.bias + ", scatter " + st.scatter
                        + ", coverage " + st.coverage;
                seen.append(ctx).append("; ");
                assertTrue(st.n >= 100, ctx);
                double seMedian = 1.2533 * st.scatter / Math.sqrt(st.n);
                assertTrue(Math.abs(st.bias) <= biasMax + 3 * seMedian, ctx);
                double seCov = Math.sqrt(0.68 * 0.32 / st.n);
                assertTrue(st.coverage >= 0.63 - 3 * seCov && st.coverage <= 0.73 + 3 * seCov, ctx);
            }
        }
        System.out.println("recovery per regime: " + seen);
    }
}
