package org.starderive.bench;

import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;
import org.starderive.physics.Band;
import org.starderive.physics.DeriveSettings;
import org.starderive.physics.StarDeriver;
import org.starderive.physics.StarInput;
import org.starderive.physics.StarResult;

/**
 * ns per star of the physics core's entry point on one thread, over 4096 varied stars. The stars are synthetic
 * benchmark data, generated here with a fixed seed from rough colour–magnitude sequences (not a catalogue, not a
 * calibration: only the mix of paths through the chain matters). Mixes ({@code mix}):
 * <ul>
 *   <li>{@code fgk} (the default, and the stars of every earlier measurement): FGK dwarfs and giants at
 *       10 pc – 5 kpc, six bands (B, V, I_C, J, H, Ks), parallax S/N from 0.5 to 1000, some E(B−V);</li>
 *   <li>{@code main_sequence}: a survey-like mix — about 55 % M dwarfs (V, I_C, BP, RP, G, J, H, Ks; absolute Ks
 *       5–9.5 at 5–200 pc), 35 % stars as in {@code fgk}, 10 % A/B stars with B and V only (B−V −0.25…0.30 at
 *       50 pc – 3 kpc).</li>
 * </ul>
 * Modes:
 * <ul>
 *   <li>{@code analytic}: the default chain (inverse parallax where ϖ/σ ≥ 5, posterior percentiles below);</li>
 *   <li>{@code inverse_only}: inverse parallax for every star (no posterior at all);</li>
 *   <li>{@code edsd_percentiles}: the prior-based posterior with its 16/50/84th percentiles for every star;</li>
 *   <li>{@code edsd_mode}: the posterior mode only (Laplace width), no percentiles.</li>
 * </ul>
 * Run with {@code scripts/bench-kernel}; not part of the test suite.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 2)
@Measurement(iterations = 5, time = 2)
@Fork(value = 1, jvmArgs = {"-Xmx1g"})
public class StarDeriverBench {
    private static final int N = 4096;

    @Param({"analytic", "inverse_only", "edsd_percentiles", "edsd_mode"})
    public String mode;

    @Param({"fgk", "main_sequence"})
    public String mix;

    private StarDeriver deriver;
    private final StarInput[] stars = new StarInput[N];
    private final StarResult out = new StarResult();
    private int i;

    @Setup(Level.Trial)
    public void setup() {
        DeriveSettings.Builder b = DeriveSettings.builder();
        switch (mode) {
            case "inverse_only": b.distanceMethod(DeriveSettings.DistanceMethod.INVERSE); break;
            case "edsd_percentiles": b.distanceMethod(DeriveSettings.DistanceMethod.EDSD); break;
            case "edsd_mode": b.distanceMethod(DeriveSettings.DistanceMethod.EDSD).posteriorPercentiles(false); break;
            default: break;
        }
        deriver = new StarDeriver(b.build());
        System.arraycopy(stars(mix), 0, stars, 0, N);
    }

    /** The benchmark's 4096 {@code fgk} stars (fixed seed), shared with {@link MonteCarloBench}. */
    static StarInput[] stars() {
        return stars("fgk");
    }

    /** The 4096 stars of mix {@code mix} ({@code fgk} or {@code main_sequence}; fixed seeds). */
    static StarInput[] stars(String mix) {
        StarInput[] stars = new StarInput[N];
        switch (mix) {
            case "fgk": {
                SplittableRandom r = new SplittableRandom(42);
                for (int k = 0; k < N; k++) {
                    stars[k] = fgkStar(r);
                }
                return stars;
            }
            case "main_sequence": {
                SplittableRandom r = new SplittableRandom(4242);
                for (int k = 0; k < N; k++) {
                    int u = r.nextInt(100);
                    stars[k] = u < 55 ? mDwarf(r) : u < 90 ? fgkStar(r) : hotStar(r);
                }
                return stars;
            }
            default:
                throw new IllegalArgumentException("mix must be fgk or main_sequence, not " + mix);
        }
    }

    /** An FGK dwarf (4 in 5) or giant at 10 pc – 5 kpc with B, V, I_C, J, H and Ks. */
    private static StarInput fgkStar(SplittableRandom r) {
        boolean giant = r.nextInt(5) == 0;
        double distPc = Math.exp(Math.log(10) + r.nextDouble() * Math.log(500));
        double mu = 5 * Math.log10(distPc / 10);
        double ebv = 0.1 * r.nextDouble() * distPc / 1000;
        double bv = giant ? 0.9 + 0.4 * r.nextDouble() : 0.45 + 0.6 * r.nextDouble();
        double mv = giant ? 0.8 + r.nextDouble() : 2.5 + 5 * (bv - 0.45);
        double v = mv + mu + 3.1 * ebv;
        double vks = 2.2 * bv + 0.1 + 3.1 * ebv * 0.9;
        double plx = 1000 / distPc;
        StarInput in = new StarInput()
                .parallax(plx + 0.02 * r.nextGaussian(), 0.02 + 0.001 * distPc / 10)
                .magnitude(Band.V, v, 0.01)
                .magnitude(Band.B, v + bv + ebv, 0.01)
                .magnitude(Band.IC, v - 1.1 * bv + 0.02 - 1.3 * ebv, 0.01)
                .magnitude(Band.KS, v - vks, 0.02)
                .magnitude(Band.J, v - vks + 0.1 + 0.3 * bv, 0.02)
                .magnitude(Band.H, v - vks + 0.05, 0.02)
                .ebv(ebv, 0.01);
        if (r.nextBoolean()) {
            in.feh(-0.5 + r.nextDouble(), 0.1);
        }
        return in;
    }

    /**
     * An M dwarf of absolute Ks 5–9.5 at 5–200 pc with V, I_C, BP, RP, G, J, H and Ks; colours rise linearly with
     * M_Ks from about M0 to M6 (V−Ks 3.8–7.0, V−I_C 1.9–4.2, BP−RP 1.85–4.05), plus 0.03 mag of scatter.
     */
    private static StarInput mDwarf(SplittableRandom r) {
        double mks = 5 + 4.5 * r.nextDouble();
        double u = (mks - 5) / 4.5;
        double distPc = Math.exp(Math.log(5) + r.nextDouble() * Math.log(40));
        double ks = mks + 5 * Math.log10(distPc / 10);
        double ebv = 0.05 * r.nextDouble() * distPc / 200;
        double v = ks + 3.8 + 3.2 * u + 0.03 * r.nextGaussian();
        double g = v - 0.5 - 1.0 * u;
        double rp = g - 0.95 - 0.45 * u;
        double plx = 1000 / distPc;
        StarInput in = new StarInput()
                .parallax(plx + 0.02 * r.nextGaussian(), 0.02 + 0.001 * distPc / 10)
                .magnitude(Band.V, v + 3.1 * ebv, 0.02)
                .magnitude(Band.IC, v - 1.9 - 2.3 * u + 0.03 * r.nextGaussian() + 1.5 * ebv, 0.02)
                .magnitude(Band.G, g + 2.7 * ebv, 0.003)
                .magnitude(Band.RP, rp + 2.0 * ebv, 0.004)
                .magnitude(Band.BP, rp + 1.85 + 2.2 * u + 3.3 * ebv, 0.005)
                .magnitude(Band.J, ks + 0.84 + 0.07 * u + 0.72 * ebv, 0.02)
                .magnitude(Band.H, ks + 0.22 + 0.13 * u + 0.46 * ebv, 0.02)
                .magnitude(Band.KS, ks + 0.31 * ebv, 0.02)
                .ebv(ebv, 0.01);
        if (r.nextBoolean()) {
            in.feh(-0.5 + r.nextDouble(), 0.1);
        }
        return in;
    }

    /** An A or B star (B−V −0.25…0.30, M_V ≈ 0.6 + 6.5 (B−V)) at 50 pc – 3 kpc with B and V only. */
    private static StarInput hotStar(SplittableRandom r) {
        double bv = -0.25 + 0.55 * r.nextDouble();
        double mv = 0.6 + 6.5 * bv + 0.3 * r.nextGaussian();
        double distPc = Math.exp(Math.log(50) + r.nextDouble() * Math.log(60));
        double ebv = 0.1 * r.nextDouble() * distPc / 1000;
        double v = mv + 5 * Math.log10(distPc / 10) + 3.1 * ebv;
        double plx = 1000 / distPc;
        return new StarInput()
                .parallax(plx + 0.02 * r.nextGaussian(), 0.02 + 0.001 * distPc / 10)
                .magnitude(Band.V, v, 0.01)
                .magnitude(Band.B, v + bv + ebv, 0.01)
                .ebv(ebv, 0.01);
    }

    @Benchmark
    public double perStar() {
        StarInput in = stars[i];
        i = (i + 1) & (N - 1);
        return deriver.derive(in, out).radiusRsun;
    }
}
