package org.starderive.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.awt.image.BufferedImage;
import java.io.File;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import javax.imageio.ImageIO;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.starderive.physics.QualityFlag;
import org.starderive.testing.SharedSpark;

class QaReportTest {
    @TempDir
    Path tmp;

    @Test
    void reportsExactlyTheKnownFlagCountsAndValidImages() throws Exception {
        SparkSession spark = SharedSpark.spark();
        StructType s = new StructType().add("star_id", DataTypes.LongType).add("tile", DataTypes.IntegerType)
                .add("flags", DataTypes.LongType).add("teff_k", DataTypes.DoubleType).add("lum_lsun", DataTypes.DoubleType)
                .add("radius_rsun", DataTypes.DoubleType).add("dist_pc", DataTypes.DoubleType)
                .add("mass_msun", DataTypes.DoubleType).add("logg_cgs", DataTypes.DoubleType);
        // a catalogue built by hand with known flags: 30 rows with LOW_SNR, 12 of them also COLOUR_OUT_OF_RANGE,
        // 5 rows DUPLICATE_ID only, 53 clean rows; tiles 0..3
        long low = QualityFlag.PARALLAX_LOW_SNR.mask();
        long oor = QualityFlag.COLOUR_OUT_OF_RANGE.mask();
        long dup = QualityFlag.DUPLICATE_ID.mask();
        List<Row> rows = new ArrayList<>();
        for (int i = 0; i < 100; i++) {
            long f = i < 30 ? (i < 12 ? low | oor : low) : (i < 35 ? dup : 0);
            boolean teff = (f & oor) == 0;
            rows.add(RowFactory.create((long) i, i % 4, f, teff ? 4000.0 + 30 * i : null, teff ? Math.pow(10, -1 + 0.03 * i) : null,
                    1.0, 10.0 + i, i % 2 == 0 ? 1.0 : null, 4.4));
        }
        Path cat = tmp.resolve("catalog");
        spark.createDataFrame(rows, s).write().partitionBy("tile").parquet(cat.toString());
        Path out = tmp.resolve("report");
        QaReport.Result r = QaReport.run(spark, cat.toString(), out.toString());
        assertEquals(100, r.rows);
        assertEquals(30L, r.rowsPerFlag.get("PARALLAX_LOW_SNR"));
        assertEquals(12L, r.rowsPerFlag.get("COLOUR_OUT_OF_RANGE"));
        assertEquals(5L, r.rowsPerFlag.get("DUPLICATE_ID"));
        assertEquals(0L, r.rowsPerFlag.get("MASS_NOT_APPLICABLE"));
        assertEquals(88, r.hrStars);
        assertEquals(25L, r.rowsPerPartition.get("tile=0"));
        assertEquals(4, r.rowsPerPartition.size());
        JsonNode json = new ObjectMapper().readTree(out.resolve("report.json").toFile());
        assertEquals(12, json.get("rows_per_flag").get("COLOUR_OUT_OF_RANGE").asLong());
        long teffHist = 0;
        for (JsonNode c : json.get("histograms").get("teff")) {
            teffHist += c.asLong();
        }
        assertEquals(88, teffHist);
        String md = Files.readString(out.resolve("index.md"));
        assertTrue(md.contains("| 7 | `COLOUR_OUT_OF_RANGE` | 12 |"), md);
        assertTrue(Files.readString(out.resolve("index.html")).contains("<img alt=\"HR diagram\" src=\"hr_diagram.png\">"));
        BufferedImage hr = ImageIO.read(out.resolve("hr_diagram.png").toFile());
        assertEquals(Charts.HR_WIDTH, hr.getWidth());
        assertEquals(Charts.HR_HEIGHT, hr.getHeight());
        for (String h : List.of("teff", "luminosity", "radius", "distance", "mass", "logg")) {
            File f = out.resolve("hist_" + h + ".png").toFile();
            BufferedImage img = ImageIO.read(f);
            assertEquals(Charts.PLOT_WIDTH, img.getWidth(), h);
            assertEquals(Charts.PLOT_HEIGHT, img.getHeight(), h);
        }
    }
}
