package org.starderive.udf;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.Metadata;
import org.apache.spark.sql.types.MetadataBuilder;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.starderive.physics.Band;

/**
 * The derived columns, in output order, with unit, UCD and description. The order here is the field order of the
 * UDF's result struct ({@link StarDeriveUdf}).
 */
public final class DerivedSchema {
    private DerivedSchema() {}

    public static final String META_UNIT = "unit";
    public static final String META_UCD = "ucd";
    public static final String META_DESCRIPTION = "description";

    public static final List<DerivedColumn> COLUMNS;

    static {
        List<DerivedColumn> c = new ArrayList<>();
        c.add(d("parallax_corr_mas", "mas", "pos.parallax.trig", "parallax after zero-point correction"));
        c.add(d("dist_pc", "pc", "pos.distance", "distance: inverse parallax, or median of the prior-based posterior (see dist_method)"));
        c.add(d("dist_lo_pc", "pc", "pos.distance;stat.min", "16th percentile of the distance"));
        c.add(d("dist_hi_pc", "pc", "pos.distance;stat.max", "84th percentile of the distance"));
        c.add(new DerivedColumn("dist_method", "string", "", "meta.code", "inverse_parallax, edsd_median or edsd_mode; null when no distance"));
        c.add(d("dist_mod_mag", "mag", "phot.mag.distMod", "distance modulus 5 log10(d / 10 pc)"));
        c.add(d("dist_mod_err_mag", "mag", "stat.error;phot.mag.distMod", "1-sigma error of the distance modulus"));
        c.add(d("ebv_used_mag", "mag", "phot.color.excess", "E(B-V) used (per-star value or configured default)"));
        c.add(d("av_mag", "mag", "phys.absorption;em.opt.V", "V-band extinction R_V * E(B-V)"));
        for (Band b : Band.values()) {
            c.add(d(StarColumns.absMag(b), "mag", "phys.magAbs", "extinction-corrected absolute magnitude in " + b.label()));
            c.add(d(StarColumns.absMagErr(b), "mag", "stat.error;phys.magAbs", "1-sigma error of abs_mag_" + b.suffix()));
        }
        c.add(new DerivedColumn("lum_class", "string", "", "src.class.luminosity", "main_sequence or evolved (log g boundary of Ciardi et al. 2011; M_Ks for red stars); null when unknown"));
        c.add(new DerivedColumn("regime", "string", "", "meta.code.class", "calibration regime that gave teff_k (dominant one in a blend): m_dwarf, fgk_dwarf, giant or hot; null when no Teff"));
        c.add(d("teff_k", "K", "phys.temperature.effective", "effective temperature: inverse-variance mean of the in-range colour relations (flag TEFF_FROM_RADIUS: from the M_Ks radius)"));
        c.add(d("teff_err_k", "K", "stat.error;phys.temperature.effective", "1-sigma error of teff_k incl. relation scatter and zero point"));
        c.add(new DerivedColumn("teff_from", "string", "", "meta.ref", "ids of the colour-Teff relations combined into teff_k (all regimes of a blend); M15/radius: from the M_Ks radius"));
        c.add(d("teff_chi2", "", "stat.fit.chi2", "chi-square of the Teff estimates about their mean (two or more relations)"));
        c.add(d("bc_v", "mag", "phot.mag.bc", "bolometric correction in V (Flower 1996, Torres 2010 coefficients)"));
        c.add(d("bc_v_err", "mag", "stat.error;phot.mag.bc", "1-sigma error of bc_v from the Teff error"));
        c.add(d("mbol", "mag", "phys.magAbs.bol", "absolute bolometric magnitude on the IAU 2015 B2 scale"));
        c.add(d("mbol_err", "mag", "stat.error;phys.magAbs.bol", "1-sigma error of mbol"));
        c.add(d("lum_lsun", "solLum", "phys.luminosity", "luminosity in nominal solar luminosities (IAU 2015 B3)"));
        c.add(d("lum_err_lsun", "solLum", "stat.error;phys.luminosity", "1-sigma error of lum_lsun"));
        c.add(d("lum_w", "W", "phys.luminosity", "luminosity in watts"));
        c.add(d("radius_rsun", "solRad", "phys.size.radius", "radius: Stefan-Boltzmann law, or from M_Ks for M dwarfs (Mann et al. 2015); nominal solar radii"));
        c.add(d("radius_err_rsun", "solRad", "stat.error;phys.size.radius", "1-sigma error of radius_rsun"));
        c.add(d("mass_msun", "solMass", "phys.mass", "main-sequence mass: from L (Eker et al. 2018), or from M_Ks for M dwarfs (Mann et al. 2019); main sequence only"));
        c.add(d("mass_err_msun", "solMass", "stat.error;phys.mass", "1-sigma error of mass_msun incl. the mass relation's scatter"));
        c.add(d("density_kg_m3", "kg.m**-3", "phys.density", "mean density"));
        c.add(d("density_err_kg_m3", "kg.m**-3", "stat.error;phys.density", "1-sigma error of density_kg_m3"));
        c.add(d("density_rho_sun", "", "phys.density;arith.ratio", "mean density in units of the mean solar density"));
        c.add(d("logg_cgs", "log(cm.s**-2)", "phys.gravity", "log10 surface gravity in cm s-2"));
        c.add(d("logg_err_cgs", "log(cm.s**-2)", "stat.error;phys.gravity", "1-sigma error of logg_cgs"));
        c.add(d("ang_diam_mas", "mas", "phys.angSize", "angular diameter from bolometric flux and Teff (Stefan-Boltzmann)"));
        c.add(d("ang_diam_err_mas", "mas", "stat.error;phys.angSize", "1-sigma error of ang_diam_mas"));
        c.add(d("ang_diam_sbr_mas", "mas", "phys.angSize", "cross-check: (V-Ks) surface-brightness diameter (Kervella et al. 2004), main sequence only"));
        c.add(new DerivedColumn("flags", "bigint", "", "meta.code.qual", "quality flag bit mask (bit values in the README)"));
        c.add(new DerivedColumn("flag_names", "array<string>", "", "meta.code.qual", "names of the flags set"));
        COLUMNS = Collections.unmodifiableList(c);
    }

