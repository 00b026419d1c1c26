package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.sample.SampleSurvey;
import org.starderive.testing.SharedSpark;
import org.starderive.udf.DerivedColumn;
import org.starderive.udf.StarMonteCarloUdf;

/** Monte Carlo uncertainties through the real job: reproducible under repartitioning and task retry; honest intervals. */
class MonteCarloJobTest {
    @TempDir
    static Path tmp;

    private static SparkSession spark;
    private static Path survey;
    private static final String CONFIG = ProjectFiles.path("sample-survey", "config", "kestrel.yaml").toString();

    @BeforeAll
    static void survey() {
        spark = SharedSpark.spark();
        survey = tmp.resolve("survey");
        SampleSurvey.writeSingle(spark, 30_000, 21, survey.toString(), 2, SaveMode.ErrorIfExists);
    }

    private static List<String> mcColumns() {
        List<String> c = new ArrayList<>();
        for (DerivedColumn d : StarMonteCarloUdf.COLUMNS) {
            c.add(d.name());
        }
        return c;
    }

    private static Dataset<Row> derive(Path input, Path out, int draws, long seed) {
        int code = Main.execute("derive", "--layout", "full", "--input", input.toString(), "--config", CONFIG, "--output", out.toString(),
                "--uncertainty", "montecarlo", "--draws", String.valueOf(draws), "--seed", String.valueOf(seed));
        assertEquals(0, code);
        return spark.read().parquet(out.toString());
    }

    @Test
    void sameSeedSameNumbersUnderRepartitioningAndARetriedTask() throws Exception {
        Path small = tmp.resolve("small");
        spark.read().parquet(survey.resolve("stars").toString()).filter("star_id < 3000").repartition(3)
                .write().partitionBy("tile").parquet(small.toString());
        Path reshuffled = tmp.resolve("reshuffled");
        spark.read().parquet(small.toString()).repartition(7).write().partitionBy("tile").parquet(reshuffled.toString());

        List<String> cols = new ArrayList<>(List.of("star_id"));
        cols.addAll(mcColumns());
        String[] rest = cols.subList(1, cols.size()).toArray(new String[0]);
        List<Row> a = derive(small, tmp.resolve("mc-a"), 32, 5).select("star_id", rest).orderBy("star_id").collectAsList();
        List<Row> b = derive(reshuffled, tmp.resolve("mc-b"), 32, 5).select("star_id", rest).orderBy("star_id").collectAsList();
        assertEquals(3000, a.size());
        assertEquals(a, b, "another partitioning, same numbers");

        spark.conf().set(TestHooks.FAIL_FIRST_ATTEMPT, "true");
        List<Row> c;
        try {
            c = derive(small, tmp.resolve("mc-c"), 32, 5).select("star_id", rest).orderBy("star_id").collectAsList();
        } finally {
            spark.conf().unset(TestHooks.FAIL_FIRST_ATTEMPT);
        }
        assertEquals(a, c, "a task that failed once and was retried writes the same numbers");
        // and the whole catalogue, every column, equals the clean run's
        List<Row> wholeA = spark.read().parquet(tmp.resolve("mc-a").toString()).orderBy("star_id").collectAsList();
        List<Row> wholeC = spark.read().parquet(tmp.resolve("mc-c").toString()).orderBy("star_id").collectAsList();
        assertEquals(wholeA, wholeC, "retried run's output equals the clean run's");
        List<Row> d = derive(small, tmp.resolve("mc-d"), 32, 6).select("star_id", rest).orderBy("star_id").collectAsList();
        assertTrue(!a.equals(d), "another seed, other numbers");
        String manifest = Files.readString(tmp.resolve("mc-a").resolve(RunManifest.FILE_NAME));
        assertTrue(manifest.contains("\"method\" : \"montecarlo\"") && manifest.contains("\"draws\" : 32")
                && manifest.contains("\"seed\" : 5"), manifest);
    }

    /** Asserts 0.63-0.73 coverage of the 16-84 % interval of quantity x in the bin, over >= 300 stars. */
    private static void coverage(Dataset<Row> pool, String bin, String[] x, StringBuilder report) {
        String lo = x[0] + "_p16_" + x[1];
        String hi = x[0] + "_p84_" + x[1];
        Row r = pool.filter(bin).filter(lo + " IS NOT NULL").selectExpr("count(*)",
                "avg(CASE WHEN " + x[2] + " BETWEEN " + lo + " AND " + hi + " THEN 1D ELSE 0D END)").first();
        double cov = r.getLong(0) == 0 ? Double.NaN : r.getDouble(1);
        report.append(String.format("[%s] %s n=%d cov=%.3f; ", bin.equals("TRUE") ? "all" : bin, x[0], r.getLong(0), cov));
        assertTrue(r.getLong(0) >= 300, report.toString());
        assertTrue(cov >= 0.63 && cov <= 0.73, x[0] + " coverage " + cov + " in " + bin + " — " + report);
    }

