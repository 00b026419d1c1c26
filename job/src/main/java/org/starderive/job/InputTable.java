package org.starderive.job;

import java.io.IOException;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.LocatedFileStatus;
import org.apache.hadoop.fs.Path;
import org.apache.hadoop.fs.RemoteIterator;
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
    private final int fileCount;

    private InputTable(String role, List<String> paths, String format, Dataset<Row> data, List<String> partitionColumns,
                       long rowsFromFooters, int fileCount) {
        this.role = role;
        this.paths = paths;
        this.format = format;
        this.data = data;
        this.partitionColumns = partitionColumns;
        this.rowsFromFooters = rowsFromFooters;
        this.fileCount = fileCount;
    }

    public String role() { return role; }
    public List<String> paths() { return paths; }
    public String format() { return format; }
    public Dataset<Row> data() { return data; }
    public List<String> partitionColumns() { return partitionColumns; }
    /** Row count from the Parquet footers (−1 for CSV). */
    public long rowsFromFooters() { return rowsFromFooters; }
    public int fileCount() { return fileCount; }

    private static boolean hidden(String name) {
        return name.startsWith("_") || name.startsWith(".");
    }

    /** Reads and checks one table. */
    public static InputTable open(SparkSession spark, String role, List<String> paths, String format) {
        Configuration conf = spark.sparkContext().hadoopConfiguration();
        List<String> files = new ArrayList<>();
        Set<List<String>> partitionLayouts = new LinkedHashSet<>();
        Map<List<String>, String> layoutExample = new HashMap<>();
        for (String p : paths) {
            Path root = new Path(p);
            try {
                FileSystem fs = root.getFileSystem(conf);
                if (!fs.exists(root)) {
                    throw JobException.input("Input " + role + " " + p + ": path does not exist (rule: every input path must exist)");
                }
                FileStatus st = fs.getFileStatus(root);
                if (st.isFile()) {
                    files.add(st.getPath().toString());
                    partitionLayouts.add(List.of());
                    layoutExample.putIfAbsent(List.of(), st.getPath().toString());
                    continue;
                }
                String rootPath = fs.makeQualified(root).toUri().getPath();
                RemoteIterator<LocatedFileStatus> it = fs.listFiles(root, true);
                while (it.hasNext()) {
                    LocatedFileStatus f = it.next();
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
                    files.add(f.getPath().toString());
                    partitionLayouts.add(keys);
                    layoutExample.putIfAbsent(keys, f.getPath().toString());
                }
            } catch (IOException e) {
                throw JobException.input("Input " + role + " " + p + ": cannot be listed (" + e.getMessage() + ") (rule: every input path must be readable)");
            }
        }
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
        } else {
            throw JobException.config("Invalid --input-format: " + format + " (must be parquet or csv)");
        }
        return new InputTable(role, paths, format, data, partitionColumns, footerRows, files.size());
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