    /**
     * The core group: the main parameters with their errors and the flag mask — what most users of a derived
     * catalogue read (distance, extinction used, Teff, regime and class, M_bol, L, R, M, density, log g, angular
     * diameter). Everything else (absolute magnitudes per band, BC, distance modulus, cross-checks, flag names ...) is
     * in the full group.
     */
    public static final java.util.Set<String> CORE = java.util.Set.of(
            "dist_pc", "dist_lo_pc", "dist_hi_pc", "dist_method", "ebv_used_mag", "lum_class", "regime",
            "teff_k", "teff_err_k", "mbol", "mbol_err", "lum_lsun", "lum_err_lsun", "radius_rsun", "radius_err_rsun",
            "mass_msun", "mass_err_msun", "density_kg_m3", "density_err_kg_m3", "logg_cgs", "logg_err_cgs",
            "ang_diam_mas", "ang_diam_err_mas", "flags");

    /** Derived values stored in 64 bits even when the output stores floats in 32: a parallax keeps its precision. */
    public static final java.util.Set<String> KEEP_DOUBLE = java.util.Set.of("parallax_corr_mas");

    /**
     * Why a derived value can be stored as a 32-bit float (resolution 6·10⁻⁸ relative, 24-bit significand): its own
     * uncertainty is orders of magnitude larger. Null for the columns kept in 64 bits or not floating point.
     */
    public static String float32Reason(DerivedColumn c) {
        if (!c.sqlType().equals("double") || KEEP_DOUBLE.contains(c.name())) {
            return null;
        }
        switch (c.unit()) {
            case "mag":
                return "errors >= 0.001 mag (photometry, distance modulus); float32 resolves 2e-6 mag at 30 mag";
            case "K":
                return "errors >= 20 K (relation scatter); float32 resolves 0.004 K at 50,000 K";
            case "log(cm.s**-2)":
                return "errors >= 0.01 dex; float32 resolves 5e-7 dex";
            case "":
                return "a test statistic or a ratio; its own noise is far above 7 significant digits";
            default:
                return "relative error >= 1e-4 (sigma_parallax / parallax and beyond); float32 resolves 6e-8 relative";
        }
    }

    private static DerivedColumn d(String name, String unit, String ucd, String description) {
        return new DerivedColumn(name, "double", unit, ucd, description);
    }

    public static List<String> names() {
        List<String> n = new ArrayList<>();
        for (DerivedColumn c : COLUMNS) {
            n.add(c.name());
        }
        return n;
    }

    public static DerivedColumn byName(String name) {
        for (DerivedColumn c : COLUMNS) {
            if (c.name().equals(name)) {
                return c;
            }
        }
        return null;
    }

    static DataType sparkType(String sqlType) {
        switch (sqlType) {
            case "double": return DataTypes.DoubleType;
            case "string": return DataTypes.StringType;
            case "bigint": return DataTypes.LongType;
            case "array<string>": return DataTypes.createArrayType(DataTypes.StringType, false);
            default: throw new IllegalStateException("Unknown column type: " + sqlType);
        }
    }

    public static Metadata metadata(DerivedColumn c) {
        return new MetadataBuilder()
                .putString(META_UNIT, c.unit())
                .putString(META_UCD, c.ucd())
                .putString(META_DESCRIPTION, c.description())
                .build();
    }

    /**
     * Result struct of the UDF: every derived column with its metadata. All fields are declared nullable, because
     * Spark declares the fields of a UDF's struct result nullable when they are expanded; {@code flags} and
     * {@code flag_names} are never null in practice.
     */
    public static StructType struct() {
        List<StructField> fields = new ArrayList<>();
        for (DerivedColumn c : COLUMNS) {
            fields.add(DataTypes.createStructField(c.name(), sparkType(c.sqlType()), true, metadata(c)));
        }
        return DataTypes.createStructType(fields);
    }
}
