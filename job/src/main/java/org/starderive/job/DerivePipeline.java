package org.starderive.job;

import static org.apache.spark.sql.functions.broadcast;
import static org.apache.spark.sql.functions.coalesce;
import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.concat_ws;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.not;
import static org.apache.spark.sql.functions.row_number;
import static org.apache.spark.sql.functions.when;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.expressions.Window;
import org.apache.spark.sql.expressions.WindowSpec;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.NumericType;
import org.apache.spark.sql.types.StringType;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.Band;
import org.starderive.physics.GaiaBandExtinction;
import org.starderive.physics.QualityFlag;
import org.starderive.udf.DerivedColumn;
import org.starderive.udf.DerivedSchema;
import org.starderive.udf.StarColumns;
import org.starderive.udf.StarDeriveUdf;
import org.starderive.udf.StarMonteCarloUdf;

/**
 * The transformation from input table(s) to the derived catalogue, without I/O:
 * <ol>
 *   <li>join policy (two tables): a full outer join on the star id, copy by copy — the k-th row of an id in the
 *       astrometry table meets the k-th row of that id in the photometry table (copies ordered by their content, so
 *       the pairing is deterministic). An id present on one side only gives a row with the other side's columns
 *       null; an id repeated k times on one side and j times on the other gives max(k, j) rows. A missing id
 *       ({@link #idMissing}) matches nothing, not even another missing id: each such row comes out alone. No input
 *       row is lost or multiplied. Columns present in both tables (other than the id) are taken from the astrometry
 *       table where it has the row, else from the photometry table;</li>
 *   <li>the survey's columns are mapped to the canonical inputs (units converted) as the config says, and checked:
 *       a missing mapped column or a non-numeric one stops the job;</li>
 *   <li>ids occurring more than once are flagged {@code DUPLICATE_ID} and every copy kept; rows whose id is missing
 *       are flagged {@code ID_MISSING} (never {@code DUPLICATE_ID}) and kept;</li>
 *   <li>the UDF adds the derived columns, each with its unit/UCD/description metadata.</li>
 * </ol>
 */
public final class DerivePipeline {
    static final String DUP_COL = "__starderive_dup";
    private static final String OCC_COL = "__starderive_occ";

    private final JobConfig config;
    private final String idColumn;

    public DerivePipeline(JobConfig config, String idColumn) {
        this.config = config;
        this.idColumn = idColumn;
    }

    public String idColumn() { return idColumn; }

    private static JobException missing(String table, String column, String what) {
        return JobException.input("Input " + table + ": missing column '" + column + "' (rule: the column for " + what + " must exist)");
    }

    /**
     * A missing star id: null, or — for a text id — empty or white space only (Unicode White_Space: spaces, tabs,
     * line breaks, no-break spaces). Such a row cannot be joined back to its source, so it is flagged
     * {@code ID_MISSING}, never counted as a duplicate and never paired with another row. Treating blank text as no
     * id is common practice (no published source), as for {@code String.isBlank}.
     */
    public static Column idMissing(Column id, DataType idType) {
        if (idType instanceof StringType) {
            return id.isNull().or(id.rlike("(?U)^\\s*$"));
        }
        return id.isNull();
    }

    private static void requireNumeric(StructType schema, String table, String column, String what) {
        if (!schema.getFieldIndex(column).isDefined()) {
            throw missing(table, column, what);
        }
        DataType t = schema.apply(column).dataType();
        if (!(t instanceof NumericType)) {
            throw JobException.input("Input " + table + ": column '" + column + "' has type " + t.simpleString()
                    + " (rule: " + what + " must be numeric)");
        }
    }

    /** Joins astrometry and photometry by the policy above (missing ids paired with nothing); adds the duplicate marker. */
    public Dataset<Row> join(InputTable astro, InputTable phot) {
        return join(astro.data(), astro.role(), astro.paths(), phot.data(), phot.role(), phot.paths());
    }

