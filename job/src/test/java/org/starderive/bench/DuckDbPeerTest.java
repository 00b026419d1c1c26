package org.starderive.bench;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.job.Main;
import org.starderive.testing.SharedSpark;

/**
 * The benchmark's peer writes what derive writes: for both column sets the peer's Parquet files have exactly the
 * column names, order and Parquet types of a derive run's files on the same input (the reference is derive's own
 * output, read — like the peer's — by DuckDB's {@code parquet_schema} as an independent reader), and both are
 * partitioned by {@code tile} into the same folders with the same number of rows.
 */
class DuckDbPeerTest {
    @TempDir
    Path tmp;

    /** The session derive runs in (in-process, as the other job tests run the command line). */
    private final SparkSession spark = SharedSpark.spark();

    @Test
    void peerWritesDerivesColumnsAndTypes() throws Exception {
        Path in = tmp.resolve("stars");
        writeInput(in, 240);
        String config = Path.of("..", "sample-survey", "config", "kestrel.yaml").toAbsolutePath().normalize().toString();
        for (String set : List.of("all", "core")) {
            Path derived = tmp.resolve("derived-" + set);
            Path peer = tmp.resolve("peer-" + set);
            assertEquals(0, Main.execute("derive", "--input", in.toString(), "--config", config,
                    "--output", derived.toString(), "--columns", set), "derive --columns " + set);
            DuckDbPeer.run(in.toString(), peer.toString(), 1, set);

            List<String> derivedSchema = fileSchema(derived);
            List<String> peerSchema = fileSchema(peer);
            // the layout itself: star_id and the derived columns of the set (tile is the folder, not a column)
            List<String> names = new ArrayList<>(List.of("star_id"));
            DuckDbPeer.derivedColumns(set).forEach(c -> names.add(c.name()));
            assertEquals(names, derivedSchema.stream().map(s -> s.split(" ")[0]).filter(n -> !n.contains("."))
                    .collect(Collectors.toList()), "derive --columns " + set + " top-level columns");
            assertEquals(derivedSchema, peerSchema, "Parquet schema: peer " + set + " vs derive --columns " + set);
            assertEquals(readTypes(derived), readTypes(peer), "types read back by DuckDB: peer " + set + " vs derive --columns " + set);
            assertEquals(partitions(derived), partitions(peer), "tile partitions, " + set);
            assertEquals(rows(derived), rows(peer), "rows, " + set);
        }
        // the float/double split is the one DerivedSchema asks for (read from derive's output above)
        assertTrue(fileSchema(tmp.resolve("derived-all")).contains("parallax_corr_mas DOUBLE -"));
        assertTrue(fileSchema(tmp.resolve("derived-all")).contains("teff_k FLOAT -"));
    }

    /**
     * A small catalogue in the canonical schema of the benchmark's Kestrel survey (every band with its error,
     * parallax, E(B-V), [Fe/H]), written by DuckDB, partitioned by tile: solar-like stars from 10 pc outwards, some
     * without E(B-V) or [Fe/H], some without a parallax or with a negative one, so that nulls occur in the output.
     */
    private static void writeInput(Path dir, int n) throws Exception {
        StringBuilder sel = new StringBuilder("SELECT i::BIGINT AS star_id, (i % 3)::INTEGER AS tile,"
                + " CASE WHEN i % 11 = 5 THEN NULL WHEN i % 13 = 7 THEN -0.3 ELSE 1000.0 / (10 + 4 * i) END AS parallax_mas,"
                + " 0.02 + 0.0001 * i AS parallax_err_mas,"
                + " CASE WHEN i % 4 = 0 THEN NULL ELSE 0.01 * (i % 4) END AS ebv, 0.01 AS ebv_err,"
                + " CASE WHEN i % 2 = 0 THEN NULL ELSE -0.2 END AS feh, 0.1 AS feh_err");
        // a G2V-like star's absolute magnitudes (B V Rc Ic J H Ks G BP RP), shifted by distance and a colour term
        double[] abs = {5.47, 4.81, 4.45, 4.11, 3.67, 3.32, 3.27, 4.67, 4.99, 4.18};
        org.starderive.physics.Band[] bands = org.starderive.physics.Band.values();
        for (int k = 0; k < bands.length; k++) {
            String m = "mag_" + bands[k].suffix();
            sel.append(", ").append(abs[k]).append(" + 5 * log10((10 + 4 * i) / 10.0) + 0.3 * ").append(k)
                    .append(" * (i % 5) / 4.0 AS ").append(m).append(", 0.01 + 0.001 * (i % 7) AS ").append(m).append("_err");
        }
        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement()) {
            st.execute("COPY (" + sel + " FROM range(" + n + ") t(i)) TO '" + dir
                    + "' (FORMAT PARQUET, PARTITION_BY (tile), COMPRESSION snappy)");
        }
    }

    /**
     * Each column of one data file as "path physical-type logical-type": nested list levels appear as
     * "flag_names.element". Repetition (required/optional) is left out: Spark writes non-null list elements as
     * required, DuckDB as optional, which costs the same bytes when there are no nulls.
     */
    private static List<String> fileSchema(Path dir) throws Exception {
        Path file;
        try (Stream<Path> s = Files.walk(dir)) {
            file = s.filter(p -> p.toString().endsWith(".parquet")).sorted().findFirst().orElseThrow();
        }
        List<String> out = new ArrayList<>();
        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement();
             ResultSet rs = st.executeQuery("SELECT name, type, converted_type, logical_type, num_children FROM parquet_schema('"
                     + file + "')")) {
            List<String[]> all = new ArrayList<>();
            while (rs.next()) {
                all.add(new String[] {rs.getString(1), rs.getString(2), rs.getString(3), rs.getString(4), rs.getString(5)});
            }
            // depth-first: the root, then top-level fields; a LIST group is followed by its repeated group and element
            for (int i = 1; i < all.size(); i++) {
                String[] r = all.get(i);
                if (r[4] != null && !r[4].equals("0")) { // a group: LIST -> repeated "list" -> "element"
                    out.add(r[0] + " " + r[2]);
                    out.add(r[0] + ".element " + all.get(i + 2)[1] + " " + logical(all.get(i + 2)));
                    i += 2;
                } else {
                    out.add(r[0] + " " + r[1] + " " + logical(r));
                }
            }
        }
        return out;
    }

    /** Each column as DuckDB reads it back (name and SQL type), over the whole partitioned output. */
    private static List<String> readTypes(Path dir) throws Exception {
        List<String> out = new ArrayList<>();
        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement();
             ResultSet rs = st.executeQuery("DESCRIBE SELECT * FROM read_parquet('" + dir + "/**/*.parquet', hive_partitioning = true)")) {
            while (rs.next()) {
                out.add(rs.getString(1) + " " + rs.getString(2));
            }
        }
        return out;
    }

    /** The converted type; INT_64 on INT64 (DuckDB writes it, Spark leaves it out) is the default and dropped. */
    private static String logical(String[] r) {
        if (r[2] == null || (r[1].equals("INT64") && r[2].equals("INT_64"))) {
            return "-";
        }
        return r[2];
    }

    private static List<String> partitions(Path dir) throws Exception {
        try (Stream<Path> s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString()).filter(n -> n.startsWith("tile=")).sorted().collect(Collectors.toList());
        }
    }

    private static long rows(Path dir) throws Exception {
        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement();
             ResultSet rs = st.executeQuery("SELECT count(*) FROM read_parquet('" + dir + "/**/*.parquet')")) {
            rs.next();
            return rs.getLong(1);
        }
    }
}
