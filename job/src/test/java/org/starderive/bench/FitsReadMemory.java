package org.starderive.bench;

import java.io.BufferedOutputStream;
import java.io.File;
import java.io.FileOutputStream;
import java.io.OutputStream;
import java.lang.reflect.Method;
import java.util.ArrayList;
import java.util.List;
import org.apache.hadoop.conf.Configuration;
import org.apache.spark.sql.Row;
import org.starderive.job.JobConfig;
import uk.ac.starlink.fits.FitsTableWriter;
import uk.ac.starlink.table.ColumnInfo;
import uk.ac.starlink.table.RandomStarTable;
import uk.ac.starlink.table.StarTable;

/**
 * Benchmark, not a test: the driver heap held and the time of reading an N-row FITS table (star_id long, tile int,
 * 12 doubles; written by STIL on first use) into Spark rows as {@code derive --input-format fits} does — the reader's
 * private step, called by reflection — the figure behind the default of {@code input.fits_votable_max_rows}.
 * Usage: {@code FitsReadMemory N FILE}; the command line is in the README (Input, FITS and VOTable inputs).
 */
public final class FitsReadMemory {
    private FitsReadMemory() {}

    public static void main(String[] args) throws Exception {
        int n = Integer.parseInt(args[0]);
        File f = new File(args[1]);
        if (!f.exists()) {
            ColumnInfo[] ci = new ColumnInfo[14];
            ci[0] = new ColumnInfo("star_id", Long.class, null);
            ci[1] = new ColumnInfo("tile", Integer.class, null);
            for (int i = 2; i < ci.length; i++) {
                ci[i] = new ColumnInfo("c" + i, Double.class, null);
            }
            StarTable t = new RandomStarTable() {
                @Override
                public int getColumnCount() { return ci.length; }

                @Override
                public long getRowCount() { return n; }

                @Override
                public ColumnInfo getColumnInfo(int i) { return ci[i]; }

                @Override
                public Object getCell(long r, int c) {
                    return c == 0 ? (Object) r : c == 1 ? (Object) (int) (r % 3) : (Object) (r * 0.001 + c);
                }
            };
            try (OutputStream os = new BufferedOutputStream(new FileOutputStream(f))) {
                new FitsTableWriter().writeStarTable(t, os);
            }
        }
        Method readOne = Class.forName("org.starderive.job.TableFileInput").getDeclaredMethod("readOne", Configuration.class,
                String.class, String.class, String.class, JobConfig.class, long.class, List.class);
        readOne.setAccessible(true);
        JobConfig cfg = JobConfig.parse("input:\n  fits_votable_max_rows: 100000000\n", "bench.yaml");
        Runtime rt = Runtime.getRuntime();
        System.gc();
        Thread.sleep(500);
        System.gc();
        long before = rt.totalMemory() - rt.freeMemory();
        long t0 = System.nanoTime();
        List<Row> rows = new ArrayList<>();
        readOne.invoke(null, new Configuration(), "table", f.getAbsolutePath(), "fits", cfg, 100_000_000L, rows);
        double s = (System.nanoTime() - t0) / 1e9;
        System.gc();
        Thread.sleep(500);
        System.gc();
        long after = rt.totalMemory() - rt.freeMemory();
        System.out.printf("rows %d, file %d bytes, read %.1f s, heap held %.0f MB (%.0f bytes/row)%n", rows.size(), f.length(),
                s, (after - before) / 1e6, (after - before) / (double) rows.size());
    }
}
