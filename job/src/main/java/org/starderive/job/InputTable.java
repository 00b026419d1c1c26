package org.starderive.job;

import java.io.IOException;
import java.io.Serializable;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.parquet.hadoop.ParquetFileReader;
import org.apache.parquet.hadoop.util.HadoopInputFile;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import scala.Tuple2;

/**
 * One input table (astrometry, photometry, or everything), checked before the job computes anything:
 * every path exists; it holds data files; for Parquet every file's footer is read (in a Spark job, so a survey's
 * thousands of files are checked in parallel) — an unreadable, truncated or zero-byte file, or a file whose schema
 * differs from the others', stops the job naming the file. Hive-style {@code key=value} folders give the partition
 * columns, which must be the same for every file.
 */
public final class InputTable {
    private final String role;
    private final List<String> paths;
    private final String format;
    private final Dataset<Row> data;
    private final List<String> partitionColumns;
    private final long rowsFromFooters;
    private final List<FileState> files;

    private InputTable(String role, List<String> paths, String format, Dataset<Row> data, List<String> partitionColumns,
                       long rowsFromFooters, List<FileState> files) {
        this.role = role;
        this.paths = paths;
        this.format = format;
        this.data = data;
        this.partitionColumns = partitionColumns;
        this.rowsFromFooters = rowsFromFooters;
        this.files = List.copyOf(files);
    }

    public String role() { return role; }
    public List<String> paths() { return paths; }
    public String format() { return format; }
    public Dataset<Row> data() { return data; }
    public List<String> partitionColumns() { return partitionColumns; }
    /** The input formats, as the rule of a refusal says them. */
    static final String FORMATS_RULE = "must be parquet, csv, fits or votable";

    /** Row count from the Parquet footers, or of the rows read from FITS/VOTable files (−1 for CSV). */
    public long rowsFromFooters() { return rowsFromFooters; }
    public int fileCount() { return files.size(); }
    /** The data files as listed when the table was opened, in listing order. */
    public List<FileState> files() { return files; }

    private static boolean hidden(String name) {
        return name.startsWith("_") || name.startsWith(".");
    }

    /** One data file as listed when the table was opened: path, size in bytes, modification time (ms since 1970, UTC). */
    public static final class FileState {
        public final String path;
        public final long bytes;
        public final long modifiedMillis;

        FileState(String path, long bytes, long modifiedMillis) {
            this.path = path;
            this.bytes = bytes;
            this.modifiedMillis = modifiedMillis;
        }
    }

    /** What one listing of the input paths found. */
    private static final class Listing {
        final List<FileState> files = new ArrayList<>();
        final Set<List<String>> partitionLayouts = new LinkedHashSet<>();
        final Map<List<String>, String> layoutExample = new HashMap<>();

        void add(FileStatus st, List<String> keys) {
            String path = st.getPath().toString();
            files.add(new FileState(path, st.getLen(), st.getModificationTime()));
            partitionLayouts.add(keys);
            layoutExample.putIfAbsent(keys, path);
        }
    }

    /**
     * Lists the data files of the paths: a file path is itself; a folder is listed recursively, skipping every file
     * with a hidden ({@code _} or {@code .}) segment below the folder. {@code mustExist} false (the re-check) treats a
     * path that has gone as holding no files, so that the comparison names the files that went with it.
     */
    /**
     * Every file under {@code dir}, depth first in name order, by {@code listStatus} — not {@code listFiles}, whose
     * located statuses make Hadoop's local file system read each file's permissions by starting an {@code ls}
     * process (seconds for a few hundred files); hidden folders are not entered.
     */
    private static List<FileStatus> walk(FileSystem fs, Path dir) throws IOException {
        List<FileStatus> out = new ArrayList<>();
        FileStatus[] children = fs.listStatus(dir);
        java.util.Arrays.sort(children, java.util.Comparator.comparing(c -> c.getPath().getName()));
        for (FileStatus c : children) {
            if (c.isDirectory()) {
                if (!hidden(c.getPath().getName())) {
                    out.addAll(walk(fs, c.getPath()));
                }
            } else {
                out.add(c);
            }
        }
        return out;
    }

