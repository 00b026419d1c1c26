package org.starderive.report;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.expr;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.starderive.job.JobException;
import org.starderive.physics.QualityFlag;

/**
 * Injection–recovery: a derived catalogue of the synthetic survey against its truth table. Bias (median of
 * derived/true − 1) and scatter (half the 16–84 % range of that ratio) of distance, Teff, L, R and mass per bin of
 * the true parallax significance and per true class; coverage of the 68 % intervals (fraction of stars whose
 * truth lies inside); how often each flag fires and whether flagged stars are the badly recovered ones.
 * Bins use the <em>true</em> parallax over its error: selecting on the observed parallax would itself bias
 * distances (truncation). All figures are Spark aggregates.
 */
public final class RecoveryReport {
    private RecoveryReport() {}

    static final double[] SNR_EDGES = {0, 1, 3, 5, 10, 20, Double.POSITIVE_INFINITY};
    static final String[] SNR_LABELS = {"<1", "1-3", "3-5", "5-10", "10-20", ">20"};
    static final String[] QUANTITIES = {"dist", "teff", "lum", "radius", "mass"};
    /**
     * Rows whose colours were all usable, whose inputs were valid and whose L does not rest on a bolometric correction
     * flagged as unreliable (an M dwarf without Ks): the "in-range" subset.
     */
    static final long NOT_CLEAN = QualityFlag.COLOUR_OUT_OF_RANGE.mask() | QualityFlag.TEFF_EXTRAPOLATED.mask()
            | QualityFlag.INPUT_INVALID.mask() | QualityFlag.MAGNITUDE_SENTINEL.mask() | QualityFlag.BC_UNRELIABLE.mask();

    /** Statistics of one quantity in one group. */
    public static final class Stat {
        public long n;
        public double bias;
        public double scatter;
        public double coverage;
    }

    /** The numbers of the report (tests read them). */
    public static final class Result {
        public long stars;
        /** Headline: true ϖ/σ &gt; 10 and in-range colours. */
        public Map<String, Stat> clean = new LinkedHashMap<>();
        public Map<String, Map<String, Stat>> bySnr = new LinkedHashMap<>();
        public Map<String, Map<String, Stat>> byClass = new LinkedHashMap<>();
        /** True ϖ/σ &gt; 10 and in-range colours, per calibration regime of the truth (empty for an older truth table). */
        public Map<String, Map<String, Stat>> byRegime = new LinkedHashMap<>();
        /** Who gets parameters: per group of the truth, stars / with Teff / with L and R / with mass / median Teff bias. */
        public Map<String, double[]> reach = new LinkedHashMap<>();
        /** Share of main-sequence stars of 2800–30,000 K with true ϖ/σ &gt; 10 that get Teff, L, R and mass. */
        public double msReachShare = Double.NaN;
        /** Lowest true-S/N bin that has distances, and its statistics. */
        public String lowestBin;
        public Map<String, Stat> lowest = new LinkedHashMap<>();
        public Map<String, double[]> flags = new LinkedHashMap<>();
        public List<String> files = new ArrayList<>();
    }

    private static String err(String q) {
        switch (q) {
            case "dist": return null;
            case "teff": return "teff_err_k";
            case "lum": return "lum_err_lsun";
            case "radius": return "radius_err_rsun";
            default: return "mass_err_msun";
        }
    }

    private static String derived(String q) {
        switch (q) {
            case "dist": return "dist_pc";
            case "teff": return "teff_k";
            case "lum": return "lum_lsun";
            case "radius": return "radius_rsun";
            default: return "mass_msun";
        }
    }

    private static String truth(String q) {
        switch (q) {
            case "dist": return "true_dist_pc";
            case "teff": return "true_teff_k";
            case "lum": return "true_lum_lsun";
            case "radius": return "true_radius_rsun";
            default: return "true_mass_msun";
        }
    }