    /** As {@link #join(InputTable, InputTable)}, on the rows {@code a} and {@code p} of the two tables (check: samples). */
    public Dataset<Row> join(Dataset<Row> astroRows, String astroRole, List<String> astroPaths,
                             Dataset<Row> photRows, String photRole, List<String> photPaths) {
        Dataset<Row> a = astroRows;
        Dataset<Row> p = photRows;
        if (!a.schema().getFieldIndex(idColumn).isDefined()) {
            throw missing(astroRole + " " + astroPaths, idColumn, "the star id to join on");
        }
        if (!p.schema().getFieldIndex(idColumn).isDefined()) {
            throw missing(photRole + " " + photPaths, idColumn, "the star id to join on");
        }
        DataType ta = a.schema().apply(idColumn).dataType();
        DataType tp = p.schema().apply(idColumn).dataType();
        if (!ta.equals(tp)) {
            throw JobException.input("Input " + photRole + ": id column '" + idColumn + "' has type " + tp.simpleString()
                    + " but " + ta.simpleString() + " in " + astroRole + " (rule: the join key has one type in both tables)");
        }
        a = withOccurrence(a, "a");
        p = withOccurrence(p, "p");
        // equalTo, not eqNullSafe: a null id meets nothing; a blank text id equals another blank one, so it is
        // excluded explicitly (an id equal to a non-missing one is not missing either)
        Column cond = a.col(idColumn).equalTo(p.col(idColumn)).and(a.col(OCC_COL).equalTo(p.col(OCC_COL)));
        if (ta instanceof StringType) {
            cond = cond.and(not(idMissing(a.col(idColumn), ta)));
        }
        Dataset<Row> j = a.join(p, cond, "full_outer");
        Set<String> aCols = new LinkedHashSet<>(List.of(astroRows.columns()));
        Set<String> pCols = new LinkedHashSet<>(List.of(photRows.columns()));
        List<Column> sel = new ArrayList<>();
        Column aPresent = a.col(OCC_COL).isNotNull();
        for (String c : aCols) {
            if (pCols.contains(c)) {
                sel.add(when(aPresent, a.col(c)).otherwise(p.col(c)).as(c));
            } else {
                sel.add(a.col(c));
            }
        }
        for (String c : pCols) {
            if (!aCols.contains(c)) {
                sel.add(p.col(c));
            }
        }
        sel.add(coalesce(a.col(DUP_COL), lit(false)).or(coalesce(p.col(DUP_COL), lit(false))).as(DUP_COL));
        return j.select(sel.toArray(new Column[0]));
    }

    /**
     * Numbers the copies of each id (deterministic order: by content) and marks ids with more than one copy; a
     * missing id is never marked (its rows are ID_MISSING instead), however many rows share it.
     */
    private Dataset<Row> withOccurrence(Dataset<Row> d, String side) {
        List<Column> order = new ArrayList<>();
        for (StructField f : d.schema().fields()) {
            if (!f.name().equals(idColumn) && !(f.dataType() instanceof org.apache.spark.sql.types.MapType)) {
                order.add(col(f.name()).asc_nulls_first());
            }
        }
        WindowSpec byId = Window.partitionBy(col(idColumn));
        WindowSpec ordered = byId.orderBy(order.toArray(new Column[0]));
        Column missing = idMissing(col(idColumn), d.schema().apply(idColumn).dataType());
        return d.withColumn(OCC_COL, row_number().over(ordered))
                .withColumn(DUP_COL, count(lit(1)).over(byId).gt(1).and(not(missing)));
    }

    /** What the scan of a single table's ids found: its census and how many (non-missing) ids occur more than once. */
    public static final class IdScan {
        public final RowCensus census;
        public final long repeatedIds;
        /** The repeated ids, one column {@link IdScanner#DUP_ID_COL}; null when there are none. */
        private final Dataset<Row> dupIds;

