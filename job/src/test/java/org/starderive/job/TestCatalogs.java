package org.starderive.job;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.List;
import java.util.TreeMap;
import java.util.stream.Stream;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * Small hand-made test catalogues (invented values, test data only): solar-type stars at a range of distances with
 * a few hostile rows, in the canonical schema, partitioned by a sky tile.
 */
final class TestCatalogs {
    private TestCatalogs() {}

    static StructType schema() {
        return new StructType()
                .add("star_id", DataTypes.LongType, false)
                .add("tile", DataTypes.IntegerType, false)
                .add("parallax_mas", DataTypes.DoubleType, true)
                .add("parallax_err_mas", DataTypes.DoubleType, true)
                .add("mag_b", DataTypes.DoubleType, true)
                .add("mag_b_err", DataTypes.DoubleType, true)
                .add("mag_v", DataTypes.DoubleType, true)
                .add("mag_v_err", DataTypes.DoubleType, true)
                .add("mag_j", DataTypes.DoubleType, true)
                .add("mag_j_err", DataTypes.DoubleType, true)
                .add("mag_ks", DataTypes.DoubleType, true)
                .add("mag_ks_err", DataTypes.DoubleType, true)
                .add("ebv", DataTypes.DoubleType, true)
                .add("feh", DataTypes.DoubleType, true);
    }

    /** The same columns with a star id of the given type that may be null (the missing-id tests). */
    static StructType schema(DataType idType) {
        StructField[] f = schema().fields().clone();
        f[0] = new StructField(f[0].name(), idType, true, f[0].metadata());
        return new StructType(f);
    }

    /** n stars over 3 tiles; every 7th row carries a defect. */
    static List<Row> rows(int n, long idOffset) {
        List<Row> rows = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            double distPc = 10 + 25 * i;
            double plx = 1000 / distPc;
            double mu = 5 * Math.log10(distPc / 10);
            double v = 4.81 + mu + 0.02 * (i % 5);
            Double vv = v;
            Double plxv = plx;
            Double bv = v + 0.653;
            switch (i % 7) {
                case 3: vv = 99.99; break;          // sentinel
                case 5: plxv = null; break;         // no parallax
                case 6: bv = Double.NaN; break;     // NaN
                default: break;
            }
            rows.add(RowFactory.create(idOffset + i, i % 3, plxv, 0.02 + 0.001 * i, bv, 0.01, vv, 0.01,
                    v - 1.544 + 0.362, 0.02, v - 1.544, 0.02, i % 4 == 0 ? null : 0.01 * (i % 4), i % 2 == 0 ? 0.0 : -0.3));
        }
        return rows;
    }

    static Dataset<Row> frame(SparkSession spark, List<Row> rows) {
        return spark.createDataFrame(rows, schema());
    }

    /**
     * The same rows with other star ids, of the given type and nullable: {@code ids.get(i)} replaces the id of
     * {@code rows.get(i)} (null, empty or blank ids for the missing-id tests).
     */
    static Dataset<Row> frameWithIds(SparkSession spark, List<Row> rows, List<?> ids, DataType idType) {
        List<Row> out = new ArrayList<>();
        for (int i = 0; i < rows.size(); i++) {
            Object[] v = new Object[rows.get(i).length()];
            for (int k = 0; k < v.length; k++) {
                v[k] = rows.get(i).get(k);
            }
            v[0] = ids.get(i);
            out.add(RowFactory.create(v));
        }
        return spark.createDataFrame(out, schema(idType));
    }

    static void writeParquet(SparkSession spark, List<Row> rows, Path dir) {
        frame(spark, rows).repartition(2).write().partitionBy("tile").parquet(dir.toString());
    }

    /**
     * The units a survey file would carry on the canonical columns (parallaxes in mas, magnitudes and E(B-V) in mag,
     * as VOUnits writes them); the rest have none.
     */
    static java.util.Map<String, String> canonicalUnits() {
        java.util.Map<String, String> m = new java.util.HashMap<>();
        for (StructField f : schema().fields()) {
            if (f.name().startsWith("parallax")) {
                m.put(f.name(), "mas");
            } else if (f.name().startsWith("mag_") || f.name().equals("ebv")) {
                m.put(f.name(), "mag");
            }
        }
        return m;
    }

    /**
     * Writes rows as one FITS binary table or one TABLEDATA VOTable, by STIL's writers (the library the job reads them
     * with; the export test reads STIL's files with astropy). Units from {@code units} (column name to unit string);
     * null values as each format writes them (FITS: NaN for floating point, TNULL for integers; VOTable: empty cells).
     */
    static void writeTableFile(List<Row> rows, StructType schema, Path file, String format, java.util.Map<String, String> units) {
        StructField[] fs = schema.fields();
        uk.ac.starlink.table.ColumnInfo[] infos = new uk.ac.starlink.table.ColumnInfo[fs.length];
        for (int i = 0; i < fs.length; i++) {
            DataType t = fs[i].dataType();
            Class<?> c = t.equals(DataTypes.LongType) ? Long.class : t.equals(DataTypes.IntegerType) ? Integer.class
                    : t.equals(DataTypes.DoubleType) ? Double.class : t.equals(DataTypes.FloatType) ? Float.class : String.class;
            infos[i] = new uk.ac.starlink.table.ColumnInfo(fs[i].name(), c, null);
            if (units.containsKey(fs[i].name())) {
                infos[i].setUnitString(units.get(fs[i].name()));
            }
        }
        uk.ac.starlink.table.RowListStarTable t = new uk.ac.starlink.table.RowListStarTable(infos);
        for (Row r : rows) {
            Object[] v = new Object[fs.length];
            for (int i = 0; i < fs.length; i++) {
                v[i] = r.get(i);
            }
            t.addRow(v);
        }
        try (java.io.OutputStream os = Files.newOutputStream(file)) {
            uk.ac.starlink.table.StarTableWriter w = format.equals("fits") ? new uk.ac.starlink.fits.FitsTableWriter()
                    : new uk.ac.starlink.votable.VOTableWriter(uk.ac.starlink.votable.DataFormat.TABLEDATA, true,
                    uk.ac.starlink.votable.VOTableVersion.V14);
            w.writeStarTable(t, os);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** SHA-256 of every file under dir, by relative path: equal maps mean byte-identical trees. */
    static TreeMap<String, String> treeHash(Path dir) {
        TreeMap<String, String> m = new TreeMap<>();
        if (!Files.exists(dir)) {
            return m;
        }
        try (Stream<Path> s = Files.walk(dir)) {
            for (Path p : (Iterable<Path>) s.filter(Files::isRegularFile)::iterator) {
                MessageDigest md = MessageDigest.getInstance("SHA-256");
                m.put(dir.relativize(p).toString(), HexFormat.of().formatHex(md.digest(Files.readAllBytes(p))));
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        } catch (Exception e) {
            throw new IllegalStateException(e);
        }
        return m;
    }

    /**
     * What a run may leave beside output {@code out} in {@code dir} besides its lease: staging folders, set-aside
     * outputs and manifests, commit journals. Empty after every run that ended, committed or not.
     */
    static List<String> commitLeftovers(Path dir, String out) {
        try (Stream<Path> s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString())
                    .filter(n -> n.startsWith(out + ".staging-") || n.startsWith("." + out + ".previous-")
                            || n.startsWith("." + out + ".commit-") || n.startsWith("." + out + ".manifest-"))
                    .sorted().collect(java.util.stream.Collectors.toList());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
