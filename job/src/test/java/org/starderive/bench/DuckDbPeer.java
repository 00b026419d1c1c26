package org.starderive.bench;

import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;
import org.starderive.physics.Band;
import org.starderive.physics.CardelliClaytonMathis1989;
import org.starderive.physics.GaiaBandExtinction;
import org.starderive.physics.Iau2015;
import org.starderive.physics.QualityFlag;
import org.starderive.udf.DerivedColumn;
import org.starderive.udf.DerivedSchema;

/**
 * The hand-written peer of a derive run, for benchmarks only: DuckDB (JDBC, 2 threads by default) executing one SQL
 * statement from the same input Parquet to Parquet partitioned by {@code tile} with snappy — writing the <b>same
 * columns, names, order and Parquet types</b> as derive's default output (layout {@code derived}, 32-bit floats):
 * <ul>
 *   <li>{@code all}: {@code star_id}, every {@link DerivedSchema#COLUMNS} entry in that order, {@code tile} as the
 *       partition column;</li>
 *   <li>{@code core}: {@code star_id}, the {@link DerivedSchema#CORE} columns in {@code COLUMNS} order, {@code tile}.</li>
 * </ul>
 * The column list and each column's stored type (FLOAT where {@link DerivedSchema#float32Reason} is non-null,
 * DOUBLE for {@link DerivedSchema#KEEP_DOUBLE}, BIGINT, VARCHAR, VARCHAR[]) are read from {@link DerivedSchema} at
 * run time, so the peer follows a change of the layout; a new derived column without an expression here fails the
 * peer with its name rather than being skipped.
 *
 * <p><b>Real physics</b> (the core chain, coefficients as cited): the zero-point-corrected parallax
 * ({@code parallax_corr_mas}, zero point −0.02 mas) and inverse-parallax distance ({@code dist_pc},
 * {@code dist_mod_mag}); {@code ebv_used_mag} and {@code av_mag} (R_V = 3.1, no per-star E(B−V) → 0); the
 * extinction-corrected {@code abs_mag_v}; the Casagrande et al. 2010 (V−Ks) colour–Teff relation at [Fe/H] = 0
 * ({@code teff_k}, A_Ks/A_V = 0.1157 from CCM89 at 2.159 µm) with its error propagated from the V and Ks errors plus
 * the relation's 25 K scatter and 15 K zero point ({@code teff_err_k}); the Flower 1996 BC_V with the Torres 2010
 * coefficients ({@code bc_v}); {@code mbol} on the IAU 2015 B2 scale (M_bol,sun = 4.74; BC zero point 4.731 on
 * the Flower scale) and {@code lum_lsun}, {@code lum_w} (IAU 2015 B3 L_sun); the Stefan–Boltzmann
 * {@code radius_rsun}; the errors of mbol, L and R propagated to first order; the geometric angular diameter
 * {@code ang_diam_mas} = 2R/d with its error; the Kervella et al. 2004 surface-brightness
 * {@code ang_diam_sbr_mas}; the distance-modulus error; and the {@code flags} bits the chain can decide
 * (PARALLAX_LOW_SNR, _NONPOSITIVE, _MISSING, PHOTOMETRY_MISSING, COLOUR_OUT_OF_RANGE, EXTINCTION_ASSUMED,
 * METALLICITY_ASSUMED, MASS_NOT_APPLICABLE).
 *
 * <p><b>Stand-ins of equal write cost</b> (same type, computed from values the peer has, cheap arithmetic; not the
 * physics derive uses): {@code dist_lo_pc}/{@code dist_hi_pc} (1000/(ϖ ± σ_ϖ)); {@code dist_method} (a CASE);
 * {@code abs_mag_<band>} of the other bands (the band's magnitude minus the distance modulus and A_V times CCM89
 * A_band/A_V, or the Casagrande et al. 2021 R/R_V at (BP−RP)₀ = 1 for G, BP, RP) and every {@code abs_mag_*_err}
 * (magnitude error and distance-modulus error in quadrature); {@code lum_class} (R &gt; 3 R_sun → evolved) and
 * {@code regime} (CASE on Teff and class); {@code teff_from} (the one relation's id); {@code teff_chi2} (the squared
 * reddening correction of V−Ks in units of its error); {@code bc_v_err} (a typical slope of 5 mag per unit
 * σ_T/T); {@code mass_msun} and its error (L ∝ M⁴ on the main sequence); {@code density_kg_m3},
 * {@code density_rho_sun}, {@code logg_cgs} and their errors (from that mass and R); {@code flag_names} (the names
 * of the set bits, a DuckDB list of strings built from {@link QualityFlag}).
 *
 * <p>Usage: {@code DuckDbPeer INPUT_DIR OUTPUT_DIR [THREADS=2] [all|core]} (default {@code all}, derive's default).
 * The input needs {@code star_id}, {@code tile}, {@code parallax_mas}, {@code parallax_err_mas}, {@code mag_v},
 * {@code mag_ks} and their errors; every other input column may be missing (then null).
 */
