package org.starderive.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.testing.SharedSpark;

/**
 * Row conservation at scale, checked by an independent reader: 10^7 rows (with repeated ids) through the real job,
 * then DuckDB compares the multiset of ids of the input and the output — not the job's own counters.
 */
class ScaleConservationIT {
    @TempDir
    Path tmp;

    static final long ROWS = 10_000_000L;

    @Test
    void tenMillionRowsInTenMillionRowsOutEveryIdAsOftenAsItCameIn() throws Exception {
        SparkSession spark = SharedSpark.spark();
        Path in = tmp.resolve("in");
        // narrow synthetic table: every 1000th id repeated; parallaxes and two bands from the row number (test data)
        spark.range(0, ROWS, 1, 16).selectExpr(
                "CASE WHEN id % 1000 = 7 THEN id - 1 ELSE id END AS star_id",
                "CAST(id % 8 AS INT) AS tile",
                "0.2 + (id % 997) / 50.0 AS parallax_mas",
                "0.02 + (id % 13) / 100.0 AS parallax_err_mas",
                "8.0 + (id % 1009) / 100.0 AS mag_v", "0.01 AS mag_v_err",
                "6.2 + (id % 1009) / 100.0 + (id % 7) / 10.0 AS mag_ks", "0.02 AS mag_ks_err")
                .write().partitionBy("tile").parquet(in.toString());
        Path out = tmp.resolve("out");
        assertEquals(0, Main.execute("derive", "--input", in.toString(), "--output", out.toString()));

        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement()) {
            st.execute("SET threads = 2");
            String src = "read_parquet('" + in + "/**/*.parquet')";
            String dst = "read_parquet('" + out + "/**/*.parquet')";
            ResultSet rs = st.executeQuery("SELECT (SELECT count(*) FROM " + src + "), (SELECT count(*) FROM " + dst + ")");
            rs.next();
            assertEquals(ROWS, rs.getLong(1));
            assertEquals(ROWS, rs.getLong(2));
            rs = st.executeQuery("SELECT count(*) FROM (SELECT star_id, count(*) n FROM " + src + " GROUP BY 1) a "
                    + "FULL OUTER JOIN (SELECT star_id, count(*) n FROM " + dst + " GROUP BY 1) b USING (star_id) "
                    + "WHERE a.n IS DISTINCT FROM b.n");
            rs.next();
            assertEquals(0, rs.getLong(1), "ids whose count differs between input and output");
            rs = st.executeQuery("SELECT count(*) FROM " + dst + " WHERE flags & " + org.starderive.physics.QualityFlag.DUPLICATE_ID.mask() + " <> 0");
            rs.next();
            assertEquals(2 * (ROWS / 1000), rs.getLong(1), "both copies of every repeated id flagged");
            rs = st.executeQuery("SELECT count(*) FROM " + dst + " WHERE teff_k IS NOT NULL");
            rs.next();
            assertTrue(rs.getLong(1) > ROWS / 10, "the physics ran: " + rs.getLong(1));
        }
    }
}
