package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.physics.QualityFlag;
import org.starderive.testing.SharedSpark;

/**
 * The row-level half of the bad-input matrix (docs/bad-input-matrix.md): one table, one row per case, one run of
 * the job. Every row must come out exactly once, with the expected flag, and the run must succeed. The
 * dataset-level half (refused before anything is written) is {@link DatasetErrorsTest}.
 */
class BadInputMatrixTest {
    @TempDir
    Path tmp;

    /** Columns of TestCatalogs.schema(), by name. */
    private static final List<String> COLS = List.of(TestCatalogs.schema().fieldNames());

    private static final class Case {
        final String name;
        final Consumer<Object[]> mutate;
        final QualityFlag[] expect;

        Case(String name, Consumer<Object[]> mutate, QualityFlag... expect) {
            this.name = name;
            this.mutate = mutate;
            this.expect = expect;
        }
    }

    private static Consumer<Object[]> set(String col, Object v) {
        int i = COLS.indexOf(col);
        return r -> r[i] = v;
    }

    static List<Case> cases() {
        List<Case> c = new ArrayList<>();
        c.add(new Case("parallax null", set("parallax_mas", null), QualityFlag.PARALLAX_MISSING));
        c.add(new Case("parallax NaN", set("parallax_mas", Double.NaN), QualityFlag.INPUT_INVALID));
        c.add(new Case("parallax +inf", set("parallax_mas", Double.POSITIVE_INFINITY), QualityFlag.INPUT_INVALID));
        c.add(new Case("parallax -inf", set("parallax_mas", Double.NEGATIVE_INFINITY), QualityFlag.INPUT_INVALID));
        c.add(new Case("parallax error null", set("parallax_err_mas", null), QualityFlag.INPUT_INVALID));
        c.add(new Case("parallax error zero", set("parallax_err_mas", 0.0), QualityFlag.INPUT_INVALID));
        c.add(new Case("parallax error negative", set("parallax_err_mas", -0.1), QualityFlag.INPUT_INVALID));
        c.add(new Case("parallax error NaN", set("parallax_err_mas", Double.NaN), QualityFlag.INPUT_INVALID));
        c.add(new Case("parallax zero", set("parallax_mas", 0.0), QualityFlag.PARALLAX_NONPOSITIVE, QualityFlag.PARALLAX_LOW_SNR,
                QualityFlag.DISTANCE_WITHHELD));
        c.add(new Case("parallax negative", set("parallax_mas", -1.5), QualityFlag.PARALLAX_NONPOSITIVE, QualityFlag.PARALLAX_LOW_SNR,
                QualityFlag.DISTANCE_WITHHELD));
        c.add(new Case("parallax 1000x too large (uas read as mas)", set("parallax_mas", 25_000.0), QualityFlag.PARALLAX_IMPLAUSIBLE));
        c.add(new Case("V null", set("mag_v", null), QualityFlag.PHOTOMETRY_MISSING));
        c.add(new Case("V NaN", set("mag_v", Double.NaN), QualityFlag.INPUT_INVALID));
        c.add(new Case("V +inf", set("mag_v", Double.POSITIVE_INFINITY), QualityFlag.INPUT_INVALID));
        c.add(new Case("V sentinel 99", set("mag_v", 99.0), QualityFlag.MAGNITUDE_SENTINEL));
        c.add(new Case("V sentinel -99", set("mag_v", -99.0), QualityFlag.MAGNITUDE_SENTINEL));
        c.add(new Case("V sentinel 99.99", set("mag_v", 99.99), QualityFlag.MAGNITUDE_SENTINEL));
        c.add(new Case("V error zero", set("mag_v_err", 0.0), QualityFlag.INPUT_INVALID));
        c.add(new Case("V error negative", set("mag_v_err", -0.02), QualityFlag.INPUT_INVALID));
        c.add(new Case("Ks error NaN", set("mag_ks_err", Double.NaN), QualityFlag.INPUT_INVALID));
        c.add(new Case("colours far outside every relation", r -> {
            r[COLS.indexOf("mag_ks")] = (Double) r[COLS.indexOf("mag_v")] - 8.0;
            r[COLS.indexOf("mag_j")] = (Double) r[COLS.indexOf("mag_v")] - 6.5;
            r[COLS.indexOf("mag_b")] = (Double) r[COLS.indexOf("mag_v")] + 3.0;
        }, QualityFlag.COLOUR_OUT_OF_RANGE));
        c.add(new Case("[Fe/H] above every range (+3)", set("feh", 3.0), QualityFlag.INPUT_INVALID, QualityFlag.METALLICITY_ASSUMED));
        c.add(new Case("[Fe/H] below every range (-6)", set("feh", -6.0), QualityFlag.INPUT_INVALID, QualityFlag.METALLICITY_ASSUMED));
        c.add(new Case("[Fe/H] NaN", set("feh", Double.NaN), QualityFlag.INPUT_INVALID, QualityFlag.METALLICITY_ASSUMED));
        c.add(new Case("E(B-V) negative", set("ebv", -0.05), QualityFlag.INPUT_INVALID, QualityFlag.EXTINCTION_ASSUMED));
        c.add(new Case("E(B-V) +inf", set("ebv", Double.POSITIVE_INFINITY), QualityFlag.INPUT_INVALID, QualityFlag.EXTINCTION_ASSUMED));
        c.add(new Case("E(B-V) null", set("ebv", null), QualityFlag.EXTINCTION_ASSUMED));
        c.add(new Case("everything but the id null", r -> {
            for (int i = 2; i < r.length; i++) {
                r[i] = null;
            }
        }, QualityFlag.PARALLAX_MISSING, QualityFlag.PHOTOMETRY_MISSING));
        c.add(new Case("duplicated id", r -> r[0] = 1L, QualityFlag.DUPLICATE_ID));
        return c;
    }

