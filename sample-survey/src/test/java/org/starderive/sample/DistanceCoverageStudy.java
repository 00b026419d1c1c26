package org.starderive.sample;

import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;
import org.starderive.physics.QualityFlag;
import org.starderive.physics.StarDeriver;
import org.starderive.physics.StarInput;
import org.starderive.physics.StarResult;

/**
 * The measurement behind the default distance minimum (docs/uncertainties.md): stars of the synthetic Kestrel survey
 * through the physics core with every star given a distance ({@code distance_snr_min} 0), and the share whose 16–84 %
 * distance interval holds the true distance, in bins of the observed parallax significance, for all stars and split
 * by whether Teff is trusted (no colour outside calibration, no disagreement, no bad input) — FGK stars and giants
 * versus mostly M dwarfs. Single-threaded, no Spark. Run with {@code scripts/study-distance-coverage [STARS] [L_KPC...]}.
 */
public final class DistanceCoverageStudy {
    private DistanceCoverageStudy() {}

    public static void main(String[] args) {
        int n = args.length > 0 ? Integer.parseInt(args[0]) : 200_000;
        double[] lengths = args.length > 1 ? new double[args.length - 1] : new double[] {DeriveSettings.PRIOR_LENGTH_KPC_DEFAULT};
        for (int i = 1; i < args.length; i++) {
            lengths[i - 1] = Double.parseDouble(args[i]);
        }
        double[] edges = {Double.NEGATIVE_INFINITY, 1, 2, 3, 4, 5, 10, Double.POSITIVE_INFINITY};
        long untrusted = QualityFlag.COLOUR_OUT_OF_RANGE.mask() | QualityFlag.TEFF_EXTRAPOLATED.mask()
                | QualityFlag.TEFF_COLOURS_DISAGREE.mask() | QualityFlag.INPUT_INVALID.mask() | QualityFlag.MAGNITUDE_SENTINEL.mask();
        System.out.printf("Kestrel survey, %,d stars (seed 21), parallax zero point -0.02 mas corrected, distance_snr_min 0%n%n", n);
        System.out.println("| prior L kpc | observed ϖ/σ | method | stars | coverage, all | Teff trusted: stars | coverage | Teff not trusted: stars | coverage |");
        System.out.println("|---|---|---|---|---|---|---|---|---|");
        for (double lengthKpc : lengths) {
            StarDeriver deriver = new StarDeriver(DeriveSettings.builder().parallaxZeroPointMas(ForwardModel.PARALLAX_ZERO_POINT_MAS)
                    .priorLengthKpc(lengthKpc).distanceSnrMin(0).build());
            ForwardModel model = new ForwardModel(21);
            ForwardModel.Star s = new ForwardModel.Star();
            StarInput in = new StarInput();
            StarResult r = new StarResult();
            int nb = edges.length - 1;
            long[][] count = new long[nb][2];
            long[][] covered = new long[nb][2];
            for (long id = 0; id < n; id++) {
                model.generate(id, s);
                in.clear();
                if (!Double.isNaN(s.parallaxMas)) {
                    in.parallax(s.parallaxMas, s.parallaxErrMas);
                }
                for (Band b : Band.values()) {
                    if (!s.missing[b.ordinal()]) {
                        in.magnitude(b, s.mag[b.ordinal()], s.magErr[b.ordinal()]);
                    }
                }
                in.ebv(s.ebvObs, s.ebvErr);
                if (!Double.isNaN(s.fehObs)) {
                    in.feh(s.fehObs, s.fehErr);
                }
                deriver.derive(in, r);
                if (Double.isNaN(r.distLoPc) || Double.isNaN(r.distHiPc)) {
                    continue;
                }
                double snr = r.parallaxCorrMas / s.parallaxErrMas;
                int k = (r.flags & untrusted) == 0 && !Double.isNaN(r.teffK) ? 0 : 1;
                for (int b = 0; b < nb; b++) {
                    if (snr >= edges[b] && snr < edges[b + 1]) {
                        count[b][k]++;
                        if (s.distPc >= r.distLoPc && s.distPc <= r.distHiPc) {
                            covered[b][k]++;
                        }
                    }
                }
            }
            for (int b = 0; b < nb; b++) {
                long all = count[b][0] + count[b][1];
                String bin = edges[b] == Double.NEGATIVE_INFINITY ? "< 1" : edges[b + 1] == Double.POSITIVE_INFINITY
                        ? "≥ " + (int) edges[b] : (int) edges[b] + "–" + (int) edges[b + 1];
                System.out.printf("| %.2f | %s | %s | %,d | %.3f | %,d | %.3f | %,d | %.3f |%n", lengthKpc, bin,
                        edges[b] >= 5 ? "inverse" : "posterior", all, (covered[b][0] + covered[b][1]) / (double) all,
                        count[b][0], covered[b][0] / (double) count[b][0], count[b][1], covered[b][1] / (double) count[b][1]);
            }
        }
    }
}
