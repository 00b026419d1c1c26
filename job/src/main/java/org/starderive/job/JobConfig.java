package org.starderive.job;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import java.io.IOException;
import java.io.StringReader;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;
import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;
import org.starderive.udf.StarColumns;
import org.yaml.snakeyaml.Yaml;
import org.yaml.snakeyaml.error.YAMLException;
import org.yaml.snakeyaml.events.CollectionStartEvent;
import org.yaml.snakeyaml.events.Event;
import org.yaml.snakeyaml.events.ScalarEvent;

/**
 * The job's configuration: how the survey's columns map to ours, their units, and the physics settings.
 * Read from YAML as <em>data only</em>: every key is looked up in the tables below, an unknown key or a value of the
 * wrong kind stops the job (exit 2) with a message naming the file, the key and the rule. Nothing in the file is
 * ever evaluated or used as a class name; a YAML tag ({@code !!java.net.URL ...}, {@code !custom}) stops the job too.
 *
 * <pre>
 * columns:
 *   star_id: source_id            # id column (default star_id)
 *   parallax: plx                 # default parallax_mas
 *   parallax_err: e_plx           # default parallax_err_mas
 *   parallax_unit: mas            # mas | arcsec | uas (default mas)
 *   bands:                        # default: mag_&lt;band&gt; / mag_&lt;band&gt;_err for every band present
 *     v: {mag: Vmag, err: e_Vmag} # or err_value: 0.02 for a constant error
 *   ebv: {column: ebv}            # or {value: 0.05}; default column ebv when present
 *   ebv_err: {column: ebv_err}    # or {value: 0.01}
 *   av: {column: a_v}             # alternative to ebv: E(B-V) = A_V / R_V
 *   feh: {column: feh}            # or {value: -0.2}
 *   feh_err: {column: feh_err}    # or {value: 0.1}
 * physics:                        # see DeriveSettings; every key optional
 *   parallax_zero_point_mas: 0.0
 *   ...
 * output:
 *   compression: snappy           # snappy | zstd | gzip | none
 *   lease_stale_after_s: 120      # a run's lease on its output not renewed this long is taken over
 *   layout: derived               # derived (id, partition columns, derived columns) | full (input columns too)
 *   columns: all                  # all | core (main parameters, errors, flags)
 *   float32: true                 # derived values in 32-bit floats (parallax_corr_mas stays 64-bit)
 * input:
 *   fits_votable_max_rows: 1000000 # FITS/VOTable inputs are read on the driver: at most this many rows per table
 * </pre>
 */
public final class JobConfig {

    /** Where a per-star quantity comes from: a column, a constant, or nowhere. */
    public static final class Source {
        private final String column;
        private final Double value;

        private Source(String column, Double value) {
            this.column = column;
            this.value = value;
        }

        public static Source column(String name) { return new Source(name, null); }

        public static Source constant(double v) { return new Source(null, v); }

        public static Source none() { return new Source(null, null); }

        public String column() { return column; }

        public Double value() { return value; }

        public boolean isColumn() { return column != null; }

        public boolean isConstant() { return value != null; }

        public boolean isNone() { return column == null && value == null; }

        @Override
        public String toString() {
            return isColumn() ? "column " + column : isConstant() ? "value " + value : "none";
        }
    }

    /** Mapping of one band. */
    public static final class BandMapping {
        public final Band band;
        public final String magColumn;
        public final Source err;

        BandMapping(Band band, String magColumn, Source err) {
            this.band = band;
            this.magColumn = magColumn;
            this.err = err;
        }
    }

    /** Units a parallax column may be in, with the factor to mas. */
    public enum ParallaxUnit {
        MAS(1.0), ARCSEC(1000.0), UAS(0.001);

        public final double toMas;

        ParallaxUnit(double toMas) { this.toMas = toMas; }
    }