    @Test
    void everyRowLevelCaseIsKeptOnceAndFlagged() throws Exception {
        SparkSession spark = SharedSpark.spark();
        List<Case> cases = cases();
        Row base = TestCatalogs.rows(2, 0).get(1); // a solar-type star at 35 pc, nothing wrong with it
        List<Row> rows = new ArrayList<>();
        Object[] ref = new Object[base.length()];
        for (int i = 0; i < ref.length; i++) {
            ref[i] = base.get(i);
        }
        ref[0] = 1L;
        ref[COLS.indexOf("ebv")] = 0.0;
        ref[COLS.indexOf("feh")] = 0.0;
        rows.add(RowFactory.create(ref.clone()));
        Map<Long, Case> byId = new LinkedHashMap<>();
        for (int k = 0; k < cases.size(); k++) {
            Object[] r = ref.clone();
            r[0] = 100L + k;
            cases.get(k).mutate.accept(r);
            rows.add(RowFactory.create(r));
            if (!cases.get(k).name.equals("duplicated id")) {
                byId.put(100L + k, cases.get(k));
            }
        }
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        TestCatalogs.writeParquet(spark, rows, in);
        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());

        Map<Long, List<Long>> flagsById = new HashMap<>();
        for (Row row : spark.read().parquet(out.toString()).select("star_id", "flags").collectAsList()) {
            flagsById.computeIfAbsent(row.getLong(0), x -> new ArrayList<>()).add(row.getLong(1));
        }
        assertEquals(rows.size(), flagsById.values().stream().mapToInt(List::size).sum(), "every row once");
        for (Map.Entry<Long, Case> e : byId.entrySet()) {
            List<Long> f = flagsById.get(e.getKey());
            assertEquals(1, f.size(), e.getValue().name);
            for (QualityFlag q : e.getValue().expect) {
                assertTrue(q.isSet(f.get(0)), e.getValue().name + " should carry " + q + ", has " + QualityFlag.names(f.get(0)));
            }
        }
        // the duplicated id: the reference row and its copy, both kept, both flagged
        assertEquals(2, flagsById.get(1L).size());
        for (long f : flagsById.get(1L)) {
            assertTrue(QualityFlag.DUPLICATE_ID.isSet(f));
        }
    }

    @Test
    void theDocumentedMatrixListsEveryCase() throws Exception {
        String doc = Files.readString(ProjectFiles.path("docs", "bad-input-matrix.md"));
        for (Case c : cases()) {
            assertTrue(doc.contains("| " + c.name + " |"), "docs/bad-input-matrix.md lacks the case: " + c.name);
        }
    }
}
