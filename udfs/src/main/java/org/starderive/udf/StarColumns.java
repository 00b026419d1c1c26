package org.starderive.udf;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import org.starderive.physics.Band;

/**
 * Canonical column names of the input schema (what a survey's columns are mapped to) and of the derived
 * columns. Units are in every name.
 */
public final class StarColumns {
    private StarColumns() {}

    public static final String STAR_ID = "star_id";
    public static final String PARALLAX_MAS = "parallax_mas";
    public static final String PARALLAX_ERR_MAS = "parallax_err_mas";
    public static final String EBV = "ebv";
    public static final String EBV_ERR = "ebv_err";
    public static final String FEH = "feh";
    public static final String FEH_ERR = "feh_err";

    public static String mag(Band b) { return "mag_" + b.suffix(); }

    public static String magErr(Band b) { return "mag_" + b.suffix() + "_err"; }

    public static String absMag(Band b) { return "abs_mag_" + b.suffix(); }

    public static String absMagErr(Band b) { return "abs_mag_" + b.suffix() + "_err"; }

    /** Field order of the UDF's input struct. */
    public static final List<String> INPUT_FIELDS;

    static {
        List<String> l = new ArrayList<>();
        l.add(PARALLAX_MAS);
        l.add(PARALLAX_ERR_MAS);
        for (Band b : Band.values()) {
            l.add(mag(b));
            l.add(magErr(b));
        }
        l.add(EBV);
        l.add(EBV_ERR);
        l.add(FEH);
        l.add(FEH_ERR);
        INPUT_FIELDS = Collections.unmodifiableList(l);
    }
}
