package org.starderive.bench;

import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.Statement;

/**
 * The hand-written peer of a derive run, for benchmarks only: DuckDB (JDBC, 2 threads) executing one SQL statement of
 * the core chain — zero-point-corrected inverse-parallax distance, extinction-corrected absolute V, the Casagrande
 * et al. 2010 (V−Ks) colour–Teff relation at [Fe/H] = 0, the Torres 2010 BC_V polynomial, L, the Stefan–Boltzmann
 * R, and a flag column — from the same input Parquet to Parquet partitioned the same way.
 * Usage: {@code DuckDbPeer INPUT_DIR OUTPUT_DIR [THREADS]}.
 */
public final class DuckDbPeer {
    private DuckDbPeer() {}

    static String sql(String in, String out) {
        // coefficients: C10 V-Ks (Table 4), Flower 1996 / Torres 2010 Table 1, CCM89 A_Ks/A_V at 2.159 um = 0.1168/1.0096,
        // M_bol,sun = 4.731 on the Flower scale (derived in BolometricCorrectionFlower1996), parallax zero point -0.02 mas
        return "COPY (SELECT *,"
                + " parallax_mas + 0.02 AS plx,"
                + " CASE WHEN plx > 0 THEN 1000.0 / plx END AS dist_pc,"
                + " 5 * log10(dist_pc / 10) AS dist_mod_mag,"
                + " coalesce(ebv, 0) * 3.1 AS av_mag,"
                + " mag_v - dist_mod_mag - av_mag AS abs_mag_v,"
                + " (mag_v - mag_ks) - av_mag * (1 - 0.1157) AS vks0,"
                + " CASE WHEN vks0 BETWEEN 0.78 AND 3.15 THEN 5040.0 / (0.5057 + 0.2600 * vks0 - 0.0146 * vks0 * vks0) END AS teff_k,"
                + " log10(teff_k) AS lt,"
                + " CASE WHEN lt < 3.70 THEN -0.190537291496456e5 + lt * (0.155144866764412e5 + lt * (-0.421278819301717e4 + lt * 0.381476328422343e3))"
                + "      WHEN lt <= 3.90 THEN -0.370510203809015e5 + lt * (0.385672629965804e5 + lt * (-0.150651486316025e5 + lt * (0.261724637119416e4 + lt * -0.170623810323864e3)))"
                + "      ELSE -0.118115450538963e6 + lt * (0.137145973583929e6 + lt * (-0.636233812100225e5 + lt * (0.147412923562646e5 + lt * (-0.170587278406872e4 + lt * 0.788731721804990e2)))) END AS bc_v,"
                + " pow(10, -0.4 * (abs_mag_v + bc_v - 4.731)) AS lum_lsun,"
                + " sqrt(lum_lsun) * pow(5772.0 / teff_k, 2) AS radius_rsun,"
                + " (CASE WHEN parallax_mas IS NULL THEN 4 ELSE 0 END)"
                + "   | (CASE WHEN plx / parallax_err_mas < 5 THEN 1 ELSE 0 END)"
                + "   | (CASE WHEN plx <= 0 THEN 2 ELSE 0 END)"
                + "   | (CASE WHEN mag_v IS NULL OR mag_ks IS NULL THEN 16 ELSE 0 END)"
                + "   | (CASE WHEN teff_k IS NULL AND vks0 IS NOT NULL THEN 128 ELSE 0 END) AS flags"
                + " FROM read_parquet('" + in + "/**/*.parquet', hive_partitioning = true))"
                + " TO '" + out + "' (FORMAT PARQUET, PARTITION_BY (tile), COMPRESSION snappy)";
    }

    public static void main(String[] args) throws Exception {
        String threads = args.length > 2 ? args[2] : "2";
        long t0 = System.nanoTime();
        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement()) {
            st.execute("SET threads = " + Integer.parseInt(threads));
            st.execute(sql(args[0], args[1]));
        }
        System.out.printf("duckdb peer: %.1f s%n", (System.nanoTime() - t0) / 1e9);
    }
}
