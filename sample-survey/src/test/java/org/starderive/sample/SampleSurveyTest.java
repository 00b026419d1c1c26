package org.starderive.sample;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

class SampleSurveyTest {
    private static final int N = 20_000;
    private static SparkSession spark;
    private static List<Row> stars;

    @BeforeAll
    static void generate() {
        spark = SharedSpark.spark();
        stars = SampleSurvey.stars(spark, N, 11, 3).orderBy("star_id").collectAsList();
    }

    @Test
    void sameSeedSameTablesWhateverThePartitioning() {
        List<Row> again = SampleSurvey.stars(spark, N, 11, 7).orderBy("star_id").collectAsList();
        assertEquals(stars, again);
        List<Row> other = SampleSurvey.stars(spark, N, 12, 3).orderBy("star_id").collectAsList();
        assertNotEquals(stars, other);
        assertEquals(N, other.size());
    }

    @Test
    void tablesAreWrittenWithExactSizesAndTilePartitions(@TempDir Path tmp) {
        SampleSurvey.write(spark, 3_000, 5, tmp.toString(), 2, SaveMode.ErrorIfExists);
        for (String t : List.of(SampleSurvey.ASTROMETRY, SampleSurvey.PHOTOMETRY, SampleSurvey.TRUTH)) {
            Dataset<Row> d = spark.read().parquet(tmp.resolve(t).toString());
            assertEquals(3_000, d.count(), t);
            assertEquals(3_000, d.select("star_id").distinct().count(), t);
            assertTrue(d.select("tile").distinct().count() <= ForwardModel.TILES);
        }
    }

    @Test
    void mainSequenceMassesFollowTheStatedImf() {
        // Kroupa 2001: slope 2.3 above 0.5 Msun. Maximum-likelihood slope of a power law truncated to [0.5, 8],
        // found with Commons Math; its standard error is about (alpha - 1) / sqrt(n).
        double lo = ForwardModel.KROUPA_M_BREAK;
        double hi = ForwardModel.KROUPA_M_MAX;
        double sumLog = 0;
        int n = 0;
        for (Row r : stars) {
            double m = r.getDouble(r.fieldIndex("true_mass_msun"));
            if (r.getString(r.fieldIndex("true_class")).equals("ms") && m >= lo && m <= hi) {
                sumLog += Math.log(m);
                n++;
            }
        }
        double meanLog = sumLog / n;
        // d/da log L = n/(a-1) ... : score of the truncated Pareto: 1/(a-1) + (lo^(1-a) ln lo - hi^(1-a) ln hi)/(lo^(1-a) - hi^(1-a)) - meanLog = 0
        double alpha = new BrentSolver(1e-10).solve(200, a -> {
            double pl = Math.pow(lo, 1 - a);
            double ph = Math.pow(hi, 1 - a);
            return 1 / (a - 1) + (pl * Math.log(lo) - ph * Math.log(hi)) / (pl - ph) - meanLog;
        }, 1.2, 4.0);
        double se = (alpha - 1) / Math.sqrt(n);
        assertEquals(ForwardModel.KROUPA_ALPHA_HIGH, alpha, 3 * se, "alpha " + alpha + " +- " + se + " from " + n + " stars");
    }

    private static double share(String column, String value) {
        long k = stars.stream().filter(r -> value.equals(r.getString(r.fieldIndex(column)))).count();
        return (double) k / stars.size();
    }

    private static void assertBinomial(double p, double observed, String what) {
        double se = Math.sqrt(p * (1 - p) / N);
        assertEquals(p, observed, 4 * se, what);
    }

    @Test
    void statedFractionsOfClassesAndDefects() {
        double giants = share("true_class", "red_clump") + share("true_class", "rgb");
        assertBinomial(1 - ForwardModel.FRAC_MS - ForwardModel.FRAC_SUBGIANT, giants, "giants");
        assertBinomial(ForwardModel.FRAC_SUBGIANT, share("true_class", "subgiant"), "subgiants");
        // a later defect overwrites the label of an earlier one: blend, then sentinel, then NaN
        double pNan = ForwardModel.P_NAN;
        double pSentinel = ForwardModel.P_SENTINEL * (1 - pNan);
        double pBlend = ForwardModel.P_BLEND * (1 - ForwardModel.P_SENTINEL) * (1 - pNan);
        assertBinomial(pNan, share("defect", "nan"), "NaN rows");
        assertBinomial(pSentinel, share("defect", "sentinel"), "sentinel rows");
        assertBinomial(pBlend, share("defect", "blend"), "blends");
        // the sentinel really is in a magnitude column
        long sentinelValues = stars.stream().filter(r -> {
            for (String c : r.schema().fieldNames()) {
                if (c.startsWith("mag_") && !c.endsWith("_err") && !r.isNullAt(r.fieldIndex(c)) && r.getDouble(r.fieldIndex(c)) == 99.99) {
                    return true;
                }
            }
            return false;
        }).count();
        assertEquals(Math.round(share("defect", "sentinel") * N), sentinelValues);
    }

    @Test
    void parallaxesAreTrueValuesPlusTheStatedZeroPointAndNoise() {
        // mean of (observed - true) / sigma over clean rows: the zero point shows as -0.02 mas; noise is unit normal
        double sum = 0;
        double sum2 = 0;
        double zp = 0;
        int n = 0;
        int negative = 0;
        for (Row r : stars) {
            if (r.isNullAt(r.fieldIndex("parallax_mas")) || Double.isNaN(r.getDouble(r.fieldIndex("parallax_mas")))) {
                continue;
            }
            double obs = r.getDouble(r.fieldIndex("parallax_mas"));
            double tru = r.getDouble(r.fieldIndex("true_parallax_mas"));
            double s = r.getDouble(r.fieldIndex("parallax_err_mas"));
            double z = (obs - tru - ForwardModel.PARALLAX_ZERO_POINT_MAS) / s;
            sum += z;
            sum2 += z * z;
            zp += obs - tru;
            n++;
            negative += obs < 0 ? 1 : 0;
        }
        assertEquals(0, sum / n, 4 / Math.sqrt(n));
        assertEquals(1, Math.sqrt(sum2 / n), 0.03);
        assertTrue(negative > 0, "faint stars give negative parallaxes");
    }
}