    /** Aggregates for one quantity: n, quantiles of the ratio, covered count. */
    private static List<Column> aggs(String q) {
        String ratio = derived(q) + " / " + truth(q) + " - 1";
        String covered = q.equals("dist")
                ? "true_dist_pc BETWEEN dist_lo_pc AND dist_hi_pc"
                : "abs(" + derived(q) + " - " + truth(q) + ") <= " + err(q);
        List<Column> a = new ArrayList<>();
        a.add(expr("count(" + derived(q) + ")").as(q + "_n"));
        a.add(expr("percentile_approx(" + ratio + ", array(0.16, 0.5, 0.84), 10000)").as(q + "_q"));
        a.add(expr("sum(CASE WHEN " + derived(q) + " IS NOT NULL AND (" + covered + ") THEN 1 ELSE 0 END)").as(q + "_cov"));
        return a;
    }

    private static Map<String, Stat> stats(Row r) {
        Map<String, Stat> m = new LinkedHashMap<>();
        for (String q : QUANTITIES) {
            Stat s = new Stat();
            s.n = r.getLong(r.fieldIndex(q + "_n"));
            if (s.n > 0) {
                List<Double> qs = r.getList(r.fieldIndex(q + "_q"));
                s.bias = qs.get(1);
                s.scatter = (qs.get(2) - qs.get(0)) / 2;
                s.coverage = (double) r.getLong(r.fieldIndex(q + "_cov")) / s.n;
            } else {
                s.bias = s.scatter = s.coverage = Double.NaN;
            }
            m.put(q, s);
        }
        return m;
    }

    private static Column[] allAggs() {
        List<Column> a = new ArrayList<>();
        for (String q : QUANTITIES) {
            a.addAll(aggs(q));
        }
        return a.toArray(new Column[0]);
    }

    private static Map<String, Map<String, Stat>> grouped(Dataset<Row> j, String key) {
        Column[] a = allAggs();
        Map<String, Map<String, Stat>> out = new LinkedHashMap<>();
        for (Row r : j.groupBy(col(key)).agg(a[0], java.util.Arrays.copyOfRange(a, 1, a.length)).orderBy(col(key)).collectAsList()) {
            out.put(String.valueOf(r.get(0)), stats(r));
        }
        return out;
    }