    // Config keys (YAML paths) with their defaults
    public static final String KEY_COLUMNS = "columns";
    public static final String KEY_PHYSICS = "physics";
    public static final String KEY_OUTPUT = "output";
    public static final String COMPRESSION_DEFAULT = "snappy";
    /** Output layouts: {@code derived} (id, partition columns, derived columns) or {@code full} (every input column too). */
    public static final String LAYOUT_DEFAULT = "derived";
    /** Derived column groups: {@code core} or {@code all}. */
    public static final String COLUMNS_DEFAULT = "all";

    static void checkLayout(String v, String option) {
        if (!v.equals("derived") && !v.equals("full")) {
            throw JobException.config("Invalid " + option + ": " + v + " (must be derived or full)");
        }
    }

    static void checkColumns(String v, String option) {
        if (!v.equals("core") && !v.equals("all")) {
            throw JobException.config("Invalid " + option + ": " + v + " (must be core or all)");
        }
    }
    public static final String KEY_UNCERTAINTY = "uncertainty";
    public static final String KEY_INPUT = "input";
    /**
     * FITS and VOTable inputs are read into the driver's memory (measured: 410 bytes per row of 14 numeric columns,
     * {@code FitsReadMemory} in the test sources): at most this many rows per input table, all its files together;
     * above it the job stops (exit 3) before reading further. The same default as the export's {@code --max-rows}:
     * about 0.4 GB of driver heap for a table of 14 numeric columns.
     */
    public static final long FITS_VOTABLE_MAX_ROWS_DEFAULT = 1_000_000L;
    /** analytic (first order) or montecarlo (percentiles over draws). */
    public static final String UNCERTAINTY_METHOD_DEFAULT = "analytic";
    /**
     * Monte Carlo draws per star: with 128 the probability inside one star's 16-84 % interval scatters by 0.041 (sd)
     * about 0.683, inside the 0.63-0.73 band the coverage tests accept (64 draws: 0.057); docs/uncertainties.md.
     */
    public static final int DRAWS_DEFAULT = 128;
    /** Run seed of the Monte Carlo streams. */
    public static final long SEED_DEFAULT = 1L;

    private static final Set<String> TOP_KEYS = Set.of(KEY_COLUMNS, KEY_PHYSICS, KEY_OUTPUT, KEY_UNCERTAINTY, KEY_INPUT);
    private static final Set<String> INPUT_KEYS = Set.of("fits_votable_max_rows");
    private static final Set<String> UNCERTAINTY_KEYS = Set.of("method", "draws", "seed");
    private static final Set<String> COLUMN_KEYS = Set.of("star_id", "parallax", "parallax_err", "parallax_unit",
            "bands", "ebv", "ebv_err", "av", "feh", "feh_err");
    private static final Set<String> BAND_KEYS = Set.of("mag", "err", "err_value");
    private static final Set<String> SOURCE_KEYS = Set.of("column", "value");
    private static final Set<String> OUTPUT_KEYS = Set.of("compression", "lease_stale_after_s", "layout", "columns", "float32");
    private static final Set<String> COMPRESSIONS = Set.of("snappy", "zstd", "gzip", "none");
    /** physics keys, each one line of DeriveSettings. */
    private static final Set<String> PHYSICS_KEYS = Set.of("parallax_zero_point_mas", "parallax_snr_min",
            "parallax_max_mas", "distance_snr_min", "distance_method", "prior_length_kpc", "posterior_percentiles", "r_v", "ebv_default",
            "ebv_err_default", "feh_default", "feh_err_default", "allow_extrapolation", "teff_disagree_p",
            "diameter_disagree_sigma", "giant_logg_prior", "giant_logg_prior_err", "mag_min", "mag_max", "relations",
            "hot_teff_err_frac_max");

    private final String origin;
    private final String idColumn;
    private final String parallaxColumn;
    private final String parallaxErrColumn;
    private final ParallaxUnit parallaxUnit;
    private final Map<Band, BandMapping> explicitBands;
    private final Source ebv;
    private final Source ebvErr;
    private final Source av;
    private final Source feh;
    private final Source fehErr;
    private final DeriveSettings settings;
    private final String compression;
    private final double leaseStaleAfterS;
    private String layout;
    private String columnGroup;
    private final boolean float32;
    private final JsonNode resolved;
    private String uncertaintyMethod;
    private final long fitsVotableMaxRows;
    private int draws;
    private long seed;

