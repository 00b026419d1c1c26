package org.starderive.udf;

import org.apache.spark.sql.Row;
import org.starderive.physics.Band;
import org.starderive.physics.StarInput;

/**
 * Fills a reused {@link StarInput} from a Row in {@link StarColumns#INPUT_FIELDS} order; SQL NULL means absent. Used by
 * the UDF and by the job's {@code check}, which runs the physics core on a sample in the driver.
 */
public final class StarInputReader {
    private final StarInput in = new StarInput();

    public StarInput read(Row row) {
        in.clear();
        if (row == null) {
            return in;
        }
        int i = 0;
        if (!row.isNullAt(i)) { in.hasParallax = true; in.parallaxMas = row.getDouble(i); }
        i++;
        if (!row.isNullAt(i)) { in.hasParallaxErr = true; in.parallaxErrMas = row.getDouble(i); }
        i++;
        for (int b = 0; b < Band.COUNT; b++) {
            if (!row.isNullAt(i)) { in.hasMag[b] = true; in.mag[b] = row.getDouble(i); }
            i++;
            if (!row.isNullAt(i)) { in.hasMagErr[b] = true; in.magErr[b] = row.getDouble(i); }
            i++;
        }
        if (!row.isNullAt(i)) { in.hasEbv = true; in.ebv = row.getDouble(i); }
        i++;
        if (!row.isNullAt(i)) { in.hasEbvErr = true; in.ebvErr = row.getDouble(i); }
        i++;
        if (!row.isNullAt(i)) { in.hasFeh = true; in.feh = row.getDouble(i); }
        i++;
        if (!row.isNullAt(i)) { in.hasFehErr = true; in.fehErr = row.getDouble(i); }
        return in;
    }
}