        IdScan(RowCensus census, long repeatedIds, Dataset<Row> dupIds) {
            this.census = census;
            this.repeatedIds = repeatedIds;
            this.dupIds = dupIds;
        }

        Dataset<Row> dupIds() {
            return dupIds;
        }
    }

    /**
     * The census of a single table (rows and id-hash sums, see {@link RowCensus}) and its repeated ids: one read of the
     * id column (Parquet reads just that column) when no id repeats, a second read of the candidates' rows otherwise
     * ({@link IdScanner}).
     */
    public IdScan scanIds(Dataset<Row> d, String table) {
        if (!d.schema().getFieldIndex(idColumn).isDefined()) {
            throw missing(table, idColumn, "the star id; set columns.star_id in the config");
        }
        return IdScanner.scan(d, idColumn);
    }

    /**
     * Marks duplicate ids of a single table: the repeated ids (from {@link #scanIds}) joined back — collected and
     * broadcast when there are at most 10⁶ of them. Missing ids ({@link #idMissing}) are never marked.
     */
    public Dataset<Row> markDuplicates(Dataset<Row> d, IdScan scan) {
        if (scan.repeatedIds == 0) {
            return d.withColumn(DUP_COL, lit(false));
        }
        Dataset<Row> dups = scan.dupIds.withColumn(DUP_COL, lit(true));
        Dataset<Row> small;
        if (scan.repeatedIds <= IdScanner.MAX_BROADCAST_IDS) {
            List<Row> ids = dups.collectAsList();
            small = broadcast(d.sparkSession().createDataFrame(ids, dups.schema()));
        } else {
            small = dups;
        }
        Dataset<Row> j = d.join(small, d.col(idColumn).equalTo(small.col(IdScanner.DUP_ID_COL)), "left");
        return j.drop(IdScanner.DUP_ID_COL).withColumn(DUP_COL, coalesce(col(DUP_COL), lit(false)));
    }