    private JobConfig(String origin, JsonNode root) {
        this.origin = origin;
        checkKeys(root, "", TOP_KEYS);
        JsonNode cols = object(root, KEY_COLUMNS);
        checkKeys(cols, KEY_COLUMNS, COLUMN_KEYS);
        idColumn = text(cols, KEY_COLUMNS, "star_id", StarColumns.STAR_ID);
        parallaxColumn = text(cols, KEY_COLUMNS, "parallax", StarColumns.PARALLAX_MAS);
        parallaxErrColumn = text(cols, KEY_COLUMNS, "parallax_err", StarColumns.PARALLAX_ERR_MAS);
        String unit = text(cols, KEY_COLUMNS, "parallax_unit", "mas");
        switch (unit) {
            case "mas": parallaxUnit = ParallaxUnit.MAS; break;
            case "arcsec": parallaxUnit = ParallaxUnit.ARCSEC; break;
            case "uas": parallaxUnit = ParallaxUnit.UAS; break;
            default: throw bad(KEY_COLUMNS + ".parallax_unit", unit, "must be one of mas, arcsec, uas");
        }
        Map<Band, BandMapping> bands = new LinkedHashMap<>();
        JsonNode bandsNode = object(cols, "bands");
        Iterator<Map.Entry<String, JsonNode>> it = bandsNode.fields();
        while (it.hasNext()) {
            Map.Entry<String, JsonNode> e = it.next();
            String path = KEY_COLUMNS + ".bands." + e.getKey();
            Band b;
            try {
                b = Band.bySuffix(e.getKey());
            } catch (IllegalArgumentException ex) {
                throw bad(path, e.getKey(), "band must be one of b v rc ic j h ks g bp rp");
            }
            if (!e.getValue().isObject()) {
                throw bad(path, e.getValue().toString(), "must be a mapping with mag and err (or err_value)");
            }
            checkKeys(e.getValue(), path, BAND_KEYS);
            String mag = text(e.getValue(), path, "mag", null);
            if (mag == null) {
                throw bad(path + ".mag", "missing", "every mapped band needs its magnitude column");
            }
            Source err;
            if (e.getValue().has("err") && e.getValue().has("err_value")) {
                throw bad(path, "err and err_value", "give one of them, not both");
            } else if (e.getValue().has("err_value")) {
                err = Source.constant(number(e.getValue(), path, "err_value", Double.NaN));
                if (!(err.value() > 0)) {
                    throw bad(path + ".err_value", String.valueOf(err.value()), "must be > 0 mag");
                }
            } else {
                err = Source.column(text(e.getValue(), path, "err", mag + "_err"));
            }
            bands.put(b, new BandMapping(b, mag, err));
        }
        explicitBands = Collections.unmodifiableMap(bands);
        ebv = source(cols, "ebv");
        ebvErr = source(cols, "ebv_err");
        av = source(cols, "av");
        feh = source(cols, "feh");
        fehErr = source(cols, "feh_err");
        if (!ebv.isNone() && !av.isNone()) {
            throw bad(KEY_COLUMNS + ".av", av.toString(), "give either ebv or av, not both");
        }
        settings = physics(object(root, KEY_PHYSICS));
        JsonNode out = object(root, KEY_OUTPUT);
        checkKeys(out, KEY_OUTPUT, OUTPUT_KEYS);
        compression = text(out, KEY_OUTPUT, "compression", COMPRESSION_DEFAULT);
        if (!COMPRESSIONS.contains(compression)) {
            throw bad(KEY_OUTPUT + ".compression", compression, "must be one of " + new TreeSet<>(COMPRESSIONS));
        }
        layout = text(out, KEY_OUTPUT, "layout", LAYOUT_DEFAULT);
        if (!layout.equals("derived") && !layout.equals("full")) {
            throw bad(KEY_OUTPUT + ".layout", layout, "must be derived or full");
        }
        columnGroup = text(out, KEY_OUTPUT, "columns", COLUMNS_DEFAULT);
        if (!columnGroup.equals("core") && !columnGroup.equals("all")) {
            throw bad(KEY_OUTPUT + ".columns", columnGroup, "must be core or all");
        }
        float32 = bool(out, KEY_OUTPUT, "float32", true);
        leaseStaleAfterS = number(out, KEY_OUTPUT, "lease_stale_after_s", OutputLease.STALE_AFTER_S_DEFAULT);
        if (!(leaseStaleAfterS >= 10 && leaseStaleAfterS <= 86_400)) {
            throw bad(KEY_OUTPUT + ".lease_stale_after_s", String.valueOf(leaseStaleAfterS),
                    "must be 10 to 86400 s (a lease not renewed for this long is taken over)");
        }
        JsonNode in = object(root, KEY_INPUT);
        checkKeys(in, KEY_INPUT, INPUT_KEYS);
        double maxRows = number(in, KEY_INPUT, "fits_votable_max_rows", FITS_VOTABLE_MAX_ROWS_DEFAULT);
        if (!(maxRows >= 1 && maxRows <= 100_000_000) || maxRows != Math.rint(maxRows)) {
            throw bad(KEY_INPUT + ".fits_votable_max_rows", String.valueOf(maxRows),
                    "must be a whole number from 1 to 100000000 (rows read into the driver's memory)");
        }
        fitsVotableMaxRows = (long) maxRows;
        JsonNode u = object(root, KEY_UNCERTAINTY);
        checkKeys(u, KEY_UNCERTAINTY, UNCERTAINTY_KEYS);
        uncertaintyMethod = text(u, KEY_UNCERTAINTY, "method", UNCERTAINTY_METHOD_DEFAULT);
        double d = number(u, KEY_UNCERTAINTY, "draws", DRAWS_DEFAULT);
        double sd = number(u, KEY_UNCERTAINTY, "seed", SEED_DEFAULT);
        withUncertainty(uncertaintyMethod, d, sd, KEY_UNCERTAINTY + ".");
        resolved = root;
    }