    public static Result run(SparkSession spark, String derivedDir, String truthDir, String outDir) throws IOException {
        Dataset<Row> d = spark.read().parquet(derivedDir);
        Dataset<Row> t = spark.read().parquet(truthDir);
        for (String c : List.of("star_id", "flags", "dist_pc", "teff_k", "teff_err_k", "parallax_err_mas")) {
            if (!d.schema().getFieldIndex(c).isDefined()) {
                throw JobException.input("Derived catalogue " + derivedDir + ": missing column '" + c
                        + "' (rule: recovery reads a catalogue derived from the synthetic survey with --layout full, which keeps the observed parallax error)");
            }
        }
        if (!t.schema().getFieldIndex("true_teff_k").isDefined()) {
            throw JobException.input("Truth table " + truthDir + ": missing column 'true_teff_k' (rule: recovery reads the truth/ table of starderive sample)");
        }
        StringBuilder snrCase = new StringBuilder("CASE");
        for (int i = 0; i < SNR_LABELS.length; i++) {
            snrCase.append(" WHEN true_parallax_mas / parallax_err_mas < ").append(SNR_EDGES[i + 1] == Double.POSITIVE_INFINITY ? "1e300" : SNR_EDGES[i + 1])
                   .append(" THEN '").append(i).append(' ').append(SNR_LABELS[i]).append('\'');
        }
        snrCase.append(" ELSE 'none' END");
        Dataset<Row> j = d.join(t.drop("tile"), "star_id").withColumn("snr_bin", expr(snrCase.toString()));
        j.cache();
        try {
            Result res = new Result();
            res.stars = j.count();
            res.bySnr = grouped(j, "snr_bin");
            res.byClass = grouped(j, "true_class");
            Column[] a = allAggs();
            Dataset<Row> clean = j.filter(expr("true_parallax_mas / parallax_err_mas > 10 AND (flags & " + NOT_CLEAN + ") = 0"));
            res.clean = stats(clean.agg(a[0], java.util.Arrays.copyOfRange(a, 1, a.length)).first());
            if (t.schema().getFieldIndex("true_regime").isDefined()) {
                // subgiants apart: the job's main-sequence mass relations do not hold for them
                res.byRegime = grouped(clean.withColumn("regime_key", expr("CASE WHEN true_class = 'subgiant' THEN "
                        + "concat(true_regime, ' (subgiants)') ELSE true_regime END")), "regime_key");
            }
            reach(j, res);
            for (Map.Entry<String, Map<String, Stat>> e : res.bySnr.entrySet()) {
                if (e.getValue().get("dist").n > 0 && e.getValue().get("teff").n > 0) {
                    res.lowestBin = e.getKey();
                    res.lowest = e.getValue();
                    break;
                }
            }
            // flags: share of stars, and median |Teff error| and |distance error| with and without the flag; and the
            // median |Teff error| in units of the star's own Teff error (faint stars' noisy colours have large errors
            // but rarely disagree beyond them: in |error| alone a flag that works can look useless)
            String zTeff = "abs(teff_k - true_teff_k) / teff_err_k";
            for (QualityFlag f : QualityFlag.values()) {
                String has = "(flags & " + f.mask() + ") <> 0";
                Row r = j.agg(expr("avg(CASE WHEN " + has + " THEN 1.0 ELSE 0.0 END)"),
                        expr("percentile_approx(CASE WHEN " + has + " THEN abs(teff_k / true_teff_k - 1) END, 0.5, 10000)"),
                        expr("percentile_approx(CASE WHEN NOT " + has + " THEN abs(teff_k / true_teff_k - 1) END, 0.5, 10000)"),
                        expr("percentile_approx(CASE WHEN " + has + " THEN abs(dist_pc / true_dist_pc - 1) END, 0.5, 10000)"),
                        expr("percentile_approx(CASE WHEN NOT " + has + " THEN abs(dist_pc / true_dist_pc - 1) END, 0.5, 10000)"),
                        expr("percentile_approx(CASE WHEN " + has + " THEN " + zTeff + " END, 0.5, 10000)"),
                        expr("percentile_approx(CASE WHEN NOT " + has + " THEN " + zTeff + " END, 0.5, 10000)")).first();
                double[] v = new double[7];
                for (int i = 0; i < 7; i++) {
                    v[i] = r.isNullAt(i) ? Double.NaN : ((Number) r.get(i)).doubleValue();
                }
                res.flags.put(f.name(), v);
            }
            write(res, derivedDir, truthDir, Path.of(outDir));
            return res;
        } finally {
            j.unpersist();
        }
    }

    /** Groups of the truth for the "who gets parameters" table (a star can be in more than one). */
    static final String[][] REACH_GROUPS = {
            {"main sequence < 3900 K", "true_class = 'ms' AND true_teff_k < 3900"},
            {"main sequence 3900-7000 K", "true_class = 'ms' AND true_teff_k >= 3900 AND true_teff_k < 7000"},
            {"main sequence 7000-10,000 K", "true_class = 'ms' AND true_teff_k >= 7000 AND true_teff_k < 10000"},
            {"main sequence > 10,000 K", "true_class = 'ms' AND true_teff_k >= 10000"},
            {"M dwarfs (ms < 3900 K) with true parallax/error > 10", "true_class = 'ms' AND true_teff_k < 3900 AND true_parallax_mas / parallax_err_mas > 10"},
            {"main sequence 2800-30,000 K with true parallax/error > 10", "true_class = 'ms' AND true_teff_k >= 2800 AND true_teff_k <= 30000 AND true_parallax_mas / parallax_err_mas > 10"},
            {"giants and subgiants", "true_class <> 'ms'"}};

