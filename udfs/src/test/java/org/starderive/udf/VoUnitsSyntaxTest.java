package org.starderive.udf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.Test;

/**
 * Every unit string the job writes (column metadata, data dictionary, exports) is a VOUnits string.
 *
 * <p>Checked against: IVOA Recommendation "Units in the VO", version 1.0 (2014-05-23), section 2 and the normative
 * grammar of its appendix C.4 — products with '.', one division '/', powers only with '**' (an integer, or a
 * parenthesised number), the functions log, ln, exp and sqrt applied to a parenthesised expression, SI prefixes on
 * the units that take them, and the recognised unit symbols of its tables (base and derived SI units, the astronomy
 * symbols). No Java parser of VOUnits is served by the project's Maven mirror, so this is a small checker written
 * from the Recommendation's rules (not from any program's code); the astropy test of the exports
 * ({@code ExportReadByAstropyTest}) is the independent cross-check: astropy's own VOUnits parser reads every unit we
 * write, except the argument-of-a-function form, which astropy 5.2 does not parse (its documented limitation).
 */
class VoUnitsSyntaxTest {

    /** Recognised units that take SI prefixes (VOUnits 1.0 section 2.3-2.4: SI base and derived units, and more). */
    static final Set<String> PREFIXABLE = Set.of("m", "g", "s", "A", "K", "mol", "cd", "rad", "sr", "Hz", "N", "Pa", "J",
            "W", "C", "V", "Ohm", "S", "F", "Wb", "T", "H", "lm", "lx", "eV", "Jy", "pc", "yr", "a", "erg", "arcsec",
            "mag", "B", "bit", "byte");
    /** Recognised units that take no prefix here (VOUnits 1.0 section 2.4 and the astronomy symbols of 2.7). */
    static final Set<String> PLAIN = Set.of("deg", "arcmin", "mas", "h", "min", "d", "AU", "au", "solMass", "solLum",
            "solRad", "Angstrom", "angstrom", "barn", "beam", "ph", "photon", "pix", "pixel", "ct", "count", "adu", "D",
            "G", "Ry", "lyr", "chan", "voxel", "R", "bin");
    static final List<String> PREFIXES = List.of("da", "y", "z", "a", "f", "p", "n", "u", "m", "c", "d", "h", "k", "M",
            "G", "T", "P", "E", "Z", "Y");
    static final Set<String> FUNCTIONS = Set.of("log", "ln", "exp", "sqrt");

    /** Recursive-descent check of one unit string; returns the problems found (empty: valid). */
    static final class Checker {
        private final String s;
        private int i;
        private final List<String> problems = new ArrayList<>();

        Checker(String s) { this.s = s; }

        List<String> check() {
            if (s.isEmpty()) {
                problems.add("empty string (a dimensionless quantity has no unit attribute instead)");
                return problems;
            }
            completeExpression();
            if (problems.isEmpty() && i != s.length()) {
                problems.add("unexpected '" + s.substring(i) + "' at " + i);
            }
            return problems;
        }

        private boolean peek(String t) { return s.startsWith(t, i); }

        private void expect(String t) {
            if (!peek(t)) {
                throw new IllegalArgumentException("expected '" + t + "' at " + i);
            }
            i += t.length();
        }

        private void completeExpression() {
            try {
                productOfUnits();
                if (peek("/")) {
                    i++;
                    unitExpression();
                }
            } catch (IllegalArgumentException e) {
                problems.add(e.getMessage());
            }
        }

        private void productOfUnits() {
            unitExpression();
            while (peek(".")) {
                i++;
                unitExpression();
            }
        }

        /** What follows an opening parenthesis, of a group or a function: a product, an optional division, ")". */
        private void insideParentheses() {
            productOfUnits();
            if (peek("/")) {
                i++;
                unitExpression();
            }
            expect(")");
        }

        private void unitExpression() {
            if (peek("(")) {
                i++;
                insideParentheses();
                return;
            }
            int start = i;
            while (i < s.length() && Character.isLetter(s.charAt(i))) {
                i++;
            }
            String sym = s.substring(start, i);
            if (sym.isEmpty()) {
                throw new IllegalArgumentException("expected a unit symbol at " + start);
            }
            if (FUNCTIONS.contains(sym) && peek("(")) {
                i++;
                insideParentheses();
                return;
            }
            if (!recognised(sym)) {
                throw new IllegalArgumentException("'" + sym + "' is not a recognised unit (with or without an SI prefix)");
            }
            if (peek("**")) {
                i += 2;
                numericPower();
            } else if (i < s.length() && (Character.isDigit(s.charAt(i)) || s.charAt(i) == '-' || s.charAt(i) == '+'
                    || s.charAt(i) == '^')) {
                throw new IllegalArgumentException("power of '" + sym + "' at " + i + " not written with '**' "
                        + "(VOUnits has no implicit or '^' powers)");
            }
        }