    /** Sets the uncertainty method (config or command line), checking each value. */
    JobConfig withUncertainty(String method, double drawsValue, double seedValue, String prefix) {
        if (!method.equals("analytic") && !method.equals("montecarlo")) {
            throw bad(prefix + "method", method, "must be analytic or montecarlo");
        }
        if (!(drawsValue >= 8 && drawsValue <= 100_000) || drawsValue != Math.rint(drawsValue)) {
            throw bad(prefix + "draws", String.valueOf(drawsValue), "must be a whole number from 8 to 100000");
        }
        if (!Double.isFinite(seedValue) || seedValue != Math.rint(seedValue) || Math.abs(seedValue) > 9.007199254740992E15) {
            throw bad(prefix + "seed", String.valueOf(seedValue), "must be a whole number");
        }
        uncertaintyMethod = method;
        draws = (int) drawsValue;
        seed = (long) seedValue;
        return this;
    }

    public boolean monteCarlo() { return uncertaintyMethod.equals("montecarlo"); }
    public String uncertaintyMethod() { return uncertaintyMethod; }
    public int draws() { return draws; }
    public long seed() { return seed; }

    /** The configuration with no file: canonical column names, default physics. */
    public static JobConfig defaults() {
        return new JobConfig("(defaults)", new ObjectMapper().createObjectNode());
    }

    public static JobConfig load(Path file) {
        String text;
        try {
            text = Files.readString(file);
        } catch (IOException e) {
            throw JobException.config("Cannot read config file " + file + ": " + e.getMessage());
        }
        return parse(text, file.toString());
    }

    public static JobConfig parse(String yaml, String origin) {
        ObjectMapper mapper = new ObjectMapper(new YAMLFactory());
        JsonNode root;
        try {
            root = mapper.readTree(yaml);
        } catch (JsonProcessingException e) {
            throw JobException.config("Invalid config file " + origin + ": not valid YAML ("
                    + e.getOriginalMessage() + ")");
        }
        try {
            refuseTags(yaml, origin);
        } catch (YAMLException e) {
            throw JobException.config("Invalid config file " + origin + ": not valid YAML (" + e.getMessage() + ")");
        }
        if (root == null || root.isNull() || root.isMissingNode()) {
            root = mapper.createObjectNode();
        }
        if (!root.isObject()) {
            throw JobException.config("Invalid config file " + origin + ": top level must be a mapping of "
                    + new TreeSet<>(TOP_KEYS));
        }
        return new JobConfig(origin, root);
    }

