package org.starderive.physics;

import java.util.Objects;

/**
 * A physical or astronomical constant together with its unit, its standard uncertainty and the
 * document that defines it. A constant without a reference cannot be made: {@link #of} rejects a
 * blank reference, and {@link #derived} records which primary constants a value was computed from.
 *
 * <p>Instances are immutable. The value is read in hot loops through plain {@code static final double}
 * twins in the holder classes ({@link Iau2015}, {@link Iau2012}, {@link Codata2018},
 * {@link DerivedConstants}); this object is what documentation, manifests and tests print.
 */
public final class Constant {
    private final String name;
    private final double value;
    private final double uncertainty;
    private final String unit;
    private final String reference;

    private Constant(String name, double value, double uncertainty, String unit, String reference) {
        this.name = name;
        this.value = value;
        this.uncertainty = uncertainty;
        this.unit = unit;
        this.reference = reference;
    }

    /**
     * A primary constant.
     *
     * @param uncertainty standard uncertainty in the same unit; 0 for an exact or nominal value
     */
    public static Constant of(String name, double value, double uncertainty, String unit, String reference) {
        Objects.requireNonNull(name, "name");
        Objects.requireNonNull(unit, "unit");
        if (reference == null || reference.isBlank()) {
            throw new IllegalArgumentException("Invalid constant " + name + ": no reference (every constant names its source)");
        }
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException("Invalid constant " + name + ": " + value + " (must be finite)");
        }
        if (!(uncertainty >= 0.0)) {
            throw new IllegalArgumentException("Invalid constant " + name + " uncertainty: " + uncertainty + " (must be >= 0)");
        }
        return new Constant(name, value, uncertainty, unit, reference);
    }

    /** A constant computed from others; the reference names them. */
    public static Constant derived(String name, double value, double uncertainty, String unit, String derivedFrom) {
        return of(name, value, uncertainty, unit, "derived from " + derivedFrom);
    }

    public String name() { return name; }
    public double value() { return value; }
    public double uncertainty() { return uncertainty; }
    public String unit() { return unit; }
    public String reference() { return reference; }

    @Override
    public String toString() {
        return name + " = " + value + (uncertainty > 0 ? " ± " + uncertainty : "") + " " + unit + " (" + reference + ")";
    }
}
