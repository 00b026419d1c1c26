package org.starderive.job;

import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.QualityFlag;
import org.starderive.udf.DerivedColumn;
import org.starderive.udf.DerivedSchema;

/** The Markdown data dictionary written beside every output: every column, its unit, UCD and meaning; every flag. */
public final class DataDictionary {
    private DataDictionary() {}

    public static final String FILE_NAME = "_data_dictionary.md";

    public static String render(StructType outputSchema, String idColumn) {
        StringBuilder sb = new StringBuilder();
        sb.append("# Data dictionary\n\n");
        sb.append("Derived stellar parameters. Units follow IVOA VOUnits; UCDs the IVOA UCD1+ vocabulary. ")
          .append("A null value means the quantity could not be derived; `flags` says why.\n\n");
        sb.append("| column | type | unit | UCD | description |\n|---|---|---|---|---|\n");
        StringBuilder why = new StringBuilder();
        for (StructField f : outputSchema.fields()) {
            DerivedColumn d = DerivedSchema.byName(f.name());
            if (d == null) {
                d = org.starderive.udf.StarMonteCarloUdf.COLUMNS.stream().filter(c -> c.name().equals(f.name())).findFirst().orElse(null);
            }
            if (d != null) {
                String type = f.dataType().simpleString();
                sb.append("| `").append(d.name()).append("` | ").append(type).append(" | ").append(d.unit())
                  .append(" | ").append(d.ucd()).append(" | ").append(d.description()).append(" |\n");
                if (type.equals("float")) {
                    why.append("| `").append(d.name()).append("` | ").append(DerivedSchema.float32Reason(d)).append(" |\n");
                }
            } else {
                sb.append("| `").append(f.name()).append("` | ").append(f.dataType().simpleString()).append(" | | ")
                  .append(f.name().equals(idColumn) ? "meta.id;meta.main" : "")
                  .append(" | input column, passed through unchanged |\n");
            }
        }
        if (why.length() > 0) {
            sb.append("\n## Why 32-bit floats\n\nEach `float` column's own uncertainty is orders of magnitude above the ")
              .append("resolution of a 32-bit float (24-bit significand, 6e-8 relative); ids, parallaxes and input columns ")
              .append("keep their type.\n\n| column | reason |\n|---|---|\n").append(why);
        }
        sb.append("\n## Quality flags (`flags` bit mask)\n\n| bit | value | name | meaning |\n|---|---|---|---|\n");
        for (QualityFlag q : QualityFlag.values()) {
            sb.append("| ").append(q.bit()).append(" | ").append(q.mask()).append(" | `").append(q.name()).append("` | ")
              .append(q.description()).append(" |\n");
        }
        return sb.toString();
    }
}