    private static void reach(Dataset<Row> j, Result res) {
        List<Column> a = new ArrayList<>();
        for (String[] g : REACH_GROUPS) {
            String in = "(" + g[1] + ")";
            a.add(expr("sum(CASE WHEN " + in + " THEN 1 ELSE 0 END)"));
            a.add(expr("sum(CASE WHEN " + in + " AND teff_k IS NOT NULL THEN 1 ELSE 0 END)"));
            a.add(expr("sum(CASE WHEN " + in + " AND lum_lsun IS NOT NULL AND radius_rsun IS NOT NULL THEN 1 ELSE 0 END)"));
            a.add(expr("sum(CASE WHEN " + in + " AND mass_msun IS NOT NULL THEN 1 ELSE 0 END)"));
            a.add(expr("sum(CASE WHEN " + in + " AND teff_k IS NOT NULL AND lum_lsun IS NOT NULL AND radius_rsun IS NOT NULL"
                    + " AND mass_msun IS NOT NULL THEN 1 ELSE 0 END)"));
            a.add(expr("percentile_approx(CASE WHEN " + in + " THEN teff_k / true_teff_k - 1 END, 0.5, 10000)"));
        }
        Row r = j.agg(a.get(0), a.subList(1, a.size()).toArray(new Column[0])).first();
        for (int i = 0; i < REACH_GROUPS.length; i++) {
            double[] v = new double[6];
            for (int k = 0; k < 6; k++) {
                Object o = r.get(6 * i + k);
                v[k] = o == null ? Double.NaN : ((Number) o).doubleValue();
            }
            res.reach.put(REACH_GROUPS[i][0], v);
        }
        double[] ms = res.reach.get(REACH_GROUPS[5][0]);
        res.msReachShare = ms[0] == 0 ? Double.NaN : ms[4] / ms[0];
    }

    private static String pct(double v) {
        return Double.isNaN(v) ? "–" : String.format("%+.2f %%", 100 * v);
    }

    private static String ratio(double v) {
        return Double.isNaN(v) ? "–" : String.format("%.2f", v);
    }

    private static String frac(double v) {
        return Double.isNaN(v) ? "–" : String.format("%.3f", v);
    }

    private static void table(StringBuilder sb, String keyName, Map<String, Map<String, Stat>> groups) {
        sb.append("| ").append(keyName);
        for (String q : QUANTITIES) {
            sb.append(" | ").append(q).append(" n | bias | scatter | 68 % cov.");
        }
        sb.append(" |\n|---");
        for (int i = 0; i < QUANTITIES.length * 4; i++) {
            sb.append("|---");
        }
        sb.append("|\n");
        groups.forEach((k, m) -> {
            sb.append("| ").append(k);
            for (String q : QUANTITIES) {
                Stat s = m.get(q);
                sb.append(" | ").append(s.n).append(" | ").append(pct(s.bias)).append(" | ").append(pct(s.scatter).replace("+", ""))
                  .append(" | ").append(frac(s.coverage));
            }
            sb.append(" |\n");
        });
    }