    private static Listing list(Configuration conf, String role, List<String> paths, boolean mustExist) {
        Listing listing = new Listing();
        for (String p : paths) {
            Path root = new Path(p);
            try {
                FileSystem fs = root.getFileSystem(conf);
                if (!fs.exists(root)) {
                    if (!mustExist) {
                        continue;
                    }
                    throw JobException.input("Input " + role + " " + p + ": path does not exist (rule: every input path must exist)");
                }
                FileStatus st = fs.getFileStatus(root);
                if (st.isFile()) {
                    listing.add(st, List.of());
                    continue;
                }
                String rootPath = fs.makeQualified(root).toUri().getPath();
                for (FileStatus f : walk(fs, root)) {
                    String rel = f.getPath().toUri().getPath().substring(rootPath.length());
                    String[] segments = rel.replaceFirst("^/", "").split("/");
                    boolean skip = false;
                    List<String> keys = new ArrayList<>();
                    for (int i = 0; i < segments.length; i++) {
                        if (hidden(segments[i])) {
                            skip = true;
                            break;
                        }
                        if (i < segments.length - 1) {
                            int eq = segments[i].indexOf('=');
                            if (eq > 0) {
                                keys.add(segments[i].substring(0, eq));
                            }
                        }
                    }
                    if (skip) {
                        continue;
                    }
                    listing.add(f, keys);
                }
            } catch (IOException e) {
                throw JobException.input("Input " + role + " " + p + ": cannot be listed (" + e.getMessage() + ") (rule: every input path must be readable)"
                        + (mustExist ? "" : "; nothing was committed"));
            }
        }
        return listing;
    }

    /** Reads and checks one table, with the default configuration. */
    public static InputTable open(SparkSession spark, String role, List<String> paths, String format) {
        return open(spark, role, paths, format, JobConfig.defaults());
    }

    /**
     * Reads and checks one table. Parquet and CSV are read by Spark; FITS and VOTable by {@link TableFileInput} on the
     * driver (each path a file, or a folder of files of the same columns, without {@code key=value} folders), with the
     * config's row limit and unit check.
     */
    public static InputTable open(SparkSession spark, String role, List<String> paths, String format, JobConfig config) {
        Configuration conf = spark.sparkContext().hadoopConfiguration();
        Listing listing = list(conf, role, paths, true);
        List<String> files = new ArrayList<>();
        for (FileState f : listing.files) {
            files.add(f.path);
        }
        Set<List<String>> partitionLayouts = listing.partitionLayouts;
        Map<List<String>, String> layoutExample = listing.layoutExample;
        if (files.isEmpty()) {
            throw JobException.input("Input " + role + " " + paths + ": no data files (rule: the input must not be empty)");
        }
        if (partitionLayouts.size() > 1) {
            List<List<String>> l = new ArrayList<>(partitionLayouts);
            throw JobException.input("Input " + role + ": partition folders differ between files: "
                    + layoutExample.get(l.get(0)) + " has " + l.get(0) + ", " + layoutExample.get(l.get(1)) + " has " + l.get(1)
                    + " (rule: every file sits under the same key=value folders)");
        }
        List<String> partitionColumns = partitionLayouts.iterator().next();

        Dataset<Row> data;
        long footerRows = -1;
        if (format.equals("parquet")) {
            footerRows = checkParquetFooters(spark, role, files);
            data = spark.read().parquet(paths.toArray(new String[0]));
        } else if (format.equals("csv")) {
            data = spark.read().option("header", "true").option("inferSchema", "true").option("mode", "FAILFAST")
                    .csv(paths.toArray(new String[0]));
        } else if (format.equals(TableFileInput.FITS) || format.equals(TableFileInput.VOTABLE)) {
            if (!partitionColumns.isEmpty()) {
                throw JobException.input("Input " + role + " " + layoutExample.get(partitionColumns) + ": sits under key=value "
                        + "folders " + partitionColumns + " (rule: a " + format + " input is one file, or a folder of files, "
                        + "without partition folders; convert a partitioned survey to Parquet)");
            }
            TableFileInput.Result r = TableFileInput.read(spark, role, files, format, config);
            data = r.data;
            footerRows = r.rows;
        } else {
            throw JobException.config("Invalid --input-format: " + format + " (" + FORMATS_RULE + ")");
        }
        return new InputTable(role, paths, format, data, partitionColumns, footerRows, listing.files);
    }

    /**
     * Lists the paths again, by the same rules as {@link #open}, and compares with what was listed then. Any data file
     * removed, added, or with another size or modification time stops the job naming the first such file (in path
     * order): the output would otherwise mix the rows of two versions of the input, or miss rows the run never saw.
     */
    public void recheck(Configuration conf) {
        Map<String, FileState> before = new TreeMap<>();
        for (FileState f : files) {
            before.put(f.path, f);
        }
        Map<String, FileState> now = new TreeMap<>();
        for (FileState f : list(conf, role, paths, false).files) {
            now.put(f.path, f);
        }
        Set<String> all = new TreeSet<>(before.keySet());
        all.addAll(now.keySet());
        String first = null;
        String what = null;
        int changed = 0;
        for (String path : all) {
            String d = difference(before.get(path), now.get(path));
            if (d != null) {
                changed++;
                if (first == null) {
                    first = path;
                    what = d;
                }
            }
        }
        if (first != null) {
            throw JobException.input("Input " + role + " file " + first + ": " + what + " since the run listed it"
                    + (changed > 1 ? " (and " + (changed - 1) + " more file" + (changed > 2 ? "s" : "") + " changed)" : "")
                    + " (rule: inputs must not change while a run reads them); nothing was committed");
        }
    }

