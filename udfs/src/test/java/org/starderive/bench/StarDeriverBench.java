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
 * ns per star of the physics core's entry point on one thread, over 4096 varied stars (FGK dwarfs and giants at
 * 10 pc – 5 kpc, six bands, parallax S/N from 0.5 to 1000, some E(B−V)). Modes:
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
        System.arraycopy(stars(), 0, stars, 0, N);
    }

    /** The benchmark's 4096 stars (fixed seed), shared with {@link MonteCarloBench}. */
    static StarInput[] stars() {
        StarInput[] stars = new StarInput[N];
        SplittableRandom r = new SplittableRandom(42);
        for (int k = 0; k < N; k++) {
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
            stars[k] = in;
        }
        return stars;
    }

    @Benchmark
    public double perStar() {
        StarInput in = stars[i];
        i = (i + 1) & (N - 1);
        return deriver.derive(in, out).radiusRsun;
    }
}