    private static void write(Result res, String derivedDir, String truthDir, Path out) throws IOException {
        Files.createDirectories(out);
        Map<String, double[]> bias = new LinkedHashMap<>();
        Map<String, double[]> cov = new LinkedHashMap<>();
        List<String> bins = new ArrayList<>(res.bySnr.keySet());
        for (String q : QUANTITIES) {
            double[] b = new double[bins.size()];
            double[] c = new double[bins.size()];
            for (int i = 0; i < bins.size(); i++) {
                Stat s = res.bySnr.get(bins.get(i)).get(q);
                b[i] = s.bias;
                c[i] = s.coverage;
            }
            bias.put(q, b);
            cov.put(q, c);
        }
        String binLabel = "bin of true parallax / error: " + String.join(", ", bins);
        File fb = out.resolve("bias_vs_snr.png").toFile();
        Charts.lines(fb, "Median bias (derived / true - 1)", binLabel, "median bias", bias, 0.0);
        File fc = out.resolve("coverage_vs_snr.png").toFile();
        Charts.lines(fc, "Coverage of the 68 % intervals", binLabel, "fraction of stars covered", cov, 0.68);
        res.files.add(fb.getName());
        res.files.add(fc.getName());

        StringBuilder sb = new StringBuilder();
        sb.append("# Injection-recovery report\n\n");
        sb.append(String.format("Derived catalogue `%s` against truth `%s`: %,d stars.%n%n", derivedDir, truthDir, res.stars));
        sb.append("The synthetic photometry is made with the same published relations the job inverts, so this checks the ")
          .append("inference, the flags and the uncertainties, not the calibrations themselves (those are checked against ")
          .append("published tables in the physics tests). Bins use the true parallax over its error.\n\n");
        sb.append("## Headline: true parallax/error > 10, all colours in range, valid inputs, no unreliable BC\n\n| quantity | n | bias | scatter | 68 % coverage |\n|---|---|---|---|---|\n");
        res.clean.forEach((q, s) -> sb.append(String.format("| %s | %d | %s | %s | %s |%n", q, s.n, pct(s.bias), pct(s.scatter).replace("+", ""), frac(s.coverage))));
        sb.append("\n## By parallax significance\n\n");
        table(sb, "true parallax/error", res.bySnr);
        sb.append("\n![bias](bias_vs_snr.png)\n\n![coverage](coverage_vs_snr.png)\n\n## By true class\n\n");
        table(sb, "class", res.byClass);
        if (!res.byRegime.isEmpty()) {
            sb.append("\n## By calibration regime of the truth: true parallax/error > 10, all colours in range, valid inputs, no unreliable BC\n\n");
            table(sb, "regime", res.byRegime);
        }
        sb.append("\n## Who gets parameters\n\n| stars (truth) | n | with Teff | with L and R | with mass | with all four | median Teff bias |\n")
          .append("|---|---|---|---|---|---|---|\n");
        res.reach.forEach((k, v) -> sb.append(String.format("| %s | %,d | %,d (%.0f %%) | %,d | %,d | %,d (%.1f %%) | %s |%n", k, (long) v[0],
                (long) v[1], v[0] == 0 ? 0 : 100 * v[1] / v[0], (long) v[2], (long) v[3], (long) v[4],
                v[0] == 0 ? 0 : 100 * v[4] / v[0], pct(v[5]))));
        sb.append("\n## Flags: how often, and are the flagged stars the badly recovered ones?\n\n")
          .append("Teff error in units of the star's own Teff error (|error|/σ): a Gaussian's median is 0.67; above it, the ")
          .append("errors claim too much.\n\n")
          .append("| flag | share of stars | median abs. Teff error, flagged | not flagged | median Teff abs. error/σ, flagged | not flagged | median abs. distance error, flagged | not flagged |\n|---|---|---|---|---|---|---|---|\n");
        res.flags.forEach((f, v) -> sb.append(String.format("| `%s` | %s | %s | %s | %s | %s | %s | %s |%n", f, frac(v[0]),
                pct(v[1]).replace("+", ""), pct(v[2]).replace("+", ""), ratio(v[5]), ratio(v[6]),
                pct(v[3]).replace("+", ""), pct(v[4]).replace("+", ""))));
        String md = sb.toString();
        Files.writeString(out.resolve("index.md"), md, StandardCharsets.UTF_8);
        Files.writeString(out.resolve("index.html"), Html.fromReportMarkdown(md, "starderive recovery report"), StandardCharsets.UTF_8);
        ObjectMapper m = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);
        Files.writeString(out.resolve("recovery.json"), m.writeValueAsString(res) + "\n", StandardCharsets.UTF_8);
        res.files.add("index.md");
        res.files.add("index.html");
        res.files.add("recovery.json");
    }
}