    /** What changed between two listings of one file, or null if nothing did. */
    private static String difference(FileState was, FileState is) {
        if (is == null) {
            return "file removed";
        }
        if (was == null) {
            return "new file appeared";
        }
        List<String> d = new ArrayList<>();
        if (was.bytes != is.bytes) {
            d.add("size " + was.bytes + " -> " + is.bytes + " bytes");
        }
        if (was.modifiedMillis != is.modifiedMillis) {
            d.add("modified " + Instant.ofEpochMilli(was.modifiedMillis) + " -> " + Instant.ofEpochMilli(is.modifiedMillis));
        }
        return d.isEmpty() ? null : String.join(", ", d);
    }

    /** What one footer read returns: rows and schema, or the error. */
    private static final class Footer implements Serializable {
        private static final long serialVersionUID = 1L;
        final String path;
        final long rows;
        final String schema;
        final String error;

        Footer(String path, long rows, String schema, String error) {
            this.path = path;
            this.rows = rows;
            this.schema = schema;
            this.error = error;
        }
    }

    private static long checkParquetFooters(SparkSession spark, String role, List<String> files) {
        JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
        Map<String, String> confEntries = new HashMap<>();
        for (Map.Entry<String, String> e : spark.sparkContext().hadoopConfiguration()) {
            confEntries.put(e.getKey(), e.getValue());
        }
        int slices = Math.max(1, Math.min(files.size(), spark.sparkContext().defaultParallelism() * 4));
        JavaRDD<Footer> footers = jsc.parallelize(files, slices).mapPartitions(it -> {
            Configuration c = new Configuration(false);
            confEntries.forEach(c::set);
            List<Footer> out = new ArrayList<>();
            while (it.hasNext()) {
                String f = it.next();
                try (ParquetFileReader r = ParquetFileReader.open(HadoopInputFile.fromPath(new Path(f), c))) {
                    out.add(new Footer(f, r.getRecordCount(), r.getFooter().getFileMetaData().getSchema().toString(), null));
                } catch (Exception e) {
                    out.add(new Footer(f, 0, null, e.getClass().getSimpleName() + ": " + e.getMessage()));
                }
            }
            return out.iterator();
        });
        footers.cache();
        try {
            List<Footer> broken = footers.filter(f -> f.error != null).take(3);
            if (!broken.isEmpty()) {
                Footer b = broken.get(0);
                throw JobException.input("Input " + role + " file " + b.path + ": not a readable Parquet file (" + b.error
                        + ") (rule: every input file must be a complete Parquet file)");
            }
            List<Tuple2<String, Tuple2<String, Long>>> schemas = footers
                    .mapToPair(f -> new Tuple2<>(f.schema, new Tuple2<>(f.path, f.rows)))
                    .reduceByKey((a, b) -> new Tuple2<>(a._1().compareTo(b._1()) <= 0 ? a._1() : b._1(), a._2() + b._2()))
                    .collect();
            if (schemas.size() > 1) {
                Tuple2<String, Tuple2<String, Long>> a = schemas.get(0);
                Tuple2<String, Tuple2<String, Long>> b = schemas.get(1);
                throw JobException.input("Input " + role + ": schema differs between files " + a._2()._1() + " and "
                        + b._2()._1() + " (" + firstDifference(a._1(), b._1())
                        + ") (rule: every file of a table has the same columns and types)");
            }
            return schemas.get(0)._2()._2();
        } finally {
            footers.unpersist(false);
        }
    }

    /** The first line (column) in which two Parquet schema texts differ. */
    static String firstDifference(String a, String b) {
        String[] la = a.split("\n");
        String[] lb = b.split("\n");
        Set<String> sa = new LinkedHashSet<>();
        Set<String> sb = new LinkedHashSet<>();
        for (String s : la) {
            sa.add(s.trim());
        }
        for (String s : lb) {
            sb.add(s.trim());
        }
        for (String s : sa) {
            if (!sb.contains(s)) {
                return "column '" + s.replace(";", "") + "' only in the first";
            }
        }
        for (String s : sb) {
            if (!sa.contains(s)) {
                return "column '" + s.replace(";", "") + "' only in the second";
            }
        }
        return "column order differs";
    }
}