    @Test
    void posteriorDistanceDrawsCoverTheTruthWhereThePosteriorIsAskedFor() throws Exception {
        // distance_snr_min lowered to 4: stars at observed significance 4-5 get distances sampled from the posterior
        Path config = tmp.resolve("kestrel-posterior.yaml");
        Files.writeString(config, "physics:\n  parallax_zero_point_mas: -0.02\n  distance_snr_min: 4\n");
        Path out = tmp.resolve("mc-posterior");
        assertEquals(0, Main.execute("derive", "--layout", "full", "--input", survey.resolve("stars").toString(), "--config", config.toString(),
                "--output", out.toString(), "--uncertainty", "montecarlo", "--draws", "64", "--seed", "2"));
        Dataset<Row> j = spark.read().parquet(out.toString())
                .join(spark.read().parquet(survey.resolve("truth").toString()).drop("tile"), "star_id")
                .withColumn("snr", org.apache.spark.sql.functions.expr("parallax_corr_mas / parallax_err_mas"));
        StringBuilder report = new StringBuilder();
        assertTrue(j.filter("snr >= 4 AND snr < 5 AND dist_method = 'edsd_median'").count() > 300);
        coverage(j, "snr >= 4 AND snr < 5", new String[] {"dist", "pc", "true_dist_pc"}, report);
        System.out.println("Monte Carlo posterior check: " + report);
    }

    @Test
    void intervalsCoverTheTruthAndAgreeWithFirstOrderWhereItHolds() {
        Dataset<Row> derived = derive(survey.resolve("stars"), tmp.resolve("mc-full"), 64, 1);
        // Bins of the observed parallax significance (what a user selects on). With the default distance minimum
        // (5) the lowest bin with a result is 5-10.
        Dataset<Row> j = derived.join(spark.read().parquet(survey.resolve("truth").toString()).drop("tile"), "star_id")
                .withColumn("snr", org.apache.spark.sql.functions.expr("parallax_corr_mas / parallax_err_mas"));
        j.cache();
        String[][] q = {{"dist", "pc", "true_dist_pc"}, {"teff", "k", "true_teff_k"}, {"lum", "lsun", "true_lum_lsun"},
                {"radius", "rsun", "true_radius_rsun"}};
        // Teff, L and R: stars without a flag that says Teff must not be trusted (colour out of range, extrapolated
        // or disagreeing Teff, invalid or sentinel input); distance rests on the parallax alone: every star
        long untrusted = org.starderive.physics.QualityFlag.COLOUR_OUT_OF_RANGE.mask()
                | org.starderive.physics.QualityFlag.TEFF_EXTRAPOLATED.mask()
                | org.starderive.physics.QualityFlag.TEFF_COLOURS_DISAGREE.mask()
                | org.starderive.physics.QualityFlag.INPUT_INVALID.mask()
                | org.starderive.physics.QualityFlag.MAGNITUDE_SENTINEL.mask();
        Dataset<Row> usable = j.filter("(flags & " + untrusted + ") = 0");
        assertEquals(0, j.filter("snr < 5 AND dist_p50_pc IS NOT NULL").count(), "no distance below significance 5");
        StringBuilder report = new StringBuilder();
        for (String bin : List.of("TRUE", "snr >= 5 AND snr < 10", "snr >= 10")) {
            for (String[] x : q) {
                coverage(x[0].equals("dist") ? j : usable, bin, x, report);
            }
        }
        // analytic and Monte Carlo errors agree within 10 % for high-significance, in-range stars
        Dataset<Row> good = j.filter("snr > 20 AND (flags & " + (org.starderive.physics.QualityFlag.COLOUR_OUT_OF_RANGE.mask()
                | org.starderive.physics.QualityFlag.INPUT_INVALID.mask() | org.starderive.physics.QualityFlag.MAGNITUDE_SENTINEL.mask())
                + ") = 0 AND teff_k IS NOT NULL");
        String[][] e = {{"teff", "k", "teff_err_k"}, {"lum", "lsun", "lum_err_lsun"}, {"radius", "rsun", "radius_err_rsun"}};
        for (String[] x : e) {
            double ratio = good.selectExpr("percentile_approx((" + x[0] + "_p84_" + x[1] + " - " + x[0] + "_p16_" + x[1]
                    + ") / 2 / " + x[2] + ", 0.5, 10000)").first().getDouble(0);
            report.append(String.format("%s mc/analytic=%.3f; ", x[0], ratio));
            assertEquals(1.0, ratio, 0.10, x[0] + " — " + report);
        }
        j.unpersist();
        System.out.println("Monte Carlo check: " + report);
    }
}