public final class DuckDbPeer {
    private DuckDbPeer() {}

    /** Parallax zero point of the Kestrel survey config (kestrel.yaml): corrected = ϖ − (−0.02 mas). */
    static final double ZERO_POINT_MAS = -0.02;
    /** CCM89 A_Ks/A_V at 2.159 µm (0.1168/1.0096), the value the original peer used. */
    static final double AKS_AV = 0.1157;
    static final double RV = 3.1;

    /** The columns written, in order, without the partition column: star_id, then the derived columns of the set. */
    static List<DerivedColumn> derivedColumns(String columnSet) {
        boolean core;
        switch (columnSet) {
            case "all": core = false; break;
            case "core": core = true; break;
            default: throw new IllegalArgumentException("Unknown column set: '" + columnSet + "' (must be all or core)");
        }
        List<DerivedColumn> out = new ArrayList<>();
        for (DerivedColumn c : DerivedSchema.COLUMNS) {
            if (!core || DerivedSchema.CORE.contains(c.name())) {
                out.add(c);
            }
        }
        return out;
    }

    /** The DuckDB type a derived column is stored with in derive's default output. */
    static String storedType(DerivedColumn c) {
        switch (c.sqlType()) {
            case "double": return DerivedSchema.float32Reason(c) != null ? "FLOAT" : "DOUBLE";
            case "bigint": return "BIGINT";
            case "string": return "VARCHAR";
            case "array<string>": return "VARCHAR[]";
            default: throw new IllegalStateException("No DuckDB type for " + c.name() + " of type " + c.sqlType());
        }
    }