    /**
     * Data only: a YAML tag ({@code !!java.net.URL}, {@code !custom}, even {@code !!str}) asks the reader to construct
     * a type or to reinterpret a value. The tree reader drops most tags silently, so the value would mean something
     * other than what the file says; any tag, on a key or a value, stops the job instead. The scan reads SnakeYAML's
     * event stream (the parser under Jackson's YAML module): parsing only, nothing is constructed.
     */
    private static void refuseTags(String yaml, String origin) {
        for (Event ev : new Yaml().parse(new StringReader(yaml))) {
            String tag = ev instanceof ScalarEvent ? ((ScalarEvent) ev).getTag()
                    : ev instanceof CollectionStartEvent ? ((CollectionStartEvent) ev).getTag() : null;
            if (tag != null) {
                throw JobException.config("Invalid config file " + origin + ": YAML tag " + shownTag(tag) + " at line "
                        + (ev.getStartMark().getLine() + 1)
                        + " (rule: tags are not allowed; the file is data only, nothing in it is evaluated)");
            }
        }
    }

    /** The tag as it is written in the file: the parser hands core and global tags resolved. */
    private static String shownTag(String tag) {
        String core = "tag:yaml.org,2002:";
        if (tag.startsWith(core)) {
            return "!!" + tag.substring(core.length());
        }
        return tag.startsWith("!") ? tag : "!<" + tag + ">";
    }

    private JobException bad(String key, String value, String rule) {
        return JobException.config("Invalid config " + origin + ": " + key + " = " + value + " (" + rule + ")");
    }

    private void checkKeys(JsonNode node, String path, Set<String> allowed) {
        Iterator<String> names = node.fieldNames();
        while (names.hasNext()) {
            String n = names.next();
            if (!allowed.contains(n)) {
                throw JobException.config("Invalid config " + origin + ": unknown key '" + (path.isEmpty() ? n : path + "." + n)
                        + "' (rule: only these keys are allowed here: " + new TreeSet<>(allowed) + ")");
            }
        }
    }

    private JsonNode object(JsonNode parent, String key) {
        JsonNode n = parent.get(key);
        if (n == null || n.isNull()) {
            return new ObjectMapper().createObjectNode();
        }
        if (!n.isObject()) {
            throw bad(key, n.toString(), "must be a mapping");
        }
        return n;
    }

    private String text(JsonNode parent, String path, String key, String dflt) {
        JsonNode n = parent.get(key);
        if (n == null || n.isNull()) {
            return dflt;
        }
        if (!n.isTextual() || n.asText().isBlank()) {
            throw bad(path + "." + key, n.toString(), "must be a non-empty text");
        }
        return n.asText();
    }

    private double number(JsonNode parent, String path, String key, double dflt) {
        JsonNode n = parent.get(key);
        if (n == null || n.isNull()) {
            return dflt;
        }
        if (!n.isNumber()) {
            throw bad(path + "." + key, n.toString(), "must be a number");
        }
        return n.asDouble();
    }

    private boolean bool(JsonNode parent, String path, String key, boolean dflt) {
        JsonNode n = parent.get(key);
        if (n == null || n.isNull()) {
            return dflt;
        }
        if (!n.isBoolean()) {
            throw bad(path + "." + key, n.toString(), "must be true or false");
        }
        return n.asBoolean();
    }

