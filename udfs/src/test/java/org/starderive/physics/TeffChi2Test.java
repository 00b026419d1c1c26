package org.starderive.physics;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The colour chi-square with correlated errors: colours that share V (and the common [Fe/H]) have correlated Teff
 * errors. Stars made exactly as the error model says — each colour on its Casagrande et al. 2010 relation at a Teff
 * offset by that relation's published scatter, V with a large error shared by all colours, small errors elsewhere,
 * a measured [Fe/H] off by its error — must be flagged TEFF_COLOURS_DISAGREE at the configured false-alarm rate
 * (p = 0.01): the chi-square then follows the chi-square distribution (common practice for correlated residuals).
 */
class TeffChi2Test {
    // no J: with J and Ks the job would also use J-Ks, whose colour here would follow from the other draws
    private static final String[] IDS = {"C10/B-V", "C10/V-Ic", "C10/V-H", "C10/V-Ks"};
    private static final Band[] RED = {Band.B, Band.IC, Band.H, Band.KS};
    private static final double SIGMA_V = 0.04;
    private static final double SIGMA_OTHER = 0.004;
    private static final double SIGMA_FEH = 0.1;

    /** The colour a relation assigns to Teff, by bisection inside its range (its Teff falls with colour). */
    private static double colour(TeffRelation r, double teffK, double feh) {
        double a = r.colourMin();
        double b = r.colourMax();
        for (int i = 0; i < 60; i++) {
            double m = 0.5 * (a + b);
            if (r.teff(m, feh, 4.4) > teffK) {
                a = m;
            } else {
                b = m;
            }
        }
        return 0.5 * (a + b);
    }

    @Test
    void correlatedColoursAreFlaggedAtTheConfiguredFalseAlarmRate() {
        DeriveSettings settings = DeriveSettings.defaults();
        StarDeriver d = new StarDeriver(settings);
        StarResult out = new StarResult();
        SplittableRandom rnd = new SplittableRandom(17);
        int n = 20_000;
        int flagged = 0;
        int allColours = 0;
        for (int k = 0; k < n; k++) {
            double t = 5000 + 1000 * rnd.nextDouble();
            double fehTrue = -0.3 + 0.5 * rnd.nextDouble();
            // a main-sequence luminosity (L ~ Teff^6, our approximation) so the star is classed a dwarf
            double mbol = 4.73 - 2.5 * 6 * Math.log10(t / 5772);
            double mv = mbol - BolometricCorrectionFlower1996.bcV(t);
            double vTrue = mv + 5; // at 100 pc
            double v = vTrue + SIGMA_V * rnd.nextGaussian();
            StarInput in = new StarInput().parallax(10, 0.02).magnitude(Band.V, v, SIGMA_V).ebv(0, 0)
                    .feh(fehTrue + SIGMA_FEH * rnd.nextGaussian(), SIGMA_FEH);
            for (int i = 0; i < IDS.length; i++) {
                TeffRelation r = TeffRelations.byId(IDS[i]);
                double x = colour(r, t + r.scatterK(t) * rnd.nextGaussian(), fehTrue);
                double redOrBlue = RED[i] == Band.B ? vTrue + x : vTrue - x;
                in.magnitude(RED[i], redOrBlue + SIGMA_OTHER * rnd.nextGaussian(), SIGMA_OTHER);
            }
            d.derive(in, out);
            if (Long.bitCount(out.teffRelations) != IDS.length) {
                continue; // a colour pushed outside its range by the draws: another number of degrees of freedom
            }
            allColours++;
            flagged += out.has(QualityFlag.TEFF_COLOURS_DISAGREE) ? 1 : 0;
        }
        assertTrue(allColours > 0.9 * n, "stars with all four colours: " + allColours);
        double p = settings.teffDisagreeP();
        double rate = (double) flagged / allColours;
        assertEquals(p, rate, 4 * Math.sqrt(p * (1 - p) / allColours), "false-alarm rate " + rate + " over " + allColours);
    }
}