    /**
     * Every derived value in 64 bits (or its final type for text, lists and flags), in dependency order; names
     * starting {@code _p_} are intermediates. DuckDB resolves the later expressions' references to earlier aliases
     * (lateral column aliases).
     */
    static Map<String, String> expressions(Set<String> inputColumns) {
        java.util.function.Function<String, String> in = n -> inputColumns.contains(n) ? n : "CAST(NULL AS DOUBLE)";
        Map<String, String> e = new LinkedHashMap<>();
        // distance: zero-point-corrected inverse parallax
        e.put("_p_plx", "parallax_mas - (" + ZERO_POINT_MAS + ")");
        e.put("parallax_corr_mas", "_p_plx");
        e.put("dist_pc", "CASE WHEN _p_plx > 0 THEN 1000.0 / _p_plx END");
        e.put("dist_lo_pc", "CASE WHEN _p_plx > 0 THEN 1000.0 / (_p_plx + parallax_err_mas) END");
        e.put("dist_hi_pc", "CASE WHEN _p_plx > parallax_err_mas THEN 1000.0 / (_p_plx - parallax_err_mas) END");
        e.put("dist_method", "CASE WHEN dist_pc IS NOT NULL THEN 'inverse_parallax' END");
        e.put("dist_mod_mag", "5 * log10(dist_pc / 10)");
        e.put("dist_mod_err_mag", "CASE WHEN dist_pc IS NOT NULL THEN " + (5 / Math.log(10)) + " * parallax_err_mas / _p_plx END");
        e.put("ebv_used_mag", "coalesce(" + in.apply("ebv") + ", 0)");
        e.put("av_mag", "ebv_used_mag * " + RV);
        // absolute magnitudes: V is the chain's; the other bands are stand-ins of the same form
        for (Band b : Band.values()) {
            String mag = in.apply("mag_" + b.suffix());
            String err = in.apply("mag_" + b.suffix() + "_err");
            double k = b.isGaiaLike() ? GaiaBandExtinction.r(b, 1.0) / RV : CardelliClaytonMathis1989.bandOverAv(b, RV);
            if (b == Band.V) {
                k = 1.0;
            }
            e.put("abs_mag_" + b.suffix(), mag + " - dist_mod_mag - av_mag * " + k);
            e.put("abs_mag_" + b.suffix() + "_err", "sqrt(" + err + " * " + err + " + dist_mod_err_mag * dist_mod_err_mag)");
        }
        // Teff: Casagrande et al. 2010 Table 4, V-Ks, [Fe/H] = 0: theta = a0 + a1 X + a2 X^2, scatter 25 K, zero point 15 K
        e.put("_p_vks0", "(mag_v - mag_ks) - av_mag * (1 - " + AKS_AV + ")");
        e.put("_p_sig_c", "sqrt(mag_v_err * mag_v_err + mag_ks_err * mag_ks_err)");
        e.put("teff_k", "CASE WHEN _p_vks0 BETWEEN 0.78 AND 3.15 THEN 5040.0 / (0.5057 + 0.2600 * _p_vks0 - 0.0146 * _p_vks0 * _p_vks0) END");
        e.put("teff_err_k", "sqrt(25.0 * 25.0 + 15.0 * 15.0 + pow(teff_k * teff_k / 5040.0 * (0.2600 - 2 * 0.0146 * _p_vks0) * _p_sig_c, 2))");
        e.put("teff_from", "CASE WHEN teff_k IS NOT NULL THEN 'C10/V-Ks' END");
        e.put("teff_chi2", "CASE WHEN teff_k IS NOT NULL THEN pow(av_mag * (1 - " + AKS_AV + ") / _p_sig_c, 2) END");
        // BC_V: Flower 1996 with Torres 2010 coefficients
        e.put("_p_lt", "log10(teff_k)");
        e.put("bc_v", "CASE WHEN _p_lt < 3.70 THEN -0.190537291496456e5 + _p_lt * (0.155144866764412e5 + _p_lt * (-0.421278819301717e4 + _p_lt * 0.381476328422343e3))"
                + " WHEN _p_lt <= 3.90 THEN -0.370510203809015e5 + _p_lt * (0.385672629965804e5 + _p_lt * (-0.150651486316025e5 + _p_lt * (0.261724637119416e4 + _p_lt * -0.170623810323864e3)))"
                + " ELSE -0.118115450538963e6 + _p_lt * (0.137145973583929e6 + _p_lt * (-0.636233812100225e5 + _p_lt * (0.147412923562646e5 + _p_lt * (-0.170587278406872e4 + _p_lt * 0.788731721804990e2)))) END");
        e.put("bc_v_err", "5.0 * teff_err_k / teff_k");
        // M_bol on the IAU 2015 B2 scale (4.74) from a BC whose zero point is M_bol,sun = 4.731 on the Flower scale
        e.put("mbol", "abs_mag_v + bc_v + (4.74 - 4.731)");
        e.put("mbol_err", "sqrt(mag_v_err * mag_v_err + dist_mod_err_mag * dist_mod_err_mag + bc_v_err * bc_v_err)");
        e.put("lum_lsun", "pow(10, -0.4 * (mbol - 4.74))");
        e.put("lum_err_lsun", "lum_lsun * " + (0.4 * Math.log(10)) + " * mbol_err");
        e.put("lum_w", "lum_lsun * " + Iau2015.L_SUN_W);
        e.put("radius_rsun", "sqrt(lum_lsun) * pow(" + Iau2015.TEFF_SUN_K + " / teff_k, 2)");
        e.put("radius_err_rsun", "radius_rsun * sqrt(pow(0.5 * lum_err_lsun / lum_lsun, 2) + pow(2 * teff_err_k / teff_k, 2))");
        e.put("lum_class", "CASE WHEN radius_rsun IS NULL THEN NULL WHEN radius_rsun > 3 THEN 'evolved' ELSE 'main_sequence' END");
        e.put("regime", "CASE WHEN teff_k IS NULL THEN NULL WHEN lum_class = 'evolved' THEN 'giant' WHEN teff_k < 4000 THEN 'm_dwarf' ELSE 'fgk_dwarf' END");
        e.put("mass_msun", "CASE WHEN lum_class = 'main_sequence' THEN pow(lum_lsun, 0.25) END");
        e.put("mass_err_msun", "0.25 * mass_msun * lum_err_lsun / lum_lsun");
        double rhoSun = Iau2015.GM_SUN_M3_S2 / 6.67430e-11 / (4.0 / 3 * Math.PI * Math.pow(Iau2015.R_SUN_M, 3));
        double loggSun = Math.log10(Iau2015.GM_SUN_M3_S2 / (Iau2015.R_SUN_M * Iau2015.R_SUN_M) * 100);
        e.put("density_rho_sun", "mass_msun / pow(radius_rsun, 3)");
        e.put("density_kg_m3", "density_rho_sun * " + rhoSun);
        e.put("density_err_kg_m3", "density_kg_m3 * sqrt(pow(mass_err_msun / mass_msun, 2) + pow(3 * radius_err_rsun / radius_rsun, 2))");
        e.put("logg_cgs", loggSun + " + log10(mass_msun) - 2 * log10(radius_rsun)");
        e.put("logg_err_cgs", (1 / Math.log(10)) + " * sqrt(pow(mass_err_msun / mass_msun, 2) + pow(2 * radius_err_rsun / radius_rsun, 2))");
        // angular diameter 2R/d in mas: 2 R_sun / 1 pc = 2 * 6.957e8 / 3.0856775814913673e16 rad
        double mas = 2 * Iau2015.R_SUN_M / 3.0856775814913673e16 * (180 / Math.PI * 3600e3);
        e.put("ang_diam_mas", "radius_rsun / dist_pc * " + mas);
        e.put("ang_diam_err_mas", "ang_diam_mas * sqrt(pow(radius_err_rsun / radius_rsun, 2) + pow(parallax_err_mas / _p_plx, 2))");
        // Kervella et al. 2004: log10 theta = 0.0755 (V-K)0 + 0.5170 - 0.2 K0, (V-K)0 in -0.1 .. 4.1, main sequence
        e.put("ang_diam_sbr_mas", "CASE WHEN lum_class = 'main_sequence' AND _p_vks0 BETWEEN -0.1 AND 4.1"
                + " THEN pow(10, 0.0755 * _p_vks0 + 0.5170 - 0.2 * (mag_ks - " + AKS_AV + " * av_mag)) END");
        e.put("flags", "CAST((CASE WHEN parallax_mas IS NULL THEN " + QualityFlag.PARALLAX_MISSING.mask() + " ELSE 0 END)"
                + " | (CASE WHEN _p_plx / parallax_err_mas < 5 THEN " + QualityFlag.PARALLAX_LOW_SNR.mask() + " ELSE 0 END)"
                + " | (CASE WHEN _p_plx <= 0 THEN " + QualityFlag.PARALLAX_NONPOSITIVE.mask() + " ELSE 0 END)"
                + " | (CASE WHEN mag_v IS NULL OR mag_ks IS NULL THEN " + QualityFlag.PHOTOMETRY_MISSING.mask() + " ELSE 0 END)"
                + " | (CASE WHEN teff_k IS NULL AND _p_vks0 IS NOT NULL THEN " + QualityFlag.COLOUR_OUT_OF_RANGE.mask() + " ELSE 0 END)"
                + " | (CASE WHEN " + in.apply("ebv") + " IS NULL THEN " + QualityFlag.EXTINCTION_ASSUMED.mask() + " ELSE 0 END)"
                + " | (CASE WHEN " + in.apply("feh") + " IS NULL THEN " + QualityFlag.METALLICITY_ASSUMED.mask() + " ELSE 0 END)"
                + " | (CASE WHEN mass_msun IS NULL THEN " + QualityFlag.MASS_NOT_APPLICABLE.mask() + " ELSE 0 END) AS BIGINT)");
        StringBuilder names = new StringBuilder("list_filter([");
        for (QualityFlag f : QualityFlag.values()) {
            names.append(f.ordinal() == 0 ? "" : ", ")
                    .append("CASE WHEN flags & ").append(f.mask()).append(" <> 0 THEN '").append(f.name()).append("' END");
        }
        e.put("flag_names", names.append("], lambda x: x IS NOT NULL)").toString());
        return e;
    }