    private Source source(JsonNode cols, String key) {
        JsonNode n = cols.get(key);
        String path = KEY_COLUMNS + "." + key;
        if (n == null || n.isNull()) {
            return Source.none();
        }
        if (!n.isObject()) {
            throw bad(path, n.toString(), "must be {column: NAME} or {value: NUMBER}");
        }
        checkKeys(n, path, SOURCE_KEYS);
        if (n.has("column") == n.has("value")) {
            throw bad(path, n.toString(), "give exactly one of column or value");
        }
        if (n.has("column")) {
            return Source.column(text(n, path, "column", null));
        }
        double v = number(n, path, "value", Double.NaN);
        if (!Double.isFinite(v)) {
            throw bad(path + ".value", String.valueOf(v), "must be finite");
        }
        return Source.constant(v);
    }

    private DeriveSettings physics(JsonNode p) {
        checkKeys(p, KEY_PHYSICS, PHYSICS_KEYS);
        String path = KEY_PHYSICS;
        // defaults read from a DeriveSettings object, not from its static constants: javac copies constants into this
        // class, and an incremental build would keep an old default after the physics module changed it
        DeriveSettings d = DeriveSettings.defaults();
        DeriveSettings.Builder b = DeriveSettings.builder()
                .parallaxZeroPointMas(number(p, path, "parallax_zero_point_mas", d.parallaxZeroPointMas()))
                .parallaxSnrMin(number(p, path, "parallax_snr_min", d.parallaxSnrMin()))
                .distanceSnrMin(number(p, path, "distance_snr_min", d.distanceSnrMin()))
                .parallaxMaxMas(number(p, path, "parallax_max_mas", d.parallaxMaxMas()))
                .priorLengthKpc(number(p, path, "prior_length_kpc", d.priorLengthKpc()))
                .posteriorPercentiles(bool(p, path, "posterior_percentiles", d.posteriorPercentiles()))
                .rv(number(p, path, "r_v", d.rv()))
                .ebvDefault(number(p, path, "ebv_default", d.ebvDefault()))
                .ebvErrDefault(number(p, path, "ebv_err_default", d.ebvErrDefault()))
                .fehDefault(number(p, path, "feh_default", d.fehDefault()))
                .fehErrDefault(number(p, path, "feh_err_default", d.fehErrDefault()))
                .allowExtrapolation(bool(p, path, "allow_extrapolation", d.allowExtrapolation()))
                .teffDisagreeP(number(p, path, "teff_disagree_p", d.teffDisagreeP()))
                .diameterDisagreeSigma(number(p, path, "diameter_disagree_sigma", d.diameterDisagreeSigma()))
                .giantLoggPrior(number(p, path, "giant_logg_prior", d.giantLoggPrior()))
                .giantLoggPriorErr(number(p, path, "giant_logg_prior_err", d.giantLoggPriorErr()))
                .hotTeffErrFracMax(number(p, path, "hot_teff_err_frac_max", d.hotTeffErrFracMax()))
                .magMin(number(p, path, "mag_min", d.magMin()))
                .magMax(number(p, path, "mag_max", d.magMax()));
        String method = text(p, path, "distance_method", "auto");
        switch (method) {
            case "auto": b.distanceMethod(DeriveSettings.DistanceMethod.AUTO); break;
            case "inverse": b.distanceMethod(DeriveSettings.DistanceMethod.INVERSE); break;
            case "edsd": b.distanceMethod(DeriveSettings.DistanceMethod.EDSD); break;
            default: throw bad(path + ".distance_method", method, "must be one of auto, inverse, edsd");
        }
        JsonNode rel = p.get("relations");
        if (rel != null && !rel.isNull()) {
            if (!rel.isArray()) {
                throw bad(path + ".relations", rel.toString(), "must be a list of relation ids");
            }
            List<String> ids = new ArrayList<>();
            rel.forEach(x -> ids.add(x.asText()));
            try {
                b.relations(ids);
            } catch (IllegalArgumentException e) {
                throw bad(path + ".relations", rel.toString(), e.getMessage());
            }
        }
        try {
            return b.build();
        } catch (IllegalArgumentException e) {
            throw JobException.config("Invalid config " + origin + ": physics: " + e.getMessage());
        }
    }