    /** The canonical input struct's columns, built from the survey's columns as the config maps them. */
    public Map<String, Column> canonicalInputs(StructType schema, String table) {
        Map<String, Column> m = new java.util.LinkedHashMap<>();
        requireNumeric(schema, table, config.parallaxColumn(), "parallax (columns.parallax)");
        requireNumeric(schema, table, config.parallaxErrColumn(), "parallax error (columns.parallax_err)");
        double f = config.parallaxUnit().toMas;
        m.put(StarColumns.PARALLAX_MAS, col(config.parallaxColumn()).cast("double").multiply(f));
        m.put(StarColumns.PARALLAX_ERR_MAS, col(config.parallaxErrColumn()).cast("double").multiply(f));

        Map<Band, JobConfig.BandMapping> bands = new EnumMap<>(Band.class);
        if (!config.explicitBands().isEmpty()) {
            bands.putAll(config.explicitBands());
        } else {
            for (Band b : Band.values()) {
                if (schema.getFieldIndex(StarColumns.mag(b)).isDefined()) {
                    bands.put(b, null);
                }
            }
            if (bands.isEmpty()) {
                throw JobException.input("Input " + table + ": no magnitude column (rule: at least one of mag_b, mag_v, mag_rc, "
                        + "mag_ic, mag_j, mag_h, mag_ks, mag_g, mag_bp, mag_rp, or columns.bands in the config)");
            }
        }
        // the G, BP, RP extinction coefficients (GaiaBandExtinction) are for one law at R_V = 3.1: with another R_V
        // the optical bands would follow CCM at that R_V and these would not, so their colours would mix two laws
        double rvGaia = GaiaBandExtinction.RV;
        if (config.settings().rv() != rvGaia) {
            for (Band b : bands.keySet()) {
                if (b.isGaiaLike()) {
                    JobConfig.BandMapping bm = bands.get(b);
                    throw JobException.config("Config " + config.origin() + ": physics.r_v = " + config.settings().rv()
                            + " with the " + b.label() + " column '" + (bm == null ? StarColumns.mag(b) : bm.magColumn)
                            + "' of " + table + " (rule: the G, BP and RP extinction coefficients hold for R_V = " + rvGaia
                            + " only; use r_v: " + rvGaia + ", or map only the other bands under columns.bands)");
                }
            }
        }
        for (Band b : Band.values()) {
            Column mag = lit(null).cast("double");
            Column err = lit(null).cast("double");
            if (bands.containsKey(b)) {
                JobConfig.BandMapping bm = bands.get(b);
                String magCol = bm == null ? StarColumns.mag(b) : bm.magColumn;
                requireNumeric(schema, table, magCol, "magnitude in " + b.label());
                mag = col(magCol).cast("double");
                if (bm != null && bm.err.isConstant()) {
                    err = lit(bm.err.value());
                } else {
                    String errCol = bm == null ? StarColumns.magErr(b) : bm.err.column();
                    requireNumeric(schema, table, errCol, "error of the " + b.label() + " magnitude (or columns.bands."
                            + b.suffix() + ".err_value)");
                    err = col(errCol).cast("double");
                }
            }
            m.put(StarColumns.mag(b), mag);
            m.put(StarColumns.magErr(b), err);
        }
        double rv = config.settings().rv();
        if (!config.av().isNone()) {
            m.put(StarColumns.EBV, source(schema, table, config.av(), null, "A_V (columns.av)").divide(rv));
        } else {
            m.put(StarColumns.EBV, source(schema, table, config.ebv(), StarColumns.EBV, "E(B-V) (columns.ebv)"));
        }
        m.put(StarColumns.EBV_ERR, source(schema, table, config.ebvErr(), StarColumns.EBV_ERR, "E(B-V) error (columns.ebv_err)"));
        m.put(StarColumns.FEH, source(schema, table, config.feh(), StarColumns.FEH, "[Fe/H] (columns.feh)"));
        m.put(StarColumns.FEH_ERR, source(schema, table, config.fehErr(), StarColumns.FEH_ERR, "[Fe/H] error (columns.feh_err)"));
        return m;
    }

    private static Column source(StructType schema, String table, JobConfig.Source s, String defaultColumn, String what) {
        if (s.isConstant()) {
            return lit(s.value());
        }
        if (s.isColumn()) {
            requireNumeric(schema, table, s.column(), what);
            return col(s.column()).cast("double");
        }
        if (defaultColumn != null && schema.getFieldIndex(defaultColumn).isDefined()) {
            requireNumeric(schema, table, defaultColumn, what);
            return col(defaultColumn).cast("double");
        }
        return lit(null).cast("double");
    }

    /**
     * Input columns passed through, then every derived column with its metadata; the duplicate marker becomes the
     * DUPLICATE_ID flag bit, a missing id ({@link #idMissing}) the ID_MISSING bit.
     */
    public Dataset<Row> derive(Dataset<Row> withDup, String table) {
        return derive(withDup, table, List.of());
    }