    /**
     * The statement: the chain over the input in stages — each stage adds the values whose references are all
     * computed by earlier stages, so every value is computed once and referenced as a column (DuckDB substitutes a
     * lateral alias's whole expression at each use, which multiplies both planning and execution work down a chain
     * this long) — then the derived columns of the set in their stored types.
     */
    static String sql(String in, String out, String columnSet, Set<String> inputColumns) {
        Map<String, String> e = expressions(inputColumns);
        Map<String, Integer> stage = new LinkedHashMap<>();
        java.util.regex.Pattern ident = java.util.regex.Pattern.compile("\\b[a-z_][a-z0-9_]*\\b");
        int stages = 0;
        for (Map.Entry<String, String> x : e.entrySet()) {
            int s = 0;
            java.util.regex.Matcher m = ident.matcher(x.getValue().replaceAll("'[^']*'", "''"));
            while (m.find()) {
                Integer ref = stage.get(m.group());
                if (ref != null) {
                    s = Math.max(s, ref + 1);
                }
            }
            stage.put(x.getKey(), s);
            stages = Math.max(stages, s + 1);
        }
        StringBuilder from = new StringBuilder("read_parquet('" + in + "/**/*.parquet', hive_partitioning = true)");
        for (int s = 0; s < stages; s++) {
            StringBuilder sel = new StringBuilder("SELECT *");
            for (Map.Entry<String, String> x : e.entrySet()) {
                if (stage.get(x.getKey()) == s) {
                    sel.append(",\n  ").append(x.getValue()).append(" AS ").append(x.getKey());
                }
            }
            from = new StringBuilder("(").append(sel).append("\nFROM ").append(from).append(")");
        }
        StringBuilder outer = new StringBuilder("SELECT star_id");
        for (DerivedColumn c : derivedColumns(columnSet)) {
            if (!e.containsKey(c.name())) {
                throw new IllegalStateException("DuckDbPeer has no expression for the derived column '" + c.name()
                        + "' (DerivedSchema changed): add one to DuckDbPeer.expressions");
            }
            outer.append(", CAST(").append(c.name()).append(" AS ").append(storedType(c)).append(") AS ").append(c.name());
        }
        outer.append(", tile FROM ").append(from);
        return "COPY (" + outer + ")\nTO '" + out + "' (FORMAT PARQUET, PARTITION_BY (tile), COMPRESSION snappy)";
    }

    static Set<String> inputColumns(Statement st, String in) throws java.sql.SQLException {
        Set<String> cols = new TreeSet<>();
        try (ResultSet rs = st.executeQuery("DESCRIBE SELECT * FROM read_parquet('" + in + "/**/*.parquet', hive_partitioning = true)")) {
            while (rs.next()) {
                cols.add(rs.getString(1));
            }
        }
        return cols;
    }

    /** Runs the peer: input Parquet directory to output directory, with DuckDB's thread count and the column set. */
    public static void run(String in, String out, int threads, String columnSet) throws java.sql.SQLException {
        try (Connection c = DriverManager.getConnection("jdbc:duckdb:"); Statement st = c.createStatement()) {
            st.execute("SET threads = " + threads);
            st.execute(sql(in, out, columnSet, inputColumns(st, in)));
        }
    }

    public static void main(String[] args) throws Exception {
        int threads = args.length > 2 ? Integer.parseInt(args[2]) : 2;
        String columnSet = args.length > 3 ? args[3] : "all";
        long t0 = System.nanoTime();
        run(args[0], args[1], threads, columnSet);
        System.out.printf("duckdb peer (%s): %.1f s%n", columnSet, (System.nanoTime() - t0) / 1e9);
    }
}