    public String origin() { return origin; }
    public String idColumn() { return idColumn; }
    public String parallaxColumn() { return parallaxColumn; }
    public String parallaxErrColumn() { return parallaxErrColumn; }
    public ParallaxUnit parallaxUnit() { return parallaxUnit; }
    /** Bands mapped explicitly in the file; when empty, the canonical mag_&lt;band&gt; columns present are used. */
    public Map<Band, BandMapping> explicitBands() { return explicitBands; }
    public Source ebv() { return ebv; }
    public Source ebvErr() { return ebvErr; }
    public Source av() { return av; }
    public Source feh() { return feh; }
    public Source fehErr() { return fehErr; }
    public DeriveSettings settings() { return settings; }
    public String compression() { return compression; }

    /** {@code derived} or {@code full}. */
    public String layout() { return layout; }

    /** {@code core} or {@code all}. */
    public String columnGroup() { return columnGroup; }

    /** Derived floating-point values stored as 32-bit floats (except those in {@code DerivedSchema.KEEP_DOUBLE}). */
    public boolean float32() { return float32; }

    /** Overrides layout and column group from the command line. */
    public JobConfig withLayout(String layoutOrNull, String columnsOrNull) {
        if (layoutOrNull != null) {
            checkLayout(layoutOrNull, "--layout");
            layout = layoutOrNull;
        }
        if (columnsOrNull != null) {
            checkColumns(columnsOrNull, "--columns");
            columnGroup = columnsOrNull;
        }
        return this;
    }

    /** Rows of one FITS or VOTable input table (all its files) read into the driver at most; see {@link #FITS_VOTABLE_MAX_ROWS_DEFAULT}. */
    public long fitsVotableMaxRows() { return fitsVotableMaxRows; }

    /** Seconds without renewal after which another run's lease on the output is stale (see {@link OutputLease}). */
    public double leaseStaleAfterS() { return leaseStaleAfterS; }

    /** The configuration as read, with every default filled in, for the run manifest. */
    public ObjectNode resolvedForManifest(ObjectMapper m) {
        ObjectNode n = m.createObjectNode();
        n.put("origin", origin);
        n.set("as_written", resolved);
        ObjectNode s = n.putObject("physics_resolved");
        DeriveSettings d = settings;
        s.put("parallax_zero_point_mas", d.parallaxZeroPointMas());
        s.put("parallax_snr_min", d.parallaxSnrMin());
        s.put("distance_snr_min", d.distanceSnrMin());
        s.put("parallax_max_mas", d.parallaxMaxMas());
        s.put("distance_method", d.distanceMethod().name().toLowerCase());
        s.put("prior_length_kpc", d.priorLengthKpc());
        s.put("posterior_percentiles", d.posteriorPercentiles());
        s.put("r_v", d.rv());
        s.put("ebv_default", d.ebvDefault());
        s.put("ebv_err_default", d.ebvErrDefault());
        s.put("feh_default", d.fehDefault());
        s.put("feh_err_default", d.fehErrDefault());
        s.put("allow_extrapolation", d.allowExtrapolation());
        s.put("teff_disagree_p", d.teffDisagreeP());
        s.put("diameter_disagree_sigma", d.diameterDisagreeSigma());
        s.put("giant_logg_prior", d.giantLoggPrior());
        s.put("giant_logg_prior_err", d.giantLoggPriorErr());
        s.put("hot_teff_err_frac_max", d.hotTeffErrFracMax());
        s.put("mag_min", d.magMin());
        s.put("mag_max", d.magMax());
        s.put("parallax_unit", parallaxUnit.name().toLowerCase());
        s.put("compression", compression);
        s.put("lease_stale_after_s", leaseStaleAfterS);
        s.put("layout", layout);
        s.put("columns", columnGroup);
        s.put("float32", float32);
        s.put("fits_votable_max_rows", fitsVotableMaxRows);
        ObjectNode un = n.putObject("uncertainty_resolved");
        un.put("method", uncertaintyMethod);
        if (monteCarlo()) {
            un.put("draws", draws);
            un.put("seed", seed);
            un.put("star_key", "xxhash64 of the star id (Spark xxhash64, seed 42)");
            un.put("generator", "Commons RNG XO_RO_SHI_RO_128_PP seeded per star from (seed, star_key)");
        }
        return n;
    }
}