    /**
     * As {@link #derive(Dataset, String)}, in the configured output layout: with layout {@code derived} only the id and
     * the {@code keep} columns (the partition columns) are passed through; with column group {@code core} only
     * {@link DerivedSchema#CORE} of the derived columns (plus every Monte Carlo column when asked for); with
     * {@code float32} the derived floating-point values are stored in 32 bits (see {@link DerivedSchema#float32Reason}).
     */
    public Dataset<Row> derive(Dataset<Row> withDup, String table, List<String> keep) {
        StructType schema = withDup.schema();
        List<String> derivedNames = new ArrayList<>(DerivedSchema.names());
        if (config.monteCarlo()) {
            for (DerivedColumn c : StarMonteCarloUdf.COLUMNS) {
                derivedNames.add(c.name());
            }
        }
        for (String derived : derivedNames) {
            if (schema.getFieldIndex(derived).isDefined()) {
                throw JobException.input("Input " + table + ": column '" + derived + "' has the name of a derived column "
                        + "(rule: input columns must not collide with derived ones; rename it upstream)");
            }
        }
        Map<String, Column> inputs = canonicalInputs(schema, table);
        List<Column> fields = new ArrayList<>();
        for (String f : StarColumns.INPUT_FIELDS) {
            fields.add(inputs.get(f).as(f));
        }
        Column inputStruct = org.apache.spark.sql.functions.struct(fields.toArray(new Column[0]));
        Column result = StarDeriveUdf.function(config.settings()).apply(inputStruct);
        String d = "__starderive_result";
        String mc = "__starderive_mc";
        Dataset<Row> withResult = TestHooks.maybeFailFirstAttempt(withDup).withColumn(d, result);
        if (config.monteCarlo()) {
            List<Column> mcFields = new ArrayList<>(fields);
            mcFields.add(org.apache.spark.sql.functions.xxhash64(col(idColumn)).as(StarMonteCarloUdf.STAR_KEY));
            Column mcStruct = org.apache.spark.sql.functions.struct(mcFields.toArray(new Column[0]));
            withResult = withResult.withColumn(mc, StarMonteCarloUdf.function(config.settings(), config.draws(), config.seed()).apply(mcStruct));
        }
        List<Column> sel = new ArrayList<>();
        boolean full = config.layout().equals("full");
        for (String c : schema.fieldNames()) {
            if (!c.equals(DUP_COL) && (full || c.equals(idColumn) || keep.contains(c))) {
                sel.add(col(c));
            }
        }
        boolean core = config.columnGroup().equals("core");
        long dupMask = QualityFlag.DUPLICATE_ID.mask();
        long missingMask = QualityFlag.ID_MISSING.mask();
        Column dup = col(DUP_COL);
        Column missing = idMissing(col(idColumn), schema.apply(idColumn).dataType());
        for (DerivedColumn c : DerivedSchema.COLUMNS) {
            if (core && !DerivedSchema.CORE.contains(c.name())) {
                continue;
            }
            Column v = col(d + "." + c.name());
            if (c.name().equals("flags")) {
                v = when(dup, v.bitwiseOR(lit(dupMask))).otherwise(v);
                v = when(missing, v.bitwiseOR(lit(missingMask))).otherwise(v);
            } else if (c.name().equals("flag_names")) {
                // DUPLICATE_ID (bit 20) and ID_MISSING (bit 21) are the highest bits, above every flag of the
                // physics core: appending them in this order keeps the names in bit order
                v = when(dup, org.apache.spark.sql.functions.array_union(v,
                        org.apache.spark.sql.functions.array(lit(QualityFlag.DUPLICATE_ID.name())))).otherwise(v);
                v = when(missing, org.apache.spark.sql.functions.array_union(v,
                        org.apache.spark.sql.functions.array(lit(QualityFlag.ID_MISSING.name())))).otherwise(v);
            }
            sel.add(stored(v, c).as(c.name(), DerivedSchema.metadata(c)));
        }
        if (config.monteCarlo()) {
            for (DerivedColumn c : StarMonteCarloUdf.COLUMNS) {
                sel.add(stored(col(mc + "." + c.name()), c).as(c.name(), DerivedSchema.metadata(c)));
            }
        }
        return withResult.select(sel.toArray(new Column[0]));
    }

    /** The value as stored: a 32-bit float where the config asks for it and the column allows it. */
    private Column stored(Column v, DerivedColumn c) {
        return config.float32() && DerivedSchema.float32Reason(c) != null ? v.cast("float") : v;
    }

    /** CSV cannot hold arrays: flag names become one '|'-separated text. */
    public static Dataset<Row> forCsv(Dataset<Row> d) {
        if (!d.schema().getFieldIndex("flag_names").isDefined()) {
            return d;
        }
        return d.withColumn("flag_names", concat_ws("|", col("flag_names")));
    }

}
