package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
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
import org.apache.spark.sql.types.DataTypes;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.physics.QualityFlag;
import org.starderive.testing.SharedSpark;
import org.starderive.udf.DerivedSchema;

/**
 * The row-level half of the bad-input matrix (docs/bad-input-matrix.md): one table, one row per case, one run of
 * the job. Every row must come out exactly once, with the expected flag, and the run must succeed; a bad value that
 * is to be ignored must leave every derived value as it is for the same row without that value. The dataset-level
 * half (refused before anything is written) is {@link DatasetErrorsTest}. The star id is text, so that a null, an
 * empty and a blank id can each be a case; every row is known by its id.
 */
class BadInputMatrixTest {
    @TempDir
    Path tmp;

    /** Id of the row without the bad value of case id k: (k + this) as text. */
    private static final long WITHOUT_ID_OFFSET = 1_000_000L;

    /** Columns of TestCatalogs.schema(), by name. */
    private static final List<String> COLS = List.of(TestCatalogs.schema().fieldNames());

    private static final class Case {
        final String name;
        final Consumer<Object[]> mutate;
        final QualityFlag[] expect;
        /** The same row with the bad value removed; null when the case has no value to ignore (see cases()). */
        Consumer<Object[]> without;

        Case(String name, Consumer<Object[]> mutate, QualityFlag... expect) {
            this.name = name;
            this.mutate = mutate;
            this.expect = expect;
        }

        /** The bad value must be ignored: every derived value equals the one of the row without it. */
        Case ignoredLike(Consumer<Object[]> rowWithout) {
            this.without = rowWithout;
            return this;
        }
    }

    private static Consumer<Object[]> set(String col, Object v) {
        int i = COLS.indexOf(col);
        return r -> r[i] = v;
    }

    /** The given fields missing (null). */
    private static Consumer<Object[]> missing(String... cols) {
        return r -> {
            for (String c : cols) {
                r[COLS.indexOf(c)] = null;
            }
        };
    }

