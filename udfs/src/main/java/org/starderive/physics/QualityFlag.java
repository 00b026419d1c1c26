package org.starderive.physics;

import java.util.ArrayList;
import java.util.List;

/**
 * One named bit per condition under which a number must not be trusted, or under which it rests on an
 * assumption. The bit values are part of the output format: never renumber, only append.
 */
public enum QualityFlag {
    /**
     * ϖ/σ_ϖ below the configured threshold (default 5): inverse parallax not used; by default no distance at all
     * ({@link #DISTANCE_WITHHELD}), the prior-based posterior only where {@code distance_snr_min} allows it.
     */
    PARALLAX_LOW_SNR(0, "parallax signal-to-noise below the threshold; inverse parallax not used (no distance unless distance_snr_min allows the posterior)"),
    /** Parallax (after zero-point correction) is zero or negative. */
    PARALLAX_NONPOSITIVE(1, "parallax is zero or negative; no distance unless distance_snr_min <= 0 allows the posterior"),
    /** No parallax in the row. */
    PARALLAX_MISSING(2, "no parallax; no distance and no absolute quantities"),
    /** |ϖ| larger than any star's (wrong unit?). */
    PARALLAX_IMPLAUSIBLE(3, "parallax larger than any star's (wrong unit?); not used"),
    /** The bands needed for Teff (a colour) or for the luminosity (V, or G with BP and RP) are missing. */
    PHOTOMETRY_MISSING(4, "no colour of any usable relation, or no V (nor G, BP, RP) for the luminosity"),
    /** A magnitude outside the plausible range (99, 99.99, −99 style sentinels): treated as missing. */
    MAGNITUDE_SENTINEL(5, "a magnitude is a sentinel value (outside the plausible range) and was ignored"),
    /** A value is NaN/infinite, or an error is not positive, or a value is out of its physical domain. */
    INPUT_INVALID(6, "an input value or error is NaN, infinite, non-positive where it must be positive, or unphysical; it was ignored"),
    /**
     * The star has colours, but none inside the calibrated range of any relation of its regime: no Teff (unless
     * extrapolation is allowed). Colours outside one relation but inside another regime's are not flagged.
     */
    COLOUR_OUT_OF_RANGE(7, "no colour lies inside the calibrated range of a relation of the star's regime: no Teff"),
    /** Teff extrapolated outside a relation's calibrated range (only when extrapolation is switched on). */
    TEFF_EXTRAPOLATED(8, "Teff extrapolated beyond a relation's calibrated range"),
    /**
     * The in-range Teff estimates disagree beyond their errors (chi-square test), or a colour beyond a calibrated edge
     * says the star is hotter/cooler than the in-range estimates allow.
     */
    TEFF_COLOURS_DISAGREE(9, "Teff from different colours disagree beyond their errors, or an out-of-range colour contradicts it"),
    /** L rests on a bolometric correction outside its calibration or known to be poor (dwarfs cooler than 4000 K). */
    BC_UNRELIABLE(10, "L rests on a bolometric correction outside its calibration or poor (dwarfs below 4000 K without an M-dwarf radius)"),
    /** No E(B−V) for this row: the configured default (0 unless set) was used. */
    EXTINCTION_ASSUMED(11, "no per-star extinction; the configured default was used"),
    /** No [Fe/H] for this row: the configured default was used. */
    METALLICITY_ASSUMED(12, "no per-star [Fe/H]; the configured default was used"),
    /** No mass: the star is not classed main sequence, or lies outside the mass-luminosity relation. */
    MASS_NOT_APPLICABLE(13, "no mass: not a main-sequence star or outside the mass relations; no density, no log g"),
    /** Luminosity class could not be determined (no distance): main-sequence relations assumed. */
    LUM_CLASS_ASSUMED(14, "luminosity class unknown (no usable distance): main-sequence colour relations assumed"),
    /** Stefan–Boltzmann and surface-brightness angular diameters disagree beyond their errors. */
    DIAMETER_DISAGREE(15, "Stefan-Boltzmann and surface-brightness angular diameters disagree"),
    /** V was computed from G and BP−RP (no V in the row). */
    V_FROM_G(16, "V computed from G and BP-RP (no V measured)"),
    /**
     * ϖ/σ_ϖ below the configured minimum for any distance (default 5): no distance is given, nor anything that needs
     * one. Below it a distance rests on the prior, and the posterior intervals under one geometric prior were
     * measured not to cover the truth as often as they claim (docs/uncertainties.md).
     */
    DISTANCE_WITHHELD(17, "parallax too insignificant for a distance (below distance_snr_min); no distance, L, R, mass or log g"),
    /**
     * A hot-regime star (Flower 1996 Teff from B−V) whose Teff error exceeds {@code hot_teff_err_frac_max} of its Teff:
     * for B stars the colour is so flat in Teff that dereddening dominates.
     */
    HOT_TEFF_UNCERTAIN(18, "hot star whose Teff error exceeds hot_teff_err_frac_max of Teff (dereddening dominates)"),
    /** The star id occurs more than once in the input (set by the job, not by the physics core). */
    DUPLICATE_ID(20, "the star id occurs more than once in the input; every copy is kept"),
    /**
     * The star id is null, or (a text id) empty or white space only (set by the job, not by the physics core): the
     * row is kept, alone — never paired in the two-table join, never {@link #DUPLICATE_ID} — but nothing ties it to
     * its source row. Bit 19 is unused and stays so.
     */
    ID_MISSING(21, "the star id is null, empty or blank: the row is kept but cannot be joined back to its source"),
    /**
     * An M dwarf without a colour of any Mann et al. 2015 relation (no V, no BP) whose Teff comes from its radius: R
     * from M_Ks ({@link RadiusMann2015}) and the Teff at which the Teff–radius relation ({@link TeffRadiusMann2015})
     * gives it. Teff, R and L then all rest on M_Ks; the Teff error carries the relation's 13.4 % scatter in R.
     */
    TEFF_FROM_RADIUS(22, "M dwarf without a Mann colour: Teff from its M_Ks radius through the Teff-radius relation; Teff, R and L rest on M_Ks alone");

    private static final QualityFlag[] VALUES = values();

    private final int bit;
    private final String description;

    QualityFlag(int bit, String description) {
        this.bit = bit;
        this.description = description;
    }

    public int bit() { return bit; }

    public long mask() { return 1L << bit; }

    public String description() { return description; }

    public boolean isSet(long flags) { return (flags & mask()) != 0; }

    /** Names of the flags set in {@code flags}, in bit order. */
    public static List<String> names(long flags) {
        List<String> names = new ArrayList<>();
        for (QualityFlag f : VALUES) {
            if ((flags & f.mask()) != 0) {
                names.add(f.name());
            }
        }
        return names;
    }

    /** Names of the flags as an array (for Spark array columns). */
    public static String[] nameArray(long flags) {
        return names(flags).toArray(new String[0]);
    }
}
