package org.starderive.job;

import org.apache.spark.sql.DataFrameWriter;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.types.DoubleType;
import org.apache.spark.sql.types.FloatType;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * Parquet writer settings shared by the derive job and the benchmark's I/O floor, so that both write the same bytes:
 * the codec, and plain (not dictionary) encoding for every double and float column. Measured doubles and derived doubles are
 * nearly all distinct; Parquet would build a dictionary per column chunk and then abandon it — profiled at ~22 % of
 * a derive run for the derived columns and a further ~8 % for the passed-through ones. Integer, string and array
 * columns (ids, partition keys, flags, labels) keep Parquet's default, where dictionaries pay. Derived values stored
 * as 32-bit floats are as distinct as the doubles they come from.
 */
public final class ParquetWriteOptions {
    private ParquetWriteOptions() {}

    public static DataFrameWriter<Row> apply(DataFrameWriter<Row> w, StructType schema, String compression) {
        DataFrameWriter<Row> out = w.option("compression", compression.equals("none") ? "uncompressed" : compression);
        for (StructField f : schema.fields()) {
            if (f.dataType() instanceof DoubleType || f.dataType() instanceof FloatType) {
                out = out.option("parquet.enable.dictionary#" + f.name(), "false");
            }
        }
        return out;
    }
}