    /**
     * The cases. A bad value that must be ignored carries {@code ignoredLike(row without it)}; missing values (null
     * parallax, V, E(B-V), everything), valid measurements that are flagged (zero or negative parallax, colours no
     * relation covers), the duplicated id and the missing ids have nothing to ignore.
     */
    static List<Case> cases() {
        List<Case> c = new ArrayList<>();
        c.add(new Case("parallax null", set("parallax_mas", null), QualityFlag.PARALLAX_MISSING));
        c.add(new Case("parallax NaN", set("parallax_mas", Double.NaN), QualityFlag.INPUT_INVALID).ignoredLike(missing("parallax_mas")));
        c.add(new Case("parallax +inf", set("parallax_mas", Double.POSITIVE_INFINITY), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("parallax_mas")));
        c.add(new Case("parallax -inf", set("parallax_mas", Double.NEGATIVE_INFINITY), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("parallax_mas")));
        // a parallax without a valid error is unusable: the row must come out as if it had no parallax at all
        c.add(new Case("parallax error null", set("parallax_err_mas", null), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("parallax_mas", "parallax_err_mas")));
        c.add(new Case("parallax error zero", set("parallax_err_mas", 0.0), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("parallax_mas", "parallax_err_mas")));
        c.add(new Case("parallax error negative", set("parallax_err_mas", -0.1), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("parallax_mas", "parallax_err_mas")));
        c.add(new Case("parallax error NaN", set("parallax_err_mas", Double.NaN), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("parallax_mas", "parallax_err_mas")));
        // zero and negative parallaxes are measurements, not bad values: kept (parallax_corr_mas), flagged, no distance
        c.add(new Case("parallax zero", set("parallax_mas", 0.0), QualityFlag.PARALLAX_NONPOSITIVE, QualityFlag.PARALLAX_LOW_SNR,
                QualityFlag.DISTANCE_WITHHELD));
        c.add(new Case("parallax negative", set("parallax_mas", -1.5), QualityFlag.PARALLAX_NONPOSITIVE, QualityFlag.PARALLAX_LOW_SNR,
                QualityFlag.DISTANCE_WITHHELD));
        c.add(new Case("parallax 1000x too large (uas read as mas)", set("parallax_mas", 25_000.0), QualityFlag.PARALLAX_IMPLAUSIBLE)
                .ignoredLike(missing("parallax_mas")));
        c.add(new Case("V null", set("mag_v", null), QualityFlag.PHOTOMETRY_MISSING));
        c.add(new Case("V NaN", set("mag_v", Double.NaN), QualityFlag.INPUT_INVALID).ignoredLike(missing("mag_v")));
        c.add(new Case("V +inf", set("mag_v", Double.POSITIVE_INFINITY), QualityFlag.INPUT_INVALID).ignoredLike(missing("mag_v")));
        c.add(new Case("V sentinel 99", set("mag_v", 99.0), QualityFlag.MAGNITUDE_SENTINEL).ignoredLike(missing("mag_v")));
        c.add(new Case("V sentinel -99", set("mag_v", -99.0), QualityFlag.MAGNITUDE_SENTINEL).ignoredLike(missing("mag_v")));
        c.add(new Case("V sentinel 99.99", set("mag_v", 99.99), QualityFlag.MAGNITUDE_SENTINEL).ignoredLike(missing("mag_v")));
        // a magnitude without a valid error is unusable: as if the band were not measured
        c.add(new Case("V error zero", set("mag_v_err", 0.0), QualityFlag.INPUT_INVALID).ignoredLike(missing("mag_v", "mag_v_err")));
        c.add(new Case("V error negative", set("mag_v_err", -0.02), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("mag_v", "mag_v_err")));
        c.add(new Case("Ks error NaN", set("mag_ks_err", Double.NaN), QualityFlag.INPUT_INVALID)
                .ignoredLike(missing("mag_ks", "mag_ks_err")));
        // valid magnitudes whose colours no relation covers: still used (absolute magnitudes), only Teff is lost
        c.add(new Case("colours far outside every relation", r -> {
            r[COLS.indexOf("mag_ks")] = (Double) r[COLS.indexOf("mag_v")] - 8.0;
            r[COLS.indexOf("mag_j")] = (Double) r[COLS.indexOf("mag_v")] - 6.5;
            r[COLS.indexOf("mag_b")] = (Double) r[COLS.indexOf("mag_v")] + 3.0;
        }, QualityFlag.COLOUR_OUT_OF_RANGE));
        c.add(new Case("[Fe/H] above every range (+3)", set("feh", 3.0), QualityFlag.INPUT_INVALID, QualityFlag.METALLICITY_ASSUMED)
                .ignoredLike(missing("feh")));
        c.add(new Case("[Fe/H] below every range (-6)", set("feh", -6.0), QualityFlag.INPUT_INVALID, QualityFlag.METALLICITY_ASSUMED)
                .ignoredLike(missing("feh")));
        c.add(new Case("[Fe/H] NaN", set("feh", Double.NaN), QualityFlag.INPUT_INVALID, QualityFlag.METALLICITY_ASSUMED)
                .ignoredLike(missing("feh")));
        c.add(new Case("E(B-V) negative", set("ebv", -0.05), QualityFlag.INPUT_INVALID, QualityFlag.EXTINCTION_ASSUMED)
                .ignoredLike(missing("ebv")));
        c.add(new Case("E(B-V) +inf", set("ebv", Double.POSITIVE_INFINITY), QualityFlag.INPUT_INVALID, QualityFlag.EXTINCTION_ASSUMED)
                .ignoredLike(missing("ebv")));
        c.add(new Case("E(B-V) null", set("ebv", null), QualityFlag.EXTINCTION_ASSUMED));
        c.add(new Case("everything but the id null", r -> {
            for (int i = 2; i < r.length; i++) {
                r[i] = null;
            }
        }, QualityFlag.PARALLAX_MISSING, QualityFlag.PHOTOMETRY_MISSING));
        c.add(new Case("duplicated id", r -> r[0] = "1", QualityFlag.DUPLICATE_ID));
        // a row that cannot be joined back to its source: kept, flagged, never a duplicate of another missing id;
        // empty or blank text as no id is common practice (no published source)
        c.add(new Case("id null", r -> r[0] = null, QualityFlag.ID_MISSING));
        c.add(new Case("id empty", r -> r[0] = "", QualityFlag.ID_MISSING));
        c.add(new Case("id blank (white space only)", r -> r[0] = " \t ", QualityFlag.ID_MISSING));
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
        ref[0] = "1";
        ref[COLS.indexOf("ebv")] = 0.0;
        ref[COLS.indexOf("feh")] = 0.0;
        rows.add(RowFactory.create(ref.clone()));
        // by the id the case row ends up with: "100" + k, or the missing id itself (null, "", blank: one row each)
        Map<String, Case> byId = new LinkedHashMap<>();
        for (int k = 0; k < cases.size(); k++) {
            Object[] r = ref.clone();
            r[0] = String.valueOf(100L + k);
            cases.get(k).mutate.accept(r);
            rows.add(RowFactory.create(r));
            if (!cases.get(k).name.equals("duplicated id")) {
                byId.put((String) r[0], cases.get(k));
            }
            if (cases.get(k).without != null) {
                Object[] w = ref.clone();
                w[0] = String.valueOf(WITHOUT_ID_OFFSET + 100L + k);
                cases.get(k).without.accept(w);
                rows.add(RowFactory.create(w));
            }
        }
        Path in = tmp.resolve("in");
        Path out = tmp.resolve("out");
        spark.createDataFrame(rows, TestCatalogs.schema(DataTypes.StringType)).repartition(2).write().partitionBy("tile")
                .parquet(in.toString());
        CliRunner r = CliRunner.run("derive", "--input", in.toString(), "--output", out.toString());
        assertEquals(0, r.exitCode, r.toString());

        Map<String, List<Long>> flagsById = new HashMap<>();
        for (Row row : spark.read().parquet(out.toString()).select("star_id", "flags").collectAsList()) {
            flagsById.computeIfAbsent(row.getString(0), x -> new ArrayList<>()).add(row.getLong(1));
        }
        assertEquals(rows.size(), flagsById.values().stream().mapToInt(List::size).sum(), "every row once");
        for (Map.Entry<String, Case> e : byId.entrySet()) {
            List<Long> f = flagsById.get(e.getKey());
            assertEquals(1, f.size(), e.getValue().name);
            for (QualityFlag q : e.getValue().expect) {
                assertTrue(q.isSet(f.get(0)), e.getValue().name + " should carry " + q + ", has " + QualityFlag.names(f.get(0)));
            }
            // the job's own flags only where the case asks for them: no missing id is a duplicate, no real id missing
            for (QualityFlag q : List.of(QualityFlag.DUPLICATE_ID, QualityFlag.ID_MISSING)) {
                if (!List.of(e.getValue().expect).contains(q)) {
                    assertFalse(q.isSet(f.get(0)), e.getValue().name + " should not carry " + q);
                }
            }
        }
        // a bad value that is ignored leaves no trace in any derived value: each equals the one of the same row
        // without that value (only the flags differ, by design)
        List<String> derived = new ArrayList<>(DerivedSchema.names());
        derived.removeAll(List.of("flags", "flag_names"));
        Map<String, Row> derivedById = new HashMap<>();
        for (Row row : spark.read().parquet(out.toString()).select("star_id", derived.toArray(new String[0])).collectAsList()) {
            derivedById.put(row.getString(0), row);
        }
        int compared = 0;
        for (Map.Entry<String, Case> e : byId.entrySet()) {
            if (e.getValue().without == null) {
                continue;
            }
            Row bad = derivedById.get(e.getKey());
            Row without = derivedById.get(String.valueOf(WITHOUT_ID_OFFSET + Long.parseLong(e.getKey())));
            for (int i = 0; i < derived.size(); i++) {
                assertEquals(without.get(i + 1), bad.get(i + 1), e.getValue().name + ": " + derived.get(i)
                        + " differs from the row without the bad value, so the bad value was used");
            }
            compared++;
        }
        assertEquals(21, compared, "cases checked against the row without their bad value");
        // the duplicated id: the reference row and its copy, both kept, both flagged
        assertEquals(2, flagsById.get("1").size());
        for (long f : flagsById.get("1")) {
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
