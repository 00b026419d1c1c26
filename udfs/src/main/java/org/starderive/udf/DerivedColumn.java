package org.starderive.udf;

/**
 * One derived column: name, unit, IVOA UCD (UCD1+ controlled vocabulary) and a one-line description. These go into
 * the Parquet schema as Spark column metadata and into the data dictionary written beside the output.
 */
public final class DerivedColumn {
    private final String name;
    private final String sqlType;
    private final String unit;
    private final String ucd;
    private final String description;

    DerivedColumn(String name, String sqlType, String unit, String ucd, String description) {
        this.name = name;
        this.sqlType = sqlType;
        this.unit = unit;
        this.ucd = ucd;
        this.description = description;
    }

    public String name() { return name; }
    /** "double", "string", "bigint" or "array<string>". */
    public String sqlType() { return sqlType; }
    /** Unit in the IVOA VOUnits spelling; empty for dimensionless or text. */
    public String unit() { return unit; }
    public String ucd() { return ucd; }
    public String description() { return description; }
}
