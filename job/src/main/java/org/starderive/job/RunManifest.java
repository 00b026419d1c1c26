package org.starderive.job;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.starderive.physics.BolometricCorrectionFlower1996;
import org.starderive.physics.CardelliClaytonMathis1989;
import org.starderive.physics.Codata2018;
import org.starderive.physics.Constant;
import org.starderive.physics.DerivedConstants;
import org.starderive.physics.GaiaBandExtinction;
import org.starderive.physics.GaiaToJohnsonRiello2021;
import org.starderive.physics.Iau2012;
import org.starderive.physics.Iau2015;
import org.starderive.physics.LuminosityClass;
import org.starderive.physics.MassLuminosityEker2018;
import org.starderive.physics.ParallaxDistance;
import org.starderive.physics.SurfaceBrightnessKervella2004;
import org.starderive.physics.TeffRelation;
import org.starderive.physics.TeffRelations;

/** The JSON manifest written beside the output: from it alone a reader can tell how the catalogue was made. */
public final class RunManifest {
    private RunManifest() {}

    public static final String FILE_NAME = "_starderive_manifest.json";

    public static String version() {
        String v = RunManifest.class.getPackage().getImplementationVersion();
        return v == null ? "development build" : v;
    }

    static ObjectNode methods(ObjectMapper m, JobConfig config) {
        ObjectNode methods = m.createObjectNode();
        ArrayNode rel = methods.putArray("colour_teff_relations");
        long mask = config.settings().relationMask();
        List<TeffRelation> all = TeffRelations.all();
        for (int i = 0; i < all.size(); i++) {
            if ((mask & (1L << i)) != 0) {
                TeffRelation r = all.get(i);
                ObjectNode n = rel.addObject();
                n.put("id", r.id());
                n.put("colour", r.colourName());
                n.put("regime", r.regime().label());
                n.put("colour_min", r.colourMin());
                n.put("colour_max", r.colourMax());
                n.put("feh_min", r.fehMin());
                n.put("feh_max", r.fehMax());
                n.put("scatter_k", r.scatterK());
                if (r.teffMaxK() < Double.POSITIVE_INFINITY) {
                    n.put("teff_min_k", r.teffMinK());
                    n.put("teff_max_k", r.teffMaxK());
                }
                n.put("citation", r.citation());
            }
        }
        methods.put("distance", ParallaxDistance.CITATION);
        methods.put("extinction", CardelliClaytonMathis1989.CITATION);
        methods.put("extinction_gaia_bands", GaiaBandExtinction.CITATION);
        methods.put("bolometric_correction", BolometricCorrectionFlower1996.CITATION);
        methods.put("g_to_v", GaiaToJohnsonRiello2021.CITATION);
        methods.put("mass_luminosity", MassLuminosityEker2018.CITATION);
        methods.put("m_dwarf_radius", org.starderive.physics.RadiusMann2015.CITATION);
        methods.put("m_dwarf_mass", org.starderive.physics.MassMann2019.CITATION);
        methods.put("regime_blends", "K7-M0: " + org.starderive.physics.Regime.M_BLEND_LO_K + "-"
                + org.starderive.physics.Regime.M_BLEND_HI_K + " K (Mann Teff); late A-early F: "
                + org.starderive.physics.Regime.HOT_BLEND_LO_K + "-" + org.starderive.physics.Regime.HOT_BLEND_HI_K
                + " K (Flower Teff); linear weights, our choice");
        methods.put("luminosity_class", LuminosityClass.CLASSING_CITATION);
        methods.put("surface_brightness", SurfaceBrightnessKervella2004.CITATION);
        methods.put("uncertainties", "first order (analytic), source by source over one table of error sources "
                + "(bands, E(B-V), [Fe/H], log g prior, relation scatter, zero points, G to V, distance, radius and mass "
                + "relations)" + (config.monteCarlo() ? "; plus Monte Carlo percentiles over "
                + config.draws() + " draws per star (" + org.starderive.physics.MonteCarloDeriver.class.getSimpleName() + ")" : ""));
        ArrayNode constants = methods.putArray("constants");
        for (Constant c : new Constant[] {Iau2015.R_SUN, Iau2015.L_SUN, Iau2015.TEFF_SUN, Iau2015.GM_SUN, Iau2015.L0,
                Iau2012.AU, Codata2018.SIGMA_SB, Codata2018.G, DerivedConstants.PARSEC, DerivedConstants.M_SUN,
                DerivedConstants.MBOL_SUN, BolometricCorrectionFlower1996.MBOL_SUN_CONSTANT}) {
            ObjectNode n = constants.addObject();
            n.put("name", c.name());
            n.put("value", c.value());
            n.put("uncertainty", c.uncertainty());
            n.put("unit", c.unit());
            n.put("reference", c.reference());
        }
        return methods;
    }

    /**
     * The {@code file_list} of one input table: every data file with its size and modification time as listed when
     * the table was opened (and found unchanged before the commit), sorted by path so that the manifest does not
     * depend on the listing order of the file system.
     */
    static List<Map<String, Object>> fileList(InputTable t) {
        List<Map<String, Object>> out = new ArrayList<>();
        List<InputTable.FileState> files = new ArrayList<>(t.files());
        files.sort(Comparator.comparing(f -> f.path));
        for (InputTable.FileState f : files) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("path", f.path);
            m.put("bytes", f.bytes);
            m.put("modified_utc", Instant.ofEpochMilli(f.modifiedMillis).toString());
            out.add(m);
        }
        return out;
    }

    /** Renders the manifest. */
    public static String render(DeriveJob.Request req, JobConfig config, Map<String, Object> facts, Map<String, Long> perFlag,
                                Map<String, Double> seconds) {
        ObjectMapper m = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);
        ObjectNode root = m.createObjectNode();
        root.put("tool", "starderive");
        root.put("version", version());
        facts.forEach((k, v) -> root.set(k, m.valueToTree(v)));
        ObjectNode cmd = root.putObject("request");
        cmd.set("input", m.valueToTree(req.input));
        cmd.set("photometry", m.valueToTree(req.photometry));
        cmd.put("input_format", req.inputFormat);
        cmd.put("output_format", req.outputFormat);
        cmd.put("write_mode", req.writeMode.label());
        cmd.put("output", req.output);
        root.set("config", config.resolvedForManifest(m));
        root.set("methods", methods(m, config));
        root.set("rows_per_flag", m.valueToTree(perFlag));
        root.set("seconds", m.valueToTree(seconds));
        try {
            return m.writeValueAsString(root) + "\n";
        } catch (Exception e) {
            throw new IllegalStateException("manifest", e);
        }
    }
}