        private void numericPower() {
            if (peek("(")) {
                i++;
                signedNumber(true);
                if (peek("/")) {
                    i++;
                    digits();
                }
                expect(")");
            } else {
                signedNumber(false);
            }
        }

        private void signedNumber(boolean allowFraction) {
            if (peek("-") || peek("+")) {
                i++;
            }
            digits();
            if (allowFraction && peek(".")) {
                i++;
                digits();
            }
        }

        private void digits() {
            int start = i;
            while (i < s.length() && Character.isDigit(s.charAt(i))) {
                i++;
            }
            if (i == start) {
                throw new IllegalArgumentException("expected digits at " + start);
            }
        }
    }

    static boolean recognised(String sym) {
        if (PREFIXABLE.contains(sym) || PLAIN.contains(sym)) {
            return true;
        }
        for (String p : PREFIXES) {
            if (sym.startsWith(p) && PREFIXABLE.contains(sym.substring(p.length()))) {
                return true;
            }
        }
        return false;
    }

    static List<String> problems(String unit) {
        return new Checker(unit).check();
    }

    @Test
    void everyDerivedAndMonteCarloUnitIsVoUnits() {
        List<DerivedColumn> all = new ArrayList<>(DerivedSchema.COLUMNS);
        all.addAll(StarMonteCarloUdf.COLUMNS);
        int checked = 0;
        for (DerivedColumn c : all) {
            if (c.unit().isEmpty()) {
                // text, codes, flag masks and ratios: no unit attribute at all
                continue;
            }
            assertEquals(List.of(), problems(c.unit()), c.name() + " unit '" + c.unit() + "'");
            checked++;
        }
        assertTrue(checked >= 60, "units checked: " + checked);
    }

    /** The classes holding the {@code Constant}s the run manifest lists (its {@code methods.constants}). */
    static final List<Class<?>> CONSTANT_HOLDERS = List.of(org.starderive.physics.Iau2015.class,
            org.starderive.physics.Iau2012.class, org.starderive.physics.Codata2018.class,
            org.starderive.physics.DerivedConstants.class, org.starderive.physics.BolometricCorrectionFlower1996.class);

    /** Every public static Constant of the holder classes (the manifest's constants are among them). */
    static List<org.starderive.physics.Constant> allConstants() throws IllegalAccessException {
        List<org.starderive.physics.Constant> out = new ArrayList<>();
        for (Class<?> h : CONSTANT_HOLDERS) {
            for (java.lang.reflect.Field f : h.getFields()) {
                if (f.getType() == org.starderive.physics.Constant.class && java.lang.reflect.Modifier.isStatic(f.getModifiers())) {
                    out.add((org.starderive.physics.Constant) f.get(null));
                }
            }
        }
        return out;
    }

    @Test
    void everyConstantUnitIsVoUnits() throws IllegalAccessException {
        // the run manifest prints these units beside the constants' values
        List<org.starderive.physics.Constant> all = allConstants();
        for (org.starderive.physics.Constant c : all) {
            assertEquals(List.of(), problems(c.unit()), c.name() + " unit '" + c.unit() + "'");
        }
        // the constants of the manifest, each with a unit: radius, luminosity, Teff, GM, L0, au, sigma, G, pc, mass,
        // two solar bolometric magnitudes, plus S_sun, f_0, V_sun, density and gravity
        assertTrue(all.size() >= 12, "constants checked: " + all.size());
        assertEquals(List.of(), problems(org.starderive.physics.Codata2018.G.unit()));
        assertEquals("m**3.kg**-1.s**-2", org.starderive.physics.Codata2018.G.unit(), "CODATA 2018: G in m^3 kg^-1 s^-2");
    }

    @Test
    void checkerRejectsWhatVoUnitsDoesNot() {
        // the two spellings this project used before: FITS-style implicit powers are not VOUnits
        assertFalse(problems("kg.m-3").isEmpty());
        assertFalse(problems("log(cm.s-2)").isEmpty());
        assertFalse(problems("km/s^2").isEmpty());
        assertFalse(problems("kg m**-3").isEmpty(), "a space is no product operator");
        assertFalse(problems("Lsun").isEmpty(), "the solar luminosity is solLum");
        assertFalse(problems("dex").isEmpty(), "dex is not a VOUnits symbol");
        assertFalse(problems("log(cm.s**-2").isEmpty(), "unbalanced parenthesis");
        // the manifest's constants before they were VOUnits: FITS-style products and powers
        assertFalse(problems("W m-2 K-4").isEmpty());
        assertFalse(problems("m3 kg-1 s-2").isEmpty());
        assertFalse(problems("m3.s**-2").isEmpty(), "m3 is no power in VOUnits");
        // and accepts the forms the Recommendation gives
        assertEquals(List.of(), problems("km.s**-1"));
        assertEquals(List.of(), problems("m**(-2)"));
        assertEquals(List.of(), problems("W/m**2"));
        assertEquals(List.of(), problems("log(cm.s**-2)"));
    }
}
